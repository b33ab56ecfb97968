package pathplan

import (
	"context"
	"errors"
	"math"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
)

// bandedSplit divides a domain part into bays and channels for a disk of
// the tool radius: a zone where the tool centre cannot swing a loop wider
// than the tool is cleared by trochoidal loops, the rest by fronts. It
// returns nil when the part has no channel, or when its channels are of a
// kind the zoned planner does not handle yet (branches, no bay at all, bays
// not joined by channels); the whole part is then cleared by fronts. It
// also returns the share of the part's area the channels hold, whether or
// not the zoned planner takes them (0 when the split fails).
func bandedSplit(ctx context.Context, comp bandedComp, st bandedSettings, tol float64) (*offset.Zones, float64, error) {
	z, err := offset.Split(ctx, comp.c, st.r, tol, offset.SplitOptions{})
	if err != nil {
		if ctx.Err() != nil {
			return nil, 0, err
		}
		// The split is an optimisation of the path; without it the
		// fronts still clear the part.
		return nil, 0, nil
	}
	share := channelShare(z)
	if len(z.Channels) == 0 || len(z.Bays) == 0 {
		return nil, share, nil
	}
	for _, ch := range z.Channels {
		if len(ch.Branches) > 0 || len(ch.Ends) == 0 || len(ch.Ends) > 2 || len(ch.Spine) < 2 {
			return nil, share, nil
		}
	}
	// Every bay must be reached from the first through channels.
	seen := make([]bool, len(z.Bays))
	seen[0] = true
	for changed := true; changed; {
		changed = false
		for _, ch := range z.Channels {
			if len(ch.Ends) != 2 {
				continue
			}
			a, b := ch.Ends[0].Bay, ch.Ends[1].Bay
			if seen[a] != seen[b] {
				seen[a], seen[b] = true, true
				changed = true
			}
		}
	}
	for _, s := range seen {
		if !s {
			return nil, share, nil
		}
	}
	return &z, share, nil
}

// channelShare returns the share of the zones' area that lies in
// channels, 0 when they have no area.
func channelShare(z offset.Zones) float64 {
	var bays, chans float64
	for _, b := range z.Bays {
		bays += geom.Shape{b.Region}.Area()
	}
	for _, ch := range z.Channels {
		chans += geom.Shape{ch.Region}.Area()
	}
	if bays+chans <= 0 {
		return 0
	}
	return chans / (bays + chans)
}

// bandedMask returns a grid over the same raster as g whose domain is the
// nodes of g inside reg, with the swept nodes of g carried over.
func bandedMask(g *bandedGrid, reg geom.Region) *bandedGrid {
	m := &bandedGrid{x0: g.x0, y0: g.y0, h: g.h, nx: g.nx, ny: g.ny, walls: g.walls, outer: g.outer, stock: g.stock}
	n := len(g.in)
	m.in = make([]bool, n)
	m.reached = make([]bool, n)
	m.t = make([]float64, n)
	m.src = make([]int32, n)
	for i := range m.t {
		m.t[i] = math.Inf(1)
		m.src[i] = -1
	}
	s := geom.Shape{reg}
	b := reg.Outer.Bounds()
	for k, in := range g.in {
		if !in {
			continue
		}
		q := g.pt(k)
		if q.X < b.Min.X-g.h || q.X > b.Max.X+g.h || q.Y < b.Min.Y-g.h || q.Y > b.Max.Y+g.h {
			continue
		}
		if s.Contains(q) || s.DistanceToBoundary(q) < 0.5*g.h {
			m.in[k] = true
			m.reached[k] = g.reached[k]
		}
	}
	return m
}

