package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"time"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/pathplan"
	"github.com/chipband/chipband/timing"
)

const compareSynopsis = "compare JOB [--machine M] [--material NAME] [--square-islands] [--square-corners] [--direct-turns] [--json] [--html R.html] [--quiet]"

// runCompare implements `chipband compare JOB [--machine M] [--material
// NAME] [--square-islands] [--square-corners] [--direct-turns] [--json]
// [--html R.html] [--quiet]`: it plans both strategies for every feature, times and
// simulates them and recommends one per feature.
func runCompare(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("compare", compareSynopsis, stderr)
	machinePath := fl.String("machine", "", "machine file (JSON); default: the job's machine, else the built-in bench mill")
	material := fl.String("material", pathplan.DefaultMaterial, "work material for spindle power: "+materialNames())
	squareIslands := fl.Bool("square-islands", false, "plan banded with its pass ends square to islands, as plan --square-islands does")
	squareCorners := fl.Bool("square-corners", false, "plan banded with square inside corners on its pass along the walls, as plan --square-corners does")
	directTurns := fl.Bool("direct-turns", false, "plan banded with direct turns at walls, as plan --direct-turns does")
	asJSON := fl.Bool("json", false, "write the comparison as JSON on stdout")
	htmlPath := fl.String("html", "", "also write a self-contained HTML report here")
	quiet := fl.Bool("quiet", false, "no progress on stderr")
	pos, err := parseFlags(fl, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return badInputf("want exactly one job file, got %d", len(pos))
	}
	job, err := pathplan.LoadJob(pos[0])
	if err != nil {
		return badInput(err)
	}
	opts := pathplan.CompareOptions{Material: *material, Detail: *htmlPath != ""}
	opts.Banded.SquareIslands = *squareIslands
	opts.Banded.SquareCorners = *squareCorners
	opts.Banded.DirectTurns = *directTurns
	if *machinePath != "" {
		m, err := loadMachine(*machinePath)
		if err != nil {
			return err
		}
		opts.Machine = &m
	}
	prog := newProgress(stderr, *quiet)
	opts.Progress = prog.update
	cmp, err := pathplan.Compare(ctx, job, opts)
	prog.done()
	if err != nil {
		if pathplan.IsJobError(err) {
			return badInput(fmt.Errorf("%s: %w", pos[0], err))
		}
		return err
	}
	if *htmlPath != "" {
		if err := writeReportFile(*htmlPath, cmp); err != nil {
			return err
		}
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(compareJSON{Comparison: cmp, Caution: pathplan.SafetyCaution})
	}
	if err := writeComparison(stdout, cmp); err != nil {
		return err
	}
	if *htmlPath != "" {
		fmt.Fprintf(stdout, "\nreport written to %s\n", *htmlPath)
	}
	return nil
}

// compareJSON is the --json output: the comparison and the caution.
type compareJSON struct {
	*pathplan.Comparison
	Caution string `json:"caution"`
}

// materialNames lists the work materials of the Kienzle table.
func materialNames() string {
	var names []string
	for _, w := range engage.TypicalKienzle() {
		names = append(names, w.Name)
	}
	return strings.Join(names, ", ")
}

// loadMachine reads a machine file; every problem is bad input.
func loadMachine(path string) (timing.Machine, error) {
	f, err := os.Open(path)
	if err != nil {
		return timing.Machine{}, badInput(err)
	}
	defer f.Close()
	m, err := timing.ReadMachine(f)
	if err != nil {
		return timing.Machine{}, badInput(fmt.Errorf("%s: %w", path, err))
	}
	return m, nil
}

// writeReportFile writes the HTML report of cmp to path.
func writeReportFile(path string, cmp *pathplan.Comparison) error {
	var b strings.Builder
	if err := pathplan.WriteReport(&b, cmp); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return writeOutput(path, []byte(b.String()))
}

