//go:build geos

package offset

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/twpayne/go-geos"

	"github.com/chipband/chipband/geom"
)

// geosQuadSegs is the number of segments per quarter circle used for the
// GEOS reference buffers: with d ≤ 20 mm its chord error
// d·(1 − cos(π/(4·q))) is below 2e-4 mm, well inside tol.
const geosQuadSegs = 256

// geosCase returns a random shape and a distance. Besides the shapes of
// randomShape it makes nearly vanishing offsets: rectangles (with collinear
// points) offset inward to within 0.01 mm of their half width.
func geosCase(rng *rand.Rand, i int) (geom.Shape, float64) {
	if i%7 == 6 {
		w, h := 5+30*rng.Float64(), 5+30*rng.Float64()
		s := geom.Shape{{Outer: geom.Ring{
			geom.Pt(0, 0), geom.Pt(w/3, 0), geom.Pt(w, 0), geom.Pt(w, h/2), geom.Pt(w, h), geom.Pt(0, h)}}}
		return s, -(min(w, h)/2 - 0.01)
	}
	s := randomShape(rng, i)
	d := []float64{0.1, 0.8, 2, 4.5, 9, 15}[rng.IntN(6)] * (0.6 + 0.8*rng.Float64())
	if rng.IntN(3) > 0 {
		d = -d
	}
	return s, d
}

// Reference: GEOS buffer (round joins, high quadsegs) as an independent
// implementation of the same Minkowski sum and difference. Accept a
// Hausdorff distance between the boundaries ≤ 2·tol + 1e-6 mm and an area
// difference ≤ 0.05 %.
func TestAgainstGEOS(t *testing.T) {
	c := geos.NewContext()
	rng := rand.New(rand.NewPCG(2005, 85513))
	tol := DefaultTolerance
	const n = 240
	for i := 0; i < n; i++ {
		s, d := geosCase(rng, i)
		ours, err := Offset(s, d, tol)
		if err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		if err := checkValid(ours); err != nil {
			t.Fatalf("case %d (d=%g): invalid result: %v", i, d, err)
		}
		ref := toGEOS(c, s).Buffer(d, geosQuadSegs)
		og := toGEOS(c, ours)
		if !og.IsValid() {
			t.Fatalf("case %d: GEOS finds our result invalid: %s", i, og.IsValidReason())
		}
		ra, oa := ref.Area(), ours.Area()
		if ref.IsEmpty() || ra == 0 {
			if oa > 1e-6 {
				t.Errorf("case %d (d=%g): GEOS empty, ours area %g", i, d, oa)
			}
			continue
		}
		if len(ours) == 0 {
			t.Errorf("case %d (d=%g): ours empty, GEOS area %g", i, d, ra)
			continue
		}
		if rel := math.Abs(oa-ra) / ra; rel > 5e-4 {
			t.Errorf("case %d (d=%g): area %.6f vs GEOS %.6f (%.4f %%)", i, d, oa, ra, 100*rel)
		}
		h := og.Boundary().HausdorffDistanceDensify(ref.Boundary(), 0.25)
		if h > 2*tol+1e-6 {
			t.Errorf("case %d (d=%g, kind %d): Hausdorff distance to GEOS %.6f mm > %.6f", i, d, i%6, h, 2*tol+1e-6)
		}
	}
}
