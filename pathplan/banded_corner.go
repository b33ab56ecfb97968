package pathplan

import (
	"math"

	"github.com/chipband/chipband/geom"
)

// Sharp corners of the boundary pass.
//
// The last pass along a wall takes a strip one step wide. Where the wall
// turns sharply toward the domain (the inside corner of a pocket), a pass
// that runs straight into the corner meets the strip of the next wall
// head-on: the engaged arc then holds the side arc of its own strip and
// twice that of the strip ahead, 3·arccos(1 − w/r) in all (about 95° for a
// 7.5 % step, ae/D 0.55, elementary geometry), plus the corner the fronts
// could not reach. The 1 mm moving average over such a corner reads 0.4 to
// 0.6 of the diameter. A corner of the part rounded a little wider than
// the tool is no better: the tool centre turns it on a tight arc convex to
// the strip (spiralPhi's convex relation: 73° for a 1 mm arc, D8, 7.5 %).
//
// Instead, the boundary pass rounds the corner with a fillet of radius
// cornerRoundRadius (about 1.5r) and leaves the corner to a fan: fillets
// of falling radius, each tangent to both walls, so that each takes the
// crescent between itself and the one before, thickest on the bisector.
// The radius falls by the step that holds the engagement there
// (spiralStep for a convex front; the bisector distance of a fillet of
// radius ρ from the corner is ρ·(1/cos(θ/2) − 1) for a turn θ). The fan's
// passes zigzag: every other one runs the other way (conventional), from
// the leg the last one ended on, so that the tool only goes back along that
// leg over what it has just cut; with BandedOptions.ClimbOnly every pass
// runs in climb and the tool goes back along the chord of the fillet it has
// just cut. BandedOptions.SquareCorners leaves the fans out.
//
// In a closed part the fronts stop a step short of the walls, and would
// run into each corner in short crescents across it, each stepped onto by
// a link along the wall that meets its slab head-on (ae/D 0.28 for a 7.5 %
// step). Instead they leave each corner the boundary pass fans to the fan
// (cornerCaps): they stop at an arc a fan's step inside the first fillet,
// and the boundary pass cuts along that arc before the fillet. Measured
// against fronts that ran into the corners (1 mm maximum / cycle on the
// demo router): closed pocket .138 / 131.4 s → .130 / 127.7 s, deep
// pocket of two_depths.json .197 / 59.6 s → .138 / 55.8 s, island pocket
// .214 → .135, boss pocket .223 → .148; the shares above the band stay
// within 0.1 points. The fans and caps then cost 7.0 s on the closed test
// pocket's four corners (4.6 s with 5 mm corners).

const (
	// cornerMinTurn is the smallest turn of the boundary pass treated as
	// a corner: below it the strip ahead is met at a slant.
	cornerMinTurn = 30 * math.Pi / 180
	// cornerMaxPasses caps the fan of one corner. A right angle needs 15
	// fillets for a 6 mm tool and the 5–10 % band (cornerRadii, down to
	// 0.02r). Dropping any one of them doubles a step, and the crescent
	// that step leaves reads an arc of 53–61°, ae/D 0.20–0.26, however
	// small the fillets (the corner's geometry scales with the radius;
	// computed by sampling the tool circle against the last fillet's
	// envelope). With a cap of 12 the tail's last crescent read 0.264 on
	// every right-angle corner of the test pockets. 16 keeps every fillet
	// of a right angle, for 0.3 s more per pocket on the demo router.
	cornerMaxPasses = 16
	// cornerStepShare sets the engagement a fan's steps are taken at: that
	// share of the way from the band's target to the top of the in-band
	// range. The fillets read above their step where they leave the legs.
	// Measured against 0.5 (share of cutting length above 1.15 × the band
	// maximum): closed pocket .0088 → .0071, deep pocket of
	// two_depths.json .0167 → .0129, counterbore .0062 → .0049, comb
	// pocket .0170 → .0152, for about 1 s more per pocket (two more
	// fillets per right angle). At 0 the deep pocket's in-band share fell
	// under 0.9 (.896), as the fillets' crescents thin out toward their
	// ends.
	cornerStepShare = 0.25
	// capLead is how far, in tool radii, the pass along a corner's cap
	// (cornerCap) runs along each leg's inset line before and after the
	// cap's arc, so that it takes what the fronts left along that line
	// where the first fillet meets it. Measured on the deep pocket of
	// two_depths.json (share above 1.15 × the band maximum): .0107
	// without, .0090 at 0.5, .0089 at 1 (+0.5 s), .0088 at 2, where the
	// in-band share fell to .895.
	capLead = 0.5
	// cornerLegShare is the share of each leg a corner's fillets may use,
	// so that the fillets of neighbouring corners never overlap;
	// cornerLegAlone is the share of a leg no other corner's fillets use
	// (its far end turns away from the domain, or starts the ring).
	// Measured: the counterbore of two_depths.json, whose corner where it
	// meets the deep pocket has a 3 mm leg, 1 mm maximum over full windows
	// 0.313 -> 0.153 at 0.9 against 0.45.
	cornerLegShare = 0.45
	cornerLegAlone = 0.9
)

