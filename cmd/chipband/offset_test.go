package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/chipband/chipband/geom"
)

func writeTemp(t *testing.T, name, content string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func TestOffsetCommand(t *testing.T) {
	in := writeTemp(t, "sq.wkt", "POLYGON((0 0,40 0,40 20,0 20,0 0))")
	code, out, stderr := runCLI(t, "offset", "--distance", "-5", in)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	s, err := geom.ParseWKT(out)
	if err != nil {
		t.Fatalf("output is not WKT: %v\n%s", err, out)
	}
	// Exact inward offset of a rectangle: (40−10)×(20−10), elementary geometry.
	if a := s.Area(); a < 300-1e-6 || a > 300+1e-6 {
		t.Errorf("area %g, want 300", a)
	}

	gj := writeTemp(t, "sq.geojson", `{"type":"Polygon","coordinates":[[[0,0],[10,0],[10,10],[0,10],[0,0]]]}`)
	code, out, stderr = runCLI(t, "offset", "--distance", "1", gj)
	if code != 0 || !strings.Contains(out, `"Polygon"`) {
		t.Fatalf("geojson: exit %d, out %q, stderr %q", code, out, stderr)
	}
}

func TestOffsetCommandBadInput(t *testing.T) {
	good := writeTemp(t, "sq.wkt", "POLYGON((0 0,10 0,10 10,0 10,0 0))")
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"no distance", []string{"offset", good}, "--distance is required"},
		{"no file", []string{"offset", "--distance", "1"}, "want exactly one input file"},
		{"missing file", []string{"offset", "--distance", "1", filepath.Join(t.TempDir(), "nope.wkt")}, "no such file"},
		{"bad wkt", []string{"offset", "--distance", "1", writeTemp(t, "bad.wkt", "POLYGON((0 0,1")}, "bad.wkt"},
		{"line not area", []string{"offset", "--distance", "1", writeTemp(t, "l.wkt", "LINESTRING(0 0,1 1)")}, "LINESTRING"},
		{"bow tie", []string{"offset", "--distance", "1", writeTemp(t, "bow.wkt", "POLYGON((0 0,10 10,10 0,0 10,0 0))")}, "bow.wkt"},
		{"bad tol", []string{"offset", "--distance", "1", "--tol", "-1", good}, "--tol"},
		{"bad flag", []string{"offset", "--distanse", "1", good}, "distanse"},
		{"bad number", []string{"offset", "--distance", "one", good}, "invalid value"},
		{"empty file", []string{"offset", "--distance", "1", writeTemp(t, "e.wkt", "")}, "empty file"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, stderr := runCLI(t, c.args...)
			if code != 2 {
				t.Errorf("exit %d, want 2 (stderr %q)", code, stderr)
			}
			if !strings.Contains(stderr, c.want) {
				t.Errorf("stderr %q does not contain %q", stderr, c.want)
			}
			if strings.Contains(stderr, "panic") || strings.Contains(stderr, "goroutine") {
				t.Errorf("stack trace in %q", stderr)
			}
		})
	}
}
