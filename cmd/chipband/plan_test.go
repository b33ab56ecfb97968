package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"

	"github.com/chipband/chipband/pathplan"
)

// A banded --report lists per feature the engagement summary, the R1
// cycle time and the ratio to the removal bound (issue 6), also for a job
// that names no machine: it is then timed on compare's default machine,
// and the report says so, with the banded flags it was planned with.
func TestPlanBandedReportWithoutMachine(t *testing.T) {
	job := writeTemp(t, "job.json", `{
  "name": "small pocket",
  "stock": {"outline": "POLYGON ((0 0, 40 0, 40 30, 0 30, 0 0))", "top": 0},
  "features": [{"name": "pocket", "region": "POLYGON ((10 8, 30 8, 30 22, 10 22, 10 8))", "depth": 4}],
  "tool": {"diameter": 6, "flute_length": 15, "flutes": 3},
  "cut": {"band": [0.05, 0.1], "allowance": 0, "spindle_rpm": 16000, "chip_load": 0.03,
          "layered": {"stepover": 0.5, "stepdown": 1}},
  "clearance": 5
}`)
	dir := t.TempDir()
	rep := filepath.Join(dir, "r.json")
	code, _, stderr := runCLI(t, "plan", job, "--strategy", "banded", "-o", filepath.Join(dir, "p.nc"), "--report", rep, "--direct-turns", "--square-corners")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	data, err := os.ReadFile(rep)
	if err != nil {
		t.Fatal(err)
	}
	var r struct {
		Banded []struct {
			Name       string `json:"name"`
			Engagement struct {
				InBand *float64 `json:"in_band_fraction"`
				MaxEng *float64 `json:"max_engagement"`
			} `json:"engagement"`
			CycleS float64 `json:"cycle_s"`
			BoundS float64 `json:"bound_s"`
			Ratio  float64 `json:"ratio"`
		} `json:"banded"`
		Machine string `json:"banded_machine"`
		Source  string `json:"banded_machine_source"`
		Options struct {
			SquareIslands *bool `json:"square_islands"`
			SquareCorners *bool `json:"square_corners"`
			DirectTurns   *bool `json:"direct_turns"`
		} `json:"banded_options"`
	}
	if err := json.Unmarshal(data, &r); err != nil {
		t.Fatalf("report is not JSON: %v", err)
	}
	if len(r.Banded) != 1 || r.Banded[0].Name != "pocket" {
		t.Fatalf("banded report %+v, want one entry for the pocket", r.Banded)
	}
	b := r.Banded[0]
	if b.Engagement.InBand == nil || b.Engagement.MaxEng == nil {
		t.Errorf("no engagement summary in %s", data)
	}
	if !(b.CycleS > 0 && b.BoundS > 0) || b.Ratio != b.CycleS/b.BoundS {
		t.Errorf("cycle %.3f s, bound %.3f s, ratio %.3f: want positive times and their ratio", b.CycleS, b.BoundS, b.Ratio)
	}
	if o := r.Options; o.SquareIslands == nil || *o.SquareIslands || o.DirectTurns == nil || !*o.DirectTurns || o.SquareCorners == nil || !*o.SquareCorners {
		t.Errorf("banded_options %+v, want square_islands false, square_corners and direct_turns true", o)
	}
	if r.Source != "default" || r.Machine != pathplan.DemoMachine().Name {
		t.Errorf("timed on %q (source %q), want %q (default)", r.Machine, r.Source, pathplan.DemoMachine().Name)
	}
}
