package pathplan

import (
	"context"
	"math"
	"testing"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// trochoidSlabPhi simulates tp on a slab from x = 0 (engage, default
// raster) and returns the largest engagement angle of the cutting samples
// whose tool centre lies beyond x = from (the steady loops).
func trochoidSlabPhi(t *testing.T, r float64, tp *geom.Toolpath, from float64) float64 {
	t.Helper()
	stock := geom.Shape{{Outer: geom.RectRing(0, -20, 80, 20)}}
	m, err := engage.NewMaterial(stock, 0, engage.MaterialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	res, err := engage.Simulate(context.Background(), m, engage.Tool{Diameter: 2 * r, FluteLength: 10, Flutes: 2}, tp, engage.SimOptions{})
	if err != nil {
		t.Fatal(err)
	}
	worst := 0.0
	for _, s := range res.Profile {
		if s.Class == engage.Cut && s.X > from {
			worst = max(worst, s.Phi)
		}
	}
	return worst
}

// The pitch trochoidHeldPitch chooses for held-front loops keeps the
// engagement at the band maximum when engage simulates the loops: straight
// runs of loops from the air into a slab, measured over the steady loops
// (engage is the reference; its engaged arc is design §4's, counted on the
// front half about the direction of travel).
//   - The loops traced finely (1° chords) read what the model says, within
//     1°: the model is right.
//   - The loops as trochoidRun lays them and bandedEmit writes them (front
//     halves as arcs) read at most the band maximum plus that 1°. In 10°
//     chords the front of each loop read 5° more (half the chord's turn).
func TestTrochoidHeldPitchEngage(t *testing.T) {
	const r = 3.0
	phiMax := bandedPhiOf(0.1)
	deg := func(a float64) float64 { return a * 180 / math.Pi }
	for _, rt := range []float64{0.5, 1.45, 2.9} {
		p := trochoidHeldPitch(r, rt, phiMax)
		model := trochoidHeldMaxPhi(r, rt, p)
		x0 := -(rt + r + 1) // in the air
		loops := int(math.Ceil((12 - x0) / p))
		fine := &geom.Toolpath{Start: geom.Point3{X: x0, Y: rt, Z: -3}}
		for i := 1; i <= loops*360; i++ {
			x, y := trochoidHeldPoint(rt, p, math.Pi/2+2*math.Pi*float64(i)/360)
			fine.Moves = append(fine.Moves, geom.Move{Kind: geom.Feed, To: geom.Point3{X: x0 + x, Y: y, Z: -3}, Feed: 1000})
		}
		got := trochoidSlabPhi(t, r, fine, rt+r+1)
		t.Logf("rt %.2f: pitch %.4f, model %.2f°, engage %.2f° (1° chords)", rt, p, deg(model), deg(got))
		if d := math.Abs(deg(got - model)); d > 1 {
			t.Errorf("rt %.2f pitch %.4f: engage max φ %.2f°, model %.2f°", rt, p, deg(got), deg(model))
		}

		// The planner's loops along a channel whose clearance is rt + 0.01.
		c := geom.Shape{{Outer: geom.RectRing(-20, -rt-0.01, 40, rt+0.01)}}
		spine := []geom.Point{{X: -(rt + r + 1), Y: 0}, {X: 14, Y: 0}}
		clr := []float64{rt + 0.01, rt + 0.01}
		st := bandedSettings{r: r, feed: 1000, minR: 0.6, pitches: &pitchCache{m: map[int]float64{}}}
		pitch := func(rr float64) float64 {
			_, rq := trochoidPitchKey(rr)
			return trochoidHeldPitch(r, rq, phiMax)
		}
		run := trochoidRun(c, spine, clr, false, pitch, st)
		if len(run.arcs) == 0 {
			t.Fatalf("rt %.2f: no front half laid as an arc", rt)
		}
		b := &builder{}
		b.path.Start = geom.Point3{X: run.pts[0].X, Y: run.pts[0].Y, Z: -3}
		b.pos = b.path.Start
		bandedEmit(b, []bandedPiece{{kind: pieceTrochoid, pts: run.pts, arcs: run.arcs}}, c, -3, 0, 5, st, &FeatureSummary{})
		planned := trochoidSlabPhi(t, r, &b.path, rt+r+1)
		t.Logf("rt %.2f: planned loops %.2f° (band maximum %.2f°)", rt, deg(planned), deg(phiMax))
		if deg(planned) > deg(phiMax)+1 {
			t.Errorf("rt %.2f: planned loops engage %.2f°, above the band maximum %.2f° + 1°", rt, deg(planned), deg(phiMax))
		}
	}
}

// The pitch cache's floored radius never exceeds the loop's (a larger one
// would give a pitch the loop cannot hold) and lies within 0.1 mm or 5 %
// of it, whichever is more; equal keys stand for equal radii.
func TestTrochoidPitchKey(t *testing.T) {
	seen := map[int]float64{}
	for rt := 0.0; rt < 8; rt += 0.0007 {
		k, rq := trochoidPitchKey(rt)
		if rq > rt+1e-12 || rt-rq > max(0.1, 0.05*rt)+1e-12 {
			t.Fatalf("rt %.4f: floored to %.4f", rt, rq)
		}
		if v, ok := seen[k]; ok && v != rq {
			t.Fatalf("key %d stands for %.4f and %.4f", k, v, rq)
		}
		seen[k] = rq
	}
}
