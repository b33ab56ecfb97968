package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/pathplan"
	"github.com/chipband/chipband/timing"
)

// runCheck implements "chipband check JOB PROGRAM.nc [--json]".
func runCheck(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("check", "check JOB.json PROGRAM.nc [--json] [--cell MM] [--step MM]", stderr)
	asJSON := fs.Bool("json", false, "print the summary as JSON")
	cell := fs.Float64("cell", engage.DefaultCellSize, "material grid spacing, mm")
	step := fs.Float64("step", engage.DefaultStep, "sampling step along the path, mm")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		fs.Usage()
		return badInputf("want a job file and a program file, got %d arguments", len(pos))
	}
	if !(*cell > 0) || math.IsInf(*cell, 0) {
		return badInputf("--cell must be a positive number of mm, got %v", *cell)
	}
	if !(*step > 0) || math.IsInf(*step, 0) {
		return badInputf("--step must be a positive number of mm, got %v", *step)
	}
	job, err := pathplan.LoadJob(pos[0])
	if err != nil {
		return badInput(err)
	}
	f, err := os.Open(pos[1])
	if err != nil {
		return badInput(err)
	}
	defer f.Close()
	tp, err := readToolpath(f)
	if err != nil {
		return badInputf("%s: %w", pos[1], err)
	}
	in, err := checkInput(job)
	if err != nil {
		return badInputf("%s: %w", pos[0], err)
	}
	in.Step = *step
	in.Material = engage.MaterialOptions{CellSize: *cell}
	tool := engage.Tool{Diameter: job.Tool.Diameter, FluteLength: job.Tool.FluteLength, Flutes: job.Tool.Flutes}
	res, err := engage.Check(ctx, in, tool, tp)
	if err != nil {
		if errors.Is(err, engage.ErrCellBudget) {
			return badInputf("%s: %w (try a larger --cell)", pos[1], err)
		}
		if errors.Is(err, engage.ErrSampleBudget) {
			return badInputf("%s: %w (try a larger --step)", pos[1], err)
		}
		return fmt.Errorf("%s: %w", pos[1], err)
	}
	s := res.Summary
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(s)
	}
	return printCheck(stdout, pos[1], job, s)
}

// checkInput describes the job's stock and features to the simulator: the
// features must be cleared to their floors, and the walls (the stock less
// every feature, engage.KeepOf) must stay.
func checkInput(job *pathplan.Job) (engage.CheckInput, error) {
	in := engage.CheckInput{
		Stock:      job.Stock.Outline,
		Top:        job.Stock.Top,
		Band:       job.Cut.Band,
		SpindleRPM: job.Cut.SpindleRPM,
	}
	regions := make([]geom.Shape, len(job.Features))
	for i, ft := range job.Features {
		in.Targets = append(in.Targets, engage.Target{Name: ft.Name, Region: ft.Region, Floor: job.Stock.Top - ft.Depth})
		regions[i] = ft.Region
	}
	keep, err := engage.KeepOf(job.Stock.Outline, regions)
	if err != nil {
		return in, fmt.Errorf("walls: %w", err)
	}
	in.Keep = keep
	return in, nil
}

// readToolpath reads a G-code program into a toolpath. Feed moves that go
// down while they move sideways (ramps and helices) count as entries.
func readToolpath(r io.Reader) (*geom.Toolpath, error) {
	rd := timing.NewReader(r)
	tp := &geom.Toolpath{}
	started := false
	for {
		b, err := rd.Next()
		if err == io.EOF {
			return tp, nil
		}
		if err != nil {
			return nil, err
		}
		var m geom.Move
		switch b.Kind {
		case timing.KindRapid:
			m = geom.Move{Kind: geom.Rapid}
		case timing.KindLine:
			m = geom.Move{Kind: geom.Feed, Feed: b.Feed}
		case timing.KindArc:
			m = geom.Move{Kind: geom.Feed, Feed: b.Feed, Arc: true, Center: geom.Pt(b.Center[0], b.Center[1]), CW: b.CW}
		default:
			continue
		}
		if !started {
			tp.Start = geom.Point3{X: b.From[0], Y: b.From[1], Z: b.From[2]}
			started = true
		}
		m.To = geom.Point3{X: b.To[0], Y: b.To[1], Z: b.To[2]}
		dxy := (b.To[0]-b.From[0])*(b.To[0]-b.From[0]) + (b.To[1]-b.From[1])*(b.To[1]-b.From[1])
		if m.Kind == geom.Feed && b.To[2] < b.From[2]-1e-9 && (dxy > 1e-12 || m.Arc) {
			m.Kind = geom.Entry
		}
		if b.Op != "" && (len(tp.Ops) == 0 || tp.Ops[len(tp.Ops)-1].Name != b.Op) {
			tp.Ops = append(tp.Ops, geom.Operation{Name: b.Op, First: len(tp.Moves)})
		}
		tp.Moves = append(tp.Moves, m)
	}
}

