package pathplan

import (
	"context"
	"encoding/hex"
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// zSeg is a straight piece of the tool-centre trace with its end heights.
type zSeg struct {
	a, b   geom.Point
	za, zb float64
}

// traceSegs returns moves [0, n) of p as straight pieces, arcs as chords
// within 1e-4 mm of the arc (sagitta rad·(1 − cos(θ/2)), elementary
// geometry) with the height interpolated along the sweep.
func traceSegs(p *Plan, n int) []zSeg {
	var out []zSeg
	from := p.Path.Start
	for _, m := range p.Path.Moves[:n] {
		f := from
		from = m.To
		if !m.Arc {
			out = append(out, zSeg{geom.Pt(f.X, f.Y), geom.Pt(m.To.X, m.To.Y), f.Z, m.To.Z})
			continue
		}
		c := m.Center
		rad := math.Hypot(f.X-c.X, f.Y-c.Y)
		sweep := geom.ArcSweep(geom.Pt(f.X, f.Y), geom.Pt(m.To.X, m.To.Y), c, m.CW)
		if m.CW {
			sweep = -sweep
		}
		k := 1
		if rad > 1e-4 {
			k = max(1, int(math.Ceil(math.Abs(sweep)/(2*math.Acos(max(-1, 1-1e-4/rad))))))
		}
		a0 := math.Atan2(f.Y-c.Y, f.X-c.X)
		prev, pz := geom.Pt(f.X, f.Y), f.Z
		for i := 1; i <= k; i++ {
			a := a0 + sweep*float64(i)/float64(k)
			q := geom.Pt(c.X+rad*math.Cos(a), c.Y+rad*math.Sin(a))
			z := f.Z + (m.To.Z-f.Z)*float64(i)/float64(k)
			out = append(out, zSeg{prev, q, pz, z})
			prev, pz = q, z
		}
	}
	return out
}

// materialTop returns the height of the material at x once a flat tool of
// radius r has followed segs through stock of top height top: the lowest
// tool height over the part of each segment whose disk covers x. On a
// segment the covering part is the parameter interval where
// |a + t(b−a) − x| ≤ r (a quadratic in t) and the height is linear in t,
// so its lowest value is at an end of that interval.
func materialTop(segs []zSeg, x geom.Point, r, top float64, stock geom.Shape) float64 {
	if !stock.Contains(x) {
		return math.Inf(-1)
	}
	h := top
	for _, s := range segs {
		d, w := s.b.Sub(s.a), s.a.Sub(x)
		A := d.X*d.X + d.Y*d.Y
		B := 2 * (d.X*w.X + d.Y*w.Y)
		C := w.X*w.X + w.Y*w.Y - r*r
		if A < 1e-18 {
			if C <= 0 {
				h = math.Min(h, math.Min(s.za, s.zb))
			}
			continue
		}
		disc := B*B - 4*A*C
		if disc < 0 {
			continue
		}
		sq := math.Sqrt(disc)
		lo, hi := math.Max(0, (-B-sq)/(2*A)), math.Min(1, (-B+sq)/(2*A))
		if lo > hi {
			continue
		}
		h = math.Min(h, math.Min(s.za+(s.zb-s.za)*lo, s.za+(s.zb-s.za)*hi))
	}
	return h
}

// TestLayeredRapidClearance replans generated jobs in which the
// simulation saw a rapid descent through material and checks every rapid
// that ends below the stock top exactly, without a material grid: no
// material left by the earlier moves may stand above the rapid's end
// within the tool's disk grown by half the planner's descent margin
// (0.025 mm). Points are sampled on circles of the disk and of that ring.
func TestLayeredRapidClearance(t *testing.T) {
	const grow = 0.025
	for _, c := range []struct{ name, hex string }{
		// A rapid descended beside the wall a shallower feature left
		// inside a deeper one, tangent to the material the deeper
		// feature's first level left standing (the cleared region counted
		// the allowance strip at that wall as cut).
		{"job 164", "5ac5761be3d7e52ddaf069b99e8f658f873f669641c0c1474ea306f9ae7e3e3cd72122af9a8283e00f0c9f3c295b3367d70b94060c8ea9674b3f916950c4985f"},
		// The simulation's 0.2 mm cells report a rapid through material
		// where the exact clearance is 0.118 mm.
		{"job 426", "6d99a234b183b296e7e35f2728302b0031a256a2ae27154c52d521c7d74f99b2ef43dfd163a3775506eece2e5380aaadd81d9d9d6308c30bf92bfa4be8e35244"},
	} {
		data, err := hex.DecodeString(c.hex)
		if err != nil {
			t.Fatal(err)
		}
		j := genJob(data)
		if err := j.Validate(); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		p, err := PlanLayered(context.Background(), j, Options{})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		r := j.Tool.Radius()
		checked := 0
		for i, m := range p.Path.Moves {
			if m.Kind != geom.Rapid || m.To.Z >= j.Stock.Top {
				continue
			}
			q := geom.Pt(m.To.X, m.To.Y)
			var near []zSeg
			for _, s := range traceSegs(p, i) {
				if geom.SegmentDistance(q, s.a, s.b) < 2*r+grow {
					near = append(near, s)
				}
			}
			checked++
			for k := 0; k <= 12; k++ {
				rho := (r + grow) * float64(k) / 12
				n := max(1, int(2*math.Pi*rho/0.01))
				for a := range n {
					th := 2 * math.Pi * float64(a) / float64(n)
					x := geom.Pt(q.X+rho*math.Cos(th), q.Y+rho*math.Sin(th))
					if h := materialTop(near, x, r, j.Stock.Top, j.Stock.Outline); h > m.To.Z+1e-9 {
						t.Fatalf("%s: rapid %d to %v: material at %.4f mm stands at (%.4f, %.4f), %.4f mm from the tool axis (radius %.3f)",
							c.name, i, m.To, h, x.X, x.Y, rho, r)
					}
				}
			}
		}
		if checked == 0 {
			t.Errorf("%s: no rapid below the top to check", c.name)
		}
		t.Logf("%s: %d rapids below the top clear by %.3f mm or more", c.name, checked, grow)
	}
}
