package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// tinyJobFile writes an invented small pocket job and returns its path.
func tinyJobFile(t *testing.T) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "tiny.json")
	err := os.WriteFile(p, []byte(`{
  "name": "tiny pocket",
  "stock": {"outline": "POLYGON ((0 0, 50 0, 50 40, 0 40, 0 0))", "top": 0},
  "features": [{"name": "pocket", "region": "POLYGON ((10 10, 40 10, 40 30, 10 30, 10 10))", "depth": 3}],
  "tool": {"diameter": 6, "flute_length": 20, "flutes": 3},
  "cut": {"band": [0.05, 0.1], "spindle_rpm": 18000, "chip_load": 0.03,
          "layered": {"stepover": 0.5, "stepdown": 1.5}},
  "clearance": 5
}`), 0o644)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func TestCompareText(t *testing.T) {
	job := tinyJobFile(t)
	html := filepath.Join(t.TempDir(), "r.html")
	code, out, stderr := runCLI(t, "compare", job, "--html", html, "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"tiny pocket", "built-in default", "layered", "banded", "<- faster", "is faster by", "CAUTION: Machining can injure", "total: layered program"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	if stderr != "" {
		t.Errorf("--quiet, yet stderr %q", stderr)
	}
	page, err := os.ReadFile(html)
	if err != nil || !strings.Contains(string(page), `id="comparison"`) {
		t.Errorf("report: %v, %d bytes", err, len(page))
	}
}

func TestCompareJSONAndMachineFlag(t *testing.T) {
	job := tinyJobFile(t)
	code, out, stderr := runCLI(t, "compare", job, "--json", "--machine", "../../testdata/machines/hobby-router.json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var got struct {
		MachineSource string `json:"machine_source"`
		Machine       struct {
			Name string `json:"name"`
		} `json:"machine"`
		Features []struct {
			Name        string `json:"name"`
			Recommended string `json:"recommended"`
			Layered     struct {
				CycleS float64 `json:"cycle_s"`
			} `json:"layered"`
			Banded struct {
				CycleS float64 `json:"cycle_s"`
			} `json:"banded"`
		} `json:"features"`
		Totals struct {
			BestS float64 `json:"best_s"`
		} `json:"totals"`
		Caution string `json:"caution"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, out)
	}
	if got.MachineSource != "option" || got.Machine.Name != "hobby router" {
		t.Errorf("machine %q from %q, want hobby router from the option", got.Machine.Name, got.MachineSource)
	}
	if len(got.Features) != 1 || got.Features[0].Recommended == "" || got.Totals.BestS <= 0 || got.Caution == "" {
		t.Errorf("incomplete JSON: %+v", got)
	}
}

func TestCompareBadInputExits2(t *testing.T) {
	job := tinyJobFile(t)
	badJob := filepath.Join(t.TempDir(), "bad.json")
	os.WriteFile(badJob, []byte(`{"name": "x", "colour": "red"}`), 0o644)
	for _, args := range [][]string{
		{"compare"},
		{"compare", "no-such-job.json"},
		{"compare", badJob},
		{"compare", job, "--machine", "no-such-machine.json"},
		{"compare", job, "--material", "unobtainium"},
		{"compare", job, "--frobnicate"},
		{"demo", "extra-argument"},
	} {
		code, _, stderr := runCLI(t, args...)
		if code != 2 {
			t.Errorf("%v: exit %d, want 2 (stderr %q)", args, code, stderr)
		}
		if stderr == "" {
			t.Errorf("%v: no message", args)
		}
	}
}

func TestClock(t *testing.T) {
	for s, want := range map[float64]string{0: "0:00.0", 59.96: "1:00.0", 83.44: "1:23.4", 3725: "1:02:05"} {
		if got := clockS(s); got != want {
			t.Errorf("clockS(%v) = %q, want %q", s, got, want)
		}
	}
}

// compare --square-islands plans banded as plan --square-islands does: the
// JSON says so, the header names it, and the banded plan of a pocket around
// an island changes (its pass ends at the island no longer lean).
// --direct-turns and --square-corners are passed on the same way (the
// pocket's four corners lose their fans, so the banded time changes).
func TestCompareSquareIslands(t *testing.T) {
	p := filepath.Join(t.TempDir(), "island.json")
	err := os.WriteFile(p, []byte(`{
  "name": "ring pocket",
  "stock": {"outline": "POLYGON ((0 0, 60 0, 60 50, 0 50, 0 0))", "top": 0},
  "features": [{"name": "ring", "region": "POLYGON ((8 8, 52 8, 52 42, 8 42, 8 8), (26 21, 26 29, 34 29, 34 21, 26 21))", "depth": 4}],
  "tool": {"diameter": 6, "flute_length": 20, "flutes": 3},
  "cut": {"band": [0.05, 0.1], "spindle_rpm": 18000, "chip_load": 0.03,
          "layered": {"stepover": 0.5, "stepdown": 2}},
  "clearance": 5
}`), 0o644)
	if err != nil {
		t.Fatal(err)
	}
	type result struct {
		SquareIslands bool `json:"square_islands"`
		SquareCorners bool `json:"square_corners"`
		DirectTurns   bool `json:"direct_turns"`
		Features      []struct {
			Banded struct {
				CycleS float64 `json:"cycle_s"`
			} `json:"banded"`
		} `json:"features"`
	}
	run := func(args ...string) result {
		t.Helper()
		code, out, stderr := runCLI(t, append([]string{"compare", p, "--json", "--quiet"}, args...)...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var r result
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatalf("not JSON: %v", err)
		}
		return r
	}
	off, on := run(), run("--square-islands")
	if off.SquareIslands || !on.SquareIslands {
		t.Errorf("square_islands %v without the flag, %v with it", off.SquareIslands, on.SquareIslands)
	}
	if a, b := off.Features[0].Banded.CycleS, on.Features[0].Banded.CycleS; a == b {
		t.Errorf("banded cycle %.1f s with and without --square-islands: the flag did not reach the planner", a)
	}
	if r := run("--direct-turns"); !r.DirectTurns || off.DirectTurns || on.DirectTurns {
		t.Errorf("direct_turns %v with --direct-turns, %v and %v without", r.DirectTurns, off.DirectTurns, on.DirectTurns)
	}
	sq := run("--square-corners")
	if !sq.SquareCorners || off.SquareCorners {
		t.Errorf("square_corners %v with --square-corners, %v without", sq.SquareCorners, off.SquareCorners)
	}
	if a, b := off.Features[0].Banded.CycleS, sq.Features[0].Banded.CycleS; a == b {
		t.Errorf("banded cycle %.1f s with and without --square-corners: the flag did not reach the planner", a)
	}
	code, out, stderr := runCLI(t, "compare", p, "--quiet", "--square-islands")
	if code != 0 || !strings.Contains(out, "banded pass ends square to islands") {
		t.Errorf("exit %d, header does not name the square ends:\n%s%s", code, out, stderr)
	}
}
