package engage

import (
	"math"

	"github.com/chipband/chipband/geom"
)

// piece is a stretch of tool-centre path to stamp into the material: a line
// from a to b, or an arc about o of radius rad from angle th0 turning by
// sweep (signed, positive counter-clockwise), with Z linear along it.
type piece struct {
	arc    bool
	a, b   geom.Point
	o      geom.Point
	rad    float64
	th0    float64
	sweep  float64
	za, zb float64
}

// cellUpdate applies one tool position class to cell k: f = r − d, cut
// tells whether the cell centre is within the tool radius and zc is the
// lowest tool bottom that reached it (or passed by it).
func (m *Material) cellUpdate(k int, f float32, cut bool, zc float32) {
	h := m.c[k].h
	if cut {
		switch {
		case zc < h-epsZ:
			m.c[k].h = zc
			m.c[k].a = f
			m.c[k].b = m.c[k].s
		case zc <= h+epsZ:
			if f > m.c[k].a {
				m.c[k].a = f
			}
		}
		return
	}
	if zc < h-epsZ && f > m.c[k].b {
		m.c[k].b = f
	}
}

// stamp removes the material swept by a tool of radius r along p and
// records the distance field around it. It returns the volume removed (mm³).
func (m *Material) stamp(p piece, r float64) float64 {
	if p.arc {
		if math.Abs(p.sweep) > math.Pi/2 {
			n := int(math.Ceil(math.Abs(p.sweep) / (math.Pi / 2)))
			var vol float64
			for i := 0; i < n; i++ {
				q := p
				q.th0 = p.th0 + p.sweep*float64(i)/float64(n)
				q.sweep = p.sweep / float64(n)
				q.za = p.za + (p.zb-p.za)*float64(i)/float64(n)
				q.zb = p.za + (p.zb-p.za)*float64(i+1)/float64(n)
				vol += m.stampArc(q, r)
			}
			return vol
		}
		return m.stampArc(p, r)
	}
	return m.stampLine(p, r)
}

// rowSpan returns the cell columns [i0, i1) whose centres lie in [xl, xr].
func (m *Material) rowSpan(xl, xr float64) (int, int) {
	i0 := int(math.Ceil((xl-m.x0)*m.inv - 0.5))
	i1 := int(math.Floor((xr-m.x0)*m.inv-0.5)) + 1
	return max(i0, 0), min(i1, m.nx)
}

// linear returns the x interval where lo ≤ c0 + c1·x ≤ hi.
func linear(c0, c1, lo, hi float64) (float64, float64, bool) {
	if math.Abs(c1) < 1e-12 {
		if c0 >= lo && c0 <= hi {
			return math.Inf(-1), math.Inf(1), true
		}
		return 0, 0, false
	}
	x0, x1 := (lo-c0)/c1, (hi-c0)/c1
	if x0 > x1 {
		x0, x1 = x1, x0
	}
	return x0, x1, true
}

func (m *Material) stampLine(p piece, r float64) float64 {
	R := r + float64(m.band)
	a, b := p.a, p.b
	ab := b.Sub(a)
	L := ab.Len()
	var u geom.Point
	if L > 1e-9 {
		u = ab.Scale(1 / L)
	} else {
		L = 0
	}
	n := u.Perp()
	ymin, ymax := math.Min(a.Y, b.Y)-R, math.Max(a.Y, b.Y)+R
	j0 := max(int(math.Ceil((ymin-m.y0)*m.inv-0.5)), 0)
	j1 := min(int(math.Floor((ymax-m.y0)*m.inv-0.5))+1, m.ny)
	r2 := r * r
	dz := p.zb - p.za
	zmin := float32(math.Min(p.za, p.zb))
	ca := m.cell * m.cell
	var vol float64
	for j := j0; j < j1; j++ {
		y := m.cy(j)
		xl, xr := math.Inf(1), math.Inf(-1)
		for _, e := range [2]geom.Point{a, b} {
			if dy := y - e.Y; math.Abs(dy) <= R {
				w := math.Sqrt(R*R - dy*dy)
				xl, xr = math.Min(xl, e.X-w), math.Max(xr, e.X+w)
			}
		}
		if L > 0 {
			// Band: 0 ≤ (p−a)·u ≤ L and |(p−a)·n| ≤ R.
			dy := y - a.Y
			if l0, l1, ok := linear(dy*u.Y-a.X*u.X, u.X, 0, L); ok {
				if k0, k1, ok := linear(dy*n.Y-a.X*n.X, n.X, -R, R); ok {
					lo, hi := math.Max(l0, k0), math.Min(l1, k1)
					if lo <= hi {
						xl, xr = math.Min(xl, lo), math.Max(xr, hi)
					}
				}
			}
		}
		if xl > xr {
			continue
		}
		i0, i1 := m.rowSpan(xl, xr)
		row := j * m.nx
		dy := y - a.Y
		for i := i0; i < i1; i++ {
			dx := m.cx(i) - a.X
			t0 := dx*u.X + dy*u.Y
			var d, d2 float64
			if L > 0 && t0 >= 0 && t0 <= L {
				// Beside the segment the distance is the perpendicular offset
				// (a segment without XY length has no side: its distance is
				// the one to the point).
				d = math.Abs(dx*n.X + dy*n.Y)
				d2 = d * d
			} else {
				t := 0.0
				if t0 > L {
					t = L
				}
				ex, ey := dx-t*u.X, dy-t*u.Y
				d2 = ex*ex + ey*ey
				d = math.Sqrt(d2)
			}
			if d > R {
				continue
			}
			f := float32(r - d)
			k := row + i
			if d2 > r2 {
				m.cellUpdate(k, f, false, zmin)
				continue
			}
			zc := float32(p.za)
			if dz != 0 {
				if L == 0 {
					zc = zmin
				} else {
					e := dx*n.X + dy*n.Y
					half := math.Sqrt(math.Max(r2-e*e, 0))
					tlo := math.Min(math.Max(t0-half, 0), L)
					thi := math.Min(math.Max(t0+half, 0), L)
					zc = float32(p.za + dz*math.Min(tlo, thi)/L)
					if z2 := float32(p.za + dz*math.Max(tlo, thi)/L); z2 < zc {
						zc = z2
					}
				}
			}
			if h := m.c[k].h; zc < h-epsZ && !math.IsInf(float64(h), -1) {
				vol += float64(h-zc) * ca
			}
			m.cellUpdate(k, f, true, zc)
		}
	}
	return vol
}

