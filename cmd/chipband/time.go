package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"github.com/chipband/chipband/timing"
)

// runTime implements `chipband time --machine M PROGRAM.nc [--json]`: it
// predicts the cycle time of a G-code program on a machine.
func runTime(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("time", "time --machine M PROGRAM.nc [--json] [--model R1|jerk]", stderr)
	machinePath := fs.String("machine", "", "machine file (JSON: max_feed, rapid, accel, corner_tolerance)")
	asJSON := fs.Bool("json", false, "write the report as JSON")
	modelName := fs.String("model", "R1", "speed model: R1 (constant acceleration) or jerk (S-curve)")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if *machinePath == "" {
		return badInput(errors.New("--machine is required"))
	}
	if len(pos) != 1 {
		return badInput(fmt.Errorf("want exactly one program file, got %d", len(pos)))
	}
	model, err := timing.ParseModel(*modelName)
	if err != nil {
		return badInput(err)
	}
	mf, err := os.Open(*machinePath)
	if err != nil {
		return badInput(err)
	}
	m, err := timing.ReadMachine(mf)
	mf.Close()
	if err != nil {
		return badInput(fmt.Errorf("%s: %w", *machinePath, err))
	}
	pf, err := os.Open(pos[0])
	if err != nil {
		return badInput(err)
	}
	defer pf.Close()
	rep, err := timing.EstimateProgram(ctx, pf, m, timing.Options{Model: model})
	if err != nil {
		if ctx.Err() != nil {
			return err
		}
		return badInput(fmt.Errorf("%s: %w", pos[0], err))
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(rep)
	}
	return writeTimeText(stdout, pos[0], rep)
}

// writeTimeText prints a short human summary of a timing report.
func writeTimeText(w io.Writer, name string, r timing.Report) error {
	var b strings.Builder
	machine := r.Machine
	if machine == "" {
		machine = "machine"
	}
	fmt.Fprintf(&b, "%s on %s (model %s): %s\n", name, machine, r.Model, clock(r.TotalS))
	fmt.Fprintf(&b, "  feed        %s  (%.0f mm)\n", clock(r.FeedS), r.FeedLength)
	fmt.Fprintf(&b, "  rapid       %s  (%.0f mm)\n", clock(r.RapidS), r.RapidLength)
	if r.DwellS > 0 {
		fmt.Fprintf(&b, "  dwell       %s\n", clock(r.DwellS))
	}
	if r.ToolChangeS > 0 {
		fmt.Fprintf(&b, "  tool change %s\n", clock(r.ToolChangeS))
	}
	if r.SpindleS > 0 {
		fmt.Fprintf(&b, "  spindle     %s\n", clock(r.SpindleS))
	}
	fmt.Fprintf(&b, "  lost to acceleration %s of the motion time (%.1f %%)\n", clock(r.AccelLossS), pct(r.AccelLossS, r.FeedS+r.RapidS))
	fmt.Fprintf(&b, "  %d blocks\n", r.Blocks)
	named := 0
	for _, o := range r.Operations {
		if o.Name != "" {
			named++
		}
	}
	if named > 0 {
		b.WriteString("operations:\n")
		for _, o := range r.Operations {
			n := o.Name
			if n == "" {
				n = "(before first operation)"
			}
			fmt.Fprintf(&b, "  %-30s %s\n", n, clock(o.TotalS))
		}
	}
	if r.WindowLimited > 0 {
		fmt.Fprintf(&b, "note: %d moves were planned conservatively (look-ahead window too short)\n", r.WindowLimited)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// clock formats seconds as h:mm:ss.s or m:ss.s.
func clock(s float64) string {
	neg := s < 0
	if neg {
		s = -s
	}
	h := int(s / 3600)
	m := int(s/60) % 60
	sec := s - float64(h*3600+m*60)
	sign := ""
	if neg {
		sign = "-"
	}
	if h > 0 {
		return fmt.Sprintf("%s%d:%02d:%04.1f", sign, h, m, sec)
	}
	return fmt.Sprintf("%s%d:%04.1f", sign, m, sec)
}

func pct(a, b float64) float64 {
	if b == 0 {
		return 0
	}
	return 100 * a / b
}
