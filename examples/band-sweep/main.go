// Command band-sweep is an engagement study: it plans one invented pocket
// with the banded strategy at radial-engagement targets from 4 % to 15 %
// of the tool diameter and tabulates, for each, the cycle time on a bench
// mill, the engagement the simulation measured, the share of the flute
// length that does the work and the peak spindle power.
//
//	go run ./examples/band-sweep
package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/chipband/chipband/pathplan"
)

func main() {
	targets := []float64{0.04, 0.06, 0.08, 0.10, 0.12, 0.15}
	if err := run(context.Background(), os.Stdout, targets); err != nil {
		fmt.Fprintln(os.Stderr, "band-sweep:", err)
		os.Exit(1)
	}
}

// studyJob is the invented pocket: 36 × 24 mm, 10 mm deep, in aluminium,
// with a 6 mm three-flute end mill whose 20 mm flutes take the full depth
// in one level.
const studyJob = `{
  "name": "engagement study pocket",
  "stock": {"outline": "POLYGON ((0 0, 60 0, 60 44, 0 44, 0 0))", "top": 0},
  "features": [{"name": "pocket", "region": "POLYGON ((12 10, 48 10, 48 34, 12 34, 12 10))", "depth": 10}],
  "tool": {"diameter": 6, "flute_length": 20, "flutes": 3},
  "cut": {"band": [0.05, 0.1], "spindle_rpm": 18000, "chip_load": 0.03,
          "layered": {"stepover": 0.5, "stepdown": 1}},
  "clearance": 5
}`

// point is one target of the sweep.
type point struct {
	target float64
	res    pathplan.FeatureResult
}

// sweep plans and evaluates the pocket at each target. The job's band is
// set around each target (±25 %) so that the planner's verification holds
// that band and the in-band share is measured against it.
func sweep(ctx context.Context, targets []float64) ([]point, error) {
	var out []point
	for _, t := range targets {
		job, err := pathplan.ReadJob(strings.NewReader(studyJob))
		if err != nil {
			return nil, err
		}
		job.Cut.Band = [2]float64{0.75 * t, 1.25 * t}
		plan, err := pathplan.PlanBanded(ctx, job, pathplan.BandedOptions{Target: t})
		if err != nil {
			return nil, fmt.Errorf("target %.2f: %w", t, err)
		}
		res, err := pathplan.Evaluate(ctx, plan, pathplan.CompareOptions{})
		if err != nil {
			return nil, fmt.Errorf("target %.2f: %w", t, err)
		}
		out = append(out, point{t, res[0]})
	}
	return out, nil
}

// run prints the table of the sweep.
func run(ctx context.Context, w io.Writer, targets []float64) error {
	pts, err := sweep(ctx, targets)
	if err != nil {
		return err
	}
	m := pathplan.DemoMachine()
	fmt.Fprintf(w, "banded roughing of a 36 × 24 × 10 mm pocket, D6 mm, on the %s (model R1)\n\n", m.Name)
	fmt.Fprintf(w, "%7s  %10s  %8s  %9s  %9s  %8s  %6s  %8s\n", "target", "cycle", "MRR", "mean ae/D", "max ae/D", "in band", "flute", "peak kW")
	for _, p := range pts {
		r := p.res
		fmt.Fprintf(w, "%6.0f%%  %10s  %8.1f  %9.3f  %9.3f  %7.0f%%  %5.0f%%  %8.2f\n",
			100*p.target, pathplan.FormatSeconds(r.CycleS), r.MRR, r.MeanAeD, r.MaxEngagement, 100*r.InBand, 100*r.FluteUsage, r.PeakPowerKW)
	}
	fmt.Fprintln(w, "\nMRR in cm³/min; max ae/D as a 1 mm moving average; in band: share of cutting length within [0.8·min, 1.1·max] of ±25 % around the target.")
	fmt.Fprintln(w, "Caution: "+pathplan.SafetyCaution)
	return nil
}
