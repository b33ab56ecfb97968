package pathplan

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/chipband/chipband/geom"
)

// bandedExactGouge returns the deepest intrusion of the tool (radius r)
// into keep along the moves of tp that run below top, computed without a
// raster: the distance from each line move to every keep edge is the exact
// segment–segment distance; arcs are sampled every 0.002 mm, and since the
// distance to a fixed set is 1-Lipschitz along the path the sampled
// minimum is within 0.001 mm of the true one (elementary geometry). It also
// returns the move where the deepest intrusion happens (−1 when none).
func bandedExactGouge(tp *geom.Toolpath, keep geom.Shape, r, top float64) (float64, int) {
	type edge struct{ a, b geom.Point }
	var edges []edge
	for _, ring := range keep.Rings() {
		for i := range ring {
			edges = append(edges, edge{ring[i], ring[(i+1)%len(ring)]})
		}
	}
	segDist := func(p, q geom.Point, e edge) float64 {
		if geom.SegmentsMeet(p, q, e.a, e.b) {
			return 0
		}
		return math.Min(math.Min(geom.SegmentDistance(p, e.a, e.b), geom.SegmentDistance(q, e.a, e.b)),
			math.Min(geom.SegmentDistance(e.a, p, q), geom.SegmentDistance(e.b, p, q)))
	}
	worst, at := 0.0, -1
	check := func(d float64, p geom.Point, i int) {
		g := r - d
		if keep.Contains(p) {
			g = r + d
		}
		if g > worst {
			worst, at = g, i
		}
	}
	from := tp.Start
	for i, m := range tp.Moves {
		a, b := from.XY(), m.To.XY()
		below := math.Min(from.Z, m.To.Z) < top-1e-9
		from = m.To
		if !below || m.Kind == geom.Rapid {
			continue
		}
		if !m.Arc {
			d := math.Inf(1)
			for _, e := range edges {
				d = math.Min(d, segDist(a, b, e))
			}
			check(d, a, i)
			continue
		}
		sweep := geom.ArcSweep(a, b, m.Center, m.CW)
		rad := a.Dist(m.Center)
		n := int(math.Ceil(math.Abs(sweep)*rad/0.002)) + 1
		a0 := math.Atan2(a.Y-m.Center.Y, a.X-m.Center.X)
		for k := 0; k <= n; k++ {
			t := a0 + sweep*float64(k)/float64(n)
			q := geom.Pt(m.Center.X+rad*math.Cos(t), m.Center.Y+rad*math.Sin(t))
			d := math.Inf(1)
			for _, e := range edges {
				d = math.Min(d, geom.SegmentDistance(q, e.a, e.b))
			}
			check(d, q, i)
		}
	}
	return worst, at
}

// No banded path comes nearer the walls and islands than the tool radius
// (allowance 0 on most jobs), checked exactly: the distance from every
// tool-centre position below the stock top to the material that must stay
// is at least r − 0.005 mm (the gouge limit). The keep shape is the
// stock less every feature, as in BandedReport.
//
// Not yet met on three jobs (links filleted round island corners, see
// issue 6), so it runs with the must-show figures.
func TestBandedNoWallGouge(t *testing.T) {
	if os.Getenv("CHIPBAND_MUSTSHOW") == "" {
		t.Skip("set CHIPBAND_MUSTSHOW=1 to run the issue 6 acceptance figures")
	}
	jobs := map[string]*Job{"demo": DemoJob()}
	files, _ := filepath.Glob("../testdata/jobs/*.json")
	for _, f := range files {
		j, err := LoadJob(f)
		if err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		jobs[filepath.Base(f)] = j
	}
	for name, job := range jobs {
		plan, err := PlanBanded(context.Background(), job, BandedOptions{NoVerify: true})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		keep, err := bandedKeep(job)
		if err != nil {
			t.Fatal(err)
		}
		g, at := bandedExactGouge(&plan.Path, keep, job.Tool.Radius(), job.Stock.Top)
		if g > 0.005 {
			t.Errorf("%s: wall gouge %.4f mm at move %d, limit 0.005", name, g, at)
		}
	}
}

// A straight tool-centre path along the walls of a square pocket, turning
// at the corners of the tool-centre domain, is exactly r from the walls:
// the exact check reports no gouge (elementary geometry), where a raster
// that interpolates a distance field across the corner bisector would see
// up to a quarter cell.
func TestBandedExactGougeCorner(t *testing.T) {
	keep := geom.Shape{{Outer: geom.RectRing(-10, -10, 30, 30), Holes: []geom.Ring{geom.RectRing(0, 0, 20, 20).Reversed()}}}
	tp := &geom.Toolpath{Start: geom.Point3{X: 3, Y: 3, Z: -1}, Moves: []geom.Move{
		{Kind: geom.Feed, To: geom.Point3{X: 17, Y: 3, Z: -1}},
		{Kind: geom.Feed, To: geom.Point3{X: 17, Y: 17, Z: -1}},
		{Kind: geom.Feed, To: geom.Point3{X: 3, Y: 17, Z: -1}},
		{Kind: geom.Feed, To: geom.Point3{X: 3, Y: 3, Z: -1}},
	}}
	if g, at := bandedExactGouge(tp, keep, 3, 0); g > 1e-9 {
		t.Errorf("gouge %.6f at move %d on a path exactly r from the walls", g, at)
	}
	// 0.01 mm too close to one wall: a gouge of 0.01.
	tp.Moves[0].To.Y, tp.Start.Y = 2.99, 2.99
	if g, _ := bandedExactGouge(tp, keep, 3, 0); math.Abs(g-0.01) > 1e-9 {
		t.Errorf("gouge %.6f, want 0.010", g)
	}
}
