package pathplan

import (
	"context"
	"math"

	"github.com/chipband/chipband/geom"
)

// bandedPieceKind tells what a piece of a banded level does.
type bandedPieceKind uint8

const (
	pieceCut      bandedPieceKind = iota // a front pass in material
	pieceLink                            // a move at depth through swept material
	pieceBoundary                        // the last pass along the domain boundary
	pieceLift                            // leave the level and come back at the piece's end
	pieceTrochoid                        // trochoidal loops in a channel
	// pieceApproach is the way from the descent in the air to the first
	// pass of an open level: the entry into the stock, cut at the entry
	// feed.
	pieceApproach
)

// bandedPiece is one polyline of a level's path, in cutting order.
type bandedPiece struct {
	kind bandedPieceKind
	pts  []geom.Point
	// model, when set, is what the fronts take the piece to have cut
	// instead of pts (see spiralGrow's spiral transitions).
	model []geom.Point
	// arcs, in order, are runs of pts that lie on circles and are cut as
	// one arc move each (the front halves of trochoidal loops).
	arcs []pieceArc
}

// pieceArc is a run of a piece's points, from pts[from] to pts[to], that
// lies on the circle about c and turns counter-clockwise by less than a
// full turn.
type pieceArc struct {
	from, to int
	c        geom.Point
}

// spiralParams are the inputs of one front growth.
type spiralParams struct {
	r       float64 // tool radius
	phi     float64 // target engagement angle, radians
	phiMax  float64 // engagement angle at the top of the in-band range, radians
	h       float64 // grid node spacing
	minStep float64 // smallest local step, mm
	maxStep float64 // largest local step, mm
	// climbOnly keeps every pass in climb; otherwise an open pass may run
	// either way, whichever end is nearer.
	climbOnly bool
	// directTurns steps straight onto the next pass at walls, without
	// spiralTurn's drift (BandedOptions.DirectTurns).
	directTurns bool
	// leadIn bends the start of open passes onto the previous front
	// (measured worse on the demo job, so off by default).
	leadIn bool
	// noBoundary leaves out the last pass along the boundary of c (a bay
	// whose walls are passed along once the whole domain is cleared).
	noBoundary bool
	// leanHoles leans pass ends onto the walls of holes too (open
	// features, where the holes are the part).
	leanHoles bool
	// trimBoundary leaves out of the boundary pass the stretches where the
	// tool cannot reach the stock (boundaryTrim): open parts, whose
	// boundary runs through the air round it.
	trimBoundary bool
	// leanIslands leans pass ends onto the islands of a pocket, more
	// gently (islandLeanAngle, islandLeanSpan), unless
	// BandedOptions.SquareIslands.
	leanIslands bool
	// squareCorners leaves the boundary pass's corners sharp, without
	// the fans of spiralCorners.
	squareCorners bool
	// turnTau and turnFrac hold turnProfile for r, phi, phiMax and h,
	// computed once per domain part.
	turnTau, turnFrac []float64
	// caps are the corners the fronts leave to the fans (cornerCaps).
	caps []cornerCap
	// turnMin is the length, in drift lengths (the last of turnTau), of
	// the shortest pass spiralTurn ramps onto: 3, or shortTurnMin.
	turnMin float64
}

// newSpiralParams returns the front parameters of the banded cut data st:
// steps between 0.3 and 1.6 times the straight-cut width, and the drift of
// the turns.
func newSpiralParams(st bandedSettings) spiralParams {
	p := spiralParams{r: st.r, phi: st.phi, phiMax: st.phiMax, h: st.h, climbOnly: st.climbOnly, directTurns: st.directTurns, leanIslands: st.leanIslands, squareCorners: st.squareCorners}
	straight := st.r * (1 - math.Cos(st.phi))
	p.minStep, p.maxStep = 0.3*straight, 1.6*straight
	p.turnTau, p.turnFrac = turnProfile(p.r, straight, math.Max(p.phiMax, p.phi), 0.5*p.h)
	p.turnMin = 3
	return p
}

// spiralReversed returns a reversed copy of pts.
func spiralReversed(pts []geom.Point) []geom.Point {
	out := make([]geom.Point, len(pts))
	for i, p := range pts {
		out[len(pts)-1-i] = p
	}
	return out
}

// spiralFront is one extracted front polyline with its local steps.
type spiralFront struct {
	pts    []geom.Point
	steps  []float64
	closed bool
}

