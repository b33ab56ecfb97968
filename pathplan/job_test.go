package pathplan

import (
	"context"
	"strings"
	"testing"
)

// baseJob is a valid job whose text the error cases edit.
const baseJob = `{
  "name": "test plate",
  "stock": {"outline": "POLYGON ((0 0, 100 0, 100 60, 0 60, 0 0))", "top": 0},
  "features": [{"name": "slot A", "region": "POLYGON ((20 20, 80 20, 80 40, 20 40, 20 20))", "depth": 4}],
  "tool": {"diameter": 6, "flute_length": 20, "flutes": 3},
  "cut": {"band": [0.05, 0.1], "allowance": 0, "spindle_rpm": 18000, "chip_load": 0.03,
          "layered": {"stepover": 0.5, "stepdown": 1}},
  "clearance": 5
}`

func TestReadJobDefaults(t *testing.T) {
	j, err := ReadJob(strings.NewReader(baseJob))
	if err != nil {
		t.Fatal(err)
	}
	if j.Cut.RampAngle != 3 { // common practice ≤ 3°, no source
		t.Errorf("default ramp angle %v, want 3", j.Cut.RampAngle)
	}
	if j.Tool.Flutes != 3 || j.Features[0].Name != "slot A" || j.Features[0].Depth != 4 {
		t.Errorf("job read wrongly: %+v", j)
	}
	// vf = fz · z · n (feed per tooth × teeth × spindle speed; any
	// machining handbook): 0.03 · 3 · 18000 = 1620 mm/min.
	if f := j.Feed(); f < 1619.999 || f > 1620.001 {
		t.Errorf("feed %v, want 1620", f)
	}
}

func TestReadJobErrors(t *testing.T) {
	cases := []struct {
		name, from, to, want string
	}{
		{"zero depth", `"depth": 4`, `"depth": 0`, `feature "slot A": depth must be positive, got 0`},
		{"negative depth", `"depth": 4`, `"depth": -2`, `feature "slot A": depth must be positive, got -2`},
		{"outside stock", `"POLYGON ((20 20, 80 20, 80 40, 20 40, 20 20))"`, `"POLYGON ((200 20, 280 20, 280 40, 200 40, 200 20))"`, `feature "slot A": region lies entirely outside the stock`},
		{"band reversed", `"band": [0.05, 0.1]`, `"band": [0.2, 0.1]`, `cut.band min 0.2 is greater than max 0.1`},
		{"stepover too big", `"stepover": 0.5`, `"stepover": 1.2`, `cut.layered.stepover must be in (0, 0.95]`},
		{"stepover zero", `"stepover": 0.5`, `"stepover": 0`, `cut.layered.stepover must be in (0, 0.95]`},
		{"stepdown beyond flute", `"stepdown": 1`, `"stepdown": 25`, `cut.layered.stepdown must be in (0, 20] mm`},
		{"unknown key", `"clearance": 5`, `"clearance": 5, "colour": "red"`, `unknown key "colour"`},
		{"unknown nested key", `"top": 0`, `"top": 0, "height": 3`, `unknown key "height"`},
		{"missing depth", `, "depth": 4`, ``, `feature "slot A": missing key "depth"`},
		{"missing clearance", `,
  "clearance": 5`, ``, `missing key "clearance"`},
		{"missing tool", `"tool": {"diameter": 6, "flute_length": 20, "flutes": 3},`, ``, `missing key "tool"`},
		{"bad WKT", `"POLYGON ((20 20, 80 20, 80 40, 20 40, 20 20))"`, `"POLYGON ((20 20, 80 20"`, `feature "slot A": region:`},
		{"flutes not whole", `"flutes": 3`, `"flutes": 2.5`, `tool.flutes must be a whole number`},
		{"syntax", `"clearance": 5`, `"clearance": 5,`, `line 9: JSON syntax`},
		{"wrong type", `"depth": 4`, `"depth": "deep"`, `line 4: key "features.depth"`},
		{"bad machine", `"clearance": 5`, `"clearance": 5, "machine": {"max_feed": {"x": 1, "y": 1, "z": 1}}`, `machine: missing key "rapid"`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			text := strings.Replace(baseJob, c.from, c.to, 1)
			if text == baseJob {
				t.Fatalf("case does not change the job")
			}
			_, err := ReadJob(strings.NewReader(text))
			if err == nil {
				t.Fatalf("no error, want %q", c.want)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q, want it to contain %q", err, c.want)
			}
			if !IsJobError(err) {
				t.Errorf("error %q is not a JobError", err)
			}
		})
	}
}

func TestLoadJobNamesFile(t *testing.T) {
	_, err := LoadJob("testdata/no-such-job.json")
	if err == nil || !strings.Contains(err.Error(), "no-such-job.json") {
		t.Errorf("error %v, want it to name the file", err)
	}
}

func TestTooNarrow(t *testing.T) {
	// A 4 mm slot cannot take a 6 mm tool: the widest free circle in it is
	// the slot width (an inscribed circle of a strip is as wide as the
	// strip, plane geometry).
	text := strings.Replace(baseJob, `"POLYGON ((20 20, 80 20, 80 40, 20 40, 20 20))"`, `"POLYGON ((20 20, 80 20, 80 24, 20 24, 20 20))"`, 1)
	j, err := ReadJob(strings.NewReader(text))
	if err != nil {
		t.Fatal(err)
	}
	_, err = PlanLayered(context.Background(), j, Options{})
	want := `feature "slot A": too narrow for this tool (widest free circle 4.0 mm, tool 6 mm)`
	if err == nil || err.Error() != want {
		t.Fatalf("error %v, want %q", err, want)
	}
	if !IsJobError(err) {
		t.Error("not a JobError")
	}
}

func TestDemoJob(t *testing.T) {
	j := DemoJob()
	if len(j.Features) != 3 || j.Machine == nil {
		t.Fatalf("demo job: %d features, machine %v", len(j.Features), j.Machine)
	}
	if string(DemoJobJSON()) == "" {
		t.Fatal("no demo JSON")
	}
}
