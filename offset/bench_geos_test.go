//go:build geos

package offset

import (
	"math"
	"testing"

	"github.com/twpayne/go-geos"
)

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
