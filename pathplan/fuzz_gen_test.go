package pathplan

import (
	"bytes"
	"context"
	"errors"
	"io"
	"math"
	"testing"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
	"github.com/chipband/chipband/timing"
)

// byteSource turns fuzz bytes into bounded numbers; past the end it gives
// zeros, so every input decodes to some job.
type byteSource struct {
	b []byte
	i int
}

func (s *byteSource) u8() int {
	if s.i >= len(s.b) {
		return 0
	}
	v := s.b[s.i]
	s.i++
	return int(v)
}

// rng returns a number in [lo, hi].
func (s *byteSource) rng(lo, hi float64) float64 { return lo + (hi-lo)*float64(s.u8())/255 }

// genJob decodes a small job: a rectangular stock, one or two features
// (rectangles, star-shaped polygons, rectangles that leave the stock on one
// side), an island in the first, and cut data inside the ranges the job
// reader accepts. The job may still be invalid (a second feature may make
// an island touch a wall, say); callers skip jobs Validate rejects.
func genJob(data []byte) *Job {
	s := &byteSource{b: data}
	w, h := math.Round(s.rng(30, 90)), math.Round(s.rng(30, 70))
	d := []float64{4, 6, 8}[s.u8()%3]
	j := &Job{
		Name:  "generated",
		Stock: Stock{Outline: geom.Shape{{Outer: geom.RectRing(0, 0, w, h)}}, Top: 0},
		Tool:  Tool{Diameter: d, FluteLength: math.Round(s.rng(12, 25)), Flutes: 2 + s.u8()%3},
		Cut: Cut{
			SpindleRPM: 16000, ChipLoad: 0.03,
			RampAngle: 3, HelixDiameter: d / 2,
			Allowance: []float64{0, 0, 0.1, 0.25}[s.u8()%4],
		},
		Clearance: 5,
	}
	bmin := s.rng(0.04, 0.08)
	j.Cut.Band = [2]float64{round3(bmin), round3(bmin + s.rng(0.02, 0.06))}
	j.Cut.Layered = Layered{Stepover: round3(s.rng(0.3, 0.7)), Stepdown: math.Round(s.rng(0.5, 3)*4) / 4}
	j.Cut.MinPathRadius = []float64{0, 0.5, 1}[s.u8()%3]
	nf := 1 + s.u8()%2
	for k := 0; k < nf; k++ {
		cx, cy := s.rng(0.3*w, 0.7*w), s.rng(0.3*h, 0.7*h)
		var reg geom.Region
		var inner float64 // radius of a disk about (cx, cy) inside the outer ring
		switch s.u8() % 3 {
		case 0, 2: // rectangle, open on one side for kind 2 (chosen below)
			hw := s.rng(d, math.Min(cx, w-cx)-1)
			hh := s.rng(d, math.Min(cy, h-cy)-1)
			x0, y0, x1, y1 := cx-hw, cy-hh, cx+hw, cy+hh
			if s.u8()%2 == 1 { // open: run past one stock edge
				switch s.u8() % 4 {
				case 0:
					x0 = -5
				case 1:
					x1 = w + 5
				case 2:
					y0 = -5
				default:
					y1 = h + 5
				}
			}
			reg.Outer = geom.RectRing(round3(x0), round3(y0), round3(x1), round3(y1))
			inner = math.Min(hw, hh)
		default: // star-shaped polygon about (cx, cy)
			n := 5 + s.u8()%5
			rmax := s.rng(1.5*d, 0.48*math.Min(w, h))
			var ring geom.Ring
			for i := 0; i < n; i++ {
				a := 2 * math.Pi * (float64(i) + s.rng(-0.3, 0.3)) / float64(n)
				r := s.rng(0.55*rmax, rmax)
				ring = append(ring, geom.Pt(round3(cx+r*math.Cos(a)), round3(cy+r*math.Sin(a))))
			}
			reg.Outer = ring
			// The star contains the disk of radius 0.55·rmax·cos(π·1.6/n)
			// about its centre: neighbouring vertices are at most 1.6·2π/n
			// apart and at least 0.55·rmax out (elementary geometry).
			inner = 0.55 * rmax * math.Cos(math.Pi*1.6/float64(n))
		}
		if k == 0 && s.u8()%2 == 1 && inner > 2*d {
			ir := s.rng(0.15, 0.35) * inner
			if s.u8()%2 == 0 {
				reg.Holes = []geom.Ring{geom.Circle(geom.Pt(cx, cy), ir, 24)}
			} else {
				reg.Holes = []geom.Ring{geom.RectRing(round3(cx-ir), round3(cy-ir*0.7), round3(cx+ir), round3(cy+ir*0.7))}
			}
		}
		depth := math.Round(s.rng(1, 12)*2) / 2
		j.Features = append(j.Features, Feature{Name: string(rune('A' + k)), Region: geom.Shape{reg}, Depth: depth})
	}
	return j
}

