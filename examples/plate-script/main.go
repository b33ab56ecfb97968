// Command plate-script is a job-shop script: it builds the job for an
// invented mounting plate in Go, plans both roughing strategies, keeps the
// faster program for the shop's machine and writes it as G-code.
//
//	go run ./examples/plate-script -o plate.nc
package main

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"io"
	"os"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/pathplan"
	"github.com/chipband/chipband/timing"
)

func main() {
	out := flag.String("o", "plate.nc", "G-code file to write")
	flag.Parse()
	if err := run(context.Background(), *out, os.Stdout); err != nil {
		fmt.Fprintln(os.Stderr, "plate-script:", err)
		os.Exit(1)
	}
}

// shopMill is the shop's machine (invented).
func shopMill() timing.Machine {
	return timing.Machine{
		Name:            "shop mill",
		MaxFeed:         timing.Axes{X: 6000, Y: 6000, Z: 3000},
		Rapid:           timing.Axes{X: 15000, Y: 15000, Z: 8000},
		Accel:           timing.Axes{X: 800, Y: 800, Z: 500},
		CornerTolerance: 0.02,
	}
}

// plateJob builds the job: a 100 × 70 mm aluminium plate, 12 mm thick,
// with a 6 mm deep closed pocket for a sensor and a 12 mm deep rebate open
// along one long edge.
func plateJob() (*pathplan.Job, error) {
	shape := func(wkt string) geom.Shape {
		s, err := geom.ParseWKT(wkt)
		if err != nil {
			panic(err) // the literals below are valid
		}
		return s
	}
	m := shopMill()
	job := &pathplan.Job{
		Name:        "mounting plate",
		Description: "Invented: a sensor pocket and a rebate along one edge.",
		Stock:       pathplan.Stock{Outline: shape("POLYGON ((0 0, 100 0, 100 70, 0 70, 0 0))"), Top: 0},
		Features: []pathplan.Feature{
			{Name: "sensor pocket", Region: shape("POLYGON ((20 30, 60 30, 60 58, 20 58, 20 30))"), Depth: 6},
			{Name: "rebate", Region: shape("POLYGON ((-10 -10, 110 -10, 110 14, -10 14, -10 -10))"), Depth: 12},
		},
		Tool: pathplan.Tool{Diameter: 6, FluteLength: 20, Flutes: 3},
		Cut: pathplan.Cut{
			Band: [2]float64{0.05, 0.1}, SpindleRPM: 16000, ChipLoad: 0.03,
			Layered:   pathplan.Layered{Stepover: 0.5, Stepdown: 1.5},
			RampAngle: 3, HelixDiameter: 4,
		},
		Clearance: 5,
		Machine:   &m,
	}
	return job, job.Validate()
}

// run plans the plate, writes the faster program to out and prints what
// it did.
func run(ctx context.Context, out string, w io.Writer) error {
	job, err := plateJob()
	if err != nil {
		return err
	}
	lay, err := pathplan.PlanLayered(ctx, job, pathplan.Options{})
	if err != nil {
		return err
	}
	ban, err := pathplan.PlanBanded(ctx, job, pathplan.BandedOptions{})
	if err != nil {
		return err
	}
	best, bestS := lay, 0.0
	for _, p := range []*pathplan.Plan{lay, ban} {
		rep, err := pathplan.TimePlan(ctx, p, *job.Machine, timing.Options{})
		if err != nil {
			return err
		}
		fmt.Fprintf(w, "%-8s %s", p.Strategy, pathplan.FormatSeconds(rep.TotalS))
		for _, op := range rep.Operations {
			fmt.Fprintf(w, "  [%s %s]", op.Name, pathplan.FormatSeconds(op.TotalS))
		}
		fmt.Fprintln(w)
		if bestS == 0 || rep.TotalS < bestS {
			best, bestS = p, rep.TotalS
		}
	}
	var prog bytes.Buffer
	if err := pathplan.WriteGCode(&prog, best); err != nil {
		return err
	}
	// Read the program back and time it as the machine will see it.
	rep, err := timing.EstimateProgram(ctx, bytes.NewReader(prog.Bytes()), *job.Machine, timing.Options{})
	if err != nil {
		return fmt.Errorf("reading the written program back: %w", err)
	}
	if err := os.WriteFile(out, prog.Bytes(), 0o644); err != nil {
		return err
	}
	fmt.Fprintf(w, "wrote %s: %s roughing, %d lines, %s on the %s\n",
		out, best.Strategy, bytes.Count(prog.Bytes(), []byte("\n")), pathplan.FormatSeconds(rep.TotalS), job.Machine.Name)
	fmt.Fprintln(w, "Caution: "+pathplan.SafetyCaution)
	return nil
}