// cornerFillet returns the fillet of radius rho at vertex v between the
// legs a→v and v→b, which turns right (toward the domain, for a pass in
// climb with the domain on its right) by theta: its tangent points and
// the polyline of the arc from the tangent point on a→v to the one on
// v→b, in steps of at most 6°.
func cornerFillet(a, v, b geom.Point, theta, rho float64) []geom.Point {
	d1 := v.Sub(a).Unit()
	d2 := b.Sub(v).Unit()
	t := rho * math.Tan(theta/2)
	ta := v.Sub(d1.Scale(t))
	n1 := geom.Pt(d1.Y, -d1.X) // right of the direction of travel
	o := ta.Add(n1.Scale(rho))
	a0 := math.Atan2(ta.Y-o.Y, ta.X-o.X)
	n := max(2, int(math.Ceil(theta/(6*math.Pi/180))))
	pts := make([]geom.Point, 0, n+1)
	for i := 0; i <= n; i++ {
		ang := a0 - theta*float64(i)/float64(n) // clockwise
		pts = append(pts, geom.Pt(o.X+rho*math.Cos(ang), o.Y+rho*math.Sin(ang)))
	}
	pts[n] = v.Add(d2.Scale(t))
	return pts
}

// cornerRadii returns the radii of a corner's fan, from rho0 (the boundary
// pass's fillet, not included) down to rhoEnd, for a turn theta: each
// fillet's bisector point lies one convex step inside the last one's. A
// sharp corner needs many small steps; past cornerMaxPasses the fan keeps
// that many of the radii, evenly spread over the sequence and ending at
// rhoEnd, so that it still reaches the corner with larger steps.
func cornerRadii(rho0, rhoEnd, theta float64, p spiralParams) []float64 {
	kappa := 1/math.Cos(theta/2) - 1
	phi := fanPhi(p)
	var out []float64
	rho := rho0
	for len(out) < 50*cornerMaxPasses && rho > rhoEnd+1e-9 {
		// The step is set by the tighter of the two fillets: the next
		// radius x solves (rho − x)·kappa = spiralStep at x, which changes
		// sign on (0, rho) (bisection; a fixed point can oscillate where
		// the turn is gentle and kappa small).
		lo, hi := 0.0, rho
		for range 60 {
			x := 0.5 * (lo + hi)
			if (rho-x)*kappa > spiralStep(p.r, phi, math.Max(x, 1e-3), true) {
				lo = x
			} else {
				hi = x
			}
		}
		next := 0.5 * (lo + hi)
		if next < rhoEnd+0.25*(rho-next) {
			next = rhoEnd
		}
		out = append(out, next)
		rho = next
	}
	if len(out) > 0 {
		out[len(out)-1] = rhoEnd
	}
	if n := len(out); n > cornerMaxPasses {
		kept := make([]float64, cornerMaxPasses)
		for i := range kept {
			kept[i] = out[(i+1)*n/cornerMaxPasses-1]
		}
		out = kept
	}
	return out
}

