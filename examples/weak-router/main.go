// Command weak-router asks a router owner's question: from which pocket
// depth on does banded roughing pay on my machine, and is that the same
// depth as on a stiff mill?
//
// The scenario is invented: a 60 × 50 mm closed pocket around a round boss
// in an aluminium plate, cut with a 6 mm three-flute end mill (step-down
// 1 mm for layered, full depth for banded), planned once per depth
// and timed on two invented machines — a stiff machining centre
// (3000 mm/s²) and a hobby router with weak acceleration (120 mm/s²).
// Banded roughing runs many short, curved moves; on the router every one
// of them costs time accelerating and braking, so the depth at which it
// overtakes layered roughing moves deeper, and for some depths the
// recommendation flips.
//
//	go run ./examples/weak-router
package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"strings"

	"github.com/chipband/chipband/pathplan"
	"github.com/chipband/chipband/timing"
)

func main() {
	if err := run(context.Background(), os.Stdout, []float64{3, 4, 5, 6}); err != nil {
		fmt.Fprintln(os.Stderr, "weak-router:", err)
		os.Exit(1)
	}
}

// stiffMill is an invented vertical machining centre.
func stiffMill() timing.Machine {
	return timing.Machine{
		Name:            "stiff mill",
		MaxFeed:         timing.Axes{X: 10000, Y: 10000, Z: 8000},
		Rapid:           timing.Axes{X: 30000, Y: 30000, Z: 20000},
		Accel:           timing.Axes{X: 3000, Y: 3000, Z: 2000},
		CornerTolerance: 0.02,
	}
}

// weakRouter is an invented hobby router with weak acceleration.
func weakRouter() timing.Machine {
	return timing.Machine{
		Name:            "hobby router",
		MaxFeed:         timing.Axes{X: 6000, Y: 6000, Z: 2000},
		Rapid:           timing.Axes{X: 6000, Y: 6000, Z: 2000},
		Accel:           timing.Axes{X: 120, Y: 120, Z: 80},
		CornerTolerance: 0.05,
	}
}

// pocketJob is the invented job at one depth: a bearing-seat plate, a
// 60 × 50 mm closed pocket around a round boss of 18 mm diameter.
func pocketJob(depth float64) (*pathplan.Job, error) {
	var boss []string
	for k := 0; k <= 36; k++ {
		a := -2 * math.Pi * float64(k%36) / 36 // clockwise: a hole
		boss = append(boss, fmt.Sprintf("%.4f %.4f", 45+9*math.Cos(a), 35+9*math.Sin(a)))
	}
	return pathplan.ReadJob(strings.NewReader(fmt.Sprintf(`{
  "name": "bearing seat plate, %g mm deep",
  "stock": {"outline": "POLYGON ((0 0, 90 0, 90 70, 0 70, 0 0))", "top": 0},
  "features": [{"name": "seat pocket", "region": "POLYGON ((15 10, 75 10, 75 60, 15 60, 15 10), (%s))", "depth": %g}],
  "tool": {"diameter": 6, "flute_length": 20, "flutes": 3},
  "cut": {"band": [0.05, 0.1], "spindle_rpm": 18000, "chip_load": 0.03,
          "layered": {"stepover": 0.5, "stepdown": 1}},
  "clearance": 5
}`, depth, strings.Join(boss, ", "), depth)))
}

// result is one depth on one machine.
type result struct {
	depth            float64
	machine          string
	layered, banded  float64 // R1 cycle times, s
	layAccel, bAccel float64 // share of motion time spent accelerating
	recommended      string
}

// run prints the table for the depths.
func run(ctx context.Context, w io.Writer, depths []float64) error {
	rows, err := compute(ctx, depths)
	if err != nil {
		return err
	}
	printTable(w, rows)
	return nil
}

// compute plans the pocket at each depth and times both plans on both
// machines: two rows per depth, the stiff mill first.
func compute(ctx context.Context, depths []float64) ([]result, error) {
	machines := []timing.Machine{stiffMill(), weakRouter()}
	var rows []result
	for _, d := range depths {
		job, err := pocketJob(d)
		if err != nil {
			return nil, err
		}
		lay, err := pathplan.PlanLayered(ctx, job, pathplan.Options{})
		if err != nil {
			return nil, fmt.Errorf("depth %g: %w", d, err)
		}
		ban, err := pathplan.PlanBanded(ctx, job, pathplan.BandedOptions{})
		if err != nil {
			return nil, fmt.Errorf("depth %g: %w", d, err)
		}
		for _, m := range machines {
			lr, err := pathplan.TimePlan(ctx, lay, m, timing.Options{})
			if err != nil {
				return nil, err
			}
			br, err := pathplan.TimePlan(ctx, ban, m, timing.Options{})
			if err != nil {
				return nil, err
			}
			r := result{depth: d, machine: m.Name, layered: lr.TotalS, banded: br.TotalS,
				layAccel: accelShare(lr), bAccel: accelShare(br), recommended: pathplan.StrategyBanded}
			if r.layered < r.banded {
				r.recommended = pathplan.StrategyLayered
			}
			rows = append(rows, r)
		}
	}
	return rows, nil
}

// accelShare is the share of motion time lost to accelerating and braking.
func accelShare(r timing.Report) float64 {
	if m := r.FeedS + r.RapidS; m > 0 {
		return r.AccelLossS / m
	}
	return 0
}

// printTable writes the rows and the depths where the machines disagree.
func printTable(w io.Writer, rows []result) {
	fmt.Fprintf(w, "%-6s  %-12s  %9s  %9s  %11s  %s\n", "depth", "machine", "layered", "banded", "accel L/B", "faster")
	for _, r := range rows {
		fmt.Fprintf(w, "%4g mm  %-12s  %8.1fs  %8.1fs  %4.0f%%/%3.0f%%  %s\n",
			r.depth, r.machine, r.layered, r.banded, 100*r.layAccel, 100*r.bAccel, r.recommended)
	}
	for i := 0; i+1 < len(rows); i += 2 {
		if rows[i].recommended != rows[i+1].recommended {
			fmt.Fprintf(w, "at %g mm the recommendation flips: %s on the %s, %s on the %s\n",
				rows[i].depth, rows[i].recommended, rows[i].machine, rows[i+1].recommended, rows[i+1].machine)
		}
	}
	for _, name := range []string{stiffMill().Name, weakRouter().Name} {
		if d, ok := breakEven(rows, name); ok {
			fmt.Fprintf(w, "on the %s banded overtakes layered at about %.1f mm (interpolated)\n", name, d)
		}
	}
	fmt.Fprintln(w, "\nCaution: "+pathplan.SafetyCaution)
}

// breakEven returns the depth at which banded becomes faster than layered
// on the named machine, interpolating linearly between the two depths
// where the difference changes sign.
func breakEven(rows []result, machine string) (float64, bool) {
	var prev *result
	for i := range rows {
		r := &rows[i]
		if r.machine != machine {
			continue
		}
		if prev != nil {
			a, b := prev.layered-prev.banded, r.layered-r.banded
			if a < 0 && b >= 0 {
				return prev.depth + (r.depth-prev.depth)*(-a)/(b-a), true
			}
		}
		prev = r
	}
	return 0, false
}