// writeOutput writes data to path through a temporary file in the same
// directory, so a reader never sees half a file.
func writeOutput(path string, data []byte) error {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	name := tmp.Name()
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		os.Remove(name)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		os.Remove(name)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Chmod(name, 0o644); err != nil {
		os.Remove(name)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Rename(name, path); err != nil {
		os.Remove(name)
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}

// writeComparison prints the comparison table, the reasons, the totals and
// the caution.
func writeComparison(w io.Writer, c *pathplan.Comparison) error {
	var b strings.Builder
	name := c.JobName
	if name == "" {
		name = "job"
	}
	src := map[string]string{"option": "from --machine", "job": "from the job", "default": "built-in default"}[c.MachineSource]
	mname := c.Machine.Name
	if mname == "" {
		mname = "machine"
	}
	fmt.Fprintf(&b, "%s: %d features on %s (%s), accel %g/%g/%g mm/s², models %s\n",
		name, len(c.Features), mname, src, c.Machine.Accel.X, c.Machine.Accel.Y, c.Machine.Accel.Z, strings.Join(c.Models, " and "))
	variants := ""
	if v := c.BandedVariants(); len(v) > 0 {
		variants = "; banded " + strings.Join(v, ", ")
	}
	fmt.Fprintf(&b, "spindle power for %s (kc1.1 %g N/mm², mc %g); band %g–%g of D%s; times under R1\n\n",
		c.Material, c.Kienzle.Kc11, c.Kienzle.Mc, c.Band[0], c.Band[1], variants)
	jerk := len(c.Models) > 1
	hdr := []string{"feature", "strategy", "levels", "cycle"}
	if jerk {
		hdr = append(hdr, "jerk")
	}
	hdr = append(hdr, "cut", "air", "link", "MRR cm³/min", "max ae/D", "mean ae/D", "flute", "peak kW", "")
	rows := [][]string{hdr}
	for _, f := range c.Features {
		for i, r := range []pathplan.FeatureResult{f.Layered, f.Banded} {
			fname := ""
			if i == 0 {
				fname = f.Name
			}
			mark := ""
			if r.Strategy == f.Recommended {
				mark = "<- faster"
			}
			row := []string{fname, r.Strategy, fmt.Sprint(r.Levels), clockS(r.CycleS)}
			if jerk {
				row = append(row, clockS(r.JerkS))
			}
			row = append(row, clockS(r.CutS), clockS(r.AirS), clockS(r.LinkS),
				fmt.Sprintf("%.1f", r.MRR), fmt.Sprintf("%.3f", r.MaxEngagement), fmt.Sprintf("%.3f", r.MeanAeD),
				fmt.Sprintf("%.0f %%", 100*r.FluteUsage), fmt.Sprintf("%.2f", r.PeakPowerKW), mark)
			rows = append(rows, row)
		}
	}
	writeTable(&b, rows)
	b.WriteString("\n")
	for _, f := range c.Features {
		kind := "closed"
		if f.Open {
			kind = "open"
		}
		fmt.Fprintf(&b, "%s (%s, %g mm deep, %.0f %% channels): %s\n", f.Name, kind, f.Depth, 100*f.ChannelShare, f.Reason)
	}
	t := c.Totals
	fmt.Fprintf(&b, "\ntotal: layered program %s, banded program %s, best per feature %s",
		clockS(t.LayeredS), clockS(t.BandedS), clockS(t.BestS))
	if jerk {
		fmt.Fprintf(&b, " (jerk-limited: layered %s, banded %s)", clockS(t.LayeredJerkS), clockS(t.BandedJerkS))
	}
	b.WriteString("\n")
	for _, wmsg := range c.Warnings {
		fmt.Fprintf(&b, "warning: %s\n", wmsg)
	}
	b.WriteString("\nCAUTION: " + pathplan.SafetyCaution + "\n")
	_, err := io.WriteString(w, b.String())
	return err
}

// writeTable writes rows as left-aligned text columns (numbers right
// aligned) separated by two spaces.
func writeTable(b *strings.Builder, rows [][]string) {
	var width []int
	for _, r := range rows {
		for i, c := range r {
			if i >= len(width) {
				width = append(width, 0)
			}
			width[i] = max(width[i], len([]rune(c)))
		}
	}
	for ri, r := range rows {
		var line strings.Builder
		for i, c := range r {
			pad := strings.Repeat(" ", width[i]-len([]rune(c)))
			if i > 1 && ri > 0 && i < len(r)-1 {
				line.WriteString(pad + c)
			} else {
				line.WriteString(c + pad)
			}
			if i < len(r)-1 {
				line.WriteString("  ")
			}
		}
		b.WriteString(strings.TrimRight(line.String(), " ") + "\n")
	}
}

// clockS formats seconds as m:ss.s, or h:mm:ss from an hour on.
func clockS(s float64) string {
	if s < 0 {
		return "-" + clockS(-s)
	}
	if s >= 3600 {
		t := int(s + 0.5)
		return fmt.Sprintf("%d:%02d:%02d", t/3600, t/60%60, t%60)
	}
	t := int(s*10 + 0.5)
	return fmt.Sprintf("%d:%02d.%d", t/600, t/10%60, t%10)
}

// progress prints the state of a long comparison on stderr, only when
// stderr is a terminal, not before a second has passed and at most five
// times a second.
type progress struct {
	mu    sync.Mutex
	w     io.Writer
	on    bool
	start time.Time
	last  time.Time
	state map[string]pathplan.CompareProgress
	shown bool
}

// newProgress returns a progress printer on stderr; it prints nothing when
// quiet is set or stderr is not a terminal.
func newProgress(stderr io.Writer, quiet bool) *progress {
	return &progress{w: stderr, on: !quiet && isTerminal(stderr), start: time.Now(), state: map[string]pathplan.CompareProgress{}}
}

// isTerminal reports whether w is a character device (a terminal).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

func (p *progress) update(s pathplan.CompareProgress) {
	if !p.on {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	p.state[s.Strategy] = s
	now := time.Now()
	if now.Sub(p.start) < time.Second || now.Sub(p.last) < 200*time.Millisecond {
		return
	}
	p.last = now
	var parts []string
	for _, name := range []string{pathplan.StrategyLayered, pathplan.StrategyBanded} {
		st, ok := p.state[name]
		if !ok {
			continue
		}
		part := fmt.Sprintf("%s %s", name, st.Stage)
		if st.Feature >= 0 {
			part += fmt.Sprintf(" feature %d/%d", st.Feature+1, st.Features)
		}
		part += fmt.Sprintf(" %3.0f%%", 100*st.Fraction)
		parts = append(parts, part)
	}
	line := strings.Join(parts, " | ")
	fmt.Fprintf(p.w, "\r%-78s", line)
	p.shown = true
}

// done clears the progress line.
func (p *progress) done() {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.shown {
		fmt.Fprintf(p.w, "\r%78s\r", "")
		p.shown = false
	}
}
