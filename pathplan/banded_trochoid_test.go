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
			return trochoidPitchAt(rr, func(_ int, rk float64) float64 { return trochoidHeldPitch(r, rk, phiMax) })
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

// The pitch trochoidPitchAt interpolates between knots is never more than
// the model's pitch for the loop itself, to the model's own resolution (its
// bisection finds the pitch to 0.99·r/2¹⁴), so the loop holds the band;
// and it gives away little: the model's pitch is concave in the loop
// radius, which the chord between knots relies on. Checked at radii
// between the knots for a 6 mm tool at a 10 % band and an 8 mm tool at
// 12 %.
func TestTrochoidPitchAt(t *testing.T) {
	for _, c := range []struct{ r, band float64 }{{3, 0.1}, {4, 0.12}} {
		phiMax := bandedPhiOf(c.band)
		model := func(rt float64) float64 { return trochoidHeldPitch(c.r, rt, phiMax) }
		res := 0.99 * c.r / (1 << trochoidPitchIters)
		for _, rt := range []float64{0.1, 0.3, 0.42, 0.61, 0.9, 1.13, 1.45, 1.8, 2.2, 2.64, 2.99, 3.6, 4.3} {
			got := trochoidPitchAt(rt, func(_ int, rk float64) float64 { return model(rk) })
			want := model(rt)
			if got > want+res {
				t.Errorf("r %.0f rt %.2f: interpolated pitch %.5f above the model's %.5f", c.r, rt, got, want)
			}
			if got < 0.9*want {
				t.Errorf("r %.0f rt %.2f: interpolated pitch %.4f gives away more than 10 %% of %.4f", c.r, rt, got, want)
			}
		}
	}
}
