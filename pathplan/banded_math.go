package pathplan

import "math"

// This file holds the engagement geometry the banded strategy is built on.
// Every relation is derived from the circle–circle intersection of the
// cutter with the envelope of the previous pass; none is fitted.

// bandedPhiOf returns the engagement angle φ (radians) of a straight side
// cut at radial fraction aeD = ae/D: φ = arccos(1 − ae/r).
func bandedPhiOf(aeD float64) float64 {
	c := 1 - 2*aeD
	return math.Acos(max(-1, min(1, c)))
}

// bandedAeOf returns the radial fraction ae/D equivalent to engagement angle
// φ: ae = r·(1 − cos φ), the convention engage reports.
func bandedAeOf(phi float64) float64 { return (1 - math.Cos(phi)) / 2 }

// spiralStep returns the local step from a previous front to the next one
// that makes the engagement angle equal phi, for a cutter of radius r, when
// the previous front has radius of curvature rp at that vertex. convex is
// set when the centre of curvature lies on the cleared side (material
// outside the curve, as in an outward spiral); otherwise the centre lies in
// the material. rp = +Inf is a straight front, where the step is the
// straight-cut width r·(1 − cos φ).
//
// Derivation (constant-engagement offsetting, after the method of Int J Adv
// Manuf Technol (2019), doi:10.1007/s00170-019-03834-8): the previous pass
// leaves an envelope circle of radius rp ± r about the centre of curvature
// O; the tool of radius r sits at distance ρ from O on the next front. The
// tool circle leaves the envelope at the point whose angle θ from the
// normal satisfies the law of cosines, and the engaged front-half arc is θ.
//
//	convex:  (rp + r)² = ρ² + r² + 2ρr·cos φ, ρ = rp + s
//	concave: (rp − r)² = ρ² + r² − 2ρr·cos φ, ρ = rp − s
func spiralStep(r, phi, rp float64, convex bool) float64 {
	c := math.Cos(phi)
	straight := r * (1 - c)
	if math.IsInf(rp, 0) || rp > 1e4*r {
		return straight
	}
	if convex {
		// ρ² + 2rcρ + r² − (rp + r)² = 0, positive root.
		rho := -r*c + math.Sqrt(r*r*c*c-r*r+(rp+r)*(rp+r))
		return max(0, rho-rp)
	}
	disc := r*r*c*c - r*r + (rp-r)*(rp-r)
	if disc < 0 || rp <= r {
		// The concave front closes before the engagement reaches φ: the
		// whole arc can be taken.
		return max(straight, rp)
	}
	rho := r*c + math.Sqrt(disc)
	return max(0, rp-rho)
}

// spiralPhi returns the engagement angle (radians) of a tool of radius r on
// a front of radius rho whose previous front is concentric at distance s,
// the inverse of spiralStep. convex as in spiralStep.
func spiralPhi(r, rho, s float64, convex bool) float64 {
	var c float64
	if convex {
		rp := rho - s
		c = ((rp+r)*(rp+r) - rho*rho - r*r) / (2 * rho * r)
	} else {
		rp := rho + s
		c = (rho*rho + r*r - (rp-r)*(rp-r)) / (2 * rho * r)
	}
	return math.Acos(max(-1, min(1, c)))
}

// bandedChipThinning returns the factor by which the programmed feed per
// tooth exceeds the chip load so that the largest chip thickness equals the
// chip load at engagement angle phi: 1/sin φ for φ < 90° (h_max = fz·sin φ,
// Altintas 2012, ch. 2, from memory), 1 beyond.
func bandedChipThinning(phi float64) float64 {
	if phi >= math.Pi/2 || phi <= 0 {
		return 1
	}
	return 1 / math.Sin(phi)
}

// bandedLevels returns the floor Z of each level when a depth is cut at
// the full usable flute length: the fewest equal levels no deeper than
// flute each. top is the stock top; the last level lands on top − depth.
func bandedLevels(top, depth, flute float64) []float64 {
	if depth <= 0 {
		return nil
	}
	if flute <= 0 {
		flute = depth
	}
	return levelsFor(top, depth, flute)
}

// trochoidPoint returns the tool centre of a trochoid along the x axis with
// loop radius rt and pitch p per loop at loop angle th (radians), counted
// from the front of the loop, turning counter-clockwise:
// x = p·th/2π + rt·cos th, y = rt·sin th.
func trochoidPoint(rt, p, th float64) (x, y float64) {
	return p*th/(2*math.Pi) + rt*math.Cos(th), rt * math.Sin(th)
}

