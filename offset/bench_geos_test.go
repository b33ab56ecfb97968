//go:build geos

package offset

import (
	"math"
	"testing"

	"github.com/twpayne/go-geos"

	"github.com/chipband/chipband/geom"
)

// toGEOS converts a shape to a GEOS MultiPolygon.
func toGEOS(c *geos.Context, s geom.Shape) *geos.Geom {
	var polys []*geos.Geom
	for _, g := range s {
		var rings [][][]float64
		for _, r := range g.Rings() {
			cs := make([][]float64, 0, len(r)+1)
			for _, p := range r {
				cs = append(cs, []float64{p.X, p.Y})
			}
			cs = append(cs, []float64{r[0].X, r[0].Y})
			rings = append(rings, cs)
		}
		polys = append(polys, c.NewPolygon(rings))
	}
	return c.NewCollection(geos.TypeIDMultiPolygon, polys)
}

// BenchmarkInward2000GEOS is BenchmarkInward2000 done by GEOS buffer with
// round joins, its quadrant segments chosen per distance so that the chord
// error d·(1 − cos(π/(4q))) meets the same tolerance.
func BenchmarkInward2000GEOS(b *testing.B) {
	c := geos.NewContext()
	g := toGEOS(c, benchPart())
	q := make([]int, 41)
	for d := 1; d <= 40; d++ {
		q[d] = int(math.Ceil(math.Pi / (4 * math.Acos(1-DefaultTolerance/float64(d)))))
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		for d := 1; d <= 40; d++ {
			if r := g.Buffer(-float64(d), q[d]); r == nil {
				b.Fatal("nil buffer")
			}
		}
	}
	b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N*40), "ms/offset")
}