// bandedAir marks as swept the nodes of g where the tool is clear of the
// stock (outside the stock outline grown by the tool radius) and returns
// the grown outline's rings as start fronts; false when g has no such node.
func bandedAir(g *bandedGrid, grown geom.Shape, p spiralParams) ([]spiralFront, bool) {
	gm := newBandedGrid(grown, p.h)
	any := false
	for k := range g.in {
		if !g.in[k] {
			continue
		}
		// Exact check of what the raster calls outside (see bandedLevel).
		if kk := gm.node(g.pt(k)); (kk < 0 || !gm.in[kk]) && !grown.Contains(g.pt(k)) {
			g.reached[k] = true
			any = true
		}
	}
	if !any {
		return nil, false
	}
	var start []spiralFront
	for _, ring := range grown.Rings() {
		pts := append(append([]geom.Point(nil), ring...), ring[0])
		pts = polyResample(pts, p.h, true)
		start = append(start, spiralFront{pts: pts, closed: true, steps: spiralSteps(pts, true, p)})
	}
	return start, true
}

// bandedDiskFront returns a clockwise circle of radius rad about c as a
// start front (material outside, on the left).
func bandedDiskFront(c geom.Point, rad float64, p spiralParams) spiralFront {
	circ := geom.Circle(c, rad, max(24, int(2*math.Pi*rad/p.h)))
	rev := circ.Reversed()
	pts := append(rev, rev[0])
	return spiralFront{pts: pts, closed: true, steps: spiralSteps(pts, true, p)}
}

