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
// 0.6 of the diameter.
//
// Instead, the boundary pass rounds the corner with a fillet of radius
// cornerRoundRadius (about 1.5r) and leaves the corner to a fan: fillets
// of falling radius, each tangent to both walls, so that each takes the
// crescent between itself and the one before, thickest on the bisector.
// The radius falls by the step that holds the engagement there
// (spiralStep for a convex front; the bisector distance of a fillet of
// radius ρ from the corner is ρ·(1/cos(θ/2) − 1) for a turn θ). Each fan
// pass runs in climb, like the boundary pass, and the tool goes back to
// the next one along the chord of the fillet it has just cut, through
// cleared material. The fan costs time, its passes being short and
// stopping at both ends (closed test pocket: 13 s on four corners on the
// demo router); BandedOptions.SquareCorners leaves it out.

const (
	// cornerMinTurn is the smallest turn of the boundary pass treated as
	// a corner: below it the strip ahead is met at a slant.
	cornerMinTurn = 30 * math.Pi / 180
	// cornerMaxPasses caps the fan of one corner.
	cornerMaxPasses = 12
	// cornerLegShare is the share of each leg a corner's fillets may use,
	// so that the fillets of neighbouring corners never overlap.
	cornerLegShare = 0.45
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
	phi := 0.5 * (p.phi + p.phiMax)
	var out []float64
	rho := rho0
	for len(out) < 50*cornerMaxPasses && rho > rhoEnd+1e-9 {
		// The step is set by the tighter of the two fillets; a few
		// rounds of the fixed point settle it.
		next := rho
		for range 60 {
			s := spiralStep(p.r, phi, math.Max(next, 1e-3), true)
			n := rho - s/kappa
			if math.Abs(n-next) < 1e-9 {
				break
			}
			next = n
		}
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

// spiralCorners splits the boundary pass pts, a ring walked in climb with
// the domain on its right that starts and ends at pts[0], at its sharp
// corners: each is rounded by a fillet of cornerRoundRadius, and the fan of
// the corner follows it (see the top of this file). A corner whose fillets
// would leave c stays as it is, and so does one in the air (no stock
// within reach of the tool there).
func spiralCorners(g *bandedGrid, c geom.Shape, pts []geom.Point, p spiralParams) []bandedPiece {
	// The last fillet: small enough that the corner left uncut is a few
	// hundredths of a mm². Like the boundary pass's own corners (bandedEmit)
	// it may be tighter than the cut data's smallest path radius, so that
	// the corner is cleared.
	rhoEnd := max(0.02*p.r, 1e-3)
	// The fillets lie inside the corner, off the walls; what could put
	// them outside c is another wall (an island) standing in the corner.
	fits := func(q []geom.Point) bool {
		for i := 1; i < len(q); i++ {
			if !insideAlong(c, q[i-1], q[i]) {
				return false
			}
		}
		return true
	}
	var out []bandedPiece
	cur := []geom.Point{pts[0]}
	for i := 1; i+1 < len(pts); i++ {
		a, v, b := pts[i-1], pts[i], pts[i+1]
		la, lb := a.Dist(v), v.Dist(b)
		if la < 1e-9 || lb < 1e-9 {
			cur = append(cur, v)
			continue
		}
		d1, d2 := v.Sub(a).Scale(1/la), b.Sub(v).Scale(1/lb)
		theta := math.Acos(max(-1, min(1, d1.Dot(d2))))
		if d1.Cross(d2) >= 0 || theta < cornerMinTurn || theta > 170*math.Pi/180 || !g.stockNear(v, p.r) {
			cur = append(cur, v)
			continue
		}
		tan := math.Tan(theta / 2)
		rho0 := math.Min(cornerRoundRadius(p), cornerLegShare*math.Min(la, lb)/tan)
		if rho0 < 2*rhoEnd {
			cur = append(cur, v)
			continue
		}
		first := cornerFillet(a, v, b, theta, rho0)
		radii := cornerRadii(rho0, rhoEnd, theta, p)
		fans := make([][]geom.Point, 0, len(radii))
		ok := fits(first) && fits([]geom.Point{first[len(first)-1], first[0]})
		prevA, prevB := first[0], first[len(first)-1]
		for _, rho := range radii {
			if !ok {
				break
			}
			f := cornerFillet(a, v, b, theta, rho)
			pass := append(append([]geom.Point{prevA}, f...), prevB)
			// The pass's straight ends run on the legs, which are walls;
			// the fillet and the chord back from the pass's end to the
			// next one's start are what could leave c.
			ok = fits(f) && fits([]geom.Point{prevB, f[0]})
			fans = append(fans, pass)
			prevA, prevB = f[0], f[len(f)-1]
		}
		if !ok {
			cur = append(cur, v)
			continue
		}
		cur = append(cur, first...)
		out = append(out, bandedPiece{kind: pieceBoundary, pts: cur})
		back := first[len(first)-1]
		at := back
		for _, f := range fans {
			// Back along the chord of the fillet just cut.
			out = append(out, bandedPiece{kind: pieceLink, pts: []geom.Point{at, f[0]}})
			out = append(out, bandedPiece{kind: pieceCut, pts: f})
			at = f[len(f)-1]
		}
		cur = []geom.Point{at, back}
	}
	cur = append(cur, pts[len(pts)-1])
	return append(out, bandedPiece{kind: pieceBoundary, pts: cur})
}
