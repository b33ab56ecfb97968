package pathplan

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/timing"
)

// num formats v with at most 4 decimals, trailing zeros and a negative
// zero removed, so the same value always gives the same text.
func num(v float64) string {
	s := strconv.FormatFloat(math.Round(v*1e4)/1e4, 'f', 4, 64)
	s = strings.TrimRight(s, "0")
	s = strings.TrimSuffix(s, ".")
	if s == "-0" || s == "" {
		s = "0"
	}
	return s
}

// comment makes text safe inside an RS-274 comment.
func comment(text string) string {
	return strings.Map(func(r rune) rune {
		switch r {
		case '(', ')', ';', '\n', '\r':
			return ' '
		}
		return r
	}, text)
}

// wrap splits text into lines of at most width characters at spaces.
func wrap(text string, width int) []string {
	var out []string
	line := ""
	for _, w := range strings.Fields(text) {
		if line != "" && len(line)+1+len(w) > width {
			out = append(out, line)
			line = w
			continue
		}
		if line != "" {
			line += " "
		}
		line += w
	}
	if line != "" {
		out = append(out, line)
	}
	return out
}

// WriteGCode writes the plan as an RS-274 program (NIST RS274/NGC v3):
// a header of comments naming the job, the tool, the strategy and the
// safety caution; G21 G90 G17; the spindle started with S and M3; every
// feature opened by the operation comment of timing.OpComment; rapids as
// G0, feed moves as G1 and arcs as G2/G3 with incremental I J; feeds F
// written when they change; M5 and M30 at the end. Coordinates have at
// most 4 decimals; axes that do not change are left out. The same plan
// always gives the same bytes.
func WriteGCode(w io.Writer, p *Plan) error {
	bw := bufio.NewWriter(w)
	j := p.Job
	name := j.Name
	if name == "" {
		name = "unnamed job"
	}
	fmt.Fprintf(bw, "(chipband %s roughing)\n", comment(p.Strategy))
	fmt.Fprintf(bw, "(job: %s)\n", comment(name))
	if j.Description != "" {
		for _, l := range wrap(comment(j.Description), 70) {
			fmt.Fprintf(bw, "(  %s)\n", l)
		}
	}
	fmt.Fprintf(bw, "(tool: flat end mill D%s mm, flute length %s mm, %d flutes)\n",
		num(j.Tool.Diameter), num(j.Tool.FluteLength), j.Tool.Flutes)
	fmt.Fprintf(bw, "(strategy: %s", comment(p.Strategy))
	if p.Strategy == "layered" {
		fmt.Fprintf(bw, ", stepover %s of D, step-down up to %s mm",
			num(j.Cut.Layered.Stepover), num(j.Cut.Layered.Stepdown))
	}
	fmt.Fprintf(bw, ", allowance %s mm)\n", num(j.Cut.Allowance))
	if len(p.Options) > 0 {
		fmt.Fprintf(bw, "(options: %s)\n", comment(strings.Join(p.Options, ", ")))
	}
	fmt.Fprintf(bw, "(cut: %s rpm, chip load %s mm, feed %s mm/min)\n",
		num(j.Cut.SpindleRPM), num(j.Cut.ChipLoad), num(j.Feed()))
	fmt.Fprintf(bw, "(Z0 at the stock top %s, clearance Z%s)\n", num(j.Stock.Top), num(j.Stock.Top+j.Clearance))
	fmt.Fprintln(bw, "(CAUTION)")
	for _, l := range wrap(SafetyCaution, 70) {
		fmt.Fprintf(bw, "(%s)\n", l)
	}
	// The planner's warnings travel with the program, for whoever runs it.
	for _, w := range p.Warnings {
		for _, l := range wrap("WARNING: "+comment(w), 70) {
			fmt.Fprintf(bw, "(%s)\n", l)
		}
	}
	fmt.Fprintln(bw, "G21 G90 G17")
	st := p.Path.Start
	fmt.Fprintf(bw, "G0 Z%s\n", num(st.Z))
	fmt.Fprintf(bw, "G0 X%s Y%s\n", num(st.X), num(st.Y))
	fmt.Fprintf(bw, "S%s M3\n", num(j.Cut.SpindleRPM))
	ops := p.Path.Ops
	oi := 0
	pos := st
	// last written values, as text, for modal omission
	lx, ly, lz := num(st.X), num(st.Y), num(st.Z)
	lf := ""
	for i, m := range p.Path.Moves {
		for oi < len(ops) && ops[oi].First == i {
			fmt.Fprintln(bw, timing.OpComment(ops[oi].Name))
			oi++
		}
		x, y, z := num(m.To.X), num(m.To.Y), num(m.To.Z)
		var b strings.Builder
		switch {
		case m.Kind == geom.Rapid:
			b.WriteString("G0")
		case m.Arc:
			if m.CW {
				b.WriteString("G2")
			} else {
				b.WriteString("G3")
			}
		default:
			b.WriteString("G1")
		}
		if m.Arc {
			// Full circles and arcs always carry both end coordinates.
			b.WriteString(" X" + x + " Y" + y)
			if z != lz {
				b.WriteString(" Z" + z)
			}
			fmt.Fprintf(&b, " I%s J%s", num(m.Center.X-pos.X), num(m.Center.Y-pos.Y))
		} else {
			if x != lx {
				b.WriteString(" X" + x)
			}
			if y != ly {
				b.WriteString(" Y" + y)
			}
			if z != lz {
				b.WriteString(" Z" + z)
			}
			if x == lx && y == ly && z == lz {
				pos = m.To
				continue
			}
		}
		if m.Kind != geom.Rapid {
			if f := num(m.Feed); f != lf {
				b.WriteString(" F" + f)
				lf = f
			}
		}
		bw.WriteString(b.String())
		bw.WriteByte('\n')
		lx, ly, lz = x, y, z
		pos = m.To
	}
	for ; oi < len(ops); oi++ {
		fmt.Fprintln(bw, timing.OpComment(ops[oi].Name))
	}
	fmt.Fprintln(bw, "M5")
	fmt.Fprintln(bw, "M30")
	return bw.Flush()
}