// bandedZoned plans one level of a domain part split into bays and
// channels: the first bay is entered (helix, or from the air when it is
// open) and cleared by fronts; from every cleared bay its channels are
// cleared by trochoidal loops along their spines, a channel that leads to
// a bay not yet cleared carrying the tool there, whose fronts then grow from
// the last loop; a bay beyond a throat too narrow for the loops is entered
// by its own helix instead; dead-end channels are left back along the spine. A last
// pass along the walls of the whole part takes the cusps of loops and
// fronts.
func bandedZoned(ctx context.Context, b *builder, job *Job, fi int, comp bandedComp, zones *offset.Zones, z, levelTop, clear float64, st bandedSettings, sum *FeatureSummary) error {
	if err := checkRasterBudget(sum.Name, comp.c.Bounds(), st.h, st.r+2*st.h, len(zones.Bays)); err != nil {
		return err
	}
	g := newBandedGridPad(comp.c, st.h, st.r+2*st.h)
	g.initStock(comp.c, job.Stock.Outline, st.r, st.r*(1-math.Cos(st.phi)))
	p := newSpiralParams(st)
	p.noBoundary = true
	p.trimBoundary = comp.open
	band := job.Cut.Band
	if band[1] <= 0 {
		band = defaultBand
	}
	phiMax := bandedPhiOf(band[1])
	var grown geom.Shape
	if comp.open {
		var err error
		grown, err = offset.Offset(job.Stock.Outline, st.r+0.01, DefaultTolerance)
		if err != nil {
			return err
		}
	}
	// The first bay: an open one when the part is open, else the largest.
	first := 0
	grids := make([]*bandedGrid, len(zones.Bays))
	airFronts := make([][]spiralFront, len(zones.Bays))
	for i, bay := range zones.Bays {
		grids[i] = bandedMask(g, bay.Region)
		if comp.open {
			if f, ok := bandedAir(grids[i], grown, p); ok {
				airFronts[i] = f
			}
		}
	}
	if comp.open {
		for i := range zones.Bays {
			if airFronts[i] != nil {
				first = i
				break
			}
		}
	}
	var start []spiralFront
	var pos geom.Point
	if airFronts[first] != nil {
		gb := grids[first]
		from, err := b.where()
		if err != nil {
			return err
		}
		bk, bd := -1, math.Inf(1)
		for k, r := range gb.reached {
			if r {
				if d := gb.pt(k).Dist(from); d < bd {
					bk, bd = k, d
				}
			}
		}
		if bk < 0 {
			return errors.New("open domain without air")
		}
		pos = gb.pt(bk)
		start = airFronts[first]
		b.rapid(p3(b.pos.XY(), clear))
		b.rapid(p3(pos, clear))
		b.rapid(p3(pos, z+st.safe))
		b.feed(geom.Link, p3(pos, z), st.entry)
	} else {
		bay := zones.Bays[first]
		hr := math.Min(st.helixR, bay.Radius-0.02)
		if hr < 0.1*st.r {
			return errors.New("no entry fits: the widest bay is narrower than a helix of a tenth of the tool radius")
		}
		grids[first].markDisk(bay.Deepest, hr)
		g.stampDisk(bay.Deepest, hr)
		f := bandedDiskFront(bay.Deepest, hr, p)
		start = []spiralFront{f}
		pos = f.pts[0]
		bandedHelixEntry(b, job, fi, bay.Deepest, pos, hr, levelTop, z, clear, st, sum)
	}
	var pieces []bandedPiece
	// emit writes the pieces so far; the first ones start in the air when
	// the level does (bandedMarkApproaches).
	inAir := airFronts[first] != nil
	emit := func() {
		if comp.open {
			bandedMarkApproaches(pieces, inAir, grown)
		}
		bandedEmit(b, pieces, comp.c, z, levelTop, clear, st, sum)
		pieces, inAir = nil, false
	}
	visited := make([]bool, len(zones.Bays))
	doneCh := make([]bool, len(zones.Channels))
	pitch := func(rt float64) float64 {
		return trochoidPitchAt(rt, func(key int, rk float64) float64 {
			return st.pitches.get(key, func() float64 {
				return trochoidHeldPitch(st.r, rk, phiMax)
			})
		})
	}
	merge := func(gb *bandedGrid) {
		for k, r := range gb.reached {
			if r {
				g.reached[k] = true
			}
		}
	}
	// add appends pieces cut outside the fronts and records them as cut.
	add := func(pcs ...bandedPiece) {
		for _, pc := range pcs {
			if pc.kind != pieceLift {
				g.stampPath(pc.pts)
			}
		}
		pieces = append(pieces, pcs...)
	}
	var clearBay func(i int, start []spiralFront) error
	clearBay = func(i int, start []spiralFront) error {
		visited[i] = true
		gb := grids[i]
		// Carry over what channels swept into this bay's raster.
		for k := range gb.in {
			if gb.in[k] && g.reached[k] {
				gb.reached[k] = true
			}
		}
		start = append(start, airFronts[i]...)
		pcs, np, err := spiralGrow(ctx, gb, geom.Shape{zones.Bays[i].Region}, start, pos, p)
		if err != nil {
			return err
		}
		pieces = append(pieces, pcs...)
		pos = np
		merge(gb)
		for ci, ch := range zones.Channels {
			if doneCh[ci] {
				continue
			}
			for ei, e := range ch.Ends {
				if e.Bay != i || doneCh[ci] {
					continue
				}
				doneCh[ci] = true
				spine, clr := ch.Spine, ch.Clearance
				if ei == 1 {
					spine, clr = spiralReversed(spine), reversedFloats(clr)
				}
				other := -1
				if len(ch.Ends) == 2 {
					other = ch.Ends[1-ei].Bay
				}
				dead := other < 0
				run := trochoidRun(comp.c, spine, clr, dead, pitch, st)
				if run.short && !dead && !visited[other] {
					// The loops stop at a throat too narrow for them, so
					// no front reaches the bay beyond: enter it by its
					// own helix (the wall pass takes the throat).
					if len(run.pts) >= 2 {
						if d := pos.Dist(run.pts[0]); d > 1e-6 {
							add(spiralLink(g, pos, run.pts[0], p)...)
						}
						add(bandedPiece{kind: pieceTrochoid, pts: run.pts, arcs: run.arcs})
						sum.Rings++
						for k, c := range run.centres {
							g.markDisk(c, run.rts[k])
						}
						pos = run.pts[len(run.pts)-1]
					}
					bay := zones.Bays[other]
					hr := math.Min(st.helixR, bay.Radius-0.02)
					if hr < 0.1*st.r {
						continue // no helix fits; the wall pass is all it gets
					}
					emit()
					grids[other].markDisk(bay.Deepest, hr)
					g.stampDisk(bay.Deepest, hr)
					f := bandedDiskFront(bay.Deepest, hr, p)
					pos = f.pts[0]
					bandedHelixEntry(b, job, fi, bay.Deepest, pos, hr, levelTop, z, clear, st, sum)
					if err := clearBay(other, []spiralFront{f}); err != nil {
						return err
					}
					continue
				}
				if len(run.pts) < 2 {
					continue
				}
				if d := pos.Dist(run.pts[0]); d > 1e-6 {
					add(spiralLink(g, pos, run.pts[0], p)...)
				}
				add(bandedPiece{kind: pieceTrochoid, pts: run.pts, arcs: run.arcs})
				sum.Rings++
				for k, c := range run.centres {
					g.markDisk(c, run.rts[k])
				}
				pos = run.pts[len(run.pts)-1]
				if dead || visited[other] {
					if dead {
						// Back along the spine, through the loops.
						back := []geom.Point{pos}
						for k := len(run.centres) - 1; k >= 0; k -= 4 {
							back = append(back, run.centres[k])
						}
						back = append(back, run.centres[0])
						add(bandedPiece{kind: pieceLink, pts: back})
						pos = back[len(back)-1]
					}
					continue
				}
				end := run.centres[len(run.centres)-1]
				rt := run.rts[len(run.rts)-1]
				grids[other].markDisk(end, rt)
				if err := clearBay(other, []spiralFront{bandedDiskFront(end, rt, p)}); err != nil {
					return err
				}
			}
		}
		return nil
	}
	if err := clearBay(first, start); err != nil {
		return err
	}
	pieces = append(pieces, spiralBoundary(g, comp.c, &pos, p)...)
	emit()
	return nil
}