// insideAlong reports whether the segment ab lies in c, to 1e-6 mm, at
// points 0.05 mm apart: a segment that runs along a wall, or ends on it,
// as the boundary pass does, passes.
func insideAlong(c geom.Shape, a, b geom.Point) bool {
	n := max(1, int(math.Ceil(a.Dist(b)/0.05)))
	for k := 0; k <= n; k++ {
		if q := a.Lerp(b, float64(k)/float64(n)); !c.Contains(q) && c.DistanceToBoundary(q) > 1e-6 {
			return false
		}
	}
	return true
}

// insideChain reports whether the polyline q lies in c (insideAlong, edge
// by edge).
func insideChain(c geom.Shape, q ...geom.Point) bool {
	for i := 1; i < len(q); i++ {
		if !insideAlong(c, q[i-1], q[i]) {
			return false
		}
	}
	return true
}

// cornerRoundRadius returns the radius of the boundary pass's fillets. Where
// a fillet runs convex along the strip the fronts left, one target step w
// wide (bandedLevel), spiralPhi's convex relation with s = w,
// (ρ − w + r)² = ρ² + r² + 2ρr·cos φ, gives the smallest radius that keeps
// the engagement at the top of the in-band range: ρ = w(2r − w) /
// (2(r(1 − cos φ) − w)), about 2r for a 7.5 % target. The relation takes
// the strip as concentric with the fillet; at the fillet's end, where the
// strip is straight, it overstates the engagement, and three quarters of
// it (about 1.5r) read as well on the corners of the closed test pocket
// (1 mm moving average 0.106 against 0.105, where 1.25r read 0.133) at 3 s
// less per four corners. Returns 1.5r when the relation has no root.
func cornerRoundRadius(p spiralParams) float64 {
	w := p.r * (1 - math.Cos(p.phi))
	den := 2 * (p.r*(1-math.Cos(p.phiMax)) - w)
	if den <= 1e-9 {
		return 1.5 * p.r
	}
	return 0.75 * math.Min(w*(2*p.r-w)/den, 4*p.r)
}

// fanPhi returns the engagement angle the fans' steps are taken at
// (cornerStepShare).
func fanPhi(p spiralParams) float64 { return p.phi + cornerStepShare*(p.phiMax-p.phi) }

// cornerEndRadius returns the radius of a fan's last fillet: small enough
// that the corner left uncut is a few hundredths of a mm². Like the
// boundary pass's own corners (bandedEmit) it may be tighter than the cut
// data's smallest path radius, so that the corner is cleared.
func cornerEndRadius(p spiralParams) float64 { return max(0.02*p.r, 1e-3) }

// cornerCap is where the fronts leave a corner of a closed part to its
// fan (cornerCaps). The fronts stop at an arc about the centre o of the
// corner's first fillet, of radius rc, so that the strip left between
// them holds the first fillet at the fan's step; it runs from x1 on the
// line of the first leg, w inside it, to x2 on the second's. The fronts do
// not end exactly on the arc or on those lines, so the boundary pass,
// arriving along the first leg, first cuts along them (capDetour): from t0
// on the leg, before the first fillet, in to g0 on its inset line, along
// that line to x1, along the arc to x2, along the second inset line to
// h0, and back across to g0 and t0. v is the corner's point, vi the inset
// walls' corner.
type cornerCap struct {
	v, vi, o   geom.Point
	x1, x2     geom.Point
	t0, g0, h0 geom.Point
	rc         float64
}

