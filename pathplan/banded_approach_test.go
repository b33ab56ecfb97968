package pathplan

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// TestBandedOpenApproach checks how the open features of deep_open.json
// (cleared by fronts) and open_slot.json (bays joined by a channel) are
// entered from the air: after each rapid that comes down a tool radius
// clear of the stock, every move up to the next pass is a descent that
// cuts nothing or a move marked as an entry at the entry feed. Links run through cut material only (issue 6); the move that
// takes the tool from the air into the edge of the stock is the open
// feature's entry, and engage, which counts entries apart, must read no
// link there that cuts.
func TestBandedOpenApproach(t *testing.T) {
	for _, name := range []string{"deep_open.json", "open_slot.json"} {
		t.Run(name, func(t *testing.T) { bandedOpenApproach(t, name) })
	}
}

func bandedOpenApproach(t *testing.T, name string) {
	ctx := context.Background()
	job, err := LoadJob("../testdata/jobs/" + name)
	if err != nil {
		t.Fatal(err)
	}
	plan, err := PlanBanded(ctx, job, BandedOptions{})
	if err != nil {
		t.Fatal(err)
	}
	st, err := bandedSetup(job, BandedOptions{})
	if err != nil {
		t.Fatal(err)
	}
	entries := 0
	err = bandedSimEach(ctx, plan, false, func(fi int, res *engage.Result) error {
		fs := plan.Features[fi]
		if !fs.Open {
			return nil
		}
		moves := plan.Path.Moves[fs.First:fs.End]
		approach := make([]bool, len(moves)) // between a rapid and the next pass
		on := false
		stock := job.Stock.Outline
		for i, m := range moves {
			switch m.Kind {
			case geom.Rapid:
				// Down in the air: a tool radius clear of the stock.
				q := m.To.XY()
				on = !stock.Contains(q) && stock.DistanceToBoundary(q) >= job.Tool.Radius()
			case geom.Feed, geom.Finish:
				on = false
			}
			approach[i] = on && m.Kind != geom.Rapid
			if approach[i] && m.Kind == geom.Entry {
				entries++
				if m.Feed != st.entry {
					t.Errorf("%s: entry move %d at %.0f mm/min, want the entry feed %.0f", fs.Name, i, m.Feed, st.entry)
				}
			}
		}
		for _, s := range res.Profile {
			if approach[s.Move] && s.Kind == geom.Link && s.Class == engage.Cut {
				t.Errorf("%s: link move %d from the air cuts at (%.2f, %.2f), ae/D %.3f", fs.Name, s.Move, s.X, s.Y, s.AE/job.Tool.Diameter)
				break
			}
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if entries == 0 {
		t.Error("no entry from the air into the stock")
	}
}

// TestBandedSlottingWarning checks that a banded plan warns of full
// slotting exactly on the features where the report's own simulation
// reads ae/D of 0.9 or more: the demo planned by default and with square
// island ends (where, on the boss pocket, a drift at the island wall runs
// through uncut material), and the closed test pocket.
func TestBandedSlottingWarning(t *testing.T) {
	ctx := context.Background()
	closed, err := LoadJob("../testdata/jobs/closed_pocket.json")
	if err != nil {
		t.Fatal(err)
	}
	slotting := 0
	for _, c := range []struct {
		job  *Job
		opts BandedOptions
	}{{DemoJob(), BandedOptions{}}, {DemoJob(), BandedOptions{SquareIslands: true}}, {closed, BandedOptions{}}} {
		job := c.job
		plan, err := PlanBanded(ctx, job, c.opts)
		if err != nil {
			t.Fatal(err)
		}
		m, _ := MachineFor(job, nil) // the machine times the plan only
		rep, err := BandedReport(ctx, plan, m)
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range rep {
			warned := false
			for _, w := range plan.Warnings {
				warned = warned || strings.Contains(w, fmt.Sprintf("feature %q: the simulation finds full slotting", r.Name))
			}
			if slot := r.Engagement.MaxAeD >= bandedSlotAeD; slot != warned {
				t.Errorf("%s / %s (%+v): max ae/D %.3f, slotting warning %v", job.Name, r.Name, c.opts, r.Engagement.MaxAeD, warned)
			}
			if warned {
				slotting++
			}
		}
	}
	if slotting == 0 {
		t.Skip("no feature of these jobs slots any more: the warning is not exercised")
	}
}