// trochoidKnot is the spacing, mm, of the loop radii at which the trochoid
// pitch is computed (trochoidPitchAt).
const trochoidKnot = 0.25

// trochoidPitchAt returns the pitch for a loop of radius rt from the pitches
// at the knots either side of it (at computes or recalls the pitch of a
// radius under a key), interpolated along the chord between them. The
// pitch grows with the loop radius, and more slowly the larger the loop
// (concave: 0.152, 0.204 and 0.242 mm at 1, 1.5 and 2 mm for a 6 mm tool
// at a 10 % band; TestTrochoidPitchAt), so the chord lies under it and the
// loop holds the band, where flooring rt to the knot below would give away
// up to a knot's worth of pitch. Under the first knot, where the pitch
// falls to nothing, rt is floored to 0.01 mm instead.
func trochoidPitchAt(rt float64, at func(key int, rk float64) float64) float64 {
	rt = max(0, rt)
	if rt < trochoidKnot {
		k := math.Floor(rt / 0.01)
		return at(-1-int(k), 0.01*k)
	}
	k := math.Floor(rt / trochoidKnot)
	r0, r1 := k*trochoidKnot, (k+1)*trochoidKnot
	p0, p1 := at(int(k), r0), at(int(k)+1, r1)
	return p0 + (p1-p0)*(rt-r0)/trochoidKnot
}

func reversedFloats(v []float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[len(v)-1-i] = x
	}
	return out
}

// bandedTrochoid is one run of trochoidal loops: the tool-centre polyline,
// and the loop centre and radius at each of its points.
type bandedTrochoid struct {
	pts, centres []geom.Point
	rts          []float64
	// arcs are the front halves: each runs counter-clockwise on a circle
	// from pts[from] to pts[to] (pts between them lie on it too).
	arcs []pieceArc
	// short is set when the run stops before the end of its spine because
	// the channel narrows below the smallest loop.
	short bool
}

