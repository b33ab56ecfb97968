package pathplan

import (
	"context"
	"math"
	"path/filepath"
	"sort"
	"testing"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
)

// testJobs returns the demo job and every job under testdata/jobs.
func testJobs(t testing.TB) map[string]*Job {
	t.Helper()
	jobs := map[string]*Job{"demo": DemoJob()}
	files, err := filepath.Glob("../testdata/jobs/*.json")
	if err != nil {
		t.Fatal(err)
	}
	if len(files) < 4 {
		t.Fatalf("want at least four jobs under testdata/jobs, have %d", len(files))
	}
	for _, f := range files {
		j, err := LoadJob(f)
		if err != nil {
			t.Fatal(err)
		}
		jobs[filepath.Base(f)] = j
	}
	return jobs
}

func sortedKeys(m map[string]*Job) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// reachTargets returns, per feature, the material a tool of radius r with
// allowance a can reach at the feature's floor: the feature inside the
// stock, less deeper features, within the opening of the free space at the
// floor by r + a. The opening is the set swept by a disk of that radius
// that stays in the free space (mathematical morphology), independent of
// how any path is built.
func reachTargets(t testing.TB, j *Job) []engage.Target {
	t.Helper()
	frees, deepers := floorSpace(t, j)
	rho := j.Tool.Diameter/2 + j.Cut.Allowance
	var out []engage.Target
	for i, f := range j.Features {
		free, deeper := frees[i], deepers[i]
		open, err := offset.Open(free, rho, 0.001)
		if err != nil {
			t.Fatal(err)
		}
		tgt, err := geom.Intersection(f.Region, j.Stock.Outline)
		if err != nil {
			t.Fatal(err)
		}
		if len(deeper) > 0 {
			// engage counts a cell by its centre; a centre on the outline
			// shared with a deeper feature belongs to both, so the band of
			// one cell along that outline is left to the deeper feature.
			grown, err := offset.Offset(deeper, engage.DefaultCellSize, 0.001)
			if err != nil {
				t.Fatal(err)
			}
			if tgt, err = geom.Difference(tgt, grown); err != nil {
				t.Fatal(err)
			}
		}
		if tgt, err = geom.Intersection(tgt, open); err != nil {
			t.Fatal(err)
		}
		out = append(out, engage.Target{Name: f.Name, Region: tgt, Floor: j.Stock.Top - f.Depth})
	}
	return out
}

// keepShape is the stock no feature may cut at any height: the stock less
// every feature region (islands are holes of the regions, so they stay).
func keepShape(t testing.TB, j *Job) geom.Shape {
	t.Helper()
	regions := make([]geom.Shape, len(j.Features))
	for i, f := range j.Features {
		regions[i] = f.Region
	}
	keep, err := engage.KeepOf(j.Stock.Outline, regions)
	if err != nil {
		t.Fatalf("keep: %v", err)
	}
	return keep
}

// floorSpace returns, for every feature, the free space at its floor (the
// air around the stock and every feature at least as deep) and the union
// of the features deeper than it.
func floorSpace(t testing.TB, j *Job) (free, deeper []geom.Shape) {
	t.Helper()
	bb := j.Stock.Outline.Bounds()
	for _, f := range j.Features {
		bb = bb.Union(f.Region.Bounds())
	}
	m := 5*j.Tool.Diameter + 10
	box := geom.Shape{{Outer: geom.RectRing(bb.Min.X-m, bb.Min.Y-m, bb.Max.X+m, bb.Max.Y+m)}}
	air, err := geom.Difference(box, j.Stock.Outline)
	if err != nil {
		t.Fatal(err)
	}
	free = make([]geom.Shape, len(j.Features))
	deeper = make([]geom.Shape, len(j.Features))
	for i, f := range j.Features {
		free[i] = air
		for _, g := range j.Features {
			if g.Depth >= f.Depth-1e-9 {
				if free[i], err = geom.Union(free[i], g.Region); err != nil {
					t.Fatal(err)
				}
			}
			if g.Depth > f.Depth+1e-9 {
				if deeper[i], err = geom.Union(deeper[i], g.Region); err != nil {
					t.Fatal(err)
				}
			}
		}
	}
	return free, deeper
}

// exactGouge returns how far the tool reaches into the stock no feature
// may cut, from the exact distance between the tool-centre path and that
// stock's outline (segments exactly, arcs by chords with their sagitta
// added), for moves below the stock top.
func exactGouge(t testing.TB, j *Job, p *Plan) (float64, int) {
	keep := keepShape(t, j)
	r := j.Tool.Diameter / 2
	worst, at := 0.0, -1
	dist := func(a, b geom.Point) float64 {
		d := math.Inf(1)
		for _, ring := range keep.Rings() {
			for i := range ring {
				c, e := ring[i], ring[(i+1)%len(ring)]
				d = math.Min(d, segDistRef(a, b, c, e))
			}
		}
		if keep.Contains(a) {
			return -d
		}
		return d
	}
	from := p.Path.Start
	for i, m := range p.Path.Moves {
		if math.Min(from.Z, m.To.Z) < j.Stock.Top-1e-9 {
			var pts []geom.Point
			sag := 0.0
			if m.Arc {
				rad := from.XY().Dist(m.Center)
				sw := geom.ArcSweep(from.XY(), m.To.XY(), m.Center, m.CW)
				n := int(math.Ceil(sw / (2 * math.Pi) * 256))
				a0 := math.Atan2(from.Y-m.Center.Y, from.X-m.Center.X)
				for k := 0; k <= n; k++ {
					a := a0 + sw*float64(k)/float64(n)*map[bool]float64{true: -1, false: 1}[m.CW]
					pts = append(pts, geom.Pt(m.Center.X+rad*math.Cos(a), m.Center.Y+rad*math.Sin(a)))
				}
				sag = rad * (1 - math.Cos(sw/float64(n)/2))
			} else {
				pts = []geom.Point{from.XY(), m.To.XY()}
			}
			for k := 1; k < len(pts); k++ {
				if g := r - dist(pts[k-1], pts[k]) + sag; g > worst {
					worst, at = g, i
				}
			}
		}
		from = m.To
	}
	return worst, at
}