func printCheck(w io.Writer, name string, job *pathplan.Job, s engage.Summary) error {
	pct := func(x float64) float64 { return 100 * x }
	fmt.Fprintf(w, "%s against job %q, tool D%g mm\n", name, job.Name, job.Tool.Diameter)
	fmt.Fprintf(w, "  path %.1f mm: cutting %.1f, entries %.1f, plunges %.1f, air %.1f, rapids %.1f\n",
		s.Length, s.CutLength, s.EntryLength, s.PlungeLength, s.AirLength, s.RapidLength)
	fmt.Fprintf(w, "  radial engagement ae/D: max %.3f (1 mm average %.3f), mean %.3f; angle max %.1f°, mean %.1f°\n",
		s.MaxAeD, s.MaxEng, s.MeanAeD, s.MaxPhi, s.MeanPhi)
	if s.Band[1] > 0 {
		fmt.Fprintf(w, "  band [%.3f, %.3f]: %.1f %% of cutting length in band, %.1f %% above 1.15 × max\n",
			s.Band[0], s.Band[1], pct(s.InBandFraction), pct(s.AboveBandFraction))
	}
	fmt.Fprintf(w, "  air %.1f %% of feed length; %d plunges; deepest axial engagement %.2f mm; removed %.0f mm³\n",
		pct(s.AirFraction), s.Plunges, s.MaxAP, s.Volume)
	if s.LinkCutLength > 0 {
		fmt.Fprintf(w, "  links cut material over %.1f mm (ae/D up to %.3f)\n", s.LinkCutLength, s.LinkMaxAeD)
	}
	if s.BeyondFlute > 0 {
		fmt.Fprintf(w, "  WARNING: %.1f mm of path cuts deeper than the flute length\n", s.BeyondFlute)
	}
	if s.GougeMove >= 0 && s.MaxGouge > 0 {
		fmt.Fprintf(w, "  WARNING: wall gouge %.3f mm at (%.3f, %.3f, %.3f), move %d\n", s.MaxGouge, s.GougeAt.X, s.GougeAt.Y, s.GougeAt.Z, s.GougeMove)
	}
	for _, t := range s.Targets {
		fmt.Fprintf(w, "  feature %-20s %s\n", fmt.Sprintf("%q", t.Name), targetLine(t))
	}
	if n := len(s.RapidViolations); n > 0 {
		fmt.Fprintf(w, "  SAFETY: %d rapid move(s) through material:\n", n)
		for i, v := range s.RapidViolations {
			if i == 10 {
				fmt.Fprintf(w, "    … %d more\n", n-10)
				break
			}
			fmt.Fprintf(w, "    move %d at (%.3f, %.3f, %.3f), %.3f mm into material\n", v.Move, v.At.X, v.At.Y, v.At.Z, v.Depth)
		}
	} else {
		fmt.Fprintln(w, "  no rapid moves through material")
	}
	return nil
}

func targetLine(t engage.TargetResidual) string {
	s := fmt.Sprintf("uncut %.2f mm² (highest %.3f mm above the floor)", t.UncutArea, t.MaxAbove)
	if t.FloorGouge > 0 {
		s += fmt.Sprintf("; WARNING: floor gouge %.3f mm", t.FloorGouge)
	}
	return s
}
