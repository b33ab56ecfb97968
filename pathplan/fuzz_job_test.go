package pathplan

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzReadJob checks that no job file makes ReadJob panic, that every
// rejection is a clear error (a *JobError or a reading error, naming the
// key or feature), and that every accepted job passes its own validation
// with the properties the design notes (§7) give a job: at least one
// feature, positive finite depths and tool sizes.
func FuzzReadJob(f *testing.F) {
	files, _ := filepath.Glob("../testdata/jobs/*.json")
	for _, name := range files {
		if data, err := os.ReadFile(name); err == nil {
			f.Add(string(data))
		}
	}
	f.Add(string(DemoJobJSON()))
	f.Fuzz(func(t *testing.T, in string) {
		j, err := ReadJob(strings.NewReader(in))
		if err != nil {
			if !IsJobError(err) {
				t.Fatalf("error %q (%T) is not a *JobError", err, err)
			}
			if strings.TrimSpace(err.Error()) == "" {
				t.Fatal("empty error")
			}
			return
		}
		if err := j.Validate(); err != nil {
			t.Fatalf("accepted job fails Validate: %v", err)
		}
		if len(j.Features) == 0 {
			t.Fatal("accepted job without features")
		}
		pos := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
		if !pos(j.Tool.Diameter) || !pos(j.Tool.FluteLength) || j.Tool.Flutes < 1 {
			t.Fatalf("accepted tool %+v", j.Tool)
		}
		for _, ft := range j.Features {
			if !pos(ft.Depth) {
				t.Fatalf("feature %q: accepted depth %v", ft.Name, ft.Depth)
			}
			if len(ft.Region) == 0 || ft.Region.Validate() != nil {
				t.Fatalf("feature %q: accepted region %s", ft.Name, ft.Region.WKT())
			}
		}
	})
}
