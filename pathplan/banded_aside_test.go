package pathplan

import (
	"context"
	"math"
	"reflect"
	"testing"

	"github.com/chipband/chipband/geom"
)

// TestBandedVerifierAside checks that the features of the demo, whose
// reaches do not meet, are verified on clones of the material beside one
// another, with the results of verifying them in order on one material.
func TestBandedVerifierAside(t *testing.T) {
	ctx := context.Background()
	job := DemoJob()
	plan, err := PlanBanded(ctx, job, BandedOptions{NoVerify: true})
	if err != nil {
		t.Fatal(err)
	}
	moves := func(fi int) []geom.Move {
		fs := plan.Features[fi]
		return plan.Path.Moves[fs.First:fs.End]
	}
	v := startBandedVerifier(ctx, job)
	for fi := range plan.Features {
		v.add(fi, plan.featureStart(fi), moves(fi))
	}
	worst, err := v.wait(false)
	if err != nil {
		t.Fatal(err)
	}
	if v.aside < 2 {
		t.Fatalf("%d features verified aside, want 2 (the first two of three disjoint ones)", v.aside)
	}
	sim, err := newBandedSim(job)
	if err != nil {
		t.Fatal(err)
	}
	for fi := range plan.Features {
		fv, err := sim.verify(ctx, fi, plan.featureStart(fi), moves(fi))
		if err != nil {
			t.Fatal(err)
		}
		name := plan.Features[fi].Name
		if !reflect.DeepEqual(fv.moves, v.moves[fi]) || fv.extra != v.extra[fi] {
			t.Errorf("%s: %d extra passes and %d moves aside, %d and %d in order", name, v.extra[fi], len(v.moves[fi]), fv.extra, len(fv.moves))
		}
		if !reflect.DeepEqual(fv.worst, worst[fi]) || fv.slot != v.slots[fi] {
			t.Errorf("%s: the worst chips or the slotting differ from those verified in order", name)
		}
	}
}

// TestArcBounds checks the bounds of arcs against points sampled along
// them (elementary geometry: the extremes lie at the ends or where the arc
// crosses an axis through its centre).
func TestArcBounds(t *testing.T) {
	c := geom.Pt(1, 2)
	for _, tc := range []struct {
		a0, a1 float64 // degrees
		cw     bool
	}{{10, 80, false}, {10, 100, false}, {80, 10, true}, {350, 20, false}, {20, 350, true}, {200, 190, false}, {45, 44, true}} {
		at := func(deg float64) geom.Point {
			r := deg * math.Pi / 180
			return c.Add(geom.Pt(math.Cos(r), math.Sin(r)).Scale(3))
		}
		a, b := at(tc.a0), at(tc.a1)
		got := arcBounds(a, b, c, tc.cw)
		want := geom.EmptyRect()
		sw := geom.ArcSweep(a, b, c, tc.cw) * 180 / math.Pi
		for k := 0; k <= 3600; k++ {
			d := sw * float64(k) / 3600
			if tc.cw {
				d = -d
			}
			want = want.Extend(at(tc.a0 + d))
		}
		if got.Min.Dist(want.Min) > 1e-4 || got.Max.Dist(want.Max) > 1e-4 {
			t.Errorf("arc %v° to %v° (cw %v): bounds %v, sampled %v", tc.a0, tc.a1, tc.cw, got, want)
		}
	}
}