// spiralGrow grows fronts from the swept region already marked on g (the
// helix disk, or the air around open stock), whose boundary is start, and
// returns the level's pieces in cutting order, links included, ending with
// the boundary pass along the domain c. pos is where the tool stands.
func spiralGrow(ctx context.Context, g *bandedGrid, c geom.Shape, start []spiralFront, pos geom.Point, p spiralParams) ([]bandedPiece, geom.Point, error) {
	climbOnly := p.climbOnly
	var out []bandedPiece
	// Fronts whose growth is still to come, each with its own group:
	// depth first, so the tool follows one side of a split front to its
	// end instead of crossing the cleared middle on every round.
	stack := [][]spiralFront{start}
	lastClosed := false
	// onLoop: the tool stands on a closed start front (the end of a helix
	// or of a ramp's stadium), so the first loop is blended out of it
	// like the next loop of the spiral, instead of a link that steps
	// square into the first slab (a head-on bite, ae/D 0.28 for a 7.5 %
	// step, right after the entry).
	onLoop := len(start) == 1 && start[0].closed && len(start[0].pts) > 0 && start[0].pts[0].Dist(pos) < 1e-6
	// Open passes cut in this round and in the group it grows from, for
	// the turns at walls.
	var recent, older, loops [][]geom.Point
	for iter := 0; iter < 100000 && len(stack) > 0; iter++ {
		if err := ctx.Err(); err != nil {
			return nil, pos, err
		}
		prev := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		var segs []spiralSeg
		for _, f := range prev {
			for i := 0; i+1 < len(f.pts); i++ {
				segs = append(segs, spiralSeg{f.pts[i], f.pts[i+1], f.steps[i], f.steps[i+1]})
			}
		}
		if len(segs) == 0 {
			continue
		}
		g.propagate(segs, p.maxStep+3*p.h)
		if g.stock != nil {
			g.materialDistance()
		}
		raw := g.contours(segs, p.maxStep+3*p.h)
		var fronts []spiralFront
		for _, pts := range raw {
			f := spiralPrepare(pts, c, p)
			if f.pts != nil {
				fronts = append(fronts, f)
			}
		}
		if len(fronts) == 0 {
			if g.stock != nil {
				// No material within reach of this front (it grew into
				// space another feature cleared): step on through the
				// air by the propagation distance, uncut, so that the
				// material beyond is still met.
				g.airStep = p.maxStep + 2*p.h
				var adv []spiralFront
				for _, pts := range g.contours(segs, p.maxStep+3*p.h) {
					if f := spiralPrepare(pts, c, p); f.pts != nil {
						adv = append(adv, f)
					}
				}
				g.sweepReached(segs)
				g.airStep = 0
				if len(adv) > 0 {
					stack = append(stack, adv)
				}
				continue
			}
			// Nothing long enough to cut: take what was reached.
			g.sweepReached(segs)
			continue
		}
		older, loops, recent = nil, nil, nil
		stamped := len(out)
		for _, f := range prev {
			if f.closed {
				loops = append(loops, f.pts)
			} else {
				older = append(older, f.pts)
			}
		}
		// Sequence the fronts: nearest first, climb direction fixed.
		done := make([]bool, len(fronts))
		var order []int
		for range fronts {
			bi, bd, bk := -1, math.Inf(1), 0
			for i, f := range fronts {
				if done[i] {
					continue
				}
				if f.closed {
					for k, q := range f.pts[:len(f.pts)-1] {
						if d := q.Dist(pos); d < bd {
							bi, bd, bk = i, d, k
						}
					}
				} else {
					if d := f.pts[0].Dist(pos); d < bd {
						bi, bd, bk = i, d, 0
					}
					if !climbOnly {
						if d := f.pts[len(f.pts)-1].Dist(pos); d < bd {
							bi, bd, bk = i, d, -1
						}
					}
				}
			}
			done[bi] = true
			order = append(order, bi)
			f := fronts[bi]
			pts := f.pts
			if f.closed {
				pts = spiralRotate(pts, bk)
			} else if bk < 0 {
				pts = spiralReversed(pts)
			}
			if !f.closed && p.leadIn {
				// Lead in from the previous front: the radial step grows
				// from nothing to the full step.
				pts = spiralLeadIn(pts, prev, math.Min(p.r, 0.3*polyLen(pts)), 2*p.maxStep+2*p.h)
				bd = pts[0].Dist(pos)
			}
			var turn, along, model []geom.Point
			if !f.closed && !p.directTurns && !(lastClosed && bd <= 2*p.maxStep+2*p.h) {
				turn, along = spiralTurn(g, recent, older, pts, p)
				if turn == nil {
					// No open pass runs beside its start, but a loop of
					// the last round may (the first open fronts after
					// the loops): the ramp from it, without the link
					// back along it, since the loop as cut was bent
					// onto the one before it at its start (spiralBlend)
					// and a link along it meets the wedge the bend left.
					turn, _ = spiralTurn(g, loops, nil, pts, p)
				}
			}
			switch {
			case turn != nil:
				if back := polyBetween(along, pos, turn[0], 1e-6); back != nil {
					// Back along the pass just cut, where a chord
					// would cut the inside of its bends.
					out = append(out, bandedPiece{kind: pieceLink, pts: back})
				} else if d := pos.Dist(turn[0]); d > 1e-6 {
					if d <= 2*p.maxStep+2*p.h+math.Max(4*p.maxStep, 1.5) && !g.crossesWalls(pos, turn[0]) && linkFree(g, pos, turn[0], p.maxStep+2*p.h) {
						out = append(out, bandedPiece{kind: pieceLink, pts: []geom.Point{pos, turn[0]}})
					} else {
						out = append(out, spiralLink(g, pos, turn[0], p)...)
					}
				}
				out = append(out, bandedPiece{kind: pieceCut, pts: turn})
			case (lastClosed || onLoop) && f.closed && bd <= 2*p.maxStep+2*p.h:
				// Spiral transition: bend the start of the new loop onto
				// the end of the last one so the machine does not stop.
				// The fronts take the loop as cut (model): the wedge the
				// bend leaves is a step's width at most and the next loop
				// takes it, where fronts that followed the bend would
				// carry a dent round after round.
				model = pts
				pts = spiralBlend(pts, pos, math.Min(2*p.r, 0.3*polyLen(pts)))
			case bd > 1e-6:
				out = append(out, spiralLink(g, pos, pts[0], p)...)
			}
			out = append(out, bandedPiece{kind: pieceCut, pts: pts, model: model})
			pos = pts[len(pts)-1]
			lastClosed, onLoop = f.closed, false
			if !f.closed {
				recent = append(recent, pts)
			}
		}
		for _, pc := range out[stamped:] {
			switch {
			case pc.model != nil:
				g.stampPath(pc.model)
			case pc.kind != pieceLift:
				g.stampPath(pc.pts)
			}
		}
		g.sweepReached(segs)
		// The last front cut grows first.
		for _, k := range order {
			stack = append(stack, []spiralFront{fronts[k]})
		}
	}
	if p.noBoundary {
		return out, pos, nil
	}
	if g.boundary != nil {
		c = g.boundary
	}
	out = append(out, spiralBoundary(g, c, &pos, p)...)
	return out, pos, nil
}

