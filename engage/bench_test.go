package engage

import (
	"context"
	"runtime"
	"testing"
	"time"

	"github.com/chipband/chipband/geom"
)

// zigzagPath returns about length mm of zigzag passes at a stepover ae
// through a w × h block whose lower edge is y = 0, starting in the air
// below the block (an open side), at depth z.
func zigzagPath(w, ae, z, length float64) *geom.Toolpath {
	r := 5.0
	y := -r + ae
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: y, Z: 5}}
	tp.Moves = append(tp.Moves, line(geom.Rapid, -10, y, z, 0))
	x, done := -10.0, 0.0
	for done < length {
		nx := w + 10
		if x > 0 {
			nx = -10
		}
		tp.Moves = append(tp.Moves, line(geom.Feed, nx, y, z, 2000))
		done += w + 20
		y += ae
		tp.Moves = append(tp.Moves, line(geom.Feed, nx, y, z, 2000))
		done += ae
		x = nx
	}
	return tp
}

// BenchmarkSimulate simulates 10 m of zigzag passes at 7.5 % stepover with a
// 10 mm tool, 20 mm deep, in a 300 × 200 mm block at the default resolution.
func BenchmarkSimulate(b *testing.B) {
	base, err := NewMaterial(rectShape(0, 0, 300, 200), 0, MaterialOptions{})
	if err != nil {
		b.Fatal(err)
	}
	tp := zigzagPath(300, 0.75, -20, 10000)
	length := tp.Length()
	var cpu time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		m := base.Clone()
		runtime.GC() // keep the collection of earlier rounds out of the figure
		c0 := cpuTime()
		b.StartTimer()
		if _, err := Simulate(context.Background(), m, tool10, tp, SimOptions{Band: [2]float64{0.05, 0.1}}); err != nil {
			b.Fatal(err)
		}
		b.StopTimer()
		cpu += cpuTime() - c0
		b.StartTimer()
	}
	b.ReportMetric(length/1000*float64(b.N)/b.Elapsed().Seconds(), "m/s")
	// On a shared machine wall time varies with the load; the CPU time of
	// the process is the steadier figure.
	b.ReportMetric(length/1000*float64(b.N)/cpu.Seconds(), "cpu-m/s")
	b.ReportMetric(float64(base.Bytes()), "level-bytes")
}

// BenchmarkSimulateSummary is BenchmarkSimulate without keeping the profile.
func BenchmarkSimulateSummary(b *testing.B) {
	base, err := NewMaterial(rectShape(0, 0, 300, 200), 0, MaterialOptions{})
	if err != nil {
		b.Fatal(err)
	}
	tp := zigzagPath(300, 0.75, -20, 10000)
	length := tp.Length()
	var cpu time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		b.StopTimer()
		m := base.Clone()
		runtime.GC() // keep the collection of earlier rounds out of the figure
		c0 := cpuTime()
		b.StartTimer()
		if _, err := Simulate(context.Background(), m, tool10, tp, SimOptions{SummaryOnly: true}); err != nil {
			b.Fatal(err)
		}
		b.StopTimer()
		cpu += cpuTime() - c0
		b.StartTimer()
	}
	b.ReportMetric(length/1000*float64(b.N)/b.Elapsed().Seconds(), "m/s")
	b.ReportMetric(length/1000*float64(b.N)/cpu.Seconds(), "cpu-m/s")
}

// BenchmarkEngage measures single engagement queries on a cut level.
func BenchmarkEngage(b *testing.B) {
	m, err := NewMaterial(rectShape(0, 0, 300, 200), 0, MaterialOptions{})
	if err != nil {
		b.Fatal(err)
	}
	if _, err := Simulate(context.Background(), m, tool10, zigzagPath(300, 0.75, -20, 3000), SimOptions{SummaryOnly: true}); err != nil {
		b.Fatal(err)
	}
	at := geom.Point3{X: 150, Y: -5 + 0.75*10, Z: -20}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		m.Engage(tool10, at, geom.Pt(1, 0))
	}
}
