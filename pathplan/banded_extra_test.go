package pathplan

import (
	"context"
	"math"
	"testing"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// stripJob is a stock whose edge rises from y = 9.04 at x = 0 to y = 10 at
// x = 10 and stays there, with a feature that takes all of it above
// y = 9.04: a strip 0.96 mm wide that a cut along it meets gradually (a
// 6 mm tool, band 5–10 %).
func stripJob(t *testing.T) *Job {
	t.Helper()
	return d6Job(t, "edge", "POLYGON ((0 0, 100 0, 100 10, 10 10, 0 9.04, 0 0))", "POLYGON ((-20 9.04, 120 9.04, 120 30, -20 30, -20 9.04))", 2, "")
}

// TestExtraPassSplitsStrip: a straight climb cut beside a strip 0.96 mm
// wide (ae/D 0.16, above the 10 % band) is relieved by one extra pass that
// splits the strip between itself and the cut. Elementary geometry: with
// the extra pass δ to the cleared side of the cut, it takes ae − δ and the
// cut δ, and together they remove what the cut alone would have.
func TestExtraPassSplitsStrip(t *testing.T) {
	ctx := context.Background()
	job := stripJob(t)
	const ae, y = 0.96, 13 - 0.96 // tool edge at y = 10 − ae
	start := geom.Point3{X: -10, Y: y, Z: -2}
	moves := []geom.Move{
		{Kind: geom.Feed, To: geom.Point3{X: 110, Y: y, Z: -2}, Feed: 2000},
		{Kind: geom.Feed, To: geom.Point3{X: 110, Y: 20, Z: -2}, Feed: 2000},
	}
	sim, err := newBandedSim(job)
	if err != nil {
		t.Fatal(err)
	}
	res, err := sim.feature(ctx, 0, start, moves, false)
	if err != nil {
		t.Fatal(err)
	}
	// The set-up reads what it should: ae/D 0.16 along the cut.
	if got := res.Summary.MaxEngFull; math.Abs(got-ae/6) > 0.01 {
		t.Fatalf("the cut reads %.3f over 1 mm, want %.3f", got, ae/6)
	}
	if sim, err = newBandedSim(job); err != nil {
		t.Fatal(err)
	}
	v, err := sim.verify(ctx, 0, start, moves)
	if err != nil {
		t.Fatal(err)
	}
	out, rres, n := v.moves, v.res, v.extra
	if n != 1 {
		t.Fatalf("%d extra passes, want 1", n)
	}
	// The limit: band maximum + 0.03 as a 1 mm moving average.
	if got := rres.Summary.MaxEng; got > 0.13 {
		t.Errorf("repaired maximum %.3f > 0.13", got)
	}
	if d := math.Abs(rres.Summary.Volume-res.Summary.Volume) / res.Summary.Volume; d > 0.01 {
		t.Errorf("the repaired path removes %.1f %% more or less than the cut", 100*d)
	}
	// The pass's offset δ in the middle of the strip, and the split there.
	var delta float64
	for _, mv := range out {
		if mv.Kind == geom.Feed && math.Abs(mv.To.X-50) < 0.15 && mv.To.Y > y+1e-6 {
			delta = mv.To.Y - y
		}
	}
	if delta <= 0 {
		t.Fatal("no extra pass beside the cut at x = 50")
	}
	var onPass, onCut float64
	for _, p := range rres.Profile {
		if p.Class != engage.Cut || math.Abs(p.X-50) > 0.1 {
			continue
		}
		if math.Abs(p.Y-y) < 1e-6 {
			onCut = p.AE
		} else if math.Abs(p.Y-y-delta) < 1e-6 {
			onPass = p.AE
		}
	}
	t.Logf("δ %.3f mm: extra pass ae/D %.3f, cut %.3f; repaired maximum %.3f (was %.3f)", delta, onPass/6, onCut/6, rres.Summary.MaxEng, res.Summary.MaxEng)
	if math.Abs(onPass-(ae-delta)) > 0.05 || math.Abs(onCut-delta) > 0.05 {
		t.Errorf("δ %.3f mm: extra pass takes %.3f mm (want %.3f), the cut %.3f mm (want %.3f)", delta, onPass, ae-delta, onCut, delta)
	}
	// Both within the in-band range [0.8·min, 1.1·max] there.
	for _, a := range []float64{onPass, onCut} {
		if a/6 < 0.04 || a/6 > 0.11 {
			t.Errorf("ae/D %.3f outside the in-band range", a/6)
		}
	}
}

// TestBandedInsertRepairs: repaired moves put into a plan shift the
// features and operations after them.
func TestBandedInsertRepairs(t *testing.T) {
	mv := func(x float64) geom.Move { return geom.Move{Kind: geom.Feed, To: geom.Point3{X: x}} }
	plan := &Plan{Path: geom.Toolpath{
		Moves: []geom.Move{mv(0), mv(1), mv(2), mv(3), mv(4), mv(5)},
		Ops:   []geom.Operation{{Name: "a", First: 0}, {Name: "b", First: 3}},
	}, Features: []FeatureSummary{{Name: "a", First: 0, End: 3}, {Name: "b", First: 3, End: 6}}}
	rep := []geom.Move{mv(0), mv(10), mv(11), mv(1), mv(2)}
	bandedInsertRepairs(plan, [][]geom.Move{rep, nil}, []int{1, 0})
	if len(plan.Path.Moves) != 8 {
		t.Fatalf("%d moves, want 8", len(plan.Path.Moves))
	}
	a, b := plan.Features[0], plan.Features[1]
	if a.First != 0 || a.End != 5 || b.First != 5 || b.End != 8 || a.ExtraPasses != 1 || b.ExtraPasses != 0 {
		t.Errorf("features %+v %+v", a, b)
	}
	if plan.Path.Ops[1].First != 5 || plan.Path.Moves[5].To.X != 3 {
		t.Errorf("operation b starts at %d (move x %.0f), want 5 (x 3)", plan.Path.Ops[1].First, plan.Path.Moves[plan.Path.Ops[1].First].To.X)
	}
}

// TestVerifySplicedSimulation checks what the one-pass verification rests
// on: an extra pass cuts only what its stretch would have, earlier, so the
// simulation put together from the feature's and the trials' reads what a
// simulation of the repaired moves reads, and the material is left as the
// repaired moves leave it. Both within the repair's own margin
// (extraPassMargin, 0.005 of ae/D, on the 1 mm maxima) and, for the
// material, but for cells along the edges of cuts (at most 0.1 % of the
// feature's cells off by more than 0.01 mm).
func TestVerifySplicedSimulation(t *testing.T) {
	// The sign job's stretches include two on one long move, which share
	// it (joinRepairs).
	for _, name := range []string{"two_depths.json", "router_sign.json"} {
		t.Run(name, func(t *testing.T) { testVerifySpliced(t, name) })
	}
}

// unverifiedPlan loads testdata job name and plans it banded without the
// verification.
func unverifiedPlan(t *testing.T, name string) (*Job, *Plan) {
	t.Helper()
	job, err := LoadJob("../testdata/jobs/" + name)
	if err != nil {
		t.Fatal(err)
	}
	plan, err := PlanBanded(context.Background(), job, BandedOptions{NoVerify: true})
	if err != nil {
		t.Fatal(err)
	}
	return job, plan
}

func testVerifySpliced(t *testing.T, name string) {
	ctx := context.Background()
	job, plan := unverifiedPlan(t, name)
	sim, err := newBandedSim(job)
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for fi, fs := range plan.Features {
		start := plan.featureStart(fi)
		before := sim.m.Clone()
		v, err := sim.verify(ctx, fi, start, plan.Path.Moves[fs.First:fs.End])
		if err != nil {
			t.Fatal(err)
		}
		if v.extra == 0 {
			continue
		}
		checked++
		fresh, err := engage.Simulate(ctx, before, sim.tool, &geom.Toolpath{Start: start, Moves: v.moves}, sim.simOptions())
		if err != nil {
			t.Fatal(err)
		}
		got, want := v.res.Summary, fresh.Summary
		t.Logf("%s: %d extra passes; 1 mm maximum %.4f (full %.4f), simulated %.4f (%.4f); samples %d, %d", fs.Name, v.extra, got.MaxEng, got.MaxEngFull, want.MaxEng, want.MaxEngFull, len(v.res.Profile), len(fresh.Profile))
		if math.Abs(got.MaxEng-want.MaxEng) > extraPassMargin || math.Abs(got.MaxEngFull-want.MaxEngFull) > extraPassMargin {
			t.Errorf("%s: the spliced simulation reads %.4f (full %.4f), the repaired moves %.4f (%.4f)", fs.Name, got.MaxEng, got.MaxEngFull, want.MaxEng, want.MaxEngFull)
		}
		if d := math.Abs(outOfBand(v.res, 6, sim.band) - outOfBand(fresh, 6, sim.band)); d > 1 {
			t.Errorf("%s: cutting outside the in-band range differs by %.2f mm", fs.Name, d)
		}
		// The material: the verification's against the repaired moves'.
		tgt, err := geom.Intersection(job.Features[fi].Region, job.Stock.Outline)
		if err != nil {
			t.Fatal(err)
		}
		bb := tgt.Bounds()
		cells, off := 0, 0
		for x := bb.Min.X; x <= bb.Max.X; x += 0.2 {
			for y := bb.Min.Y; y <= bb.Max.Y; y += 0.2 {
				a, ok1 := sim.m.HeightAt(geom.Pt(x, y))
				b, ok2 := before.HeightAt(geom.Pt(x, y))
				if !ok1 || !ok2 {
					continue
				}
				cells++
				if math.Abs(a-b) > 0.01 {
					off++
				}
			}
		}
		t.Logf("%s: %d of %d cells differ", fs.Name, off, cells)
		if float64(off) > 0.001*float64(cells) {
			t.Errorf("%s: %d of %d cells differ by more than 0.01 mm", fs.Name, off, cells)
		}
	}
	if checked == 0 {
		t.Fatal("no feature got an extra pass; the test checks nothing")
	}
}

// TestVerifyTrailBudget: with a trail too small for the whole feature (or
// none at all) the stretches before its patches are tried forward from the
// material before the feature, and the verification comes to the same
// repair: those stretches meet the same material either way.
func TestVerifyTrailBudget(t *testing.T) {
	ctx := context.Background()
	job, plan := unverifiedPlan(t, "two_depths.json")
	run := func(budget int) []bandedVerified {
		sim, err := newBandedSim(job)
		if err != nil {
			t.Fatal(err)
		}
		sim.trailBudget = budget
		var out []bandedVerified
		for fi, fs := range plan.Features {
			start := plan.featureStart(fi)
			v, err := sim.verify(ctx, fi, start, plan.Path.Moves[fs.First:fs.End])
			if err != nil {
				t.Fatal(err)
			}
			out = append(out, v)
		}
		return out
	}
	want := run(extraTrailBudget)
	for _, budget := range []int{0, 4 << 20} {
		got := run(budget)
		for fi, v := range got {
			w := want[fi]
			if w.extra == 0 {
				continue
			}
			t.Logf("budget %d MB, %s: %d extra passes (%d), maximum %.4f (%.4f)", budget>>20, plan.Features[fi].Name, v.extra, w.extra, v.res.Summary.MaxEng, w.res.Summary.MaxEng)
			if v.extra != w.extra || len(v.moves) != len(w.moves) || v.res.Summary.MaxEng != w.res.Summary.MaxEng {
				t.Errorf("budget %d: %s: %d extra passes, %d moves, maximum %.4f; with the whole trail %d, %d, %.4f", budget, plan.Features[fi].Name, v.extra, len(v.moves), v.res.Summary.MaxEng, w.extra, len(w.moves), w.res.Summary.MaxEng)
			}
		}
	}
}