// arc returns the cap's arc from x1 to x2, clockwise about o (the sense
// the fillets turn), in steps of at most 6°.
func (k cornerCap) arc() []geom.Point {
	a1 := math.Atan2(k.x1.Y-k.o.Y, k.x1.X-k.o.X)
	a2 := math.Atan2(k.x2.Y-k.o.Y, k.x2.X-k.o.X)
	sweep := math.Mod(a1-a2+4*math.Pi, 2*math.Pi)
	n := max(2, int(math.Ceil(sweep/(6*math.Pi/180))))
	pts := make([]geom.Point, 0, n+1)
	for i := 0; i <= n; i++ {
		a := a1 - sweep*float64(i)/float64(n)
		pts = append(pts, geom.Pt(k.o.X+k.rc*math.Cos(a), k.o.Y+k.rc*math.Sin(a)))
	}
	pts[0], pts[n] = k.x1, k.x2
	return pts
}

// region returns the part of the fronts' domain the cap takes: beyond the
// arc. It reaches out to the walls' corner v, past the inset walls, so
// that what is taken from the fronts' domain leaves no sliver along their
// lines.
func (k cornerCap) region() geom.Region {
	arc := k.arc()
	// The arc's ends carried out to the walls: as far again from the
	// inset walls' corner as they are, along the lines through it.
	out1, out2 := k.x1.Add(k.v.Sub(k.vi)), k.x2.Add(k.v.Sub(k.vi))
	ring := geom.Ring{k.v, out2}
	for q := len(arc) - 1; q >= 0; q-- {
		ring = append(ring, arc[q])
	}
	ring = append(ring, out1)
	return geom.Region{Outer: ring}.Normalized()
}

// capDetour returns the boundary pass's pieces along the cap, from t0 back
// to t0.
func capDetour(k cornerCap) []bandedPiece {
	pass := append(append([]geom.Point{k.g0}, k.arc()...), k.h0)
	return []bandedPiece{
		{kind: pieceLink, pts: []geom.Point{k.t0, k.g0}},
		{kind: pieceCut, pts: pass},
		{kind: pieceLink, pts: []geom.Point{k.h0, k.g0, k.t0}},
	}
}

// capAt returns the cap of the corner at v, if the fronts left one.
func capAt(caps []cornerCap, v geom.Point) (cornerCap, bool) {
	for _, k := range caps {
		if k.v.Dist(v) < 1e-6 {
			return k, true
		}
	}
	return cornerCap{}, false
}