// spiralBoundary returns the last pass along the boundary of c, linked
// from *pos, and moves *pos to its end. Each ring starts at its point
// nearest the tool, reached by a lead-in that drifts onto the wall from a
// step inside it over the length that keeps the drift under 10° (the
// engaged arc grows by about the drift angle, elementary geometry), so the
// pass enters the strip left along the wall gradually instead of plunging
// into it sideways.
func spiralBoundary(g *bandedGrid, c geom.Shape, at *geom.Point, p spiralParams) []bandedPiece {
	var out []bandedPiece
	pos := *at
	step := p.r * (1 - math.Cos(p.phi))
	lead := step / math.Tan(10*math.Pi/180)
	// Last pass along the boundary of the domain, climb: outer rings
	// clockwise, holes counter-clockwise (material on the left).
	for _, reg := range c {
		for _, ring := range reg.Rings() {
			rr := ring.Reversed()
			n := len(rr)
			// With corner fans the ring starts on an edge long enough to
			// start away from its ends (below), the longest if none is:
			// a start on the short edges of a rounded corner would split
			// the corner.
			minEdge := 0.0
			if !p.squareCorners {
				longest := 0.0
				for k := range rr {
					longest = math.Max(longest, rr[k].Dist(rr[(k+1)%n]))
				}
				minEdge = math.Min(5*cornerRoundRadius(p), longest)
			}
			bk, bd, bq := 0, math.Inf(1), rr[0]
			for k := range rr {
				if rr[k].Dist(rr[(k+1)%n]) < minEdge {
					continue
				}
				q := geom.ClosestOnSegment(pos, rr[k], rr[(k+1)%n])
				if d := q.Dist(pos); d < bd {
					bk, bd, bq = k, d, q
				}
			}
			if !p.squareCorners {
				// Start the ring away from the ends of its edge, where
				// the corners' fillets run (spiralCorners), when the
				// edge is long enough.
				e0, e1 := rr[bk], rr[(bk+1)%n]
				l := e0.Dist(e1)
				m := math.Min(0.5*l, 2.5*cornerRoundRadius(p))
				if u := bq.Dist(e0); l > 0 && u < m {
					bq = e0.Lerp(e1, m/l)
				} else if l > 0 && l-u < m {
					bq = e0.Lerp(e1, 1-m/l)
				}
				bd = pos.Dist(bq)
			}
			pts := make([]geom.Point, 0, n+2)
			pts = append(pts, bq)
			for i := 1; i <= n; i++ {
				pts = append(pts, rr[(bk+i)%n])
			}
			pts = append(pts, bq)
			// The lead-in: from a step inside the wall, lead back along
			// the edge the pass starts on.
			t := rr[(bk+1)%n].Sub(rr[bk]).Unit()
			nrm := geom.Pt(t.Y, -t.X) // the domain lies right of the climb direction
			from := bq.Sub(t.Scale(lead)).Add(nrm.Scale(step))
			// (The lead-in runs from the fronts' domain out to the wall,
			// so it is checked against c, not the grid's walls.)
			if from.Dist(bq) > 1e-9 && c.Contains(from) && c.DistanceToBoundary(from) > 0.5*step && insideAlong(c, from, bq) {
				if d := pos.Dist(from); d > 1e-6 {
					out = append(out, spiralLink(g, pos, from, p)...)
				}
				out = append(out, bandedPiece{kind: pieceCut, pts: []geom.Point{from, bq}})
			} else if bd > 1e-6 {
				out = append(out, spiralLink(g, pos, bq, p)...)
			}
			ringAt := len(out)
			if p.squareCorners {
				out = append(out, bandedPiece{kind: pieceBoundary, pts: pts})
			} else {
				out = append(out, spiralCorners(g, c, pts, p)...)
			}
			pos = pts[len(pts)-1]
			if p.trimBoundary {
				out = append(out[:ringAt], boundaryTrim(g, out[ringAt:], p)...)
			}
		}
	}
	*at = pos
	return out
}

// spiralPrepare smooths a raw contour, extends its open ends to the walls
// of c, and sets the local step of every vertex from its curvature. Pieces
// shorter than a few nodes are dropped (nil result).
func spiralPrepare(raw []geom.Point, c geom.Shape, p spiralParams) spiralFront {
	closed := len(raw) > 3 && raw[0].Dist(raw[len(raw)-1]) < 1e-9
	pts := polyResample(raw, p.h, closed)
	if polyLen(pts) < 3*p.h || len(pts) < 3 {
		return spiralFront{}
	}
	pts = polySmooth(pts, closed, 4)
	if !closed {
		pts = spiralExtend(pts, c, p, true)
		pts = spiralExtend(pts, c, p, false)
		pts = spiralLeanEnd(pts, c, p, true)
		pts = spiralLeanEnd(pts, c, p, false)
	}
	f := spiralFront{pts: pts, closed: closed}
	f.steps = spiralSteps(pts, closed, p)
	return f
}

// spiralSteps returns the local step at each vertex: the curvature is the
// turn of the tangent over a window of about the tool radius, and the step
// follows spiralStep for it.
func spiralSteps(pts []geom.Point, closed bool, p spiralParams) []float64 {
	n := len(pts)
	steps := make([]float64, n)
	cum := make([]float64, n)
	for i := 1; i < n; i++ {
		cum[i] = cum[i-1] + pts[i].Dist(pts[i-1])
	}
	total := cum[n-1]
	w := math.Max(0.5*p.r, 3*p.h)
	at := func(s float64) geom.Point { return polyAt(pts, cum, s, closed, total) }
	for i := 0; i < n; i++ {
		s0, s1 := cum[i]-w, cum[i]+w
		if !closed {
			s0, s1 = math.Max(0, s0), math.Min(total, s1)
		}
		if s1-s0 < 2*p.h {
			steps[i] = p.r * (1 - math.Cos(p.phi))
			continue
		}
		a, m, b := at(s0), at(cum[i]), at(s1)
		t1, t2 := m.Sub(a).Unit(), b.Sub(m).Unit()
		turn := math.Atan2(t1.Cross(t2), t1.Dot(t2))
		rad := math.Inf(1)
		if math.Abs(turn) > 1e-9 {
			// The chords a→m and m→b point along the tangents at their
			// middles, (s1 − s0)/2 apart: turn = (s1 − s0)/(2·rad).
			rad = (s1 - s0) / (2 * math.Abs(turn))
		}
		// Material on the left: a right turn bends toward the swept side.
		convex := turn < 0
		if !convex {
			// Around material (a front wrapping a corner of it) the full
			// correction widens the step until the fronts break up into
			// short pieces (deep_open.json shoulder: in-band 0.94 -> 0.72,
			// cycle +50 %); there the step follows half the curvature, on
			// the safe side of the target.
			rad *= 2
		}
		steps[i] = spiralStep(p.r, p.phi, rad, convex)
		steps[i] = math.Max(p.minStep, math.Min(p.maxStep, steps[i]))
	}
	return steps
}

