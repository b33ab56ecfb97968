package engage

import (
	"math"

	"github.com/chipband/chipband/geom"
)

// Engagement is the contact of the cutter periphery with material at one
// tool position.
//
// Angles are immersion angles after Altintas (2012, ch. 2): measured from
// the left normal of the feed direction, in the sense of rotation of a
// right-hand cutter turning clockwise seen from above (M3). A tooth at
// immersion ψ sits at c + r·(sin ψ·u + cos ψ·n), u the feed direction and n
// its left normal, so ψ = 0 is the left side, π/2 the front and π the right
// side. Material on the left is up (conventional) milling, on the right down
// (climb) milling.
type Engagement struct {
	Phi   float64 // engaged angle φ, radians (sum over all engaged arcs)
	Entry float64 // immersion angle where the first engaged arc starts, radians
	Exit  float64 // immersion angle where the last engaged arc ends, radians
	AE    float64 // radial width ae, mm: r·(1 − cos φ) for φ ≤ π, else D
	AP    float64 // axial depth ap, mm: highest material above the tool bottom on the engaged arc
	// SinMax is the largest sin ψ over the engaged arcs (the ratio h_max/fz)
	// and SinMean the mean of sin ψ over them (h_mean/fz).
	SinMax, SinMean float64
	// Full is set when the whole circle was examined (no feed direction in
	// the XY plane, as in a plunge); the angles then start at +Y.
	Full bool
}

// PhiDeg returns φ in degrees.
func (e Engagement) PhiDeg() float64 { return e.Phi * 180 / math.Pi }

// engageSamples is the number of intervals on the front half circle.
const engageSamples = 24

// Engage returns the engagement of tool t at position at (tool-centre XY,
// tool-bottom Z) moving along dir in the XY plane. Only the front half of
// the periphery is examined, because in continuous motion the rear half
// runs in what the tool has just cut. When dir is zero (a vertical move)
// the whole circle is examined.
func (m *Material) Engage(t Tool, at geom.Point3, dir geom.Point) Engagement {
	return m.engage(t, at, dir, nil)
}

// circleCache remembers the field on the engagement grid between samples of
// one move, while the material does not change. The field is a distance,
// and its bilinear interpolant changes by at most √2 times the distance
// moved, so a grid point whose cached |v| exceeds that bound (slack) keeps
// its sign and needs no new lookup.
type circleCache struct {
	ok    [2*engageSamples + 1]bool
	v, h  [2*engageSamples + 1]float32
	seen  [2*engageSamples + 1]float64 // travel when each value was looked up
	trav  float64                      // distance the grid has moved so far (translation + r·turn)
	at    geom.Point3
	dir   geom.Point
	valid bool
	// xs are the boundary crossings of the previous sample, used to start
	// the root search.
	xs  [8]float64
	nxs int
}

// reset forgets everything (the material changed).
func (c *circleCache) reset() {
	c.valid = false
	c.nxs = 0
	c.ok = [2*engageSamples + 1]bool{}
}

// move accounts for the tool moving to at along dir; it reports false when
// the cache cannot be used there.
func (c *circleCache) move(at geom.Point3, dir geom.Point, r float64) bool {
	if dir == (geom.Point{}) {
		c.reset()
		return false
	}
	if !c.valid || at.Z != c.at.Z {
		c.reset()
		c.valid, c.at, c.dir = true, at, dir
		return true
	}
	turn := math.Abs(math.Atan2(c.dir.Cross(dir), c.dir.Dot(dir)))
	c.trav += at.XY().Dist(c.at.XY()) + r*turn + 1e-6
	c.at, c.dir = at, dir
	return true
}

