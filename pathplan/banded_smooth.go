package pathplan

import (
	"math"

	"github.com/chipband/chipband/geom"
)

// smoothFillet is one corner of a polyline replaced by a circular arc.
type smoothFillet struct {
	from, to geom.Point // tangent points
	center   geom.Point
	cw       bool
}

// smoothPath turns a polyline into lines and arcs so that no corner is
// sharper than minR: a vertex whose turn is more than maxTurn is replaced
// by a fillet of radius minR tangent to both legs (or the largest radius
// the legs allow, never below minR when the legs are long enough). Gentle
// vertices stay, since a chain of them follows a curve of radius at least
// leg/turn. A fillet lies on the inside of its corner, off the legs, so
// when inside is set every fillet is checked against it (the tool-centre
// domain) and a corner whose fillet would leave it stays sharp: a fillet
// into an island or wall corner gouges it. It returns, per output element,
// either a line end or an arc.
func smoothPath(pts []geom.Point, kinds []geom.MoveKind, minR float64, inside func(geom.Point) bool) []geom.Move {
	const maxTurn = 12 * math.Pi / 180
	n := len(pts)
	if n < 2 {
		return nil
	}
	// Drop repeated points.
	clean := []geom.Point{pts[0]}
	ck := []geom.MoveKind{kinds[0]}
	for i, p := range pts[1:] {
		if p.Dist(clean[len(clean)-1]) > 1e-6 {
			clean = append(clean, p)
			ck = append(ck, kinds[i+1])
		}
	}
	pts, kinds = clean, ck
	n = len(pts)
	var out []geom.Move
	line := func(i int, p geom.Point) {
		out = append(out, geom.Move{Kind: kinds[i], To: geom.Point3{X: p.X, Y: p.Y}})
	}
	if n < 3 || minR <= 0 {
		for i, p := range pts[1:] {
			line(i+1, p)
		}
		return out
	}
	// Available tangent length per leg is shared by its two corners.
	legs := make([]float64, n-1)
	for i := range legs {
		legs[i] = pts[i+1].Dist(pts[i])
	}
	for i := 1; i < n; i++ {
		if i == n-1 {
			line(i, pts[i])
			break
		}
		a, b, c := pts[i-1], pts[i], pts[i+1]
		u, v := b.Sub(a).Unit(), c.Sub(b).Unit()
		turn := math.Atan2(u.Cross(v), u.Dot(v))
		at := math.Abs(turn)
		if at <= maxTurn || at > math.Pi-1e-3 {
			line(i, b)
			continue
		}
		t := minR * math.Tan(at/2)
		room := math.Min(legs[i-1], legs[i]) / 2
		if i-1 == 0 {
			room = math.Min(legs[i-1], legs[i]/2)
		}
		if i+1 == n-1 {
			room = math.Min(legs[i-1]/2, legs[i])
		}
		if t > room {
			// The legs are too short for the full radius here: keep the
			// corner rather than cut outside the legs.
			line(i, b)
			continue
		}
		p0, p1 := b.Sub(u.Scale(t)), b.Add(v.Scale(t))
		nrm := u.Perp()
		if turn < 0 {
			nrm = nrm.Scale(-1)
		}
		ctr := p0.Add(nrm.Scale(minR))
		if inside != nil && !smoothArcInside(p0, p1, ctr, inside) {
			line(i, b)
			continue
		}
		line(i, p0)
		out = append(out, geom.Move{Kind: kinds[i+1], To: geom.Point3{X: p1.X, Y: p1.Y}, Arc: true, Center: ctr, CW: turn < 0})
	}
	return out
}

// smoothArcInside reports whether the short arc from p0 to p1 about ctr
// stays inside, checked at its ends and nine points between.
func smoothArcInside(p0, p1, ctr geom.Point, inside func(geom.Point) bool) bool {
	a0 := math.Atan2(p0.Y-ctr.Y, p0.X-ctr.X)
	a1 := math.Atan2(p1.Y-ctr.Y, p1.X-ctr.X)
	da := math.Remainder(a1-a0, 2*math.Pi)
	rad := p0.Dist(ctr)
	for k := 0; k <= 10; k++ {
		a := a0 + da*float64(k)/10
		if !inside(geom.Pt(ctr.X+rad*math.Cos(a), ctr.Y+rad*math.Sin(a))) {
			return false
		}
	}
	return true
}

// smoothCount returns how many vertices of pts turn more sharply than a
// radius minR allows (what smoothPath could not round).
func smoothSharp(moves []geom.Move, from geom.Point, minR float64) int {
	n := 0
	prev := from
	var lastDir geom.Point
	for _, m := range moves {
		to := m.To.XY()
		var d0, d1 geom.Point
		if m.Arc {
			r0 := prev.Sub(m.Center)
			r1 := to.Sub(m.Center)
			d0, d1 = r0.Perp(), r1.Perp()
			if m.CW {
				d0, d1 = d0.Scale(-1), d1.Scale(-1)
			}
		} else {
			d0 = to.Sub(prev)
			d1 = d0
		}
		d0, d1 = d0.Unit(), d1.Unit()
		if lastDir != (geom.Point{}) && d0 != (geom.Point{}) {
			turn := math.Abs(math.Atan2(lastDir.Cross(d0), lastDir.Dot(d0)))
			if turn > 30*math.Pi/180 {
				n++
			}
		}
		if d1 != (geom.Point{}) {
			lastDir = d1
		}
		prev = to
	}
	return n
}