// cornerCaps returns the caps of the corners of c that the boundary pass
// will fan (spiralCorners), for fronts that stay w inside the walls. The
// fronts would otherwise run into each corner in short crescents across
// it, each stepped onto by a link along the wall that meets its slab
// head-on. A corner whose legs are too short for the full first fillet
// (its radius then depends on where the boundary pass starts its ring) is
// left as it is. stockNear reports whether stock lies within reach of a
// point, as the boundary pass will find it.
func cornerCaps(c geom.Shape, w float64, p spiralParams, stockNear func(geom.Point) bool) []cornerCap {
	rhoEnd := cornerEndRadius(p)
	round := cornerRoundRadius(p)
	// The strip between the cap and the first fillet: the convex step at
	// the fan's engagement (cornerRadii).
	phi := fanPhi(p)
	s := spiralStep(p.r, phi, round, true)
	for range 4 {
		s = spiralStep(p.r, phi, round-s, true)
	}
	s = math.Min(s, w)
	var caps []cornerCap
	for _, reg := range c {
		for _, ring := range reg.Rings() {
			// Walked as the boundary pass walks it (spiralBoundary),
			// from the middle of its longest edge, so that no corner
			// straddles the start.
			rr := ring.Reversed()
			n := len(rr)
			bk, bl := 0, 0.0
			for k := range rr {
				if l := rr[k].Dist(rr[(k+1)%n]); l > bl {
					bk, bl = k, l
				}
			}
			mid := rr[bk].Lerp(rr[(bk+1)%n], 0.5)
			pts := append(make([]geom.Point, 0, n+2), mid)
			for i := 1; i <= n; i++ {
				pts = append(pts, rr[(bk+i)%n])
			}
			pts = append(pts, mid)
			for i := 1; i+1 < len(pts); i++ {
				k, ok := cornerAt(pts, i, round)
				if !ok {
					continue
				}
				i = k.j
				if k.rho0 < round-1e-9 || round < 2*rhoEnd || !stockNear(pts[(k.i+k.j)/2]) {
					continue
				}
				// cornerFan's own test.
				first, ok := firstFillet(c, k.a, k.v, k.b, k.theta, k.rho0)
				if !ok {
					continue
				}
				d1, d2 := k.v.Sub(k.a).Unit(), k.b.Sub(k.v).Unit()
				n1, n2 := geom.Pt(d1.Y, -d1.X), geom.Pt(d2.Y, -d2.X)
				t1, t2 := first[0], first[len(first)-1]
				cp := cornerCap{v: k.v, rc: k.rho0 - s}
				cp.o = t1.Add(n1.Scale(k.rho0))
				cp.vi = k.v.Add(n1.Add(n2).Scale(w / (1 + d1.Dot(d2))))
				// f1 and f2: the feet of o on the inset lines, beside
				// the first fillet's ends.
				f1, f2 := t1.Add(n1.Scale(w)), t2.Add(n2.Scale(w))
				along := math.Sqrt(math.Max(0, cp.rc*cp.rc-(k.rho0-w)*(k.rho0-w)))
				cp.x1 = f1.Add(d1.Scale(along))
				cp.x2 = f2.Sub(d2.Scale(along))
				e1 := math.Min(capLead*p.r, 0.5*t1.Dist(k.a))
				e2 := math.Min(capLead*p.r, 0.5*t2.Dist(k.b))
				cp.t0 = t1.Sub(d1.Scale(e1))
				cp.g0 = f1.Sub(d1.Scale(e1))
				cp.h0 = f2.Add(d2.Scale(e2))
				if !insideChain(c, cp.t0, cp.g0, cp.x1) || !insideChain(c, cp.arc()...) || !insideChain(c, cp.x2, cp.h0, cp.g0) {
					continue
				}
				caps = append(caps, cp)
			}
		}
	}
	return caps
}

// boundaryCorner is a sharp inside corner of a boundary ring
// (spiralCorners): the vertices pts[i..j] of the ring (one, or a run of
// close vertices turning toward the domain), the far ends a and b of its
// legs, the point v where the lines of the legs meet, its turn theta and
// the radius rho0 of the fillet that rounds it, 0 where the corner is not
// fanned (a turn outside 30–170°, a run that is itself rounded wider than
// the fillet, or parallel legs).
type boundaryCorner struct {
	i, j    int
	a, v, b geom.Point
	theta   float64
	rho0    float64
}