func (m *Material) engage(t Tool, at geom.Point3, dir geom.Point, cache *circleCache) Engagement {
	var e Engagement
	if !finite(at.X, at.Y, at.Z, dir.X, dir.Y) || !(t.Diameter > 0) {
		return e
	}
	if at.Z >= m.top-epsZ {
		return e
	}
	r := t.Radius()
	u := dir.Unit()
	full := u == (geom.Point{})
	if full {
		u = geom.Pt(1, 0)
	}
	n := u.Perp()
	zt := float32(at.Z + epsZ)
	span := math.Pi
	steps := engageSamples
	if full {
		span, steps = 2*math.Pi, 2*engageSamples
	}
	d := span / float64(steps)
	// Material needs the field below −tol: a circle running exactly along
	// an earlier cut of the same radius (a second descent down a hole, a
	// retraced pass) must read as tangent, not engaged, despite the
	// bilinear error of a curved distance field, about cell²/(8·radius).
	// Arc ends are found at −tol; an arc as a whole counts only where the
	// circle goes deeper than twice that error (tangent, below), so that a
	// pass run back over its own track, or a tool come back onto a
	// circle it has stood on, reads no sliver while real arcs keep their
	// exact ends.
	tol := float32(1e-4)
	if full {
		tol = float32(m.cell * m.cell / (2 * r))
	}
	// hTol is the margin by which a point must be inside material for its
	// height to count in ap, and inside a higher level for topAt to take
	// that level: the bilinear error of a curved field, about
	// cell²/(8·radius), must not turn a wall the circle only touches into
	// contact over the wall's whole height.
	hTol := -float32(m.cell * m.cell / (2 * r))
	tangent := -float32(m.cell*m.cell/(4*r)) + tol
	if full {
		tangent = 0
	}

	// Circle points on the fixed grid come from the table of the material;
	// points between grid angles by angle addition from the nearest entry.
	ux, uy := r*u.X, r*u.Y
	nx, ny := r*n.X, r*n.Y
	tab := &m.circle
	eval := func(psi float64) (float32, float32) {
		k := int(psi/d + 0.5)
		dl := psi - float64(k)*d
		d2 := dl * dl
		sd := dl * (1 - d2/6*(1-d2/20))    // sin δ, |δ| ≤ π/48
		cd := 1 - d2/2*(1-d2/12*(1-d2/30)) // cos δ
		sc := tab[k%(2*engageSamples)]
		sn := sc[0]*cd + sc[1]*sd
		cs := sc[1]*cd - sc[0]*sd
		px, py := at.X+sn*ux+cs*nx, at.Y+sn*uy+cs*ny
		v, h, lo := m.field(px, py, zt)
		v += tol
		if v < 0 && lo < h-epsZ {
			h = m.topAt(px, py, zt, lo, h, tol-hTol)
		}
		return v, h
	}
	lookK := func(k int) (float32, float32) {
		sc := tab[k%(2*engageSamples)]
		px, py := at.X+sc[0]*ux+sc[1]*nx, at.Y+sc[0]*uy+sc[1]*ny
		v, h, lo := m.field(px, py, zt)
		v += tol
		if v < 0 && lo < h-epsZ {
			h = m.topAt(px, py, zt, lo, h, tol-hTol)
		}
		return v, h
	}
	if full || (cache != nil && !cache.move(at, u, r)) {
		cache = nil
	}
	// evalK returns the field at grid point k, or from the cache a value of
	// the same sign and no larger magnitude.
	evalK := func(k int) (float32, float32) {
		if cache == nil {
			return lookK(k)
		}
		if cache.ok[k] {
			v, sl := cache.v[k], float32(math.Sqrt2*(cache.trav-cache.seen[k]))
			if v > sl+1e-4 {
				return v - sl, cache.h[k]
			}
			if v < -sl-1e-4 {
				return v + sl, cache.h[k]
			}
		}
		v, h := lookK(k)
		cache.ok[k], cache.v[k], cache.h[k], cache.seen[k] = true, v, h, cache.trav
		return v, h
	}
	// The field is close to a distance (its interpolant √2-Lipschitz), so no
	// boundary lies within |v|/√2 of a sample: grid points closer than that
	// along the circle are skipped.
	skip := func(v float32) int {
		k := int(0.7 * math.Abs(float64(v)) / (r * d))
		return max(k, 1)
	}
	var illinois func(a, b float64, va, vb float32) float64
	// root finds the sign change of the field between psi a (va) and b
	// (vb) by regula falsi with the Illinois modification, which stays
	// fast where the field has a kink (two cuts meeting).
	var xs [8]float64
	nxs := 0
	root := func(a, b float64, va, vb float32) float64 {
		x := illinois(a, b, va, vb)
		if nxs < len(xs) {
			xs[nxs] = x
			nxs++
		}
		return x
	}
	illinois = func(a, b float64, va, vb float32) float64 {
		if cache != nil {
			// Start from the crossing of the previous sample in (a, b).
			for _, x0 := range cache.xs[:cache.nxs] {
				if x0 <= a || x0 >= b {
					continue
				}
				const w = 3e-4
				v0, _ := eval(x0)
				if v0 == 0 {
					return x0
				}
				if (v0 < 0) == (va < 0) {
					a, va = x0, v0
					if x1 := x0 + w; x1 < b {
						if v1, _ := eval(x1); (v1 < 0) != (va < 0) {
							b, vb = x1, v1
						} else {
							a, va = x1, v1
						}
					}
				} else {
					b, vb = x0, v0
					if x1 := x0 - w; x1 > a {
						if v1, _ := eval(x1); (v1 < 0) != (vb < 0) {
							a, va = x1, v1
						} else {
							b, vb = x1, v1
						}
					}
				}
				break
			}
		}
		side := 0
		for it := 0; it < 10; it++ {
			x := a + (b-a)*float64(va/(va-vb))
			if b-a < 3e-4 {
				return x
			}
			vx, _ := eval(x)
			switch {
			case vx == 0:
				return x
			case (vx < 0) == (va < 0):
				a, va = x, vx
				if side == -1 {
					vb /= 2
				}
				side = -1
			default:
				b, vb = x, vx
				if side == 1 {
					va /= 2
				}
				side = 1
			}
		}
		return a + (b-a)*float64(va/(va-vb))
	}
	var (
		phi, sinInt, sinMax float64
		first               = -1.0
		last                float64
		hmax                = float32(math.Inf(-1))
		// hsure is hmax over the points clearly in material, by more than
		// the bilinear error of a curved field (about cell²/(8·radius)):
		// a circle tangent to a wall or core of the tool's own making
		// (the inside of a helix bore) must not read that wall's full
		// height as ap. It falls back to hmax for arcs too thin to hold
		// such a point.
		hsure = float32(math.Inf(-1))
	)
	seen := func(v, h float32) {
		hmax = max(hmax, h)
		if v < hTol {
			hsure = max(hsure, h)
		}
	}
	// arcMin is the lowest field value seen on the arc being scanned.
	arcMin := float32(0)
	addArc := func(a, b float64) {
		low := arcMin
		arcMin = 0
		if b <= a || low >= tangent {
			return
		}
		if first < 0 {
			first = a
		}
		last = b
		phi += b - a
		if full {
			return
		}
		sinInt += math.Cos(a) - math.Cos(b)
		if a <= math.Pi/2 && b >= math.Pi/2 {
			sinMax = 1
		} else {
			sinMax = math.Max(sinMax, math.Max(math.Sin(a), math.Sin(b)))
		}
	}
	pv, ph := evalK(0)
	if pv < 0 {
		seen(pv, ph)
		arcMin = pv
	}
	v0 := pv
	start := 0.0 // start of the current material arc, when the field is negative
	// scan handles the interval [a, b] with field values va and vb: a sign
	// change ends or starts an arc; two non-negative ends closer to zero
	// than the chord allows may hide a thin
	// sliver of material (chord ≤ r·(b−a), slope ≤ √2), so the interval is
	// split a few times.
	var scan func(a, b float64, va, vb float32, depth int)
	scan = func(a, b float64, va, vb float32, depth int) {
		switch {
		case va < 0 && vb < 0:
			arcMin = min(arcMin, va, vb)
		case va < 0:
			arcMin = min(arcMin, va)
			addArc(start, root(a, b, va, vb))
		case vb < 0:
			start = root(a, b, va, vb)
			arcMin = vb
		case depth > 0 && float64(va+vb) < math.Sqrt2*r*(b-a):
			mid := (a + b) / 2
			vm, hm := eval(mid)
			if vm < 0 {
				seen(vm, hm)
			}
			scan(a, mid, va, vm, depth-1)
			scan(mid, b, vm, vb, depth-1)
		}
	}
	for k := 0; k < steps; {
		k1 := min(k+skip(pv), steps)
		var v, hv float32
		if full && k1 == steps {
			v, hv = v0, ph
		} else {
			v, hv = evalK(k1)
		}
		if (v < 0) != (pv < 0) && k1 > k+1 {
			// A sign change over a skipped stretch: walk it point by point.
			k1 = k + 1
			v, hv = evalK(k1)
		}
		if v < 0 {
			seen(v, hv)
		}
		scan(float64(k)*d, float64(k1)*d, pv, v, 4)
		pv = v
		k = k1
	}
	if pv < 0 {
		addArc(start, span)
	}
	if cache != nil {
		cache.xs, cache.nxs = xs, nxs
	}
	if phi <= 0 {
		return e
	}
	e.Phi = phi
	e.Entry, e.Exit = first, last
	e.Full = full
	if phi >= math.Pi {
		e.AE = t.Diameter
	} else {
		e.AE = r * (1 - math.Cos(phi))
	}
	if !math.IsInf(float64(hsure), -1) {
		hmax = hsure
	}
	if !math.IsInf(float64(hmax), -1) {
		e.AP = math.Max(float64(hmax)-at.Z, 0)
	}
	if full {
		e.SinMax, e.SinMean = 1, 1
	} else {
		e.SinMax = sinMax
		e.SinMean = sinInt / phi
	}
	return e
}