func round3(v float64) float64 { return math.Round(v*1000) / 1000 }

// genReach returns, per feature, the material a tool of radius r with
// allowance a can reach at the feature's floor: the feature inside the
// stock, less deeper features, within the set a disk of radius r sweeps
// while its centre stays in the free space at that floor eroded by r + a —
// the erosion by r + a dilated by r, a morphological opening when a = 0
// (Serra, Image Analysis and Mathematical Morphology, 1982, from memory).
// It does not depend on how a path is built. Features with nothing
// reachable are left out.
func genReach(t testing.TB, j *Job) []engage.Target {
	t.Helper()
	frees, deepers := floorSpace(t, j)
	rho := j.Tool.Diameter/2 + j.Cut.Allowance
	var out []engage.Target
	for i, f := range j.Features {
		free, deeper := frees[i], deepers[i]
		centres, err := offset.Offset(free, -rho, 0.001)
		if err != nil {
			t.Fatal(err)
		}
		open, err := offset.Offset(centres, j.Tool.Diameter/2, 0.001)
		if err != nil {
			t.Fatal(err)
		}
		tgt, err := geom.Intersection(f.Region, j.Stock.Outline)
		if err != nil {
			t.Fatal(err)
		}
		if len(deeper) > 0 {
			if tgt, err = geom.Difference(tgt, deeper); err != nil {
				t.Fatal(err)
			}
		}
		if tgt, err = geom.Intersection(tgt, open); err != nil {
			t.Fatal(err)
		}
		// Material within 0.01 mm of the reachable boundary counts as
		// reached: the same 0.01 mm the simulation allows above a floor
		// (engage.SimOptions.Tolerance), applied sideways, which also
		// covers the chord tolerance the planner keeps from the walls.
		if tgt, err = offset.Offset(tgt, -0.01, 0.001); err != nil {
			t.Fatal(err)
		}
		if len(tgt) == 0 {
			continue // nothing of this feature is reachable at its floor
		}
		out = append(out, engage.Target{Name: f.Name, Region: tgt, Floor: j.Stock.Top - f.Depth})
	}
	return out
}

// checkPlanOutput writes p as G-code, reads it back through the timing
// reader (every block must parse; the reader is independent of the writer)
// and returns the program bytes.
func checkPlanOutput(t testing.TB, p *Plan) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteGCode(&buf, p); err != nil {
		t.Fatalf("WriteGCode: %v", err)
	}
	rd := timing.NewReader(bytes.NewReader(buf.Bytes()))
	moves := 0
	for {
		b, err := rd.Next()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("written program does not read back: %v", err)
		}
		for _, v := range append(b.From[:], b.To[:]...) {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("line %d: coordinate %v", b.Line, v)
			}
		}
		if b.Kind == timing.KindRapid || b.Kind == timing.KindLine || b.Kind == timing.KindArc {
			moves++
		}
	}
	if len(p.Path.Moves) > 0 && moves == 0 {
		t.Fatalf("plan of %d moves wrote a program without motion", len(p.Path.Moves))
	}
	return buf.Bytes()
}