// exactFloorGouge returns how far a tool below feature fi's floor reaches
// into the part of the feature that no deeper feature overlaps, from the
// exact distance of the tool-centre path to that area (chords for arcs as
// in exactGouge). engage reports the same as a floor gouge from its grid.
func exactFloorGouge(t testing.TB, j *Job, p *Plan, fi int) float64 {
	f := j.Features[fi]
	area, err := geom.Intersection(f.Region, j.Stock.Outline)
	if err != nil {
		t.Fatal(err)
	}
	for _, g := range j.Features {
		if g.Depth > f.Depth+1e-9 {
			if area, err = geom.Difference(area, g.Region); err != nil {
				t.Fatal(err)
			}
		}
	}
	floor := j.Stock.Top - f.Depth
	r := j.Tool.Diameter / 2
	worst := 0.0
	from := p.Path.Start
	for _, m := range p.Path.Moves {
		if math.Min(from.Z, m.To.Z) < floor-1e-6 {
			d := math.Inf(1)
			for _, ring := range area.Rings() {
				for k := range ring {
					d = math.Min(d, segDistRef(from.XY(), m.To.XY(), ring[k], ring[(k+1)%len(ring)]))
				}
			}
			if area.Contains(m.To.XY()) {
				d = -d
			}
			worst = math.Max(worst, r-d)
		}
		from = m.To
	}
	return worst
}

// segDistRef is the distance between segments ab and cd, written out
// apart from the package's own helper.
func segDistRef(a, b, c, d geom.Point) float64 {
	orient := func(p, q, r geom.Point) float64 { return q.Sub(p).Cross(r.Sub(p)) }
	if o1, o2, o3, o4 := orient(a, b, c), orient(a, b, d), orient(c, d, a), orient(c, d, b); o1*o2 < 0 && o3*o4 < 0 {
		return 0
	}
	return math.Min(math.Min(geom.SegmentDistance(a, c, d), geom.SegmentDistance(b, c, d)),
		math.Min(geom.SegmentDistance(c, a, b), geom.SegmentDistance(d, a, b)))
}

func simulate(t testing.TB, j *Job, p *Plan) *engage.Result {
	t.Helper()
	res, err := engage.Check(context.Background(), engage.CheckInput{
		Stock: j.Stock.Outline, Top: j.Stock.Top,
		Targets: reachTargets(t, j), Keep: keepShape(t, j),
		SpindleRPM: j.Cut.SpindleRPM,
	}, engage.Tool{Diameter: j.Tool.Diameter, FluteLength: j.Tool.FluteLength, Flutes: j.Tool.Flutes}, &p.Path)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// TestLayeredVerifiedBySimulation plans every job and checks the path by
// material-removal simulation (engage): the acceptance figures of the
// layered issue — no wall gouge deeper than 0.005 mm, no rapid through
// material, uncut reachable material at most 0.2 % of the feature area.
func TestLayeredVerifiedBySimulation(t *testing.T) {
	jobs := testJobs(t)
	for _, name := range sortedKeys(jobs) {
		j := jobs[name]
		t.Run(name, func(t *testing.T) {
			p, err := PlanLayered(context.Background(), j, Options{})
			if err != nil {
				t.Fatal(err)
			}
			res := simulate(t, j, p)
			s := res.Summary
			t.Logf("length %.0f mm, max gouge %.4f mm, rapid violations %d, max ap %.2f", s.Length, s.MaxGouge, len(s.RapidViolations), s.MaxAP)
			// engage reads the wall distance by bilinear interpolation of
			// a field sampled on its grid; on the ridge of that field (the
			// bisector of a pocket corner, where ring 0 turns) it reads up
			// to a quarter cell short, so its figure is logged and the
			// acceptance is checked against the exact distance.
			g, gm := exactGouge(t, j, p)
			t.Logf("wall gouge: exact %.4f mm (move %d), engage %.4f mm (move %d, cell %.2f mm)", g, gm, s.MaxGouge, s.GougeMove, engage.DefaultCellSize)
			if g > 0.005 {
				t.Errorf("wall gouge %.4f mm in move %d %+v, want ≤ 0.005", g, gm, p.Path.Moves[gm])
			}
			for i, v := range s.RapidViolations {
				if i < 5 {
					t.Errorf("rapid through material: move %d at %v, %.3f mm deep", v.Move, v.At, v.Depth)
				}
			}
			for i, tr := range s.Targets {
				area := p.Features[i].Area
				t.Logf("%s: uncut %.3f mm² of %.0f (%.3f %%), max above %.3f, floor gouge %.4f", tr.Name, tr.UncutArea, area, 100*tr.UncutArea/area, tr.MaxAbove, tr.FloorGouge)
				if tr.UncutArea > 0.002*area {
					t.Errorf("%s: uncut reachable material %.3f mm², more than 0.2 %% of %.0f mm²", tr.Name, tr.UncutArea, area)
				}
				if g := exactFloorGouge(t, j, p, i); g > 0.005 {
					t.Errorf("%s: cut %.4f mm below the floor (engage reads %.4f)", tr.Name, g, tr.FloorGouge)
				}
			}
		})
	}
}