// diskMaterial returns the area of material under the tool bottom inside
// the disk of radius r about c at height z, and the highest material top
// there above z (0 when none).
func (m *Material) diskMaterial(c geom.Point, z, r float64) (area, above float64) {
	zt := float32(z + epsZ)
	var cnt int
	top := float32(math.Inf(-1))
	m.diskRows(c, r*math.Sqrt(1-1e-9), func(cells []cell) bool {
		for _, cl := range cells {
			if h := cl.h; h > zt {
				cnt++
				top = max(top, h)
			}
		}
		return true
	})
	if cnt == 0 {
		return 0, 0
	}
	return float64(cnt) * m.cell * m.cell, float64(top) - z
}

// diskRows hands visit, row by row, the cells whose centres lie inside the
// disk of radius r about c; it stops when visit returns false.
func (m *Material) diskRows(c geom.Point, r float64, visit func(cells []cell) bool) {
	j0 := max(int(math.Ceil((c.Y-r-m.y0)*m.inv-0.5)), 0)
	j1 := min(int(math.Floor((c.Y+r-m.y0)*m.inv-0.5))+1, m.ny)
	for j := j0; j < j1; j++ {
		dy := m.cy(j) - c.Y
		w2 := r*r - dy*dy
		if w2 < 0 {
			continue
		}
		w := math.Sqrt(w2)
		i0, i1 := m.rowSpan(c.X-w, c.X+w)
		if i1 <= i0 {
			continue
		}
		row := j * m.nx
		if !visit(m.c[row+i0 : row+i1]) {
			return
		}
	}
}