// trochoidRun lays trochoidal loops along spine, counter-clockwise, so the
// tool climbs into the material ahead (at the front of a loop the tool
// moves to the left of the spine and the material lies on its right). The
// loop centre advances one pitch along the spine while the tool is on the
// back half of the loop, in the cleared slot, and stands while the front
// half cuts (trochoidHeldPoint); the front half, on one circle, is
// recorded as an arc. The loop radius is the spine's clearance, held
// inside the domain c, so the tool reaches the walls; pitch gives the
// pitch for a loop radius (trochoidPitchAt over trochoidHeldPitch at the
// band maximum). The first loop is centred one loop radius back from the
// spine's start, inside the cleared bay, so the engagement grows from
// nothing. With dead set the run stops where the clearance falls below
// 60 % of its largest value (the tip of a dead end, which the wall pass
// clears); otherwise it runs to the spine's end.
func trochoidRun(c geom.Shape, spine []geom.Point, clr []float64, dead bool, pitch func(float64) float64, st bandedSettings) bandedTrochoid {
	var out bandedTrochoid
	n := len(spine)
	cum := make([]float64, n)
	for i := 1; i < n; i++ {
		cum[i] = cum[i-1] + spine[i].Dist(spine[i-1])
	}
	total := cum[n-1]
	if total <= 0 {
		return out
	}
	u0 := spine[1].Sub(spine[0]).Unit()
	u1 := spine[n-1].Sub(spine[n-2]).Unit()
	maxClr := 0.0
	for _, v := range clr {
		maxClr = math.Max(maxClr, v)
	}
	const margin = 0.01
	at := func(s float64) (geom.Point, geom.Point, float64) {
		switch {
		case s <= 0:
			return spine[0].Add(u0.Scale(s)), u0, clr[0]
		case s >= total:
			return spine[n-1].Add(u1.Scale(s - total)), u1, clr[n-1]
		}
		i := 1
		for i < n-1 && cum[i] < s {
			i++
		}
		t := (s - cum[i-1]) / math.Max(cum[i]-cum[i-1], 1e-12)
		q := spine[i-1].Lerp(spine[i], t)
		// Tangent smoothed over a short window, so corners of the spine
		// do not jerk the loops.
		a := polyAt(spine, cum, s-0.5*st.r, false, total)
		b := polyAt(spine, cum, s+0.5*st.r, false, total)
		u := b.Sub(a).Unit()
		if u == (geom.Point{}) {
			u = spine[i].Sub(spine[i-1]).Unit()
		}
		return q, u, clr[i-1] + (clr[i]-clr[i-1])*t
	}
	// The front half of a loop asks for one centre 18 times: the last
	// answer is kept.
	lastQ, lastCl, lastR := geom.Point{X: math.NaN()}, 0.0, 0.0
	radius := func(q geom.Point, cl float64) float64 {
		if q == lastQ && cl == lastCl {
			return lastR
		}
		d := 0.0
		if c.Contains(q) {
			d = c.DistanceToBoundary(q)
		}
		lastQ, lastCl, lastR = q, cl, math.Min(cl, d)-margin
		return lastR
	}
	sEnd := total
	if dead {
		for i := n - 1; i >= 0; i-- {
			if clr[i] >= 0.6*maxClr {
				sEnd = cum[i]
				break
			}
		}
	}
	q0, _, cl0 := at(0)
	rt0 := radius(q0, cl0)
	if rt0 < 0.1*st.r {
		out.short = true
		return out
	}
	// The first front half stands one loop radius back from the spine's
	// start: its tool edge just reaches the material the bay left.
	p0 := pitch(rt0)
	s := -rt0 - p0
	const half = 18
	emit := func(ss, th float64) {
		q, u, cl := at(ss)
		rt := math.Max(0, radius(q, cl))
		pt := q.Add(u.Scale(rt * math.Cos(th))).Add(u.Perp().Scale(rt * math.Sin(th)))
		out.pts = append(out.pts, pt)
		out.centres = append(out.centres, q)
		out.rts = append(out.rts, rt)
	}
	emit(s, math.Pi/2)
	for loops := 0; loops < 100000 && s < sEnd; loops++ {
		q, _, cl := at(s)
		rt := radius(q, cl)
		if rt < 0.1*st.r {
			out.short = true
			break
		}
		pch := math.Min(pitch(rt), sEnd-s)
		// Back half: the centre advances by one pitch while the tool
		// crosses the cleared slot.
		for k := 1; k <= half; k++ {
			f := math.Pi * float64(k) / half
			emit(s+pch*(1-math.Cos(f))/2, math.Pi/2+f)
		}
		s += pch
		// Front half: the centre stands, the tool cuts, on one circle.
		from := len(out.pts) - 1
		for k := 1; k <= half; k++ {
			emit(s, 3*math.Pi/2+math.Pi*float64(k)/half)
		}
		if rt := out.rts[len(out.rts)-1]; rt > 1e-3 {
			out.arcs = append(out.arcs, pieceArc{from: from, to: len(out.pts) - 1, c: out.centres[len(out.centres)-1]})
		}
	}
	return out
}
