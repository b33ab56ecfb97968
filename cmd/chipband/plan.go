package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/pathplan"
	"github.com/chipband/chipband/timing"
)

// runPlan implements `chipband plan JOB --strategy layered|banded -o OUT.nc
// [--report R.json] [--svg OUT.svg] [--square-islands] [--square-corners]
// [--direct-turns]`: it plans one roughing strategy for a job and writes
// the G-code.
func runPlan(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("plan", "plan JOB --strategy layered|banded -o OUT.nc [--report R.json] [--svg OUT.svg] [--square-islands] [--square-corners] [--direct-turns]", stderr)
	strategy := fl.String("strategy", "layered", "roughing strategy: layered or banded")
	out := fl.String("o", "", "G-code file to write (required)")
	reportPath := fl.String("report", "", "also write a JSON report of the plan here")
	svgPath := fl.String("svg", "", "also write an SVG top view of the path here")
	squareIslands := fl.Bool("square-islands", false, "banded: leave pass ends square to islands, saving time at the cost of engagement spikes, and full slotting, at island walls")
	squareCorners := fl.Bool("square-corners", false, "banded: leave the inside corners of the pass along the walls square, without the fans that clear them, saving time at the cost of engagement spikes in every corner")
	directTurns := fl.Bool("direct-turns", false, "banded: step straight onto the next pass at walls, saving time where passes are short at the cost of engagement spikes at pass ends")
	pos, err := parseFlags(fl, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return badInputf("want exactly one job file, got %d", len(pos))
	}
	for _, f := range []struct {
		name string
		set  bool
	}{{"--square-islands", *squareIslands}, {"--square-corners", *squareCorners}, {"--direct-turns", *directTurns}} {
		if f.set && *strategy != "banded" {
			return badInputf("%s applies to --strategy banded only", f.name)
		}
	}
	if *out == "" {
		return badInputf("-o OUT.nc is required")
	}
	// Refuse an output that cannot be written before anything is written,
	// so a failed run leaves no output behind.
	for _, o := range []struct{ flag, path string }{{"-o", *out}, {"--report", *reportPath}, {"--svg", *svgPath}} {
		if o.path == "" {
			continue
		}
		if fi, err := os.Stat(filepath.Dir(o.path)); err != nil || !fi.IsDir() {
			return badInputf("%s %s: directory %s does not exist", o.flag, o.path, filepath.Dir(o.path))
		}
	}
	job, err := pathplan.LoadJob(pos[0])
	if err != nil {
		return badInput(err)
	}
	var plan *pathplan.Plan
	switch *strategy {
	case "layered":
		plan, err = pathplan.PlanLayered(ctx, job, pathplan.Options{})
	case "banded":
		plan, err = pathplan.PlanBanded(ctx, job, pathplan.BandedOptions{SquareIslands: *squareIslands, SquareCorners: *squareCorners, DirectTurns: *directTurns})
	default:
		return badInputf("unknown strategy %q (want layered or banded)", *strategy)
	}
	if err != nil {
		if pathplan.IsJobError(err) {
			return badInput(fmt.Errorf("%s: %w", pos[0], err))
		}
		return err
	}
	var prog bytes.Buffer
	if err := pathplan.WriteGCode(&prog, plan); err != nil {
		return err
	}
	var rep *timing.Report
	if job.Machine != nil {
		r, err := timing.EstimateProgram(ctx, bytes.NewReader(prog.Bytes()), *job.Machine, timing.Options{})
		if err != nil {
			return fmt.Errorf("timing the program: %w", err)
		}
		rep = &r
	}
	if err := writeFileAtomic(*out, prog.Bytes()); err != nil {
		return err
	}
	if *svgPath != "" {
		var svg bytes.Buffer
		if err := pathplan.WriteSVG(&svg, plan, pathplan.SVGOptions{}); err != nil {
			return err
		}
		if err := writeFileAtomic(*svgPath, svg.Bytes()); err != nil {
			return err
		}
	}
	if *reportPath != "" {
		pr := planReport(plan, rep)
		if plan.Strategy == "banded" {
			// Per feature: engagement by simulation, R1 cycle time and
			// the ratio to the material-removal bound (issue 6), on the
			// job's machine or else compare's default one.
			m, src := pathplan.MachineFor(job, nil)
			br, err := pathplan.BandedReport(ctx, plan, m)
			if err != nil {
				return fmt.Errorf("banded report: %w", err)
			}
			pr.Banded, pr.BandedMachine, pr.BandedMachineSource = br, m.Name, src
			pr.BandedOptions = &bandedOptionsJSON{SquareIslands: *squareIslands, SquareCorners: *squareCorners, DirectTurns: *directTurns}
		}
		data, err := json.MarshalIndent(pr, "", "  ")
		if err != nil {
			return err
		}
		if err := writeFileAtomic(*reportPath, append(data, '\n')); err != nil {
			return err
		}
	}
	return writePlanText(stdout, plan, rep, *out)
}