// rapidTol is the intrusion into material below which a rapid is not
// reported, mm: far above float32 rounding of the cut-distance field (about
// 1e-7 mm at the band width), far below any machining tolerance.
const rapidTol = 1e-4

// rapidHits confirms that a tool of radius r at c with its bottom at z
// overlaps material that is still there, for a sample the grid has flagged
// (Simulate's first filter: engagement on the periphery or material under
// the bottom by the interpolated field). The grid's field beside a wall can
// show material up to a cell beyond it (the "Several levels" limit of the
// package notes), so a rapid passing a wall a little clear of it would be
// reported. rapidHits reports an overlap only when
//   - the centre of a material cell lies inside the disk by more than
//     rapidTol (the height field is exact at cell centres: each stamp
//     decides a centre by its exact distance to the tool path), or
//   - a point of the periphery (sampled every quarter cell) is material by
//     the field and lies in none of the disks B(q, a_q − rapidTol) of the
//     cells q cut below the tool bottom within the band, a_q their cut
//     distance. Those disks are surely cut (elementary geometry, the
//     triangle inequality: a_q = r − d for a tool position within d of q,
//     or the distance into a removed region or out of the stock).
//
// The disks of cells at most the band width inside a straight cut reach to
// within about c²/(8·band) of its edge (c the cell size; 1/200 of a cell at
// the default band of five cells), so a rapid clear of a wall by more than
// that is not reported however its cells lie; one that enters material by
// more than rapidTol at its periphery or by a cell at its bottom is.
// Material wholly inside the disk, thinner than a cell and away from its
// periphery, is not seen.
func (m *Material) rapidHits(c geom.Point, z, r float64) bool {
	zt := float32(z + epsZ)
	// Material centres inside the disk.
	hit := false
	m.diskRows(c, r-rapidTol, func(cells []cell) bool {
		for _, cl := range cells {
			if cl.h > zt {
				hit = true
				return false
			}
		}
		return true
	})
	if hit {
		return true
	}
	// The periphery.
	n := max(16, int(math.Ceil(2*math.Pi*r/(m.cell/4))))
	band := float64(m.band)
	for k := 0; k < n; k++ {
		sn, cs := math.Sincos(2 * math.Pi * float64(k) / float64(n))
		x, y := c.X+r*cs, c.Y+r*sn
		if v, _, _ := m.field(x, y, zt); v >= 0 {
			continue
		}
		if !m.surelyCut(x, y, zt, band) {
			return true
		}
	}
	return false
}

// surelyCut reports whether (x, y) lies inside the surely cut disk
// B(q, a_q − rapidTol) of a cell q cut below zt within band of it (see
// rapidHits).
func (m *Material) surelyCut(x, y float64, zt float32, band float64) bool {
	j0 := max(int(math.Ceil((y-band-m.y0)*m.inv-0.5)), 0)
	j1 := min(int(math.Floor((y+band-m.y0)*m.inv-0.5))+1, m.ny)
	i0 := max(int(math.Ceil((x-band-m.x0)*m.inv-0.5)), 0)
	i1 := min(int(math.Floor((x+band-m.x0)*m.inv-0.5))+1, m.nx)
	for j := j0; j < j1; j++ {
		dy := m.cy(j) - y
		row := j * m.nx
		for i := i0; i < i1; i++ {
			cl := &m.c[row+i]
			if cl.h > zt {
				continue
			}
			a := float64(cl.a) - rapidTol
			if a <= 0 {
				continue
			}
			dx := m.cx(i) - x
			if dx*dx+dy*dy < a*a {
				return true
			}
		}
	}
	return false
}