// spiralExtendMinAngle is the least angle, degrees, at which an extended
// front end must close on the part of an open feature (spiralExtend).
const spiralExtendMinAngle = 20

// spiralExtend lengthens an open front at its start (or end) along its
// tangent up to the wall of c, so the pass reaches the boundary. At the
// part of an open feature (a hole of c, p.leanHoles) an extension that
// closes on the wall at under spiralExtendMinAngle is left off: it runs
// along the wall into the strip that the fronts before it left there and
// meets it over a long arc (outside_profile.json, at the round corner of
// the part: 1 mm moving-average maximum 0.145 with it, 0.123 without). In
// pockets the extension stays at every wall, where leaving it off
// measured worse (island pocket above-band share 0.038 -> 0.040, demo boss
// pocket cycle +6 %: the fronts then stop short of the island and the wall
// pass takes a thicker strip).
func spiralExtend(pts []geom.Point, c geom.Shape, p spiralParams, atStart bool) []geom.Point {
	h := p.h
	var e, prev geom.Point
	if atStart {
		e, prev = pts[0], pts[1]
	} else {
		e, prev = pts[len(pts)-1], pts[len(pts)-2]
	}
	d := e.Sub(prev).Unit()
	if !c.Contains(e) {
		return pts
	}
	last := e
	for k := 1; k <= 24; k++ {
		q := e.Add(d.Scale(float64(k) * h / 8))
		if !c.Contains(q) || c.DistanceToBoundary(q) < 1e-3 {
			break
		}
		last = q
	}
	if last == e {
		return pts
	}
	if p.leanHoles {
		if _, _, _, _, hole := nearestEdge(c, last); hole {
			closing := c.DistanceToBoundary(e) - c.DistanceToBoundary(last)
			if closing < math.Sin(spiralExtendMinAngle*math.Pi/180)*last.Dist(e) {
				return pts
			}
		}
	}
	if atStart {
		return append([]geom.Point{last}, pts...)
	}
	return append(pts, last)
}

// shortTurnMin is spiralParams.turnMin in a part whose area lies mostly
// in bays: passes down to one drift length (1.5 mm for a 6 mm tool and the
// 5–10 % band) get a turn, against three where channels hold most of it.
// The short passes of a bay lie in its corners, where the fronts meet two
// walls; stepped onto directly, each is bitten head-on by the link along
// the wall. Measured (1 against 3, before the corner caps, which took the
// last crescents of the corners from the fronts): share above 1.15 × the
// band maximum, closed pocket .0071 → .0047, deep pocket of
// two_depths.json .0129 → .0084, counterbore .0049 → .0035; link length
// cutting, closed pocket 18.4 → 6.7 mm, deep pocket 12.9 → 5.4 mm; 1 mm
// maximum of the closed pocket .183 → .148; cycle +1–6 % (closed pocket
// 127.0 → 131.5 s, deep pocket 56.3 → 59.5 s). At 1.2, 1.5 and 2 the gains
// shrink in turn (closed pocket above .0051, .0055, .0060). In a channel
// every pass is a short one across it: there the turns took the channel
// recess of shallow_channels.json from 394 to 742 s, and it keeps 3.
const shortTurnMin = 1.0

// spiralTurn returns the ramp onto the open pass next from a pass cut
// beside it (one of cut, else of older), or nil when none runs beside its
// start, with the neighbour pass it leaves from. Stepping straight from one
// pass end to the next start meets the new slab head-on (the engaged arc is
// the chord of the step, φ = 2·arccos(1 − ae/r), elementary geometry);
// instead the tool comes back along the neighbour pass through cut
// material to a length l short of the wall, runs forward again while
// drifting over onto next along turnProfile's curve (the engaged arc held
// at 1.1 × the band maximum), and at the start of next reverses into the
// pass, which then takes the wedge the drift left. A pass shorter than
// p.turnMin drift lengths gets no turn. The ramp starts on the neighbour
// pass and ends at next's start.
func spiralTurn(g *bandedGrid, cut, older [][]geom.Point, next []geom.Point, p spiralParams) (ramp, along []geom.Point) {
	tau, frac := p.turnTau, p.turnFrac
	l := tau[len(tau)-1]
	if polyLen(next) < p.turnMin*l {
		return nil, nil
	}
	reach := p.maxStep + 2*p.h
	var seg []spiralFront
	for _, set := range [][][]geom.Point{cut, older} {
		bd := math.Inf(1)
		var best []geom.Point
		for _, c := range set {
			if _, d := nearestOnFronts([]spiralFront{{pts: c}}, next[0]); d < bd {
				bd, best = d, c
			}
		}
		if best != nil && bd <= reach {
			seg = []spiralFront{{pts: best}}
			break
		}
	}
	if seg == nil {
		return nil, nil
	}
	cum := make([]float64, len(next))
	for i := 1; i < len(next); i++ {
		cum[i] = cum[i-1] + next[i].Dist(next[i-1])
	}
	total := cum[len(next)-1]
	ramp = make([]geom.Point, 0, len(tau))
	for k := range tau {
		s := l - tau[k]
		q := polyAt(next, cum, s, false, total)
		near, d := nearestOnFronts(seg, q)
		if d > reach {
			return nil, nil
		}
		ramp = append(ramp, near.Lerp(q, frac[k]))
	}
	// A blend of two passes inside the domain may still leave it where
	// the domain is not convex.
	for i := 1; i < len(ramp); i++ {
		if g.crossesWalls(ramp[i-1], ramp[i]) {
			return nil, nil
		}
	}
	return ramp, seg[0].pts
}

