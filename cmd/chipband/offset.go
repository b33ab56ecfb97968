package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
)

// runOffset implements "chipband offset --distance D IN.wkt".
func runOffset(ctx context.Context, args []string, stdout, stderr io.Writer) error {
	fs := newFlags("offset", "offset --distance D [--tol T] [--in wkt|geojson] [--out wkt|geojson] IN.wkt|IN.geojson|-", stderr)
	dist := fs.Float64("distance", 0, "offset distance in mm: positive grows the shape, negative shrinks it")
	tol := fs.Float64("tol", offset.DefaultTolerance, "largest chord deviation of round joins, mm")
	inFmt := fs.String("in", "", "input format, wkt or geojson (default: from the file extension, else wkt)")
	outFmt := fs.String("out", "", "output format, wkt or geojson (default: the input format)")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		fs.Usage()
		return badInputf("want exactly one input file (or - for standard input), got %d", len(pos))
	}
	distSet := false
	fs.Visit(func(f *flag.Flag) { distSet = distSet || f.Name == "distance" })
	if !distSet {
		return badInputf("--distance is required")
	}
	if *tol <= 0 || *tol > 1 {
		return badInputf("--tol must be in (0, 1] mm, got %g", *tol)
	}
	name := pos[0]
	format := strings.ToLower(*inFmt)
	if format == "" {
		format = formatFromName(name)
	}
	if format != "wkt" && format != "geojson" {
		return badInputf("--in: unknown format %q, want wkt or geojson", *inFmt)
	}
	data, err := readInput(name)
	if err != nil {
		return badInput(err)
	}
	var s geom.Shape
	if format == "geojson" {
		s, err = geom.ParseGeoJSON(data)
	} else {
		s, err = geom.ParseWKT(string(data))
	}
	if err != nil {
		return badInputf("%s: %w", name, err)
	}
	out, err := offset.Offset(s, *dist, *tol)
	if err != nil {
		return badInputf("%s: %w", name, err)
	}
	of := strings.ToLower(*outFmt)
	if of == "" {
		of = format
	}
	switch of {
	case "wkt":
		_, err = fmt.Fprintln(stdout, out.WKT())
	case "geojson":
		_, err = fmt.Fprintf(stdout, "%s\n", out.GeoJSON())
	default:
		return badInputf("--out: unknown format %q, want wkt or geojson", *outFmt)
	}
	return err
}

// formatFromName guesses a shape format from a file name.
func formatFromName(name string) string {
	switch strings.ToLower(filepath.Ext(name)) {
	case ".geojson", ".json":
		return "geojson"
	}
	return "wkt"
}

// readInput reads a named file, or standard input for "-", limiting the size
// so that a wrong file cannot exhaust memory.
func readInput(name string) ([]byte, error) {
	const limit = 256 << 20
	var r io.Reader
	if name == "-" {
		r = os.Stdin
	} else {
		f, err := os.Open(name)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		r = f
	}
	data, err := io.ReadAll(io.LimitReader(r, limit+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if len(data) > limit {
		return nil, fmt.Errorf("%s: larger than %d MiB", name, limit>>20)
	}
	if len(data) == 0 {
		return nil, errors.New(name + ": empty file")
	}
	return data, nil
}
