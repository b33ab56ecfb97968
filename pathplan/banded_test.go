package pathplan

import (
	"context"
	"math"
	"testing"
)

// The step that holds the engagement angle on a curved front is checked
// against an independent circle–circle intersection: the tool circle of
// radius r at distance ρ from the centre O of the previous envelope circle
// (radius R_prev ± r) meets it where the law of cosines says; the engaged
// front-half arc is the angle at the tool centre between the normal and
// that intersection point (elementary geometry).
func TestSpiralStepCircleIntersection(t *testing.T) {
	r := 3.0
	for _, aeD := range []float64{0.05, 0.075, 0.1} {
		phi := math.Acos(1 - 2*aeD) // straight-cut relation, Altintas 2012 ch. 2
		for _, rp := range []float64{1, 3, 10, 50} {
			for _, convex := range []bool{true, false} {
				if !convex && rp <= r+r*math.Sin(phi) {
					continue
				}
				s := spiralStep(r, phi, rp, convex)
				// Independent check: intersect the tool circle with the
				// envelope circle numerically by bisection on the angle.
				var rho, env float64
				if convex {
					rho, env = rp+s, rp+r
				} else {
					rho, env = rp-s, rp-r
				}
				// Point on tool circle at angle θ from the outward normal
				// (pointing away from O when convex, toward O when concave).
				dist := func(th float64) float64 {
					x := r * math.Cos(th)
					y := r * math.Sin(th)
					if convex {
						return math.Hypot(rho+x, y)
					}
					return math.Hypot(rho-x, y)
				}
				lo, hi := 0.0, math.Pi
				inside := func(th float64) bool {
					if convex {
						return dist(th) > env
					}
					return dist(th) < env
				}
				if !inside(0) {
					t.Fatalf("ae/D %.3f rp %.0f convex %v: no engagement at the normal", aeD, rp, convex)
				}
				for i := 0; i < 60; i++ {
					m := (lo + hi) / 2
					if inside(m) {
						lo = m
					} else {
						hi = m
					}
				}
				if math.Abs(lo-phi) > 1e-6 {
					t.Errorf("ae/D %.3f rp %.0f convex %v: step %.4f gives φ %.3f°, want %.3f°", aeD, rp, convex, s, lo*180/math.Pi, phi*180/math.Pi)
				}
			}
		}
	}
}

// On a straight front the step is the straight-cut width r(1 − cos φ)
// (Altintas 2012, ch. 2); a convex front (outward spiral) needs less, a
// concave one allows more (constant-engagement offsetting,
// doi:10.1007/s00170-019-03834-8).
func TestSpiralStepLimits(t *testing.T) {
	r, phi := 3.0, math.Acos(0.85)
	straight := r * 0.15
	if got := spiralStep(r, phi, math.Inf(1), true); math.Abs(got-straight) > 1e-12 {
		t.Errorf("straight step %.6f, want %.6f", got, straight)
	}
	if got := spiralStep(r, phi, 1e5, true); math.Abs(got-straight) > 1e-3 {
		t.Errorf("nearly straight convex step %.6f, want %.6f", got, straight)
	}
	if cv, cc := spiralStep(r, phi, 10, true), spiralStep(r, phi, 10, false); !(cv < straight && cc > straight) {
		t.Errorf("convex %.4f and concave %.4f steps should straddle the straight %.4f", cv, cc, straight)
	}
}

// Radial chip thinning at ae = 0.075·D: factor 1/sin(arccos 0.85) = 1.898
// (standard relation, h_max = fz·sin φ).
func TestBandedChipThinning(t *testing.T) {
	if got := bandedChipThinning(bandedPhiOf(0.075)); math.Abs(got-1.898) > 0.001 {
		t.Errorf("chip thinning factor %.4f, want 1.898", got)
	}
}

// Levels at the full flute length: the fewest equal levels, the last on the
// floor (issue 6).
func TestBandedLevels(t *testing.T) {
	got := bandedLevels(0, 45, 20)
	want := []float64{-15, -30, -45}
	if len(got) != len(want) {
		t.Fatalf("levels %v, want %v", got, want)
	}
	for i := range got {
		if math.Abs(got[i]-want[i]) > 1e-9 {
			t.Errorf("levels %v, want %v", got, want)
		}
	}
	if got := bandedLevels(0, 14, 20); len(got) != 1 || got[0] != -14 {
		t.Errorf("depth within the flute: levels %v, want [-14]", got)
	}
}

// The engagement of a trochoidal loop, computed by sampling, is at least
// the value at the loop's front, where the tool circle meets the previous
// loop's envelope (radius rt + r about a centre one pitch behind):
// arccos(((rt+r)² − (rt+p)² − r²) / (2(rt+p)r)) by the law of cosines
// (geometry as in Otkur & Lazoglu 2007, from memory); it grows with the
// pitch, and the chosen pitch keeps it at or below the band maximum.
func TestTrochoidMaxPhiApex(t *testing.T) {
	r, rt := 3.0, 2.0
	last := 0.0
	for _, p := range []float64{0.3, 0.6, 1.0} {
		apex := math.Acos(((rt+r)*(rt+r) - (rt+p)*(rt+p) - r*r) / (2 * (rt + p) * r))
		got := trochoidMaxPhi(r, rt, p)
		if got < apex-3*math.Pi/180 {
			t.Errorf("pitch %.1f: max φ %.1f° below the value at the front %.1f°", p, got*180/math.Pi, apex*180/math.Pi)
		}
		if got < last {
			t.Errorf("pitch %.1f: max φ %.1f° fell below %.1f° at a smaller pitch", p, got*180/math.Pi, last*180/math.Pi)
		}
		last = got
	}
	pm := trochoidPitch(r, rt, bandedPhiOf(0.1))
	if got := trochoidMaxPhi(r, rt, pm); got > bandedPhiOf(0.1)+1e-9 {
		t.Errorf("pitch %.3f gives %.1f°, above the band maximum", pm, got*180/math.Pi)
	}
}

func BenchmarkPlanBandedDemo(b *testing.B) {
	job := DemoJob()
	for i := 0; i < b.N; i++ {
		if _, err := PlanBanded(context.Background(), job, BandedOptions{NoVerify: true}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkPlanBandedDemoVerified plans the demo with the verification
// (simulation and feed repair) included.
func BenchmarkPlanBandedDemoVerified(b *testing.B) {
	job := DemoJob()
	for i := 0; i < b.N; i++ {
		if _, err := PlanBanded(context.Background(), job, BandedOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