// trochoidMaxPhi returns the largest engagement angle (radians) a cutter of
// radius r meets along one loop of a steady trochoid of loop radius rt and
// pitch p in a channel whose tool centre may wander ±rt about the spine.
// It is computed, not looked up: the material is the strip |y| ≤ rt + r,
// less what the tool swept along the previous loops; at every sampled
// position of the loop the front half of the tool circle is examined
// (after Otkur & Lazoglu 2007, who analyse the engagement of trochoidal
// loops the same way, from memory).
func trochoidMaxPhi(r, rt, p float64) float64 {
	const nTh, nA = 72, 90
	// Previous loops that can still reach the current one.
	back := int(math.Ceil(2*(rt+r)/max(p, 1e-6))) + 1
	if back > 8 {
		back = 8
	}
	// Swept centre positions of the previous loops, one polyline per loop.
	prev := make([][][2]float64, back)
	for k := -back; k < 0; k++ {
		var loop [][2]float64
		for i := 0; i <= nTh; i++ {
			th := 2 * math.Pi * (float64(k) + float64(i)/nTh)
			x, y := trochoidPoint(rt, p, th)
			loop = append(loop, [2]float64{x, y})
		}
		prev[k+back] = loop
	}
	reach := rt + 2*r + p
	covered := func(qx, qy float64) bool {
		for k, loop := range prev {
			xc := p * float64(k-back)
			if math.Abs(qx-xc) > reach {
				continue
			}
			if coveredBy(loop, qx, qy, r) {
				return true
			}
		}
		return false
	}
	best := 0.0
	for i := 0; i < nTh; i++ {
		th := 2 * math.Pi * float64(i) / nTh
		cx, cy := trochoidPoint(rt, p, th)
		ux, uy := p/(2*math.Pi)-rt*math.Sin(th), rt*math.Cos(th)
		l := math.Hypot(ux, uy)
		if l == 0 {
			continue
		}
		best = max(best, frontAngle(cx, cy, ux/l, uy/l, r, rt+r, nA, covered))
	}
	return best
}

// frontAngle returns the engagement angle of a tool of radius r centred at
// (cx, cy) and moving along the unit vector (ux, uy): the length of the
// part of the front half of its circle (−90°…+90° about the feed
// direction) that lies in material — inside the strip |y| ≤ strip and not
// covered by earlier cuts. The half circle is sampled at nA+1 points and
// each change between material and none is located by bisection, so the
// angle is not rounded to the sample spacing (which would read up to one
// spacing, 3° for nA = 60, low).
func frontAngle(cx, cy, ux, uy, r, strip float64, nA int, covered func(x, y float64) bool) float64 {
	in := func(a float64) bool {
		ca, sa := math.Cos(a), math.Sin(a)
		qx := cx + r*(ux*ca-uy*sa)
		qy := cy + r*(ux*sa+uy*ca)
		return math.Abs(qy) <= strip && !covered(qx, qy)
	}
	step := math.Pi / float64(nA)
	phi := 0.0
	a0 := -math.Pi / 2
	m0 := in(a0)
	for j := 1; j <= nA; j++ {
		a1 := -math.Pi/2 + step*float64(j)
		m1 := in(a1)
		switch {
		case m0 && m1:
			phi += a1 - a0
		case m0 != m1:
			// The change lies between a0 and a1.
			lo, hi := a0, a1
			for range 12 {
				mid := (lo + hi) / 2
				if in(mid) == m0 {
					lo = mid
				} else {
					hi = mid
				}
			}
			if m0 {
				phi += lo - a0
			} else {
				phi += a1 - hi
			}
		}
		a0, m0 = a1, m1
	}
	return phi
}

// trochoidPitch returns the largest pitch whose loops keep the engagement
// angle at or below phiMax (bisection on trochoidMaxPhi, which grows with
// the pitch), and never more than the cutter radius.
func trochoidPitch(r, rt, phiMax float64) float64 {
	return largestPitch(r, phiMax, 12, func(p float64) float64 { return trochoidMaxPhi(r, rt, p) })
}