// planReportJSON is the --report file.
type planReportJSON struct {
	Job       string                    `json:"job"`
	Strategy  string                    `json:"strategy"`
	Caution   string                    `json:"caution"`
	Features  []pathplan.FeatureSummary `json:"features"`
	LengthMM  float64                   `json:"length_mm"`
	ByKindMM  map[string]float64        `json:"length_by_kind_mm"`
	Warnings  []string                  `json:"warnings"`
	TotalS    *float64                  `json:"total_s,omitempty"`
	Timing    *timing.Report            `json:"timing,omitempty"`
	Operation map[string]float64        `json:"operation_s,omitempty"`
	// Banded is the per-feature report of a banded plan, timed on
	// BandedMachine: the job's machine (source "job") or, when the job
	// names none, the machine compare uses by default (source "default").
	Banded              []pathplan.BandedFeatureReport `json:"banded,omitempty"`
	BandedMachine       string                         `json:"banded_machine,omitempty"`
	BandedMachineSource string                         `json:"banded_machine_source,omitempty"`
	// BandedOptions are the banded flags the plan was made with.
	BandedOptions *bandedOptionsJSON `json:"banded_options,omitempty"`
}

// bandedOptionsJSON records plan's banded flags in the report.
type bandedOptionsJSON struct {
	SquareIslands bool `json:"square_islands"`
	SquareCorners bool `json:"square_corners"`
	DirectTurns   bool `json:"direct_turns"`
}

func planReport(p *pathplan.Plan, rep *timing.Report) planReportJSON {
	r := planReportJSON{Job: p.Job.Name, Strategy: p.Strategy, Caution: pathplan.SafetyCaution,
		Features: p.Features, LengthMM: p.Length(), ByKindMM: map[string]float64{}, Warnings: p.Warnings}
	if r.Warnings == nil {
		r.Warnings = []string{}
	}
	for k, l := range p.LengthByKind() {
		r.ByKindMM[k.String()] = l
	}
	if rep != nil {
		r.TotalS = &rep.TotalS
		r.Timing = rep
		r.Operation = map[string]float64{}
		for _, o := range rep.Operations {
			if o.Name != "" {
				r.Operation[o.Name] = o.TotalS
			}
		}
	}
	return r
}

// writePlanText prints the caution and a short summary of the plan.
func writePlanText(w io.Writer, p *pathplan.Plan, rep *timing.Report, out string) error {
	var b strings.Builder
	b.WriteString("CAUTION: " + pathplan.SafetyCaution + "\n\n")
	name := p.Job.Name
	if name == "" {
		name = "job"
	}
	fmt.Fprintf(&b, "%s: %s roughing, %d features, path %.0f mm, written to %s\n", name, p.Strategy, len(p.Features), p.Length(), out)
	opTime := map[string]float64{}
	if rep != nil {
		for _, o := range rep.Operations {
			opTime[o.Name] = o.TotalS
		}
	}
	for _, f := range p.Features {
		kind := "closed"
		if f.Open {
			kind = "open"
		}
		fmt.Fprintf(&b, "  %-20s %-6s depth %5.2f mm, %2d levels, %3d passes, %2d entries, %2d lifts, %7.0f mm",
			f.Name, kind, f.Depth, len(f.Levels), f.Rings, f.Entries, f.Lifts, f.Length)
		if f.ExtraPasses > 0 {
			// The verification's extra passes ahead of overloads.
			fmt.Fprintf(&b, ", %d extra passes", f.ExtraPasses)
		}
		if t, ok := opTime[f.Name]; ok && rep != nil {
			fmt.Fprintf(&b, ", %s", clock(t))
		}
		b.WriteString("\n")
	}
	kinds := p.LengthByKind()
	fmt.Fprintf(&b, "  feed %.0f mm, entries %.0f mm, links %.0f mm, lifts %.0f mm, finish %.0f mm, rapids %.0f mm\n",
		kinds[geom.Feed], kinds[geom.Entry], kinds[geom.Link], kinds[geom.Lift], kinds[geom.Finish], kinds[geom.Rapid])
	if rep != nil {
		m := rep.Machine
		if m == "" {
			m = "the job's machine"
		}
		fmt.Fprintf(&b, "  estimated cycle time on %s (model %s): %s\n", m, rep.Model, clock(rep.TotalS))
	} else {
		b.WriteString("  no machine in the job: no time estimate\n")
	}
	for _, warn := range p.Warnings {
		fmt.Fprintf(&b, "warning: %s\n", warn)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// writeFileAtomic writes data to path through a temporary file in the same
// directory and a rename, so a failure never leaves a partial file.
func writeFileAtomic(path string, data []byte) (err error) {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) || errors.Is(err, fs.ErrPermission) {
			return badInput(err)
		}
		return err
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	if _, err = tmp.Write(data); err != nil {
		return err
	}
	if err = tmp.Sync(); err != nil {
		return err
	}
	if err = tmp.Close(); err != nil {
		return err
	}
	if err = os.Chmod(tmp.Name(), 0o644); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}