// cornerAt returns the corner of the ring pts (walked with the domain on
// its right) that starts at vertex i, 0 < i < len(pts)−1, for fillets of
// radius round; ok is false where vertex i does not turn toward the
// domain.
func cornerAt(pts []geom.Point, i int, round float64) (k boundaryCorner, ok bool) {
	// turn returns the unit directions into and out of vertex k and the
	// angle it turns by, positive toward the domain (right).
	turn := func(k int) (d1, d2 geom.Point, th float64, ok bool) {
		la, lb := pts[k-1].Dist(pts[k]), pts[k].Dist(pts[k+1])
		if la < 1e-9 || lb < 1e-9 {
			return d1, d2, 0, false
		}
		d1, d2 = pts[k].Sub(pts[k-1]).Scale(1/la), pts[k+1].Sub(pts[k]).Scale(1/lb)
		th = math.Acos(max(-1, min(1, d1.Dot(d2))))
		if d1.Cross(d2) > 0 {
			th = -th
		}
		return d1, d2, th, true
	}
	d1, _, th, ok := turn(i)
	if !ok || th <= 1e-3 {
		return k, false
	}
	// The run: the vertices from i on that turn toward the domain with
	// short edges between them.
	j, theta, inner := i, th, 0.0
	for j+2 < len(pts) {
		l := pts[j].Dist(pts[j+1])
		_, _, tn, ok := turn(j + 1)
		if !ok || tn <= 1e-3 || l > 0.25*round {
			break
		}
		j, theta, inner = j+1, theta+tn, inner+l
	}
	_, d2, _, _ := turn(j)
	k = boundaryCorner{i: i, j: j, a: pts[i-1], v: pts[i], b: pts[j+1], theta: theta}
	if j > i {
		// The corner point: where the lines of the edges before and
		// after the run meet.
		den := d1.Cross(d2)
		if math.Abs(den) < 1e-9 {
			return k, true
		}
		u := pts[j].Sub(pts[i]).Cross(d2) / den
		k.v = pts[i].Add(d1.Scale(u))
	}
	if theta < cornerMinTurn || theta > 170*math.Pi/180 || inner > 0.5*round*theta {
		return k, true
	}
	// A leg whose far end turns away from the domain (or is the ring's
	// start) is not shared with another corner's fillets.
	sa, sb := cornerLegShare, cornerLegShare
	if i-1 == 0 {
		sa = cornerLegAlone
	} else if _, _, tp, ok := turn(i - 1); ok && tp <= 1e-3 {
		sa = cornerLegAlone
	}
	if j+1 == len(pts)-1 {
		sb = cornerLegAlone
	} else if _, _, tn, ok := turn(j + 1); ok && tn <= 1e-3 {
		sb = cornerLegAlone
	}
	k.rho0 = math.Min(round, math.Min(sa*k.a.Dist(k.v), sb*k.v.Dist(k.b))/math.Tan(theta/2))
	return k, true
}

// spiralCorners splits the boundary pass pts, a ring walked in climb with
// the domain on its right that starts and ends at pts[0], at its sharp
// inside corners: each is rounded by a fillet of cornerRoundRadius, and the
// fan of the corner follows it (see the top of this file). A corner is one
// vertex, or a run of vertices close together that all turn toward the
// domain (a rounded corner of the part, whose tool-centre path is a tight
// arc), turning 30–170° in all; its fillets are tangent to the lines of
// the edges before and after it. Where a fillet no longer fits in c (the
// corner's own arc, or an island in the corner) the fan ends with a pass
// along the wall itself. A corner in the air (no stock within reach of the
// tool) stays as it is.
func spiralCorners(g *bandedGrid, c geom.Shape, pts []geom.Point, p spiralParams) []bandedPiece {
	rhoEnd := cornerEndRadius(p)
	round := cornerRoundRadius(p)
	var out []bandedPiece
	cur := []geom.Point{pts[0]}
	for i := 1; i+1 < len(pts); i++ {
		k, ok := cornerAt(pts, i, round)
		if !ok {
			cur = append(cur, pts[i])
			continue
		}
		j := k.j
		var fan []bandedPiece
		var back geom.Point
		if k.rho0 >= 2*rhoEnd && g.stockNear(pts[(i+j)/2], p.r) {
			fan, back = cornerFan(c, k.a, k.v, k.b, k.theta, k.rho0, rhoEnd, pts[i:j+1], p)
		}
		if fan == nil {
			// The corner stays as it comes.
			cur = append(cur, pts[i:j+1]...)
			i = j
			continue
		}
		if cp, ok := capAt(p.caps, k.v); ok {
			// The fronts left a cap here: along it first, from the
			// first fillet's start and back.
			cur = append(cur, cp.t0)
			out = append(out, bandedPiece{kind: pieceBoundary, pts: cur})
			out = append(out, capDetour(cp)...)
			out = append(out, bandedPiece{kind: pieceBoundary, pts: append([]geom.Point{cp.t0}, fan[0].pts...)})
		} else {
			cur = append(cur, fan[0].pts...)
			out = append(out, bandedPiece{kind: pieceBoundary, pts: cur})
		}
		out = append(out, fan[1:]...)
		at := back
		if len(fan) > 1 {
			last := fan[len(fan)-1].pts
			at = last[len(last)-1]
		}
		cur = []geom.Point{at, back}
		i = j
	}
	cur = append(cur, pts[len(pts)-1])
	return append(out, bandedPiece{kind: pieceBoundary, pts: cur})
}

