package pathplan

import (
	"context"
	"strings"
	"testing"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// bandedRepairFeeds is the verification on the finished plan: every
// feature simulated and relieved in order (bandedSim.verify), the extra
// passes put into the path, then the feeds repaired unless feeds is false.
// PlanBanded does the same feature by feature as each lands
// (bandedVerifier); this is the reference its test compares with.
func bandedRepairFeeds(ctx context.Context, plan *Plan, feeds bool) error {
	if !bandedRepairs(plan.Job) {
		return nil // no chip load to hold
	}
	sim, err := newBandedSim(plan.Job)
	if err != nil {
		return err
	}
	var moves [][]geom.Move
	var extra []int
	var worst []map[int]float64
	for fi, fs := range plan.Features {
		start := plan.featureStart(fi)
		v, err := sim.verify(ctx, fi, start, plan.Path.Moves[fs.First:fs.End])
		if err != nil {
			return err
		}
		moves, extra, worst = append(moves, v.moves), append(extra, v.extra), append(worst, v.worst)
	}
	bandedInsertRepairs(plan, moves, extra)
	for i := range plan.Features {
		plan.Features[i].Length = opLength(&plan.Path, plan.Features[i].First, plan.Features[i].End)
	}
	if feeds {
		for fi, w := range worst {
			bandedApplyRepair(plan, fi, w)
		}
	}
	return nil
}

// TestBandedRepairHoldsChipLoad plans a job with and without the
// verification and simulates both: without it some cutting samples carry a
// chip thicker than the chip load where the engagement leaves the band
// (ae/D above 1.1 × its maximum); with it no such sample exceeds the chip
// load, the plan says where the feed was lowered, and nothing but feeds
// changed beyond the extra passes the verification inserts. The chip thickness is engage's h_max = fz·sin of the largest
// immersion angle met (Altintas 2012, ch. 2, from memory), fz the feed per
// tooth of the programmed feed.
func TestBandedRepairHoldsChipLoad(t *testing.T) {
	ctx := context.Background()
	job, err := LoadJob("../testdata/jobs/closed_pocket.json")
	if err != nil {
		t.Fatal(err)
	}
	raw, err := PlanBanded(ctx, job, BandedOptions{NoVerify: true})
	if err != nil {
		t.Fatal(err)
	}
	// The raw plan with the verification's extra passes, feeds as planned.
	if err := bandedRepairFeeds(ctx, raw, false); err != nil {
		t.Fatal(err)
	}
	fixed, err := PlanBanded(ctx, job, BandedOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(raw.Path.Moves) != len(fixed.Path.Moves) {
		t.Fatalf("repair changed the path: %d moves before, %d after", len(raw.Path.Moves), len(fixed.Path.Moves))
	}
	for i := range raw.Path.Moves {
		a, b := raw.Path.Moves[i], fixed.Path.Moves[i]
		if a.To != b.To || a.Kind != b.Kind || a.Arc != b.Arc || b.Feed > a.Feed {
			t.Fatalf("move %d: repair may only lower feeds: %+v → %+v", i, a, b)
		}
	}
	load := job.Cut.ChipLoad
	over := 1.1 * job.Cut.Band[1] * job.Tool.Diameter
	worst := func(p *Plan) float64 {
		h := 0.0
		err := bandedSimEach(ctx, p, false, func(_ int, res *engage.Result) error {
			for _, s := range res.Profile {
				if s.Class == engage.Cut && s.AE > over && s.HMax > h {
					h = s.HMax
				}
			}
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		return h
	}
	before, after := worst(raw), worst(fixed)
	t.Logf("largest chip out of band: %.4f mm before, %.4f mm after (chip load %.3f mm)", before, after, load)
	if before <= load {
		t.Fatalf("the unrepaired plan never exceeds the chip load out of band (%.4f mm): the test shows nothing", before)
	}
	if after > load*(1+1e-9) {
		t.Errorf("after repair the largest chip out of band is %.4f mm > the chip load %.3f mm", after, load)
	}
	f := fixed.Features[0]
	if f.SlowedMoves == 0 || f.SlowedLength <= 0 {
		t.Errorf("no slowed moves recorded: %+v", f)
	}
	named := false
	for _, w := range fixed.Warnings {
		named = named || (strings.Contains(w, "feed lowered") && strings.Contains(w, f.Name))
	}
	if !named {
		t.Errorf("no warning names the slowed feature: %q", fixed.Warnings)
	}
	t.Logf("slowed %d moves, %.0f of %.0f mm", f.SlowedMoves, f.SlowedLength, f.Length)
}