// spiralLeadIn bends the first length l of an open pass onto the nearest
// previous front (when one lies within reach), fading to the pass itself.
func spiralLeadIn(pts []geom.Point, prev []spiralFront, l, reach float64) []geom.Point {
	if l <= 0 {
		return pts
	}
	out := append([]geom.Point(nil), pts...)
	s := 0.0
	for i := range out {
		if i > 0 {
			s += pts[i].Dist(pts[i-1])
		}
		if s >= l {
			break
		}
		q, d := nearestOnFronts(prev, pts[i])
		if d > reach {
			if i == 0 {
				return pts
			}
			break
		}
		out[i] = q.Lerp(pts[i], s/l)
	}
	return out
}

// polyBetween returns the part of the polyline pts from a to b, both
// within tol of it, with the vertices between them; nil when either is
// farther than tol or the two coincide.
func polyBetween(pts []geom.Point, a, b geom.Point, tol float64) []geom.Point {
	at := func(p geom.Point) (int, float64) {
		bi, bt, bd := -1, 0.0, tol
		for i := 0; i+1 < len(pts); i++ {
			q := geom.ClosestOnSegment(p, pts[i], pts[i+1])
			if d := q.Dist(p); d <= bd {
				l := pts[i+1].Dist(pts[i])
				t := 0.0
				if l > 0 {
					t = q.Dist(pts[i]) / l
				}
				bi, bt, bd = i, t, d
			}
		}
		return bi, bt
	}
	ia, ta := at(a)
	ib, tb := at(b)
	if ia < 0 || ib < 0 || a.Dist(b) <= tol {
		return nil
	}
	out := []geom.Point{a}
	switch {
	case ia < ib || ia == ib && ta < tb:
		for i := ia + 1; i <= ib; i++ {
			out = append(out, pts[i])
		}
	default:
		for i := ia; i > ib; i-- {
			out = append(out, pts[i])
		}
	}
	if out[len(out)-1].Dist(b) <= 1e-9 {
		out = out[:len(out)-1]
	}
	return append(out, b)
}

// nearestOnFronts returns the point of the fronts nearest to p and its
// distance.
func nearestOnFronts(fs []spiralFront, p geom.Point) (geom.Point, float64) {
	best, bd := p, math.Inf(1)
	for _, f := range fs {
		for i := 0; i+1 < len(f.pts); i++ {
			q := geom.ClosestOnSegment(p, f.pts[i], f.pts[i+1])
			if d := q.Dist(p); d < bd {
				best, bd = q, d
			}
		}
	}
	return best, bd
}

// spiralRotate returns a closed polyline (first point repeated at the end)
// starting at vertex k.
func spiralRotate(pts []geom.Point, k int) []geom.Point {
	n := len(pts) - 1
	out := make([]geom.Point, 0, n+1)
	for i := 0; i < n; i++ {
		out = append(out, pts[(k+i)%n])
	}
	return append(out, out[0])
}

// spiralBlend bends the first length l of pts so that it starts at from,
// the displacement fading linearly to zero: a spiral transition from one
// loop onto the next.
func spiralBlend(pts []geom.Point, from geom.Point, l float64) []geom.Point {
	off := from.Sub(pts[0])
	out := append([]geom.Point(nil), pts...)
	s := 0.0
	for i := range out {
		if i > 0 {
			s += pts[i].Dist(pts[i-1])
		}
		if s >= l || i == len(out)-1 {
			break
		}
		out[i] = pts[i].Add(off.Scale(1 - s/l))
	}
	return out
}

// spiralLink returns the way from a to b at depth through swept material:
// straight when every point of the segment is swept (near its ends the
// fronts being cut are allowed), else a path over swept nodes, else a lift.
func spiralLink(g *bandedGrid, a, b geom.Point, p spiralParams) []bandedPiece {
	if linkClear(g, a, b, p.maxStep+2*p.h) {
		return []bandedPiece{{kind: pieceLink, pts: []geom.Point{a, b}}}
	}
	if path := gridPath(g, a, b, p.maxStep+2*p.h); path != nil {
		return []bandedPiece{{kind: pieceLink, pts: path}}
	}
	// Lift: first step back onto swept nodes, where the tool touches no
	// material, so that neither the lift nor the plunge cuts.
	ra, rb := nearestReached(g, a), nearestReached(g, b)
	return []bandedPiece{
		{kind: pieceLink, pts: []geom.Point{a, ra}},
		{kind: pieceLift, pts: []geom.Point{ra, rb}},
		{kind: pieceLink, pts: []geom.Point{rb, b}},
	}
}

// nearestReached returns the swept node nearest to p where the tool is
// free of uncut material and which a straight leg from p reaches without
// crossing the domain's outline (p itself when none).
func nearestReached(g *bandedGrid, p geom.Point) geom.Point {
	k0 := g.node(p)
	if k0 < 0 {
		return p
	}
	i0, j0 := k0%g.nx, k0/g.nx
	for rad := 0; rad < 64; rad++ {
		best, bd := -1, math.Inf(1)
		for j := j0 - rad; j <= j0+rad; j++ {
			for i := i0 - rad; i <= i0+rad; i++ {
				if i < 0 || j < 0 || i >= g.nx || j >= g.ny {
					continue
				}
				if max(abs(i-i0), abs(j-j0)) != rad {
					continue
				}
				k := j*g.nx + i
				// The leg to the node is straight: it must not cross the
				// domain's outline (a far node can lie round a corner).
				if g.in[k] && g.reached[k] && g.freeNode(k) && !g.crossesWalls(p, g.pt(k)) {
					if d := g.pt(k).Dist(p); d < bd {
						best, bd = k, d
					}
				}
			}
		}
		if best >= 0 {
			return g.pt(best)
		}
	}
	return p
}

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// linkClear reports whether the segment ab runs through swept nodes, ends
// excepted within slack.
func linkClear(g *bandedGrid, a, b geom.Point, slack float64) bool {
	// The nodes first; the exact outline decides (the costlier check,
	// so it comes last).
	return linkNodesClear(g, a, b, slack) && !g.crossesWalls(a, b)
}

