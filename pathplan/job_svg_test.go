package pathplan

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestLoadJobWithSVGRegions(t *testing.T) {
	j, err := LoadJob(filepath.Join("..", "testdata", "jobs", "router_sign.json"))
	if err != nil {
		t.Fatal(err)
	}
	// Stock 160 × 90 (elementary geometry).
	if a := j.Stock.Outline.Area(); math.Abs(a-160*90) > 1e-9 {
		t.Errorf("stock area %g, want %g", a, 160.0*90)
	}
	// Recess: a 120 × 60 rectangle with four corners rounded to r = 10,
	// area w·h − (4 − π)·r² (W3C SVG 1.1 §9.2 rounded rectangle), less the
	// round boss π·12², which the drawing's nesting makes an island.
	want := 120*60 - (4-math.Pi)*100 - math.Pi*144
	f := j.Features[0]
	if len(f.Region) != 1 || len(f.Region[0].Holes) != 1 {
		t.Fatalf("recess: %d regions, want 1 with 1 island", len(f.Region))
	}
	// Chords lie inside the true arcs by at most the SVG tolerance, on the
	// outline (area low) and on the island (area high).
	if a := f.Region.Area(); math.Abs(a-want) > 2*math.Pi*22*0.01 {
		t.Errorf("recess area %g, want about %g", a, want)
	}
	// The viewBox's bottom-left corner is the origin and y points up, so the
	// recess (20..140 along x, 15..75 along y in the drawing) lands at
	// y = 90 − 75 … 90 − 15.
	b := f.Region.Bounds()
	if math.Abs(b.Min.X-20) > 1e-9 || math.Abs(b.Max.X-140) > 1e-9 || math.Abs(b.Min.Y-15) > 1e-9 || math.Abs(b.Max.Y-75) > 1e-9 {
		t.Errorf("recess bounds %+v", b)
	}
}

func TestSVGRegionErrors(t *testing.T) {
	dir := t.TempDir()
	svg := `<svg xmlns="http://www.w3.org/2000/svg"><rect id="s" width="50" height="50"/><path id="open" d="M 1 1 L 5 5"/></svg>`
	if err := os.WriteFile(filepath.Join(dir, "d.svg"), []byte(svg), 0o644); err != nil {
		t.Fatal(err)
	}
	job := func(region string) string {
		return `{"stock": {"outline": "svg:d.svg#s", "top": 0},
 "features": [{"name": "p", "region": "` + region + `", "depth": 2}],
 "tool": {"diameter": 6, "flute_length": 15, "flutes": 2},
 "cut": {"spindle_rpm": 18000, "chip_load": 0.03},
 "clearance": 5}`
	}
	for _, c := range []struct{ region, want string }{
		{"svg:d.svg#nope", `no element with id "nope"`},
		{"svg:missing.svg", "missing.svg"},
		{"svg:d.svg#open", "open"},
		{"svg:", "names no SVG file"},
	} {
		p := filepath.Join(dir, "job.json")
		if err := os.WriteFile(p, []byte(job(c.region)), 0o644); err != nil {
			t.Fatal(err)
		}
		_, err := LoadJob(p)
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), `feature "p"`) {
			t.Errorf("region %q: err %v, want feature name and %q", c.region, err, c.want)
		}
	}
}
