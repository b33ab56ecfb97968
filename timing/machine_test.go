package timing

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestReadMachineFiles(t *testing.T) {
	// the shared machine files of testdata/machines follow design notes §7
	for _, name := range []string{"bench-mill.json", "hobby-router.json"} {
		f, err := os.Open(filepath.Join("..", "testdata", "machines", name))
		if err != nil {
			t.Fatal(err)
		}
		m, err := ReadMachine(f)
		f.Close()
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if m.Name == "" || m.Accel.X <= 0 || m.CornerTolerance <= 0 {
			t.Errorf("%s: %+v", name, m)
		}
	}
}

func TestReadMachine(t *testing.T) {
	good := `{"name": "m", "max_feed": {"x": 5000, "y": 5000, "z": 3000},
	 "rapid": {"x": 10000, "y": 10000, "z": 6000}, "accel": {"x": 500, "y": 500, "z": 300},
	 "corner_tolerance": 0.02, "tool_change_s": 6}`
	m, err := ReadMachine(strings.NewReader(good))
	if err != nil {
		t.Fatal(err)
	}
	want := Machine{Name: "m", MaxFeed: Axes{5000, 5000, 3000}, Rapid: Axes{10000, 10000, 6000},
		Accel: Axes{500, 500, 300}, CornerTolerance: 0.02, ToolChangeS: 6}
	if m != want {
		t.Errorf("got %+v, want %+v", m, want)
	}
	// design notes §7: unknown keys are errors; DEVELOPERS.md: errors name
	// what is wrong
	bad := []struct{ in, msg string }{
		{strings.Replace(good, `"name"`, `"nmae"`, 1), "nmae"},
		{strings.Replace(good, `"x": 500,`, `"x": -500,`, 1), "accel.x"},
		{strings.Replace(good, `"z": 6000`, `"z": 0`, 1), "rapid.z"},
		{strings.Replace(good, `"corner_tolerance": 0.02,`, ``, 1), "corner_tolerance"},
		{strings.Replace(good, `"y": 5000, `, ``, 1), "max_feed.y"},
		{strings.Replace(good, `"tool_change_s": 6`, `"tool_change_s": -1`, 1), "tool_change_s"},
		{strings.Replace(good, `"tool_change_s": 6`, `"jerk": {"x": 1, "y": 0, "z": 1}`, 1), "jerk.y"},
		{good + "{}", "after"},
		{"", "empty"},
		{"{", "machine"},
	}
	for _, b := range bad {
		_, err := ReadMachine(strings.NewReader(b.in))
		if err == nil || !strings.Contains(err.Error(), b.msg) {
			t.Errorf("err = %v, want it to name %q", err, b.msg)
		}
	}
}