// firstFillet returns the fillet of radius rho0 that rounds a corner of
// the boundary pass (cornerFillet), and whether it and the chord back
// across it lie in c: a fan is built, and the fronts leave the corner a
// cap, only where they do.
func firstFillet(c geom.Shape, a, v, b geom.Point, theta, rho0 float64) ([]geom.Point, bool) {
	first := cornerFillet(a, v, b, theta, rho0)
	return first, insideChain(c, first...) && insideChain(c, first[len(first)-1], first[0])
}

// cornerFan returns the pieces of one corner of the boundary pass: first
// the fillet of radius rho0 that rounds it (as the end of the pass that
// arrives there), then the fan's links and passes, and the point on the
// second leg where the boundary pass goes on (the first fillet's end).
// a, v and b are the corner's legs and point (v where the legs' lines
// meet), theta its turn, wall the vertices of the wall between the legs.
// It returns nil when the first fillet, or the way back along its chord,
// does not fit in c.
func cornerFan(c geom.Shape, a, v, b geom.Point, theta, rho0, rhoEnd float64, wall []geom.Point, p spiralParams) ([]bandedPiece, geom.Point) {
	// The fillets lie inside the corner, off the walls; what could put
	// them outside c is the wall's own rounded corner, or another wall (an
	// island) standing in the corner.
	fits := func(q ...geom.Point) bool { return insideChain(c, q...) }
	first, ok := firstFillet(c, a, v, b, theta, rho0)
	back := first[len(first)-1]
	if !ok {
		return nil, back
	}
	var fans [][]geom.Point
	wallPass := false // the last of fans runs along the wall
	prevA, prevB := first[0], back
	for _, rho := range cornerRadii(rho0, rhoEnd, theta, p) {
		f := cornerFillet(a, v, b, theta, rho)
		// The pass's straight ends run on the legs, which are walls;
		// the fillet and the chord back from the pass's end to the
		// next one's start are what could leave c.
		if !fits(f...) || !fits(prevB, f[0]) {
			// The last pass of the fan follows the wall.
			fans = append(fans, append(append([]geom.Point{prevA}, wall...), prevB))
			wallPass = true
			break
		}
		fans = append(fans, append(append([]geom.Point{prevA}, f...), prevB))
		prevA, prevB = f[0], f[len(f)-1]
	}
	out := []bandedPiece{{kind: pieceBoundary, pts: first}}
	at := back
	for k, f := range fans {
		if !p.climbOnly && k%2 == 0 {
			// Zigzag: every other pass runs the other way, from the leg
			// the last one ended on; the way there is back along that
			// leg, over what the last pass cut.
			f = spiralReversed(f)
		}
		if at.Dist(f[0]) > 1e-9 {
			// Back along the chord of the fillet just cut, or along the
			// leg.
			out = append(out, bandedPiece{kind: pieceLink, pts: []geom.Point{at, f[0]}})
		}
		kind := pieceCut
		if wallPass && k == len(fans)-1 {
			// Along the wall, its corners kept (bandedEmit).
			kind = pieceBoundary
		}
		out = append(out, bandedPiece{kind: kind, pts: f})
		at = f[len(f)-1]
	}
	if at.Dist(back) > 1e-9 && !p.climbOnly && len(fans)%2 == 1 {
		// Ended on the first leg: across the cleared corner to the second.
		out = append(out, bandedPiece{kind: pieceLink, pts: []geom.Point{at, back}})
	}
	return out, back
}
