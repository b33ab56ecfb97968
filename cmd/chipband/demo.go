package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"

	"github.com/chipband/chipband/pathplan"
)

// runDemo implements `chipband demo [-o DIR] [--quiet]`: it compares both
// strategies on the built-in demo part and writes G-code, SVG top views,
// the comparison as JSON and the HTML report into DIR.
func runDemo(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fl := newFlags("demo", "demo [-o DIR] [--quiet]", stderr)
	dir := fl.String("o", "chipband-demo", "directory to write the demo's files into")
	quiet := fl.Bool("quiet", false, "no progress on stderr")
	pos, err := parseFlags(fl, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return badInputf("demo takes no files, got %q", pos)
	}
	if err := os.MkdirAll(*dir, 0o755); err != nil {
		return badInput(fmt.Errorf("output directory: %w", err))
	}
	start := time.Now()
	job := pathplan.DemoJob()
	prog := newProgress(stderr, *quiet)
	cmp, err := pathplan.Compare(ctx, job, pathplan.CompareOptions{Detail: true, Progress: prog.update})
	prog.done()
	if err != nil {
		return fmt.Errorf("demo: %w", err)
	}
	files := []struct {
		name  string
		write func(w io.Writer) error
	}{
		{"job.json", func(w io.Writer) error { _, err := w.Write(pathplan.DemoJobJSON()); return err }},
		{"layered.nc", func(w io.Writer) error { return pathplan.WriteGCode(w, cmp.Layered) }},
		{"banded.nc", func(w io.Writer) error { return pathplan.WriteGCode(w, cmp.Banded) }},
		{"layered.svg", func(w io.Writer) error { return pathplan.WriteSVG(w, cmp.Layered, pathplan.SVGOptions{}) }},
		{"banded.svg", func(w io.Writer) error { return pathplan.WriteSVG(w, cmp.Banded, pathplan.SVGOptions{}) }},
		{"comparison.json", func(w io.Writer) error {
			enc := json.NewEncoder(w)
			enc.SetIndent("", "  ")
			return enc.Encode(compareJSON{Comparison: cmp, Caution: pathplan.SafetyCaution})
		}},
		{"report.html", func(w io.Writer) error { return pathplan.WriteReport(w, cmp) }},
	}
	var written []string
	for _, f := range files {
		var b bytes.Buffer
		if err := f.write(&b); err != nil {
			return fmt.Errorf("demo: %s: %w", f.name, err)
		}
		path := filepath.Join(*dir, f.name)
		if err := writeOutput(path, b.Bytes()); err != nil {
			return err
		}
		written = append(written, path)
	}
	if err := writeComparison(stdout, cmp); err != nil {
		return err
	}
	if !*quiet {
		fmt.Fprintf(stderr, "demo finished in %.1f s\n", time.Since(start).Seconds())
	}
	fmt.Fprintf(stdout, "\nwritten:\n")
	for _, p := range written {
		fmt.Fprintf(stdout, "  %s\n", p)
	}
	fmt.Fprintf(stdout, "open %s in a browser for the pictures.\n", filepath.Join(*dir, "report.html"))
	return nil
}
