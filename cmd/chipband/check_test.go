package main

import (
	"encoding/json"
	"path/filepath"
	"strings"
	"testing"
)

func jobFile(name string) string { return filepath.Join("..", "..", "testdata", "jobs", name) }

func TestCheckReportsRapidThroughStock(t *testing.T) {
	// A G0 at Z−1 straight across the stock of the closed pocket job is the
	// kind of program that breaks tools: it must be listed as a violation.
	prog := writeTemp(t, "bad.nc", "G21 G90 G17\nG0 Z5\nG0 X50 Y35\nG1 Z-1 F300\nG0 X95 Y35\nG0 Z5\nM30\n")
	code, out, stderr := runCLI(t, "check", jobFile("closed_pocket.json"), prog, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var s struct {
		MaxEngagement   *float64          `json:"max_engagement"`
		InBandFraction  *float64          `json:"in_band_fraction"`
		Plunges         int               `json:"plunges"`
		RapidViolations []json.RawMessage `json:"rapid_violations"`
	}
	if err := json.Unmarshal([]byte(out), &s); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, out)
	}
	if s.MaxEngagement == nil || s.InBandFraction == nil {
		t.Errorf("JSON lacks max_engagement or in_band_fraction (design.md §7): %s", out)
	}
	if len(s.RapidViolations) == 0 {
		t.Errorf("no rapid violation reported for a G0 through stock")
	}
	// The vertical feed from Z5 to Z−1 into uncut stock is a plunge.
	if s.Plunges != 1 {
		t.Errorf("plunges = %d, want 1", s.Plunges)
	}
}

func TestCheckBadInput(t *testing.T) {
	prog := writeTemp(t, "ok.nc", "G0 Z5\n")
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"one file", []string{"check", jobFile("closed_pocket.json")}, "want a job file and a program file"},
		{"missing job", []string{"check", filepath.Join(t.TempDir(), "j.json"), prog}, "no such file"},
		{"bad job", []string{"check", writeTemp(t, "j.json", `{"stock":1}`), prog}, "j.json"},
		{"plane", []string{"check", jobFile("closed_pocket.json"), writeTemp(t, "p.nc", "G19\n")}, "line 1"},
		{"units", []string{"check", jobFile("closed_pocket.json"), writeTemp(t, "u.nc", "G0 Z5\nG93 G1 X1 F2\n")}, "line 2"},
		{"bad cell", []string{"check", "--cell", "0", jobFile("closed_pocket.json"), prog}, "--cell"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, _, stderr := runCLI(t, c.args...)
			if code != 2 || !strings.Contains(stderr, c.want) {
				t.Errorf("exit %d stderr %q; want 2 and %q", code, stderr, c.want)
			}
		})
	}
}
