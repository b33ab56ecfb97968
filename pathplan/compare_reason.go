package pathplan

import (
	"fmt"
	"math"
	"strings"
)

// closeCall is the share of the slower time below which the two strategies
// are reported as about equal.
const closeCall = 0.03

// decide sets the recommendation of fc and its reason in words. The
// faster R1 time decides; the reason names the facts of the feature that
// favour the winner (common practice: deep or open features favour
// full-depth roughing; shallow pockets with narrow zones can favour
// layered, because the machine spends its time braking and accelerating).
func decide(fc *FeatureComparison, models []string) {
	l, b := fc.Layered, fc.Banded
	win, lose := b, l
	if l.CycleS < b.CycleS {
		win, lose = l, b
	}
	fc.Recommended = win.Strategy
	fc.SavingS = lose.CycleS - win.CycleS
	if lose.CycleS > 0 {
		fc.SavingShare = fc.SavingS / lose.CycleS
	}

	var sb strings.Builder
	if fc.SavingShare < closeCall {
		fmt.Fprintf(&sb, "%s is faster, but only by %s (%s); either will do, so weigh tool life: %s works %s of the flute, %s %s.",
			win.Strategy, FormatSeconds(fc.SavingS), percent(fc.SavingShare),
			StrategyBanded, percent(b.FluteUsage), StrategyLayered, percent(l.FluteUsage))
		fc.Reason = sb.String()
		return
	}
	fmt.Fprintf(&sb, "%s is faster by %s (%s less than %s's %s)",
		win.Strategy, FormatSeconds(fc.SavingS), percent(fc.SavingShare), lose.Strategy, FormatSeconds(lose.CycleS))

	var pro, con []string
	depth := fmt.Sprintf("%s mm deep (%.1f × D)", trim(fc.Depth), fc.DepthPerD)
	openness := "closed, so banded must helix in"
	if fc.Open {
		openness = "open, so banded starts in the air and peels inward"
	}
	channels := fmt.Sprintf("%s of the tool-centre area lies in narrow channels, where banded's trochoidal loops return through air", percent(fc.ChannelShare))
	bays := fmt.Sprintf("most of the area is wide bays (%s in narrow channels)", percent(fc.ChannelShare))
	accel := fmt.Sprintf("banded loses %s of its motion time to accelerating and braking, layered %s",
		percent(b.AccelShare), percent(l.AccelShare))
	levels := fmt.Sprintf("banded cuts %s where layered needs %s", plural(b.Levels, "level"), plural(l.Levels, "level"))

	slim := ""
	if d := fc.DepthPerD; d > 0 && fc.Width > 0 {
		how := "short passes across it that stop and turn at both walls"
		if fc.ChannelShare >= 0.5 {
			how = "narrow trochoidal loops"
		}
		slim = fmt.Sprintf("it is only %s mm wide (%.1f × D), so banded must work it in %s", trim(fc.Width), fc.Width/(fc.Depth/d), how)
	}
	narrowWidth := slim != "" && fc.Width < 2.5*fc.Depth/fc.DepthPerD
	deep := fc.DepthPerD >= 1
	narrow := fc.ChannelShare >= 0.25
	accelHeavy := b.AccelShare > l.AccelShare+0.05
	if win.Strategy == StrategyBanded {
		if deep {
			pro = append(pro, "the feature is "+depth+": "+levels)
		} else {
			con = append(con, "it is only "+depth)
		}
		if fc.Open {
			pro = append(pro, "it is "+openness)
		} else {
			con = append(con, "it is "+openness)
		}
		if narrow {
			con = append(con, channels)
		} else {
			pro = append(pro, bays)
		}
		if narrowWidth {
			con = append(con, slim)
		}
		if !accelHeavy {
			pro = append(pro, accel)
		}
	} else {
		if !deep {
			pro = append(pro, "the feature is only "+depth+", so layered needs just "+plural(l.Levels, "level"))
		} else {
			con = append(con, "it is "+depth)
		}
		if !fc.Open {
			pro = append(pro, "it is "+openness)
		} else {
			con = append(con, "it is "+openness)
		}
		if narrow {
			pro = append(pro, channels)
		} else if narrowWidth {
			pro = append(pro, slim)
		} else {
			con = append(con, bays)
		}
		if accelHeavy {
			pro = append(pro, accel)
		}
	}
	if len(pro) > 0 {
		sb.WriteString(": ")
		sb.WriteString(joinAnd(pro))
	}
	sb.WriteString(".")
	if len(con) > 0 {
		fmt.Fprintf(&sb, " This holds although %s.", joinAnd(con))
	}
	if len(models) > 1 && l.JerkS > 0 && b.JerkS > 0 {
		jw := StrategyBanded
		if l.JerkS < b.JerkS {
			jw = StrategyLayered
		}
		if jw != win.Strategy {
			fmt.Fprintf(&sb, " The jerk-limited model puts %s ahead instead (%s against %s), so check on the machine.",
				jw, FormatSeconds(math.Min(l.JerkS, b.JerkS)), FormatSeconds(math.Max(l.JerkS, b.JerkS)))
		} else {
			fmt.Fprintf(&sb, " The jerk-limited model agrees (%s against %s).",
				FormatSeconds(math.Min(l.JerkS, b.JerkS)), FormatSeconds(math.Max(l.JerkS, b.JerkS)))
		}
	}
	fc.Reason = sb.String()
}

// FormatSeconds formats seconds for people: "0.8 s", "42 s", "3 min 05 s",
// "1 h 02 min".
func FormatSeconds(s float64) string {
	switch {
	case math.IsNaN(s) || math.IsInf(s, 0):
		return "?"
	case s < 0:
		return "-" + FormatSeconds(-s)
	case s < 9.95:
		return fmt.Sprintf("%.1f s", s)
	case s < 59.5:
		return fmt.Sprintf("%.0f s", s)
	case s < 3600-0.5:
		t := int(math.Round(s))
		return fmt.Sprintf("%d min %02d s", t/60, t%60)
	default:
		t := int(math.Round(s / 60))
		return fmt.Sprintf("%d h %02d min", t/60, t%60)
	}
}

// percent formats a share as a whole percentage, or with one decimal
// below 10 %.
func percent(f float64) string {
	p := 100 * f
	if p < 9.95 && p > 0 {
		return fmt.Sprintf("%.1f %%", p)
	}
	return fmt.Sprintf("%.0f %%", p)
}

// trim formats v with at most two decimals and no trailing zeros.
func trim(v float64) string {
	s := fmt.Sprintf("%.2f", v)
	s = strings.TrimRight(s, "0")
	return strings.TrimSuffix(s, ".")
}

func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return fmt.Sprintf("%d %ss", n, word)
}

// joinAnd joins clauses as "a, b and c".
func joinAnd(xs []string) string {
	switch len(xs) {
	case 0:
		return ""
	case 1:
		return xs[0]
	}
	return strings.Join(xs[:len(xs)-1], "; ") + "; and " + xs[len(xs)-1]
}
