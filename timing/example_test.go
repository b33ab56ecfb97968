package timing_test

import (
	"context"
	"fmt"
	"strings"

	"github.com/chipband/chipband/timing"
)

// A 100 mm feed move at 3000 mm/min on a machine accelerating at
// 1000 mm/s²: t = L/v + v/a = 2 s + 0.05 s.
func ExampleEstimateProgram() {
	m := timing.Machine{
		Name:            "invented bench mill",
		MaxFeed:         timing.Axes{X: 6000, Y: 6000, Z: 3000},
		Rapid:           timing.Axes{X: 12000, Y: 12000, Z: 6000},
		Accel:           timing.Axes{X: 1000, Y: 1000, Z: 500},
		CornerTolerance: 0.01,
	}
	prog := "G21 G90 G17\n" + timing.OpComment("face") + "\nG1 X100 F3000\nG4 P1\nM30\n"
	rep, err := timing.EstimateProgram(context.Background(), strings.NewReader(prog), m, timing.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("total %.2f s (feed %.2f s, dwell %.2f s, lost to acceleration %.2f s)\n",
		rep.TotalS, rep.FeedS, rep.DwellS, rep.AccelLossS)
	for _, op := range rep.Operations {
		fmt.Printf("%s: %.2f s\n", op.Name, op.TotalS)
	}
	// Output:
	// total 3.05 s (feed 2.05 s, dwell 1.00 s, lost to acceleration 0.05 s)
	// face: 3.05 s
}

// Paths that never become text can be timed as blocks in memory.
func ExampleEstimate() {
	m := timing.Machine{
		MaxFeed:         timing.Axes{X: 6000, Y: 6000, Z: 3000},
		Rapid:           timing.Axes{X: 12000, Y: 12000, Z: 6000},
		Accel:           timing.Axes{X: 1000, Y: 1000, Z: 500},
		CornerTolerance: 0.01,
	}
	path := []timing.Block{
		timing.Line([3]float64{0, 0, 0}, [3]float64{50, 0, 0}, 3000),
		timing.Line([3]float64{50, 0, 0}, [3]float64{100, 0, 0}, 3000),
	}
	rep, err := timing.Estimate(context.Background(), path, m, timing.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.2f s for %d blocks\n", rep.TotalS, rep.Blocks)
	// Output:
	// 2.05 s for 2 blocks
}

// The Reader gives the moves of any program back, for simulation.
func ExampleReader() {
	r := timing.NewReader(strings.NewReader("G20 G0 X1 Y2\nG2 X2 Y1 I1 J0 F10\n"))
	for {
		b, err := r.Next()
		if err != nil {
			break
		}
		fmt.Printf("line %d: %s to %.1f %.1f\n", b.Line, b.Kind, b.To[0], b.To[1])
	}
	// Output:
	// line 1: rapid to 25.4 50.8
	// line 2: arc to 50.8 25.4
}