// linkFree reports whether the tool bites no more than the allowed depth
// into uncut material along the segment ab, ends excepted within slack.
func linkFree(g *bandedGrid, a, b geom.Point, slack float64) bool {
	if g.stock == nil {
		return true
	}
	n := int(math.Ceil(a.Dist(b)/(0.5*g.h))) + 1
	for i := 0; i <= n; i++ {
		q := a.Lerp(b, float64(i)/float64(n))
		if q.Dist(a) > slack && q.Dist(b) > slack && !g.free(q) {
			return false
		}
	}
	return true
}

// linkNodesClear is linkClear on the node raster alone.
func linkNodesClear(g *bandedGrid, a, b geom.Point, slack float64) bool {
	l := a.Dist(b)
	n := int(math.Ceil(l/(0.5*g.h))) + 1
	for i := 0; i <= n; i++ {
		q := a.Lerp(b, float64(i)/float64(n))
		if q.Dist(a) <= slack || q.Dist(b) <= slack {
			k := g.node(q)
			if k < 0 || !g.in[k] {
				return false
			}
			continue
		}
		if !g.clearAt(q) {
			return false
		}
	}
	return true
}

// gridPath finds a path of swept nodes from a to b (breadth-first, eight
// neighbours) and shortens it to the fewest clear straight legs.
func gridPath(g *bandedGrid, a, b geom.Point, slack float64) []geom.Point {
	if len(g.bfsPrev) != len(g.in) {
		g.bfsPrev = make([]int32, len(g.in))
		g.bfsGen = make([]uint32, len(g.in))
	}
	g.gen++
	gen := g.gen
	ok := func(k int) bool {
		if !g.in[k] {
			return false
		}
		q := g.pt(k)
		if q.Dist(a) <= slack || q.Dist(b) <= slack {
			return true
		}
		if !g.reached[k] {
			return false
		}
		return g.freeNode(k)
	}
	near := func(p geom.Point) int {
		k0 := g.node(p)
		if k0 < 0 {
			return -1
		}
		if ok(k0) {
			return k0
		}
		i0, j0 := k0%g.nx, k0/g.nx
		best, bd := -1, math.Inf(1)
		for j := j0 - 3; j <= j0+3; j++ {
			for i := i0 - 3; i <= i0+3; i++ {
				if i < 0 || j < 0 || i >= g.nx || j >= g.ny {
					continue
				}
				k := j*g.nx + i
				if ok(k) {
					if d := g.pt(k).Dist(p); d < bd {
						best, bd = k, d
					}
				}
			}
		}
		return best
	}
	ka, kb := near(a), near(b)
	if ka < 0 || kb < 0 {
		return nil
	}
	prev := g.bfsPrev
	seen := func(k int) bool { return g.bfsGen[k] == gen }
	mark := func(k, from int) { g.bfsGen[k] = gen; prev[k] = int32(from) }
	mark(ka, -1)
	queue := []int{ka}
	for qi := 0; qi < len(queue); qi++ {
		k := queue[qi]
		if k == kb {
			break
		}
		i, j := k%g.nx, k/g.nx
		for dj := -1; dj <= 1; dj++ {
			for di := -1; di <= 1; di++ {
				ii, jj := i+di, j+dj
				if ii < 0 || jj < 0 || ii >= g.nx || jj >= g.ny {
					continue
				}
				kk := jj*g.nx + ii
				if seen(kk) || !ok(kk) {
					continue
				}
				mark(kk, k)
				queue = append(queue, kk)
			}
		}
	}
	if !seen(kb) {
		return nil
	}
	var nodes []geom.Point
	for k := kb; k >= 0; k = int(prev[k]) {
		nodes = append(nodes, g.pt(k))
	}
	for i, j := 0, len(nodes)-1; i < j; i, j = i+1, j-1 {
		nodes[i], nodes[j] = nodes[j], nodes[i]
	}
	// The ends replace their nodes, unless the leg they would then make
	// runs out of the domain (two ends just outside it, across the rounded
	// corner of an island): then the nodes stay as a way in and out.
	if len(nodes) > 2 || !g.crossesWalls(a, b) {
		nodes[0], nodes[len(nodes)-1] = a, b
	} else {
		nodes = append(append([]geom.Point{a}, nodes...), b)
	}
	// String pulling on the nodes, then the exact outline check of each
	// leg (shortened until it holds; a leg between neighbouring nodes is
	// kept).
	out := []geom.Point{a}
	i := 0
	for i < len(nodes)-1 {
		j := len(nodes) - 1
		for j > i+1 && !linkNodesClear(g, nodes[i], nodes[j], slack) {
			j--
		}
		if j > i+1 && g.crossesWalls(nodes[i], nodes[j]) {
			// Keep the node chain here: legs between neighbouring nodes
			// inside the domain clip a convex outline arc of radius R by
			// at most (1.5 h)²/(8R), below the domain's margin for the
			// arcs of islands and walls (R ≥ r).
			out = append(out, nodes[i+1:j+1]...)
		} else {
			out = append(out, nodes[j])
		}
		i = j
	}
	return out
}

// polyLen returns the length of a polyline.
func polyLen(pts []geom.Point) float64 {
	l := 0.0
	for i := 1; i < len(pts); i++ {
		l += pts[i].Dist(pts[i-1])
	}
	return l
}

// polyAt returns the point at arc length s of a polyline with cumulative
// lengths cum, wrapping when closed.
func polyAt(pts []geom.Point, cum []float64, s float64, closed bool, total float64) geom.Point {
	if closed && total > 0 {
		s = math.Mod(s, total)
		if s < 0 {
			s += total
		}
	}
	if s <= 0 {
		return pts[0]
	}
	if s >= total {
		return pts[len(pts)-1]
	}
	lo, hi := 0, len(cum)-1
	for hi-lo > 1 {
		m := (lo + hi) / 2
		if cum[m] <= s {
			lo = m
		} else {
			hi = m
		}
	}
	seg := cum[hi] - cum[lo]
	if seg <= 0 {
		return pts[lo]
	}
	return pts[lo].Lerp(pts[hi], (s-cum[lo])/seg)
}

