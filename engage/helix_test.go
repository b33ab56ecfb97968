package engage

import (
	"context"
	"fmt"
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// TestHelixEngagement: a helix entry of a D10 tool into fresh stock, the
// tool centre on a circle of diameter Dh about O, descending p = 1 mm per
// revolution from the top (Z = 0), four revolutions, counter-clockwise.
// Expected values, all geometry:
//   - every sample below the top is an entry, none a plunge;
//   - in the first revolution the stock ahead of the tool is untouched, so
//     ap is the depth below the top, −z;
//   - from the third revolution on the front half of the periphery runs in
//     material left by the revolution before (the rear half in what the
//     tool has just cut), so φ = 180° as in a full slot; ap is the pitch p,
//     read where the material is highest, at the sides of the front half.
//     The engagement grid (every π/24) reads it at ψ = π/24, where the
//     previous revolution left the floor p·δ/2π lower, δ the angle the tool
//     centre travels before the circle of radius r about it leaves that
//     periphery point (found here by bisection). The grid gives the top of
//     a point as the top of one of the four cells around it, each within a
//     cell diagonal √2·c of it, so the lower bound is the lowest floor of
//     the previous revolution within √2·c of that point (TestHelixSteadyAP,
//     elementary geometry: the centre at angle t is within r of a point at
//     polar (ρ, θ) about O for |t − θ| ≤ β, cos β = (ρ² + Rh² − r²)/(2ρ·Rh));
//   - Dh > D leaves a core of radius (Dh − D)/2 at O at the top height;
//     Dh < D leaves none: O is within r of every position, so it is cut to
//     the lowest bottom.
func TestHelixEngagement(t *testing.T) { helixEngagement(t, false) }

// TestHelixSteadyAP is the steady-state ap check of TestHelixEngagement.
func TestHelixSteadyAP(t *testing.T) { helixEngagement(t, true) }

// helixFloorNear returns the lowest floor, as a depth below p above the tool
// bottom, that the revolution before left within dist of the point q (tool
// centre at angle 0 on the circle of radius rh about the origin, moving
// counter-clockwise, p the pitch), over the points that the current
// revolution has not cut and that lie outside the core (elementary
// geometry: the centre at angle t reaches a point at polar (ρ, θ) for
// |t − θ| ≤ β, cos β = (ρ² + rh² − r²)/(2ρ·rh); the floor there is the one
// of the last angle θ + β, one revolution back).
func helixFloorNear(q geom.Point, dist, rh, r, p float64) float64 {
	low := p
	const nr, na = 24, 96
	for i := 0; i <= nr; i++ {
		for j := 0; j < na; j++ {
			a := 2 * math.Pi * float64(j) / na
			x := q.Add(geom.Pt(math.Cos(a), math.Sin(a)).Scale(dist * float64(i) / nr))
			rho, th := x.Len(), math.Atan2(x.Y, x.X)
			c := (rho*rho + rh*rh - r*r) / (2 * rho * rh)
			if rho < 1e-9 || c >= 1 || c <= -1 {
				continue // the core, beyond the bore, or reached from every angle
			}
			beta := math.Acos(c)
			if th-beta < 0 {
				continue // reached by the current revolution already
			}
			low = math.Min(low, p*(1-(th+beta)/(2*math.Pi)))
		}
	}
	return low
}

func helixEngagement(t *testing.T, steadyAP bool) {
	r := tool10.Radius()
	const p, turns = 1.0, 4
	o := geom.Pt(60, 40)
	for _, dh := range []float64{1.5 * tool10.Diameter, 0.6 * tool10.Diameter} {
		t.Run(fmt.Sprintf("Dh=%g", dh), func(t *testing.T) {
			rh := dh / 2
			m, err := NewMaterial(rectShape(0, 0, 120, 80), 0, MaterialOptions{})
			noErr(t, err)
			tp := &geom.Toolpath{Start: geom.Point3{X: o.X + rh, Y: o.Y, Z: 0}}
			for k := 1; k <= 2*turns; k++ { // half turns
				a := float64(k) * math.Pi
				tp.Moves = append(tp.Moves, geom.Move{Kind: geom.Entry, Arc: true, Center: o, Feed: 800,
					To: geom.Point3{X: o.X + rh*math.Cos(a), Y: o.Y + rh*math.Sin(a), Z: -p * float64(k) / 2}})
			}
			res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
			noErr(t, err)
			if res.Summary.Plunges != 0 || res.Summary.CutLength != 0 {
				t.Errorf("plunges %d, cut length %.2f: a helix is all entry", res.Summary.Plunges, res.Summary.CutLength)
			}
			// δ at ψ = π/24: tooth point q relative to the tool centre at
			// angle 0 on the circle (feed +Y, left normal −X towards O).
			psi := math.Pi / 24
			q := geom.Pt(rh-r*math.Cos(psi), r*math.Sin(psi))
			dist := func(d float64) float64 { return q.Dist(geom.Pt(rh*math.Cos(d), rh*math.Sin(d))) }
			lo, hi := 1e-9, math.Pi
			for it := 0; it < 100; it++ {
				if mid := (lo + hi) / 2; dist(mid) < r {
					lo = mid
				} else {
					hi = mid
				}
			}
			apLow := p * (1 - lo/(2*math.Pi))
			// The grid's reading: within a cell diagonal of that point.
			apCell := helixFloorNear(q, math.Sqrt2*m.CellSize(), rh, r, p)
			if apCell > apLow {
				t.Fatalf("floor near the point %.4f above the floor at it %.4f", apCell, apLow)
			}
			var n1, n3 int
			for _, s := range res.Profile {
				if s.Z < -epsZ && s.Class != Entry {
					t.Fatalf("class %v at z %.3f, want entry", s.Class, s.Z)
				}
				ang := math.Mod(math.Atan2(s.Y-o.Y, s.X-o.X)+2*math.Pi, 2*math.Pi)
				switch {
				case s.Move == 0 && ang > math.Pi*0.5 && ang < math.Pi*0.9:
					n1++
					near(t, "first revolution ap", s.AP, -s.Z, 0.01)
				case s.Move >= 4: // from the third revolution on
					n3++
					near(t, "steady φ°", s.PhiDeg(), 180, 0.5)
					if steadyAP && (s.AP < apCell || s.AP > p+epsZ) {
						t.Errorf("steady ap %.4f, want in [%.4f, %.4f] (move %d, angle %.1f°, phi %.1f)", s.AP, apCell, p, s.Move, ang*180/math.Pi, s.PhiDeg())
					}
				}
			}
			if n1 == 0 || n3 == 0 {
				t.Fatalf("samples: %d in the first revolution, %d steady", n1, n3)
			}
			h, ok := m.HeightAt(o)
			if dh > tool10.Diameter {
				if !ok || h != 0 {
					t.Errorf("core top %.3f (%v), want 0", h, ok)
				}
			} else {
				near(t, "centre floor", h, -p*turns, 0.01)
			}
		})
	}
}
