package pathplan

import (
	"context"
	"fmt"
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
//
// The feature is simulated once, in chunks of extraChunk along its path,
// with a Patch of the cells under each (a trail). The stretches are then
// tried from the last to the first, the material taken back along the
// trail to each; because an extra pass leaves the material its stretch
// would have, the trials need no pass before them, and the repaired
// path's simulation is put together from the feature's and the trials'.

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
// limit. On the test jobs the second round took the comb pocket's 1 mm
// maximum over full windows from 0.170 to 0.138 and the sign job's from
// 0.147 to 0.135, the third the sign job's to 0.123 (a strip along a
// rounded corner twice the step, relieved pass by pass); a fourth changes
// nothing.
const extraPassRounds = 3

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

// lead returns the moves that take the tool from the start of move p.at
// to the pass's point a: the first part of the move a splits, or nothing.
func (p extraPassPath) lead(moves []geom.Move) []geom.Move {
	if !p.split {
		return nil
	}
	mv := moves[p.at]
	mv.To = p.a
	return []geom.Move{mv}
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
// reads. The smallest, 6 %, was added for the comb pocket's run starts
// after a turn (1 mm maximum 0.206 → 0.156); eleven shares from 6 to 85 %
// gave the same there but lost the sign job's third round (0.123 →
// 0.159).
var extraPassShares = [...]float64{0.06, 0.12, 0.25, 0.4, 0.55, 0.7}

// extraChunk is the length of path, mm, the verification lays on the
// material at a time, keeping a Patch of the cells under each chunk so
// that it can take the material back to the start of any chunk.
const extraChunk = 10.0

// trail is a feature's moves as laid on the material in chunks: the first
// move of each chunk (and, last, the number of moves) and the cells the
// chunk changed, as they were before it (restored last first). Where the
// memory budget does not hold the patches of every chunk, the first
// chunks have none, and before holds the material as it was before the
// feature.
type trail struct {
	first   []int
	patches [][]engage.Patch
	before  *engage.Material
}

// extraTrailBudget is the memory, bytes, the patches of one feature's
// trail may hold: about 6 kB per mm of path (a 10 mm chunk's bounds,
// grown by the tool radius and the distance band, at 0.2 mm cells), so
// 256 MB hold some 40 m of path; the sign job's recess needs 124 MB.
// Stretches before the patches are tried on a copy of before, the path
// laid forward to each.
const extraTrailBudget = 256 << 20

// after returns the trail of the moves repaired by kept (spliceRepairs):
// the chunks start at the same moves, those that start inside a relieved
// stretch joined to the chunk before.
func (tr trail) after(kept []extraCandidate) trail {
	out := trail{before: tr.before}
	k, shift := 0, 0
	for c, f := range tr.first {
		for k < len(kept) && kept[k].m1 < f {
			shift += len(kept[k].moves) - (kept[k].m1 + 1 - kept[k].at)
			k++
		}
		if k < len(kept) && kept[k].at < f && c > 0 && c < len(tr.first)-1 {
			// A chunk without patches makes the joined chunk one.
			if n := len(out.patches) - 1; out.patches[n] != nil {
				out.patches[n] = append(out.patches[n], tr.patches[c]...)
				if tr.patches[c] == nil {
					out.patches[n] = nil
				}
			}
			continue
		}
		out.first = append(out.first, f+shift)
		if c < len(tr.patches) {
			var ps []engage.Patch
			if tr.patches[c] != nil {
				ps = append([]engage.Patch(nil), tr.patches[c]...)
			}
			out.patches = append(out.patches, ps)
		}
	}
	return out
}

// simOptions are the simulation options of the verification: the band,
// the spindle speed (for the chips the feed repair holds) and keep.
func (s *bandedSim) simOptions() engage.SimOptions {
	return engage.SimOptions{Band: s.band, SpindleRPM: s.job.Cut.SpindleRPM, Keep: s.keep}
}

// patchPad is the margin, mm, around a path's bounds that a Patch of the
// material must cover to hold all a cut along the path changes.
func (s *bandedSim) patchPad(m *engage.Material) float64 {
	return 0.5*s.tool.Diameter + m.BandWidth() + m.CellSize()
}

// layTrail simulates feature fi's moves, from start, on the material the
// features before it left, chunk by chunk, and returns the simulation
// (one profile, moves numbered in the feature, its maxima as engage's
// MaxEng and MaxEngFull take them) and the trail to go back along.
func (s *bandedSim) layTrail(ctx context.Context, fi int, start geom.Point3, moves []geom.Move) (*engage.Result, trail, error) {
	var tr trail
	pad := s.patchPad(s.m)
	// The chunks, and the first whose patch the budget holds, counting
	// from the last.
	type span struct {
		i, j int
		at   geom.Point3
	}
	var spans []span
	for i, at := 0, start; i < len(moves); {
		j, l := i, 0.0
		for from := at; j < len(moves) && (j == i || l < extraChunk); j++ {
			l += geom.MoveLength(from, moves[j])
			from = moves[j].To
		}
		spans = append(spans, span{i, j, at})
		at, i = moves[j-1].To, j
	}
	keep, bytes := len(spans), 0
	for keep > 0 {
		sp := spans[keep-1]
		if bytes += s.m.SaveBytes(pathBounds(sp.at, moves[sp.i:sp.j]), pad); bytes > s.trailBudget {
			break
		}
		keep--
	}
	if keep > 0 {
		tr.before = s.m.Clone()
	}
	chunks := make([]*engage.Result, 0, len(spans))
	samples := 0
	for c, sp := range spans {
		chunk := moves[sp.i:sp.j]
		tr.first = append(tr.first, sp.i)
		var undo []engage.Patch
		if c >= keep {
			undo = []engage.Patch{s.m.Save(pathBounds(sp.at, chunk), pad)}
		}
		tr.patches = append(tr.patches, undo)
		r, err := engage.Simulate(ctx, s.m, s.tool, &geom.Toolpath{Start: sp.at, Moves: chunk}, s.simOptions())
		if err != nil {
			return nil, tr, fmt.Errorf("simulate feature %q: %w", s.job.Features[fi].Name, err)
		}
		chunks = append(chunks, r)
		samples += len(r.Profile)
	}
	tr.first = append(tr.first, len(moves))
	res := &engage.Result{Profile: make([]engage.Sample, 0, samples)}
	for k, r := range chunks {
		appendProfile(res, r.Profile, r.Summary, tr.first[k])
	}
	summarizeWindows(res, s.tool.Diameter)
	return res, tr, nil
}

// appendProfile appends prof, the profile of a simulation of moves
// numbered from base on, to res, its arc lengths carried on from res's
// last sample, and adds the gouge and volume of sum, the simulation's
// summary, to res's.
func appendProfile(res *engage.Result, prof []engage.Sample, sum engage.Summary, base int) {
	s0 := 0.0
	if k := len(res.Profile); k > 0 {
		s0 = res.Profile[k-1].S
	}
	for _, p := range prof {
		p.Move += base
		p.S += s0
		res.Profile = append(res.Profile, p)
	}
	res.Summary.MaxGouge = math.Max(res.Summary.MaxGouge, sum.MaxGouge)
	res.Summary.Volume += sum.Volume
}

// summarizeWindows sets res's MaxEng and MaxEngFull from its profile.
func summarizeWindows(res *engage.Result, d float64) {
	res.Summary.MaxEng, res.Summary.MaxEngFull = 0, 0
	movingAverages(res.Profile, d, func(_, _ int, avg, l float64) {
		res.Summary.MaxEng = math.Max(res.Summary.MaxEng, avg)
		if l >= 1-1e-9 {
			res.Summary.MaxEngFull = math.Max(res.Summary.MaxEngFull, avg)
		}
	})
}

// extraCandidate is a stretch relieved: the moves at..m1 of the path
// (the stretch and the lead before it) replaced by moves, the extra pass
// included, with their simulation res and largest window win, and the
// stretch's arc lengths.
type extraCandidate struct {
	at, m1 int
	s0, s1 float64
	moves  []geom.Move
	res    *engage.Result
	win    float64
	n      int
	split  bool // the lead splits move at: moves starts with its first part
}

// joinRepairs returns the repairs prev and next, next's lead starting on
// prev's last move (move next.at of moves, which starts at at0), as one:
// prev up to that move, then next from where prev left the move. ok is
// false when next's lead does not split the move.
func joinRepairs(moves []geom.Move, at0 geom.Point3, prev, next extraCandidate) (extraCandidate, bool) {
	if !next.split {
		return prev, false
	}
	last := len(prev.moves) - 1
	p0 := at0
	if last > 0 {
		p0 = prev.moves[last-1].To
	}
	// l0: the length of move next.at before p0, where next's profile
	// takes over from prev's.
	mv := moves[next.at]
	mv.To = p0
	l0 := geom.MoveLength(at0, mv)
	if l0 >= geom.MoveLength(at0, next.moves[0])-1e-9 {
		return prev, false
	}
	j := prev
	j.m1, j.s1, j.n, j.win = next.m1, next.s1, prev.n+next.n, math.Max(prev.win, next.win)
	j.moves = append(append([]geom.Move(nil), prev.moves[:last]...), next.moves...)
	j.res = &engage.Result{Summary: prev.res.Summary}
	for _, p := range prev.res.Profile {
		if p.Move < last {
			j.res.Profile = append(j.res.Profile, p)
		}
	}
	s0 := 0.0
	if k := len(j.res.Profile); k > 0 {
		s0 = j.res.Profile[k-1].S
	}
	for _, p := range next.res.Profile {
		if p.Move == 0 && p.S < l0 {
			continue
		}
		p.Move += last
		p.S += s0 - l0
		j.res.Profile = append(j.res.Profile, p)
	}
	j.res.Summary.MaxGouge = math.Max(j.res.Summary.MaxGouge, next.res.Summary.MaxGouge)
	return j, true
}

// relieve finds the stretches of the simulation res of moves (from start)
// that exceed the repair limit and tries an extra pass before each at
// every offset of extraPassShares (up to the band maximum). Of the
// offsets that bring the stretch under the limit it keeps the one that
// cuts least outside the in-band range; if none does, the one that lowers
// the stretch's largest window most, if any. A pass that gouges deeper
// than res is not taken.
//
// The simulator's material is as moves leave it, and tr the trail they
// were laid along. relieve goes back along it on a copy, stretch by
// stretch from the last, and tries each stretch on the material the path
// leaves before it: the passes before a stretch only cut what their own
// stretches would have, earlier, so they leave the material it meets as
// it was. Stretches before the trail's patches (where its budget ran out)
// are tried forward, on a copy of the material before the feature.
//
// It returns the repaired moves and their simulation, spliced from res and
// the relieved stretches', the stretches kept, and whether one of them is
// still above the limit, which another round may relieve (a strip twice
// the step needs two passes); none where no stretch is relieved, or where
// the repaired path reads a higher maximum than res.
func (s *bandedSim) relieve(ctx context.Context, fi int, start geom.Point3, moves []geom.Move, res *engage.Result, tr trail) (repaired []geom.Move, rres *engage.Result, kept []extraCandidate, again bool, err error) {
	d := s.tool.Diameter
	limit := s.band[1] + 0.03 - extraPassMargin
	hs := hotStretches(res, d, limit)
	if len(hs) == 0 {
		return nil, nil, nil, false, nil
	}
	allowed, err := s.allowed(fi)
	if err != nil {
		return nil, nil, nil, false, err
	}
	from := func(i int) geom.Point3 {
		if i == 0 {
			return start
		}
		return moves[i-1].To
	}
	m := s.m.Clone()
	opt, pad := s.simOptions(), s.patchPad(m)
	// try returns stretch h relieved, its pass laid along path from cur on
	// m, which holds the material the path leaves there.
	try := func(h hotStretch, path extraPassPath, cur geom.Point3) (extraCandidate, error) {
		at := path.at
		best := extraCandidate{at: at, m1: h.m1, s0: h.s0, s1: h.s1, win: h.maxWin - 0.002, n: 1, split: path.split}
		bestOut := math.Inf(1)
		for _, f := range extraPassShares {
			pass, ok := path.pass(h.side, math.Min(f*h.peakAE, s.band[1]*d), allowed)
			if !ok {
				break
			}
			trial := append(append(path.lead(moves), pass...), moves[at:h.m1+1]...)
			undo := m.Save(pathBounds(cur, trial), pad)
			rt, err := engage.Simulate(ctx, m, s.tool, &geom.Toolpath{Start: cur, Moves: trial}, opt)
			m.Restore(undo)
			if err != nil {
				return best, err
			}
			if rt.Summary.MaxGouge > res.Summary.MaxGouge+1e-6 {
				continue
			}
			summarizeWindows(rt, d)
			w, oob := rt.Summary.MaxEng, outOfBand(rt, d, s.band)
			// Under the limit over full windows: a window at the start of
			// a run (where the pass first meets the material from the
			// air) may stay above it if it is lowered.
			under := rt.Summary.MaxEngFull <= limit && w < h.maxWin
			switch {
			case under && (best.win > limit || oob < bestOut), !under && best.win > limit && w < best.win:
				best.moves, best.res, best.win, bestOut = trial, rt, w, oob
			}
		}
		return best, nil
	}
	// lay simulates moves i..j-1 on m, for the material only.
	lay := func(i, j int) error {
		if j <= i {
			return nil
		}
		_, err := engage.Simulate(ctx, m, s.tool, &geom.Toolpath{Start: from(i), Moves: moves[i:j]}, engage.SimOptions{Band: s.band})
		return err
	}
	c := len(tr.first) - 1 // m holds the chunks before c
	var cands []extraCandidate
	k := len(hs) - 1
	for ; k >= 0; k-- {
		h := hs[k]
		path, ok := extraPassOn(moves, start, h)
		if !ok {
			continue
		}
		at := path.at
		// Back to the start of the chunk that holds move at, then on to
		// the move.
		for c > 0 && tr.first[c] > at && tr.patches[c-1] != nil {
			c--
			for i := len(tr.patches[c]) - 1; i >= 0; i-- {
				m.Restore(tr.patches[c][i])
			}
		}
		if tr.first[c] > at {
			break // before the patches: forward, below
		}
		var partial engage.Patch
		if at > tr.first[c] {
			partial = m.Save(pathBounds(from(tr.first[c]), moves[tr.first[c]:at]), pad)
			if err := lay(tr.first[c], at); err != nil {
				return nil, nil, nil, false, err
			}
		}
		cd, err := try(h, path, from(at))
		if err != nil {
			return nil, nil, nil, false, err
		}
		if cd.moves != nil {
			cands = append(cands, cd)
		}
		if at > tr.first[c] {
			m.Restore(partial)
		}
	}
	if k >= 0 {
		// The stretches 0..k, before the trail's patches: forward from
		// the material before the feature.
		m = tr.before.Clone()
		var fwd []extraCandidate
		next := 0
		for _, h := range hs[:k+1] {
			path, ok := extraPassOn(moves, start, h)
			if !ok || path.at < next {
				continue
			}
			if err := lay(next, path.at); err != nil {
				return nil, nil, nil, false, err
			}
			next = path.at
			cd, err := try(h, path, from(path.at))
			if err != nil {
				return nil, nil, nil, false, err
			}
			if cd.moves != nil {
				fwd = append(fwd, cd)
			}
		}
		for i := len(fwd) - 1; i >= 0; i-- {
			cands = append(cands, fwd[i])
		}
	}
	// In path order, each stretch clear of the one before; a stretch
	// whose lead starts on the last move of the one before (a long move
	// holding the end of one and the start of the next) shares it.
	lastS, lastM := math.Inf(-1), -1
	for i := len(cands) - 1; i >= 0; i-- {
		cd := cands[i]
		if cd.s0-extraPassLead <= lastS || cd.at < lastM {
			continue
		}
		if cd.at == lastM {
			prev := &kept[len(kept)-1]
			joined, ok := joinRepairs(moves, from(cd.at), *prev, cd)
			if !ok {
				continue
			}
			*prev = joined
		} else {
			kept = append(kept, cd)
		}
		lastS, lastM = cd.s1, cd.m1
	}
	if len(kept) == 0 {
		return nil, nil, nil, false, nil
	}
	repaired, rres = spliceRepairs(moves, res, kept)
	summarizeWindows(rres, d)
	if sr, so := rres.Summary, res.Summary; sr.MaxEng > so.MaxEng+1e-9 || sr.MaxEngFull > so.MaxEngFull+1e-9 {
		return nil, nil, nil, false, nil
	}
	for _, cd := range kept {
		again = again || cd.win > limit
	}
	return repaired, rres, kept, again, nil
}

// spliceRepairs returns moves with the stretches of kept (in path order,
// apart) replaced, and the simulation res of moves with the samples of
// those stretches replaced by theirs.
func spliceRepairs(moves []geom.Move, res *engage.Result, kept []extraCandidate) ([]geom.Move, *engage.Result) {
	nm, ns := len(moves), len(res.Profile)
	for _, cd := range kept {
		nm += len(cd.moves) - (cd.m1 + 1 - cd.at)
		ns += len(cd.res.Profile)
	}
	out := make([]geom.Move, 0, nm)
	rres := &engage.Result{Profile: make([]engage.Sample, 0, ns)}
	// k runs over res's samples; shift is the arc length the stretches
	// replaced so far add.
	k, next, shift := 0, 0, 0.0
	original := func(end int) {
		for ; k < len(res.Profile) && res.Profile[k].Move < end; k++ {
			p := res.Profile[k]
			p.Move += len(out) - next
			p.S += shift
			rres.Profile = append(rres.Profile, p)
		}
		out = append(out, moves[next:end]...)
	}
	for _, cd := range kept {
		original(cd.at)
		s0 := 0.0
		if k > 0 {
			s0 = res.Profile[k-1].S
		}
		for k < len(res.Profile) && res.Profile[k].Move <= cd.m1 {
			k++
		}
		s1 := s0
		if k > 0 {
			s1 = res.Profile[k-1].S
		}
		appendProfile(rres, cd.res.Profile, cd.res.Summary, len(out))
		out = append(out, cd.moves...)
		next = cd.m1 + 1
		if n := len(rres.Profile); n > 0 {
			shift = rres.Profile[n-1].S - s1
		}
	}
	original(len(moves))
	rres.Summary.MaxGouge = math.Max(rres.Summary.MaxGouge, res.Summary.MaxGouge)
	rres.Summary.Volume = res.Summary.Volume
	return out, rres
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
// extra passes (nil where there are none) and how many, their simulation,
// and from it the worst chips the feed repair holds and the slotting to
// warn of.
type bandedVerified struct {
	moves []geom.Move
	extra int
	res   *engage.Result
	worst map[int]float64
	slot  bandedSlotting
}

// verify simulates feature fi's moves (from start) on the material the
// features before it left and relieves them with extra passes. The
// material is left as the moves leave it, which is also how the repaired
// moves leave it: an extra pass cuts only what its stretch would have.
func (s *bandedSim) verify(ctx context.Context, fi int, start geom.Point3, moves []geom.Move) (bandedVerified, error) {
	var v bandedVerified
	res, tr, err := s.layTrail(ctx, fi, start, moves)
	if err != nil {
		return v, err
	}
	for range extraPassRounds {
		nm, rres, kept, again, err := s.relieve(ctx, fi, start, moves, res, tr)
		if err != nil {
			return v, err
		}
		if kept == nil {
			break
		}
		for _, cd := range kept {
			v.extra += cd.n
		}
		tr = tr.after(kept)
		moves, res, v.moves = nm, rres, nm
		if !again {
			break
		}
	}
	v.res = res
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