// polyResample returns the polyline with points about every step apart
// (ends kept; a closed polyline keeps its repeated end point).
func polyResample(pts []geom.Point, step float64, closed bool) []geom.Point {
	if len(pts) < 2 {
		return pts
	}
	total := polyLen(pts)
	n := int(math.Ceil(total / step))
	if n < 2 {
		n = 2
	}
	cum := make([]float64, len(pts))
	for i := 1; i < len(pts); i++ {
		cum[i] = cum[i-1] + pts[i].Dist(pts[i-1])
	}
	out := make([]geom.Point, 0, n+1)
	for i := 0; i <= n; i++ {
		out = append(out, polyAt(pts, cum, total*float64(i)/float64(n), false, total))
	}
	if closed {
		out[n] = out[0]
	}
	return out
}

// polySmooth applies Taubin's λ|μ smoothing (no shrinking) to a polyline;
// the ends of an open one stay fixed.
func polySmooth(pts []geom.Point, closed bool, iters int) []geom.Point {
	n := len(pts)
	if n < 4 {
		return pts
	}
	cur := append([]geom.Point(nil), pts...)
	tmp := make([]geom.Point, n)
	m := n
	if closed {
		m = n - 1
	}
	pass := func(f float64) {
		copy(tmp, cur)
		for i := 0; i < m; i++ {
			var a, b geom.Point
			switch {
			case closed:
				a, b = cur[(i-1+m)%m], cur[(i+1)%m]
			case i == 0 || i == n-1:
				continue
			default:
				a, b = cur[i-1], cur[i+1]
			}
			mid := a.Add(b).Scale(0.5)
			tmp[i] = cur[i].Add(mid.Sub(cur[i]).Scale(f))
		}
		if closed {
			tmp[n-1] = tmp[0]
		}
		cur, tmp = tmp, cur
	}
	for k := 0; k < iters; k++ {
		pass(0.5)
		pass(-0.53)
	}
	return cur
}

// leanAngle is the largest angle, degrees, at which a pass may meet an
// outer wall of its domain (spiralLeanEnd).
const leanAngle = 30

// islandLeanAngle and islandLeanSpan (times the tool radius) shape the lean
// onto the islands of a pocket (unless BandedOptions.SquareIslands):
// of 30° or 45° over a half or one and a half tool radii, 45° over half a
// radius kept the band best for the least time on the demo's boss pocket,
// the island pocket and the router sign (closing note of the session that
// added it).
const (
	islandLeanAngle = 45
	islandLeanSpan  = 0.5
)

// spiralLeanEnd leans the start (or end) of an open front that meets an
// outer wall of c (or a hole's wall, with p.leanHoles) so that it meets the wall at no more than leanAngle,
// heading to the swept side (the right of the front's direction: material
// lies on its left). A pass that ends square to a wall beside the round end
// of the pass before it meets the crescent between the two ends: its
// engaged arc rises over the last 0.12·D to 90° + asin(δ/2r) at the end
// (engage's TestPassEndCrescent, elementary geometry), above any usual band.
// Met at 30° from the swept side, the end takes a layer half as thick and
// the earlier end lies behind the tool: the arc then peaks at 34° for a
// 7.5 % step, under the 39.6° of 1.15 × a 10 % band (TestLeanedPassEnd).
// The last tool radius lb of the front is sheared along the wall by
// sw·u², u from 0 to 1 along it, which turns the end's direction from β to
// the wall to leanAngle when sw = (lb/2)·(sin β/tan(leanAngle) − cos β); on
// a curved wall each point keeps its distance to the wall. The next fronts
// follow the leaned cut, so they mostly arrive leaning already. Island
// walls of pockets are leaned with p.leanIslands, the default: the fronts
// then wind about the island (demo boss pocket: 45 % more passes, 24 %
// more time), but above-band share falls 0.028 → 0.007 and the full
// slotting where square ends leave a front's start beyond the pass before
// is gone. In
// open features the holes are the part itself (an outside profile), and
// there they lean as outer walls do (p.leanHoles).
func spiralLeanEnd(pts []geom.Point, c geom.Shape, p spiralParams, atStart bool) []geom.Point {
	n := len(pts)
	if n < 4 {
		return pts
	}
	e := pts[n-1]
	if atStart {
		e = pts[0]
	}
	d, wa, wb, _, hole := nearestEdge(c, e)
	if d > 2*p.h {
		return pts // the front ends in the open, not at a wall
	}
	if hole && !p.leanHoles && !p.leanIslands || wa == wb {
		return pts
	}
	span, tmax := p.r, math.Tan(leanAngle*math.Pi/180)
	if hole && !p.leanHoles {
		span, tmax = islandLeanSpan*p.r, math.Tan(islandLeanAngle*math.Pi/180)
	}
	lb := math.Min(span, 0.3*polyLen(pts))
	if lb < 2*p.h {
		return pts
	}
	work := pts // the end to lean is work's last point
	if atStart {
		work = spiralReversed(pts)
	}
	tau := wb.Sub(wa).Unit()
	// The direction in which the pass comes in, over half a tool radius.
	k0 := max(0, n-1-int(math.Ceil(p.r/(2*p.h))))
	app := e.Sub(work[k0]).Unit()
	fwd := app // the front's own direction at this end
	if atStart {
		fwd = app.Scale(-1)
	}
	if tau.Dot(geom.Pt(fwd.Y, -fwd.X)) < 0 {
		tau = tau.Scale(-1) // along the wall toward the swept side
	}
	cb := app.Dot(tau)
	sb := math.Sqrt(math.Max(0, 1-cb*cb))
	if cb > 0 && sb <= tmax*cb+1e-9 {
		return pts // leaning enough already
	}
	sw := lb / 2 * (sb/tmax - cb)
	if sw <= 0 {
		return pts
	}
	cum := make([]float64, n) // length from each vertex to the end
	for i := n - 2; i >= 0; i-- {
		cum[i] = cum[i+1] + work[i+1].Dist(work[i])
	}
	// A shear that leaves c (a corner ahead) is halved, twice at most.
	for try := 0; try < 3; try, sw = try+1, sw/2 {
		out := append([]geom.Point(nil), work...)
		ok := true
		for i := n - 1; i >= 0 && cum[i] < lb; i-- {
			u := (lb - cum[i]) / lb
			q := work[i].Add(tau.Scale(sw * u * u))
			if d0 := c.DistanceToBoundary(work[i]); d0 < p.r {
				if d1, _, _, b, _ := nearestEdge(c, q); d1 > d0+1e-6 && c.Contains(q) {
					q = q.Add(b.Sub(q).Unit().Scale(d1 - d0))
				}
			}
			if !c.Contains(q) && c.DistanceToBoundary(q) > 1e-3 {
				ok = false
				break
			}
			out[i] = q
		}
		if ok {
			if atStart {
				return spiralReversed(out)
			}
			return out
		}
	}
	return pts
}

