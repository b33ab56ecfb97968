package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestDemoWritesEverything(t *testing.T) {
	if testing.Short() {
		t.Skip("plans the demo part both ways")
	}
	dir := filepath.Join(t.TempDir(), "out")
	code, out, stderr := runCLI(t, "demo", "-o", dir, "--quiet")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"CAUTION: Machining can injure", "deep step", "boss pocket", "comb pocket", "<- faster", "report.html"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
	for _, name := range []string{"layered.nc", "banded.nc", "layered.svg", "banded.svg", "report.html", "comparison.json", "job.json"} {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil || len(b) == 0 {
			t.Errorf("%s: %v (%d bytes)", name, err, len(b))
			continue
		}
		if strings.HasSuffix(name, ".nc") && !strings.Contains(string(b), "Machining can injure") {
			t.Errorf("%s has no caution in its header", name)
		}
	}
}
