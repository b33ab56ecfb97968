package pathplan

import (
	"context"
	"math"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// The extra-pass repair is the first repair of the banded verification:
// where the simulated engagement of a pass, as a 1 mm moving average (the
// issue's measure, windows at the start of a run included), comes within
// extraPassMargin of the limit band maximum + 0.03, an extra pass is cut
// just before the stretch. It is the stretch itself offset by δ toward the
// side the pass has already cleared: it bends off the pass over
// extraPassLead, takes the material beyond δ, and comes back along itself,
// through what it has just cut, to where it left the pass; the pass then
// cuts the rest. For a straight cut of width ae, the extra pass takes
// ae − δ and the pass δ (elementary geometry). The pass only cuts what the
// stretch would have, earlier, so the material the rest of the path meets
// is the same. δ is chosen by simulating the stretch with the pass at a
// few offsets (extraPassShares); a stretch no offset improves keeps its
// overload. The feed repair (banded_repair.go) comes after it, on the
// moves as repaired.

// extraPassMargin is how far below the limit (band maximum + 0.03
// as a 1 mm moving average of ae/D) a stretch is already relieved, so that
// the repair's own uncertainty stays under the limit.
const extraPassMargin = 0.005

// extraPassLead is the length, mm, over which an extra pass bends off the
// pass it relieves. It ends where the stretch ends: its disk there reaches
// a radius beyond, and a pass that followed the path on round a corner
// would swing its offset into the material the corner turns away from.
const extraPassLead = 1.0

// extraPassRounds is how many times the verification looks for stretches
// to relieve, each round on the path the last one repaired; a round runs
// only where the last relieved a stretch without bringing it under the
// limit. On the demo job the second round takes the verified plan from
// 5.3 to 7.0 s and the comb pocket's 1 mm maximum over full windows from
// 0.170 to 0.138 (the sign job's from 0.147 to 0.135).
const extraPassRounds = 2

// extraPassStep is the longest chord, mm, of the extra pass's polyline.
const extraPassStep = 0.2

// hotStretch is a run of cutting samples of one feature's simulation whose
// 1 mm moving average of ae/D exceeds the repair limit: the moves m0..m1
// (indices in the feature) that hold it and the tool-centre positions p0
// and p1 of its first and last samples, its peak ae, mm, its largest
// window, and the side of the pass the material lies on (+1 left, −1
// right).
type hotStretch struct {
	m0, m1 int
	p0, p1 geom.Point
	s0, s1 float64 // arc length along the feature's path at p0 and p1
	peakAE float64
	maxWin float64
	side   float64
}

// hotStretches returns the stretches of res whose 1 mm moving average of
// ae/D (over consecutive cutting samples, as engage's MaxEng takes it)
// exceeds limit, with the material on one side of the pass.
func hotStretches(res *engage.Result, d, limit float64) []hotStretch {
	prof := res.Profile
	hot := make([]bool, len(prof))
	win := make([]float64, len(prof))
	movingAverages(prof, d, func(lo, k int, avg, _ float64) {
		if avg > limit {
			for j := lo; j <= k; j++ {
				hot[j] = true
				win[j] = math.Max(win[j], avg)
			}
		}
	})
	var out []hotStretch
	for k := 0; k < len(prof); {
		if !hot[k] {
			k++
			continue
		}
		h := hotStretch{m0: prof[k].Move, m1: prof[k].Move, p0: geom.Pt(prof[k].X, prof[k].Y), s0: prof[k].S}
		var lat, mag float64
		for ; k < len(prof) && hot[k]; k++ {
			p := prof[k]
			h.m1, h.p1, h.s1 = p.Move, geom.Pt(p.X, p.Y), p.S
			h.peakAE = math.Max(h.peakAE, p.AE)
			h.maxWin = math.Max(h.maxWin, win[k])
			// The middle of the engaged arcs: immersion 0 is the left
			// side, π/2 the front, π the right (engage, after Altintas).
			c := math.Cos(0.5 * (p.Entry + p.Exit))
			lat += p.AE * p.Step * c
			mag += p.AE * p.Step
		}
		if mag <= 0 || math.Abs(lat) < 0.3*mag {
			// Head-on: an offset pass would meet the same material.
			continue
		}
		h.side = math.Copysign(1, lat)
		// One extra pass for stretches closer than its lead, on the
		// same side: the second's pass would leave the path inside the
		// first.
		if n := len(out); n > 0 && out[n-1].side == h.side && h.s0-out[n-1].s1 < extraPassLead {
			o := &out[n-1]
			o.m1, o.p1, o.s1 = h.m1, h.p1, h.s1
			o.peakAE, o.maxWin = math.Max(o.peakAE, h.peakAE), math.Max(o.maxWin, h.maxWin)
			continue
		}
		out = append(out, h)
	}
	return out
}

// extraPassPath is where an extra pass runs before it is offset: the
// points seg of the path from the point a, extraPassLead before a stretch,
// to the stretch's end, with the feed of each, at height z. a lies on move
// at, which it splits unless it is that move's start.
type extraPassPath struct {
	seg   []geom.Point
	feeds []float64
	z     float64
	at    int
	a     geom.Point3
	split bool
}

// extraPassOn returns the path an extra pass relieving stretch h of the
// feature's moves (which start at start) follows, or ok false where the
// stretch is not a run of feed moves at one height with the lead before
// it.
func extraPassOn(moves []geom.Move, start geom.Point3, h hotStretch) (p extraPassPath, ok bool) {
	from := func(i int) geom.Point3 {
		if i == 0 {
			return start
		}
		return moves[i-1].To
	}
	z := moves[h.m0].To.Z
	cuts := func(i int) bool {
		k := moves[i].Kind
		return (k == geom.Feed || k == geom.Link) && math.Abs(moves[i].To.Z-z) < 1e-9 && math.Abs(from(i).Z-z) < 1e-9
	}
	for i := h.m0; i <= h.m1; i++ {
		if !cuts(i) {
			return p, false
		}
	}
	// The moves from far enough back to the stretch's end, as a polyline
	// with the move of each point.
	i0, back := h.m0, 0.0
	for i0 > 0 && back < extraPassLead+1e-9 && cuts(i0-1) {
		i0--
		back += geom.MoveLength(from(i0), moves[i0])
	}
	pts := []geom.Point{from(i0).XY()}
	idx := []int{i0}
	feeds := []float64{moves[i0].Feed}
	for i := i0; i <= h.m1; i++ {
		n := len(pts)
		pts, feeds = appendMovePoints(pts, feeds, from(i).XY(), moves[i], extraPassStep)
		for range len(pts) - n {
			idx = append(idx, i)
		}
	}
	// k0 and k1: the points nearest the stretch's ends.
	nearest := func(q geom.Point, m int) int {
		best, bd := -1, math.Inf(1)
		for k, p := range pts {
			if (idx[k] == m || k+1 < len(pts) && idx[k+1] == m) && p.Dist(q) < bd {
				best, bd = k, p.Dist(q)
			}
		}
		return best
	}
	k0, k1 := nearest(h.p0, h.m0), nearest(h.p1, h.m1)
	if k0 < 0 || k1 < k0 {
		return p, false
	}
	ka, l := k0, 0.0
	for ka > 0 && l < extraPassLead {
		l += pts[ka].Dist(pts[ka-1])
		ka--
	}
	if l < extraPassLead-1e-6 || k1-ka < 2 {
		return p, false
	}
	// Point ka lies on move idx[ka+1] (the move of the chord after it):
	// at its end when the chord is the move's first.
	p = extraPassPath{seg: pts[ka : k1+1], feeds: feeds[ka : k1+1], z: z, at: idx[ka+1]}
	p.split = ka > 0 && idx[ka] == p.at
	p.a = geom.Point3{X: pts[ka].X, Y: pts[ka].Y, Z: z}
	return p, true
}

// pass returns the extra pass along p offset by delta, mm, away from side
// (the side the material lies on, +1 left), bending off over the lead, and
// back along itself; ok is false where it would leave the tool-centre
// domain (allowed).
func (p extraPassPath) pass(side, delta float64, allowed func(geom.Point) bool) (pass []geom.Move, ok bool) {
	seg := p.seg
	q := make([]geom.Point, len(seg))
	s := 0.0
	for k := range seg {
		if k > 0 {
			s += seg[k].Dist(seg[k-1])
		}
		t := seg[min(k+1, len(seg)-1)].Sub(seg[max(k-1, 0)]).Unit()
		n := geom.Pt(-t.Y, t.X) // left normal
		f := math.Min(1, s/extraPassLead)
		f = f * f * (3 - 2*f) // smoothstep
		q[k] = seg[k].Add(n.Scale(-side * delta * f))
		if k > 0 && !allowed(q[k]) {
			return nil, false
		}
	}
	for k := 1; k < len(q); k++ {
		pass = append(pass, geom.Move{Kind: geom.Feed, To: geom.Point3{X: q[k].X, Y: q[k].Y, Z: p.z}, Feed: p.feeds[k]})
	}
	for k := len(q) - 2; k >= 0; k-- {
		pass = append(pass, geom.Move{Kind: geom.Link, To: geom.Point3{X: q[k].X, Y: q[k].Y, Z: p.z}, Feed: p.feeds[k+1]})
	}
	return pass, true
}

// appendMovePoints appends the XY polyline of mv, from from, to pts, arcs
// divided into chords no longer than step, with mv's feed for each point.
func appendMovePoints(pts []geom.Point, feeds []float64, from geom.Point, mv geom.Move, step float64) ([]geom.Point, []float64) {
	to := mv.To.XY()
	if !mv.Arc {
		n := max(1, int(math.Ceil(from.Dist(to)/step)))
		for k := 1; k <= n; k++ {
			pts = append(pts, from.Lerp(to, float64(k)/float64(n)))
			feeds = append(feeds, mv.Feed)
		}
		return pts, feeds
	}
	rad := from.Dist(mv.Center)
	a0 := math.Atan2(from.Y-mv.Center.Y, from.X-mv.Center.X)
	sw := geom.ArcSweep(from, to, mv.Center, mv.CW)
	if mv.CW {
		sw = -sw
	}
	n := max(1, int(math.Ceil(math.Abs(sw)*rad/step)))
	for k := 1; k <= n; k++ {
		a := a0 + sw*float64(k)/float64(n)
		p := geom.Pt(mv.Center.X+rad*math.Cos(a), mv.Center.Y+rad*math.Sin(a))
		if k == n {
			p = to
		}
		pts = append(pts, p)
		feeds = append(feeds, mv.Feed)
	}
	return pts, feeds
}

// extraRepair is one extra pass inserted into a feature's moves: before
// move at, from the point a on it, which splits the move unless a is the
// end of the move before.
type extraRepair struct {
	at    int
	a     geom.Point3
	split bool
	pass  []geom.Move
}

// lead returns the moves that take the tool to the repair's point a from
// the start of move at: the first part of the split move, or nothing.
func (rp extraRepair) lead(moves []geom.Move) []geom.Move {
	if !rp.split {
		return nil
	}
	mv := moves[rp.at]
	mv.To = rp.a
	return []geom.Move{mv}
}

// withExtraPasses returns the feature's moves with the passes of reps (in
// path order; two may split one move, the second beyond the first's point)
// inserted.
func withExtraPasses(moves []geom.Move, reps []extraRepair) []geom.Move {
	out := make([]geom.Move, 0, len(moves))
	next := 0
	for _, rp := range reps {
		out = append(out, moves[next:rp.at]...)
		out = append(out, rp.lead(moves)...)
		out = append(out, rp.pass...)
		next = rp.at
	}
	return append(out, moves[next:]...)
}

// maxWindowIn returns the largest 1 mm moving average of ae/D (as engage's
// MaxEng takes it, or MaxEngFull when full is set) over the cutting samples
// of res whose moves lie in [m0, m1].
func maxWindowIn(res *engage.Result, d float64, m0, m1 int, full bool) float64 {
	best := 0.0
	movingAverages(res.Profile, d, func(_, k int, avg, l float64) {
		if m := res.Profile[k].Move; (l >= 1-1e-9 || !full) && m >= m0 && m <= m1 {
			best = math.Max(best, avg)
		}
	})
	return best
}

// movingAverages calls fn for every cutting sample k of prof with the 1 mm
// moving average of ae/D that ends at it, as engage's MaxEng takes it: over
// the consecutive cutting samples lo..k, trailing, at most 1 mm long (l, mm)
// and shorter at the start of a run.
func movingAverages(prof []engage.Sample, d float64, fn func(lo, k int, avg, l float64)) {
	run, lo := false, 0
	sum, l := 0.0, 0.0
	for k, p := range prof {
		if p.Class != engage.Cut {
			run = false
			continue
		}
		if !run {
			run, lo, sum, l = true, k, 0, 0
		}
		sum += p.Step * p.AE / d
		l += p.Step
		for lo < k && l-prof[lo].Step >= 1-1e-9 {
			sum -= prof[lo].Step * prof[lo].AE / d
			l -= prof[lo].Step
			lo++
		}
		if l > 0 {
			fn(lo, k, sum/l, l)
		}
	}
}

// extraPassShares are the offsets an extra pass is tried at, as shares of
// the stretch's peak ae: the material of an overload may be a strip beside
// the pass (half the peak splits it evenly) or a wedge it runs into at an
// angle, whose width across the pass is much less than the ae its chord
// reads.
var extraPassShares = [...]float64{0.12, 0.25, 0.4, 0.55, 0.7}

// relieve finds the stretches of feature fi's simulation res (its moves
// from start, simulated on a copy of before) that exceed the repair limit
// and, in path order on a copy of before, tries an extra pass before each
// at every offset of extraPassShares (up to the band maximum). Of the
// offsets that bring the stretch under the limit it keeps the one that
// cuts least outside the in-band range; if none does, the one that lowers
// the stretch's largest window most, if any. The repaired path is
// simulated as it is built, piece by piece, and its profile put together;
// where it gouges deeper or reads a higher maximum than res, the repair is
// given up. It returns the repaired moves, their simulation and the number
// of extra passes, or n 0 (and leaves the simulator's material as res left
// it); again reports whether a stretch was relieved but not brought under
// the limit, which another round may finish.
func (s *bandedSim) relieve(ctx context.Context, fi int, start geom.Point3, moves []geom.Move, before *engage.Material, res *engage.Result) (repaired []geom.Move, rres *engage.Result, n int, again bool, err error) {
	d := s.tool.Diameter
	limit := s.band[1] + 0.03 - extraPassMargin
	hs := hotStretches(res, d, limit)
	if len(hs) == 0 {
		return nil, nil, 0, false, nil
	}
	allowed, err := s.allowed(fi)
	if err != nil {
		return nil, nil, 0, false, err
	}
	from := func(i int) geom.Point3 {
		if i == 0 {
			return start
		}
		return moves[i-1].To
	}
	opt := engage.SimOptions{Band: s.band, SpindleRPM: s.job.Cut.SpindleRPM, Keep: s.keep}
	sim := func(m *engage.Material, at geom.Point3, mv []geom.Move) (*engage.Result, error) {
		if len(mv) == 0 {
			return &engage.Result{}, nil
		}
		return engage.Simulate(ctx, m, s.tool, &geom.Toolpath{Start: at, Moves: mv}, opt)
	}
	// m holds the material as the repaired path nm leaves it at cur, the
	// start of move next or a point on it; prof is nm's profile, gouge its
	// deepest gouge and vol the volume it removed.
	m := before.Clone()
	next, cur, lastS := 0, start, math.Inf(-1)
	var nm []geom.Move
	var prof []engage.Sample
	gouge, vol := 0.0, 0.0
	lay := func(at geom.Point3, mv []geom.Move) error {
		r, err := sim(m, at, mv)
		if err != nil {
			return err
		}
		s0 := 0.0
		if k := len(prof); k > 0 {
			s0 = prof[k-1].S
		}
		for _, p := range r.Profile {
			p.Move += len(nm)
			p.S += s0
			prof = append(prof, p)
		}
		gouge = math.Max(gouge, r.Summary.MaxGouge)
		vol += r.Summary.Volume
		nm = append(nm, mv...)
		return nil
	}
	for _, h := range hs {
		if h.s0-extraPassLead <= lastS {
			continue
		}
		// The pass splits the material in two thinner cuts: of the
		// offsets that hold the limit, the one that keeps most of both
		// in the band.
		var best extraRepair
		bestWin, bestOut := h.maxWin-0.002, math.Inf(1)
		path, ok := extraPassOn(moves, start, h)
		if !ok || path.at < next {
			continue
		}
		at := path.at
		for _, f := range extraPassShares {
			pass, ok := path.pass(h.side, math.Min(f*h.peakAE, s.band[1]*d), allowed)
			if !ok {
				break
			}
			rp := extraRepair{at: at, a: path.a, split: path.split, pass: pass}
			if at > next {
				if err := lay(cur, moves[next:at]); err != nil {
					return nil, nil, 0, false, err
				}
				next, cur = at, from(at)
			}
			trial := append(append(rp.lead(moves), pass...), moves[at:h.m1+1]...)
			undo := m.Save(pathBounds(cur, trial), 0.5*d+m.BandWidth()+m.CellSize())
			rt, err := engage.Simulate(ctx, m, s.tool, &geom.Toolpath{Start: cur, Moves: trial}, engage.SimOptions{Band: s.band})
			m.Restore(undo)
			if err != nil {
				return nil, nil, 0, false, err
			}
			w, oob := maxWindowIn(rt, d, 0, len(trial), false), outOfBand(rt, d, s.band)
			// Under the limit over full windows: a window at the start of
			// a run (where the pass first meets the material from the
			// air) may stay above it if it is lowered.
			under := maxWindowIn(rt, d, 0, len(trial), true) <= limit && w < h.maxWin
			switch {
			case under && (bestWin > limit || oob < bestOut), !under && bestWin > limit && w < bestWin:
				best, bestWin, bestOut = rp, w, oob
			}
		}
		if best.pass == nil {
			continue
		}
		if err := lay(cur, append(best.lead(moves), best.pass...)); err != nil {
			return nil, nil, 0, false, err
		}
		n++
		again = again || bestWin > limit
		cur, lastS = best.a, h.s1
	}
	if n == 0 {
		return nil, nil, 0, false, nil
	}
	if err := lay(cur, moves[next:]); err != nil {
		return nil, nil, 0, false, err
	}
	rres = &engage.Result{Profile: prof}
	rres.Summary.MaxGouge, rres.Summary.Volume = gouge, vol
	movingAverages(prof, d, func(_, _ int, avg, l float64) {
		rres.Summary.MaxEng = math.Max(rres.Summary.MaxEng, avg)
		if l >= 1-1e-9 {
			rres.Summary.MaxEngFull = math.Max(rres.Summary.MaxEngFull, avg)
		}
	})
	if sr, so := rres.Summary, res.Summary; sr.MaxGouge > so.MaxGouge+1e-6 || sr.MaxEng > so.MaxEng+1e-9 || sr.MaxEngFull > so.MaxEngFull+1e-9 {
		return nil, nil, 0, false, nil
	}
	s.m = m
	return nm, rres, n, again, nil
}

// bandedInsertRepairs puts the repaired moves of each feature (nil where
// it has none) into the plan's path, shifting the features' and the
// operations' indices, and counts the extra passes.
func bandedInsertRepairs(plan *Plan, repaired [][]geom.Move, extra []int) {
	changed := false
	for _, m := range repaired {
		changed = changed || m != nil
	}
	if !changed {
		return
	}
	old := plan.Path.Moves
	out := make([]geom.Move, 0, len(old))
	// newIndex maps the old index of a feature's first move to the new.
	newIndex := map[int]int{}
	next := 0
	for fi := range plan.Features {
		fs := &plan.Features[fi]
		out = append(out, old[next:fs.First]...)
		newIndex[fs.First] = len(out)
		first := len(out)
		if fi < len(repaired) && repaired[fi] != nil {
			out = append(out, repaired[fi]...)
			fs.ExtraPasses = extra[fi]
		} else {
			out = append(out, old[fs.First:fs.End]...)
		}
		next = fs.End
		fs.First, fs.End = first, len(out)
	}
	newIndex[next] = len(out)
	out = append(out, old[next:]...)
	for i := range plan.Path.Ops {
		if k, ok := newIndex[plan.Path.Ops[i].First]; ok {
			plan.Path.Ops[i].First = k
		}
	}
	plan.Path.Moves = out
}

// outOfBand returns the cutting length of res with ae/D outside the
// in-band range [0.8·band min, 1.1·band max] (the in-band share).
func outOfBand(res *engage.Result, d float64, band [2]float64) float64 {
	l := 0.0
	for _, p := range res.Profile {
		if a := p.AE / d; p.Class == engage.Cut && (a < 0.8*band[0] || a > 1.1*band[1]) {
			l += p.Step
		}
	}
	return l
}

// allowed returns whether a tool-centre point lies in feature fi's domain
// (bandedDomain: the free space the planner's passes keep to, walls of
// other features' floors included) or within 1 µm of its boundary, and
// clear of keep by the tool radius.
func (s *bandedSim) allowed(fi int) (func(geom.Point) bool, error) {
	if s.domains == nil {
		s.domains = map[int]geom.Shape{}
	}
	dom, ok := s.domains[fi]
	if !ok {
		st, err := bandedSetup(s.job, BandedOptions{})
		if err != nil {
			return nil, err
		}
		comps, _, err := bandedDomain(s.job, s.job.Features[fi], st, DefaultTolerance)
		if err != nil {
			return nil, err
		}
		for _, c := range comps {
			dom = append(dom, c.c...)
		}
		s.domains[fi] = dom
	}
	r := 0.5 * s.tool.Diameter
	return func(q geom.Point) bool {
		if !dom.Contains(q) && dom.DistanceToBoundary(q) > 1e-3 {
			return false
		}
		return s.keep == nil || !s.keep.Contains(q) && s.keep.DistanceToBoundary(q) >= r-1e-6
	}, nil
}

// bandedVerified is the verification of one feature: its moves with the
// extra passes (nil where there are none) and how many, and, from the
// simulation of those moves, the worst chips the feed repair holds and the
// slotting to warn of.
type bandedVerified struct {
	moves []geom.Move
	extra int
	worst map[int]float64
	slot  bandedSlotting
}

// verify simulates feature fi's moves (from start) on the material the
// features before it left, relieves them with extra passes in up to
// extraPassRounds rounds (where one pass leaves a stretch above the limit,
// a strip twice the step, the next round relieves what is left) and
// leaves the material as the repaired moves do.
func (s *bandedSim) verify(ctx context.Context, fi int, start geom.Point3, moves []geom.Move) (bandedVerified, error) {
	var v bandedVerified
	before := s.m.Clone()
	res, err := s.feature(ctx, fi, start, moves, false)
	if err != nil {
		return v, err
	}
	for range extraPassRounds {
		nm, rres, n, again, err := s.relieve(ctx, fi, start, moves, before, res)
		if err != nil {
			return v, err
		}
		if n > 0 {
			moves, res = nm, rres
			v.moves, v.extra = nm, v.extra+n
		}
		if !again {
			break
		}
	}
	v.worst = bandedWorstChips(s.job, res)
	v.slot = bandedFindSlotting(s.job, res)
	return v, nil
}

// pathBounds returns the XY bounds of the moves from start, arcs by their
// whole circle.
func pathBounds(start geom.Point3, moves []geom.Move) geom.Rect {
	r := geom.Rect{Min: start.XY(), Max: start.XY()}
	from := start.XY()
	for _, mv := range moves {
		r = r.Extend(mv.To.XY())
		if mv.Arc {
			rad := from.Dist(mv.Center)
			r = r.Extend(geom.Pt(mv.Center.X-rad, mv.Center.Y-rad)).Extend(geom.Pt(mv.Center.X+rad, mv.Center.Y+rad))
		}
		from = mv.To.XY()
	}
	return r
}
