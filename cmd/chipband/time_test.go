package main

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

func machineFile(name string) string { return filepath.Join("..", "..", "testdata", "machines", name) }

func TestTimeCommandJSON(t *testing.T) {
	// One 100 mm line at 3000 mm/min on a machine with 500 mm/s² on X:
	// trapezoidal kinematics, worked by hand: t = L/v + v/a = 100/50 + 50/500 = 2.1 s.
	prog := writeTemp(t, "line.nc", "%\nG21 G90 G17\nG1 X100 F3000\nM30\n%\n")
	code, out, stderr := runCLI(t, "time", "--machine", machineFile("bench-mill.json"), prog, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var rep struct {
		TotalS float64 `json:"total_s"`
		FeedS  float64 `json:"feed_s"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatalf("not JSON: %v\n%s", err, out)
	}
	if math.Abs(rep.TotalS-2.1) > 1e-9 || math.Abs(rep.FeedS-2.1) > 1e-9 {
		t.Errorf("total_s %g feed_s %g, want 2.1", rep.TotalS, rep.FeedS)
	}
}

func TestTimeCommandBadInput(t *testing.T) {
	good := writeTemp(t, "ok.nc", "G1 X10 F100\n")
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"no machine", []string{"time", good}, "machine"},
		{"missing program", []string{"time", "--machine", machineFile("bench-mill.json"), filepath.Join(t.TempDir(), "none.nc")}, "no such file"},
		{"plane", []string{"time", "--machine", machineFile("bench-mill.json"), writeTemp(t, "p.nc", "G21\nG18\nG1 X1 F10\n")}, "line 2"},
		{"bad machine key", []string{"time", "--machine", writeTemp(t, "m.json", `{"name":"x","speed":1}`), good}, "speed"},
		{"bad word", []string{"time", "--machine", machineFile("bench-mill.json"), writeTemp(t, "w.nc", "G1 X1 F10\nG1 X@\n")}, "line 2"},
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