// nearestEdge returns the distance from q to the boundary of c, the edge
// a–b of c nearest to q, the point of that edge nearest to q, and whether
// the edge lies on a hole.
func nearestEdge(c geom.Shape, q geom.Point) (d float64, a, b, at geom.Point, hole bool) {
	d, at = math.Inf(1), q
	for _, reg := range c {
		for ri, ring := range reg.Rings() {
			for i := range ring {
				p, r := ring[i], ring[(i+1)%len(ring)]
				if x := geom.ClosestOnSegment(q, p, r); x.Dist(q) < d {
					d, a, b, at, hole = x.Dist(q), p, r, x, ri > 0
				}
			}
		}
	}
	return d, a, b, at, hole
}

// touchesStock reports whether the tool centred at q may reach the stock,
// cut or not: a node inside the stock outline lies within the tool radius
// and margin of q (at least two node spacings: the raster knows the
// outline to a node in x and in y).
func (g *bandedGrid) touchesStock(q geom.Point, margin float64) bool {
	s := g.stock
	if s == nil {
		return true
	}
	r := s.r + max(margin, 2*g.h)
	i0 := max(0, int(math.Ceil((q.X-r-g.x0)/g.h)))
	i1 := min(g.nx-1, int(math.Floor((q.X+r-g.x0)/g.h)))
	j0 := max(0, int(math.Ceil((q.Y-r-g.y0)/g.h)))
	j1 := min(g.ny-1, int(math.Floor((q.Y+r-g.y0)/g.h)))
	for j := j0; j <= j1; j++ {
		dy := g.y0 + float64(j)*g.h - q.Y
		for i := i0; i <= i1; i++ {
			dx := g.x0 + float64(i)*g.h - q.X
			if dx*dx+dy*dy <= r*r && !s.air[j*g.nx+i] {
				return true
			}
		}
	}
	return false
}

// boundaryTrim leaves out of the boundary pass's pieces (in cutting
// order) the stretches longer than twice the tool radius along which the
// tool cannot reach the stock (touchesStock: the air round an open part),
// and links over them. The pass is sampled every ds and reaches with a
// margin of ds, so the last sample kept on either side of a stretch left
// out still lies beyond the stock's reach.
func boundaryTrim(g *bandedGrid, pieces []bandedPiece, p spiralParams) []bandedPiece {
	if g.stock == nil {
		return pieces
	}
	minGap := 2 * p.r
	ds := math.Max(g.h, 0.25)
	var out []bandedPiece
	for _, pc := range pieces {
		if (pc.kind != pieceBoundary && pc.kind != pieceCut) || pc.arcs != nil || len(pc.pts) < 2 {
			out = append(out, pc)
			continue
		}
		pts := pc.pts
		cum := make([]float64, len(pts))
		for i := 1; i < len(pts); i++ {
			cum[i] = cum[i-1] + pts[i].Dist(pts[i-1])
		}
		total := cum[len(cum)-1]
		n := int(math.Ceil(total / ds))
		if n < 2 {
			out = append(out, pc)
			continue
		}
		need := make([]bool, n+1)
		for k := 0; k <= n; k++ {
			need[k] = g.touchesStock(polyAt(pts, cum, total*float64(k)/float64(n), false, total), ds)
		}
		// Gaps: runs of samples out of reach, from the last sample within
		// reach before them to the first after.
		type gap struct{ a, b float64 }
		var gaps []gap
		for k := 0; k <= n; {
			if need[k] {
				k++
				continue
			}
			e := k
			for e <= n && !need[e] {
				e++
			}
			a, b := float64(k-1)*total/float64(n), float64(e)*total/float64(n)
			if k == 0 {
				a = 0
			}
			if e > n {
				b = total
			}
			if b-a >= minGap {
				gaps = append(gaps, gap{a, b})
			}
			k = e
		}
		if len(gaps) == 0 {
			out = append(out, pc)
			continue
		}
		from := 0.0
		for _, gp := range gaps {
			if gp.a > from {
				sub := polySub(pts, cum, from, gp.a)
				out = append(out, bandedPiece{kind: pc.kind, pts: sub})
			}
			qa := polyAt(pts, cum, gp.a, false, total)
			qb := polyAt(pts, cum, gp.b, false, total)
			if qa.Dist(qb) > 1e-9 {
				out = append(out, spiralLink(g, qa, qb, p)...)
			}
			from = gp.b
		}
		if from < total {
			out = append(out, bandedPiece{kind: pc.kind, pts: polySub(pts, cum, from, total)})
		}
	}
	return out
}

// polySub returns the stretch of the open polyline pts (cumulative lengths
// cum) from arc length s0 to s1.
func polySub(pts []geom.Point, cum []float64, s0, s1 float64) []geom.Point {
	total := cum[len(cum)-1]
	out := []geom.Point{polyAt(pts, cum, s0, false, total)}
	for i, c := range cum {
		if c > s0 && c < s1 {
			out = append(out, pts[i])
		}
	}
	return append(out, polyAt(pts, cum, s1, false, total))
}
