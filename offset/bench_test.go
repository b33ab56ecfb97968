package offset

import (
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// benchPart returns a deterministic concave part of 2,000 vertices: a
// wavy outer ring of 1,850 vertices and three wavy holes of 50 each.
func benchPart() geom.Shape {
	wavy := func(c geom.Point, n int, r, a1, k1, a2, k2 float64) geom.Ring {
		ring := make(geom.Ring, n)
		for i := range ring {
			t := 2 * math.Pi * float64(i) / float64(n)
			rad := r + a1*math.Sin(k1*t) + a2*math.Sin(k2*t)
			ring[i] = geom.Pt(c.X+rad*math.Cos(t), c.Y+rad*math.Sin(t))
		}
		return ring
	}
	g := geom.Region{Outer: wavy(geom.Pt(0, 0), 1850, 150, 20, 7, 6, 23)}
	for k := 0; k < 3; k++ {
		a := 2 * math.Pi * float64(k) / 3
		h := wavy(geom.Pt(75*math.Cos(a), 75*math.Sin(a)), 50, 15, 3, 5, 1, 9)
		g.Holes = append(g.Holes, h.Reversed())
	}
	return geom.Shape{g}
}

// BenchmarkInward2000: inward offsets by 1, 2, …, 40 mm of benchPart at the
// default tolerance; reports ms per offset.
func BenchmarkInward2000(b *testing.B) {
	s := benchPart()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		for d := 1; d <= 40; d++ {
			if _, err := Offset(s, -float64(d), DefaultTolerance); err != nil {
				b.Fatal(err)
			}
		}
	}
	b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N*40), "ms/offset")
}