// simulateGen simulates p through the job's stock with engage at cell size
// cell and sampling step step, with the walls and islands as Keep and the
// reachable material of every feature as a target.
func simulateGen(ctx context.Context, t testing.TB, j *Job, p *Plan, cell, step float64, targets bool) engage.Summary {
	t.Helper()
	in := engage.CheckInput{
		Stock: j.Stock.Outline, Top: j.Stock.Top, Keep: keepShape(t, j),
		SpindleRPM: j.Cut.SpindleRPM, Step: step,
		Material: engage.MaterialOptions{CellSize: cell},
	}
	if targets {
		in.Targets = genReach(t, j)
	}
	res, err := engage.Check(ctx, in, engage.Tool{Diameter: j.Tool.Diameter, FluteLength: j.Tool.FluteLength, Flutes: j.Tool.Flutes}, &p.Path)
	if err != nil {
		t.Fatalf("simulate: %v", err)
	}
	return res.Summary
}

// genExactGouge returns how far the tool of radius r reaches into keep along
// the moves of p that run below the stock top, by exact distances from the
// tool-centre trace to keep's edges (elementary geometry; arcs as chords
// within 1e-4 mm of the arc), and the index of the worst move (−1: none).
// Moves above the top cannot touch the walls.
func genExactGouge(p *Plan, keep geom.Shape, top, r float64) (float64, int) {
	type edge struct{ a, b geom.Point }
	var edges []edge
	for _, ring := range keep.Rings() {
		for i := 0; i+1 < len(ring); i++ {
			edges = append(edges, edge{ring[i], ring[i+1]})
		}
	}
	worst, at := 0.0, -1
	from := p.Path.Start
	for i, m := range p.Path.Moves {
		f := from
		from = m.To
		if math.Min(f.Z, m.To.Z) >= top-1e-9 {
			continue
		}
		pts := []geom.Point{{X: f.X, Y: f.Y}}
		if m.Arc {
			c := m.Center
			rad := math.Hypot(f.X-c.X, f.Y-c.Y)
			sweep := geom.ArcSweep(geom.Pt(f.X, f.Y), geom.Pt(m.To.X, m.To.Y), c, m.CW)
			if m.CW {
				sweep = -sweep
			}
			n := 1
			if rad > 1e-4 {
				// sagitta rad·(1 − cos(θ/2)) ≤ 1e-4 for pieces of angle θ
				th := 2 * math.Acos(max(-1, 1-1e-4/rad))
				n = max(1, int(math.Ceil(math.Abs(sweep)/th)))
			}
			a0 := math.Atan2(f.Y-c.Y, f.X-c.X)
			for k := 1; k <= n; k++ {
				a := a0 + sweep*float64(k)/float64(n)
				pts = append(pts, geom.Pt(c.X+rad*math.Cos(a), c.Y+rad*math.Sin(a)))
			}
		} else {
			pts = append(pts, geom.Pt(m.To.X, m.To.Y))
		}
		for k := 0; k+1 < len(pts); k++ {
			p0, p1 := pts[k], pts[k+1]
			d := math.Inf(1)
			if keep.Contains(p0) {
				d = 0
			}
			for _, e := range edges {
				if d == 0 {
					break
				}
				if geom.SegmentsMeet(p0, p1, e.a, e.b) {
					d = 0
					break
				}
				d = math.Min(d, math.Min(
					math.Min(geom.SegmentDistance(p0, e.a, e.b), geom.SegmentDistance(p1, e.a, e.b)),
					math.Min(geom.SegmentDistance(e.a, p0, p1), geom.SegmentDistance(e.b, p0, p1))))
			}
			if g := r - d; g > worst {
				worst, at = g, i
			}
		}
	}
	return worst, at
}