// largestPitch bisects, in iters steps, for the largest pitch in
// [0.01·r, r] whose engagement angle maxPhi(pitch) — growing with the
// pitch — stays at or below phiMax.
func largestPitch(r, phiMax float64, iters int, maxPhi func(pitch float64) float64) float64 {
	lo, hi := 0.01*r, r
	if maxPhi(hi) <= phiMax {
		return hi
	}
	if maxPhi(lo) > phiMax {
		return lo
	}
	for i := 0; i < iters; i++ {
		m := (lo + hi) / 2
		if maxPhi(m) <= phiMax {
			lo = m
		} else {
			hi = m
		}
	}
	return lo
}

// coveredBy reports whether (qx, qy) lies within r of the polyline pts.
// It runs from the end, the stretch nearest a tool that follows it, and
// skips segments whose box lies farther than r.
func coveredBy(pts [][2]float64, qx, qy, r float64) bool {
	for i := len(pts) - 2; i >= 0; i-- {
		ax, ay := pts[i][0], pts[i][1]
		bx, by := pts[i+1][0], pts[i+1][1]
		if qx < min(ax, bx)-r || qx > max(ax, bx)+r || qy < min(ay, by)-r || qy > max(ay, by)+r {
			continue
		}
		dx, dy := pts[i+1][0]-ax, pts[i+1][1]-ay
		l2 := dx*dx + dy*dy
		t := 0.0
		if l2 > 0 {
			t = max(0, min(1, ((qx-ax)*dx+(qy-ay)*dy)/l2))
		}
		ex, ey := ax+t*dx-qx, ay+t*dy-qy
		if ex*ex+ey*ey <= r*r*(1-1e-9) {
			return true
		}
	}
	return false
}

// coverPolyline is a polyline for many coveredBy queries: the bounding
// disk of each run of coverRun segments, grown by r, lets a query skip a
// run none of whose segments can lie within r of it.
type coverPolyline struct {
	pts   [][2]float64
	r     float64
	disks [][3]float64 // per run: centre x, y and radius grown by r
}

const coverRun = 8

func newCoverPolyline(pts [][2]float64, r float64) *coverPolyline {
	c := &coverPolyline{pts: pts, r: r}
	for i0 := 0; i0 < len(pts)-1; i0 += coverRun {
		i1 := min(i0+coverRun, len(pts)-1)
		var mx, my float64
		for i := i0; i <= i1; i++ {
			mx += pts[i][0]
			my += pts[i][1]
		}
		n := float64(i1 - i0 + 1)
		mx, my = mx/n, my/n
		rho := 0.0
		for i := i0; i <= i1; i++ {
			rho = max(rho, math.Hypot(pts[i][0]-mx, pts[i][1]-my))
		}
		// The segments lie in the hull of their ends, so within rho.
		c.disks = append(c.disks, [3]float64{mx, my, rho + r + 1e-9})
	}
	return c
}

// covered is coveredBy(c.pts, qx, qy, c.r), segment for segment in the same
// order, without the runs that lie farther than r.
func (c *coverPolyline) covered(qx, qy float64) bool {
	for ri := len(c.disks) - 1; ri >= 0; ri-- {
		d := c.disks[ri]
		if dx, dy := qx-d[0], qy-d[1]; dx*dx+dy*dy > d[2]*d[2] {
			continue
		}
		i0 := ri * coverRun
		i1 := min(i0+coverRun, len(c.pts)-1)
		if coveredBy(c.pts[i0:i1+1], qx, qy, c.r) {
			return true
		}
	}
	return false
}

// trochoidHeldPoint returns the tool centre of a trochoid along the x axis
// whose centre advances only while the tool is on the back half of the loop
// (in the cut-out slot) and stands still while the front half cuts: loop
// radius rt, pitch p, loop angle th (radians) counted from the front,
// counter-clockwise. The centre moves on the back half by p·(1 − cos ψ)/2,
// ψ = th − π/2, so the velocity is continuous where the halves meet. On
// the front half the tool then runs on an arc concentric with nothing but
// the previous loop's front, one pitch behind: the engagement there is the
// circle–circle value at the apex and falls towards the walls.
func trochoidHeldPoint(rt, p, th float64) (x, y float64) {
	psi := th - math.Pi/2
	k := math.Floor(psi / (2 * math.Pi))
	f := psi - 2*math.Pi*k
	adv := 1.0
	if f < math.Pi {
		adv = (1 - math.Cos(f)) / 2
	}
	return p*(k+adv) + rt*math.Cos(th), rt * math.Sin(th)
}

