package pathplan_test

import (
	"context"
	"fmt"
	"os"
	"strings"

	"github.com/chipband/chipband/pathplan"
)

// Plan the built-in demo part with the layered strategy and list its
// features.
func ExamplePlanLayered() {
	job := pathplan.DemoJob()
	plan, err := pathplan.PlanLayered(context.Background(), job, pathplan.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, f := range plan.Features {
		kind := "closed"
		if f.Open {
			kind = "open"
		}
		fmt.Printf("%s: %s, %d levels down to %g mm\n", f.Name, kind, len(f.Levels), f.Levels[len(f.Levels)-1])
	}
	// Output:
	// deep step: open, 14 levels down to -14 mm
	// boss pocket: closed, 8 levels down to -8 mm
	// comb pocket: closed, 3 levels down to -3 mm
}

// Read a job, plan it and write the G-code.
func ExampleWriteGCode() {
	job, err := pathplan.ReadJob(strings.NewReader(`{
	  "name": "slot",
	  "stock": {"outline": "POLYGON ((0 0, 60 0, 60 40, 0 40, 0 0))", "top": 0},
	  "features": [{"name": "slot", "region": "POLYGON ((-5 15, 65 15, 65 25, -5 25, -5 15))", "depth": 3}],
	  "tool": {"diameter": 6, "flute_length": 15, "flutes": 2},
	  "cut": {"spindle_rpm": 20000, "chip_load": 0.025, "layered": {"stepover": 0.5, "stepdown": 1.5}},
	  "clearance": 5}`))
	if err != nil {
		fmt.Println(err)
		return
	}
	plan, err := pathplan.PlanLayered(context.Background(), job, pathplan.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := pathplan.WriteGCode(os.Stdout, plan); err != nil {
		fmt.Println(err)
	}
}

// A job error names the feature.
func ExampleReadJob() {
	_, err := pathplan.ReadJob(strings.NewReader(`{
	  "stock": {"outline": "POLYGON ((0 0, 60 0, 60 40, 0 40, 0 0))", "top": 0},
	  "features": [{"name": "slot A", "region": "POLYGON ((10 10, 50 10, 50 30, 10 30, 10 10))", "depth": 0}],
	  "tool": {"diameter": 6, "flute_length": 15, "flutes": 2},
	  "cut": {"spindle_rpm": 20000, "chip_load": 0.025},
	  "clearance": 5}`))
	fmt.Println(err)
	// Output:
	// feature "slot A": depth must be positive, got 0
}

// A job that names no machine is timed on the default one.
func ExampleMachineFor() {
	job := pathplan.DemoJob()
	m, src := pathplan.MachineFor(job, nil)
	fmt.Println(m.Name, src)
	job.Machine = nil
	m, src = pathplan.MachineFor(job, nil)
	fmt.Println(m.Name, src)
	// Output:
	// demo router job
	// bench mill default
}

// The banded options that trade band for time are off by default; a
// program planned with one says so in its G-code header.
func ExampleBandedOptions() {
	job, err := pathplan.ReadJob(strings.NewReader(`{
	  "name": "slot",
	  "stock": {"outline": "POLYGON ((0 0, 40 0, 40 30, 0 30, 0 0))", "top": 0},
	  "features": [{"name": "slot", "region": "POLYGON ((-5 8, 45 8, 45 22, -5 22, -5 8))", "depth": 6}],
	  "tool": {"diameter": 6, "flute_length": 15, "flutes": 3},
	  "cut": {"spindle_rpm": 16000, "chip_load": 0.03, "layered": {"stepover": 0.5, "stepdown": 2}},
	  "clearance": 5}`))
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, opts := range []pathplan.BandedOptions{{}, {DirectTurns: true}} {
		plan, err := pathplan.PlanBanded(context.Background(), job, opts)
		if err != nil {
			fmt.Println(err)
			return
		}
		var prog strings.Builder
		if err := pathplan.WriteGCode(&prog, plan); err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("direct turns %v: %q\n", opts.DirectTurns, plan.Options)
		for _, line := range strings.Split(prog.String(), "\n") {
			if strings.HasPrefix(line, "(options:") {
				fmt.Println(line)
			}
		}
	}
	// Output:
	// direct turns false: []
	// direct turns true: ["direct turns"]
	// (options: direct turns)
}