func (m *Material) stampArc(p piece, r float64) float64 {
	R := r + float64(m.band)
	// Make the span counter-clockwise from th0 over sw ≥ 0; z follows.
	th0, sw, za, zb := p.th0, p.sweep, p.za, p.zb
	if sw < 0 {
		th0, sw, za, zb = th0+sw, -sw, zb, za
	}
	o, rad := p.o, p.rad
	e0 := geom.Pt(math.Cos(th0), math.Sin(th0))
	e1 := geom.Pt(math.Cos(th0+sw), math.Sin(th0+sw))
	p0, p1 := o.Add(e0.Scale(rad)), o.Add(e1.Scale(rad))
	// Bounding box of the sector: its ends and any axis extreme inside.
	bb := geom.EmptyRect().Extend(p0).Extend(p1)
	for q := 0; q < 4; q++ {
		ang := float64(q) * math.Pi / 2
		rel := math.Mod(ang-th0+4*math.Pi, 2*math.Pi)
		if rel <= sw {
			bb = bb.Extend(o.Add(geom.Pt(math.Cos(ang), math.Sin(ang)).Scale(rad)))
		}
	}
	j0 := max(int(math.Ceil((bb.Min.Y-R-m.y0)*m.inv-0.5)), 0)
	j1 := min(int(math.Floor((bb.Max.Y+R-m.y0)*m.inv-0.5))+1, m.ny)
	bx0, bx1 := bb.Min.X-R, bb.Max.X+R
	Ro, Ri := rad+R, rad-R
	r2 := r * r
	dz := zb - za
	zmin := float32(math.Min(za, zb))
	ca := m.cell * m.cell
	var vol float64
	for j := j0; j < j1; j++ {
		y := m.cy(j)
		dy := y - o.Y
		if math.Abs(dy) > Ro {
			continue
		}
		wo := math.Sqrt(Ro*Ro - dy*dy)
		wi := 0.0
		if Ri > 0 && math.Abs(dy) < Ri {
			wi = math.Sqrt(Ri*Ri - dy*dy)
		}
		row := j * m.nx
		spans := [2][2]float64{{o.X - wo, o.X - wi}, {o.X + wi, o.X + wo}}
		if wi == 0 {
			spans = [2][2]float64{{o.X - wo, o.X + wo}, {1, 0}}
		}
		for _, sp := range spans {
			xl, xr := math.Max(sp[0], bx0), math.Min(sp[1], bx1)
			if xl > xr {
				continue
			}
			i0, i1 := m.rowSpan(xl, xr)
			for i := i0; i < i1; i++ {
				qx, qy := m.cx(i)-o.X, dy
				var d float64
				in := e0.X*qy-e0.Y*qx >= 0 && qx*e1.Y-qy*e1.X >= 0
				if in {
					d = math.Abs(math.Hypot(qx, qy) - rad)
				} else {
					d = math.Min(math.Hypot(qx+o.X-p0.X, qy+o.Y-p0.Y), math.Hypot(qx+o.X-p1.X, qy+o.Y-p1.Y))
				}
				if d > R {
					continue
				}
				f := float32(r - d)
				k := row + i
				if d*d > r2 {
					m.cellUpdate(k, f, false, zmin)
					continue
				}
				zc := float32(za)
				if dz != 0 {
					zc = float32(arcCutZ(qx, qy, th0, sw, rad, r, za, zb))
				}
				if h := m.c[k].h; zc < h-epsZ && !math.IsInf(float64(h), -1) {
					vol += float64(h-zc) * ca
				}
				m.cellUpdate(k, f, true, zc)
			}
		}
	}
	return vol
}

// arcCutZ returns the lowest tool bottom among the positions of a helical
// arc (counter-clockwise from th0 over sw, Z from za to zb) within r of the
// point q (relative to the arc centre).
func arcCutZ(qx, qy, th0, sw, rad, r, za, zb float64) float64 {
	rho := math.Hypot(qx, qy)
	zmin := math.Min(za, zb)
	if rho < 1e-9 || sw == 0 {
		return zmin
	}
	c := (rho*rho + rad*rad - r*r) / (2 * rho * rad)
	if c <= -1 {
		return zmin // every position of the circle reaches q
	}
	beta := math.Acos(math.Min(c, 1))
	rel := math.Remainder(math.Atan2(qy, qx)-th0, 2*math.Pi)
	if rel < -beta && rel+2*math.Pi-beta <= sw {
		rel += 2 * math.Pi
	}
	lo, hi := math.Max(rel-beta, 0), math.Min(rel+beta, sw)
	if lo > hi {
		lo, hi = math.Min(math.Max(rel, 0), sw), math.Min(math.Max(rel, 0), sw)
	}
	z0 := za + (zb-za)*lo/sw
	z1 := za + (zb-za)*hi/sw
	return math.Min(z0, z1)
}