// trochoidHeldMaxPhi is trochoidMaxPhi for the loops of
// trochoidHeldPoint: the largest engagement angle over one steady loop,
// computed by examining the front half of the tool circle at sampled
// positions against the material the previous loops left in the strip
// |y| ≤ rt + r (geometry as in Otkur & Lazoglu 2007, from memory).
func trochoidHeldMaxPhi(r, rt, p float64) float64 {
	const nTh, nA = 72, 60
	// Loops more than four pitches back lie behind the front half of the
	// tool wherever the pitch is small enough to matter.
	back := int(math.Ceil(2*(rt+r)/max(p, 1e-6))) + 1
	if back > 4 {
		back = 4
	}
	base := 2 * math.Pi * float64(back)
	var prev [][2]float64
	for i := 0; i <= back*nTh; i++ {
		x, y := trochoidHeldPoint(rt, p, math.Pi/2+2*math.Pi*float64(i)/nTh)
		prev = append(prev, [2]float64{x, y})
	}
	cover := newCoverPolyline(prev, r)
	best := 0.0
	for i := 0; i < nTh; i++ {
		th := math.Pi/2 + base + 2*math.Pi*float64(i)/nTh
		cx, cy := trochoidHeldPoint(rt, p, th)
		nx, ny := trochoidHeldPoint(rt, p, th+1e-4)
		ux, uy := nx-cx, ny-cy
		l := math.Hypot(ux, uy)
		if l == 0 {
			continue
		}
		best = max(best, frontAngle(cx, cy, ux/l, uy/l, r, rt+r, nA, cover.covered))
	}
	return best
}

// trochoidHeldPitch returns the largest pitch whose held-front loops keep
// the engagement angle at or below phiMax (bisection), never more than the
// cutter radius.
func trochoidHeldPitch(r, rt, phiMax float64) float64 {
	return largestPitch(r, phiMax, trochoidPitchIters, func(p float64) float64 { return trochoidHeldMaxPhi(r, rt, p) })
}

// trochoidPitchIters is the number of bisection steps of trochoidHeldPitch:
// the pitch is found to 0.99·r/2¹⁴, 0.0002 mm for a 6 mm tool.
const trochoidPitchIters = 14

// turnProfile returns the shape of a drift that crosses a step of width
// step onto a parallel pass with the engagement angle held at phiMax or
// under: arc lengths tau along the drift, from 0, spaced ds or less, and the
// share frac of the step crossed at each (0 to 1).
//
// A tool of radius r that has crossed e beyond a straight edge of material
// while moving at an angle β to it engages the arc θ + min(θ, β), with
// θ = arccos(1 − e/r) (elementary geometry: the disk beyond the edge spans
// ±θ about the edge normal, and only the front half of the tool cuts). So
// the drift may be steep while θ ≤ φmax/2 and must flatten to
// β = φmax − θ as it nears the full step. The drift is built chord by
// chord (chords of length ds at most), each as steep as its end allows,
// between 4° and 60° so that it stays short and smooth; tau is measured
// along the pass, not along the drift.
func turnProfile(r, step, phiMax, ds float64) (tau, frac []float64) {
	const lo, hi = 4 * math.Pi / 180, 60 * math.Pi / 180
	if !(step > 0) || !(r > 0) || !(ds > 0) {
		return []float64{0, ds}, []float64{0, 1}
	}
	// arc is the engaged arc at the end of a straight chord at angle β
	// that ends e beyond the edge: the worst point of the chord, since
	// the arc grows with e.
	arc := func(e, beta float64) float64 {
		th := math.Acos(max(-1, 1-e/r))
		return th + min(th, beta)
	}
	tau, frac = []float64{0}, []float64{0}
	e, s := 0.0, 0.0
	for e < step && len(tau) < 100000 {
		// The steepest chord of length ds whose end keeps the arc at
		// phiMax, by bisection on its angle, within [lo, hi].
		a, b := lo, hi
		if arc(min(step, e+ds*math.Sin(b)), b) > phiMax {
			for range 40 {
				m := (a + b) / 2
				if arc(min(step, e+ds*math.Sin(m)), m) > phiMax {
					b = m
				} else {
					a = m
				}
			}
			b = a
		}
		rise := ds * math.Sin(b)
		run := ds * math.Cos(b)
		if e+rise > step {
			run *= (step - e) / rise
			rise = step - e
		}
		e += rise
		s += run
		tau = append(tau, s)
		frac = append(frac, min(1, e/step))
	}
	frac[len(frac)-1] = 1
	return tau, frac
}
