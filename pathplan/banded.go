package pathplan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
)

// BandedOptions tune the banded strategy. The zero value is fine.
type BandedOptions struct {
	// Options are the options shared with the layered strategy.
	Options
	// Target is the radial engagement ae/D the passes aim at; zero means
	// the middle of the job's band.
	Target float64
	// GridStep is the node spacing of the front raster, mm; zero picks
	// about a third of the target radial width.
	GridStep float64
	// NoVerify skips the simulation and repair of the finished path. The
	// repair first cuts an extra pass ahead of each stretch whose
	// simulated engagement, as a 1 mm moving average, comes near the band
	// maximum + 0.03 (FeatureSummary.ExtraPasses counts them); then, as
	// the last resort, it lowers the feed of every move on which the
	// simulated chip is thicker than the chip load, and Plan.Warnings and
	// the feature summaries name what was slowed. It runs when the job
	// gives the chip load, the spindle speed and the flutes. Smaller steps
	// are not built.
	NoVerify bool
	// ClimbOnly keeps every pass in climb milling; by default a pass that
	// runs from wall to wall may be cut either way, whichever end is nearer,
	// which saves the return through cut material.
	ClimbOnly bool
	// SquareIslands leaves the ends of passes that meet an island of a
	// pocket as they come, where by default they lean onto it, as onto
	// outer walls, so that they meet it at 45° or less. A pass that ends
	// square to an island beside the round end of the pass before reads
	// over 90° of engaged arc on the crescent between the two ends, and
	// where a front ends beyond the pass before, the drift onto it runs
	// through uncut material in full slotting (demo boss pocket: ae/D over
	// 0.9 over 8 mm at its full 8 mm depth). Square ends save time, since
	// leaned ones make the fronts wind about the island: demo boss pocket
	// cycle 227 -> 182 s on the demo router, above-band share 0.007 ->
	// 0.028.
	SquareIslands bool
	// DirectTurns steps straight from the end of a pass at a wall to the
	// start of the next pass beside it. By default the tool goes back
	// along the pass just cut and drifts over onto the next one, so that
	// it never meets the next slab head-on; that costs two more stops at
	// every wall. Direct turns are faster where passes are short (a deep
	// through slot on the demo router: 242 → 160 s, then faster than
	// layered), but every pass end meets its slab head-on: the share
	// above the band rises (closed test pocket 0.009 → 0.015) and the
	// 1 mm moving average spikes at pass ends (demo deep step 0.12 →
	// 0.18). Off by default.
	DirectTurns bool
	// SquareCorners leaves the inside corners of the last pass along the
	// walls as they come, sharp or rounded little wider than the tool.
	// By default that pass rounds each corner
	// with a fillet of about 1.5 tool radii and clears what the fillet
	// leaves with a fan of smaller fillets, so that it never meets the
	// strip along the next wall head-on: square corners read ae/D 0.4 to
	// 0.6 as a 1 mm moving average (closed test pocket 0.63, fanned
	// 0.11), and cost less time (closed test pocket 118 against 126 s on
	// the demo router).
	SquareCorners bool
}

// DefaultBand is the radial engagement band used when the job gives none:
// 5–10 % of the diameter (common practice, no source).
var defaultBand = [2]float64{0.05, 0.10}

// bandedSettings are the derived cut data of one banded plan.
type bandedSettings struct {
	r, target, phi float64
	phiMax         float64 // engagement angle of 1.1 × the band maximum (top of the in-band range), radians
	feed, entry    float64 // cutting and entry feeds, mm/min
	helixR         float64 // helix centre-path radius, mm
	ramp           float64 // ramp angle, radians
	minR           float64 // smallest path radius, mm
	h              float64 // grid spacing, mm
	safe           float64 // height above a level's top at which rapids stop, mm
	climbOnly      bool
	directTurns    bool
	leanIslands    bool
	squareCorners  bool
	// pitches caches trochoidHeldPitch at the knots of trochoidPitchAt for
	// the whole plan, shared by the features planned in parallel.
	pitches *pitchCache
}

// pitchCache holds trochoid pitches by key; safe for concurrent use. Its
// values depend on the key alone, so the order in which goroutines fill it
// does not change a plan.
type pitchCache struct {
	mu sync.Mutex
	m  map[int]float64
}

// get returns the pitch of key, computing it with f the first time.
func (c *pitchCache) get(key int, f func() float64) float64 {
	c.mu.Lock()
	v, ok := c.m[key]
	c.mu.Unlock()
	if ok {
		return v
	}
	v = f()
	c.mu.Lock()
	c.m[key] = v
	c.mu.Unlock()
	return v
}

// bandedSetup derives the banded cut data from the job.
func bandedSetup(job *Job, opt BandedOptions) (bandedSettings, error) {
	var s bandedSettings
	d := job.Tool.Diameter
	if !(d > 0) {
		return s, errors.New("banded: tool diameter must be positive")
	}
	s.r = d / 2
	band := job.Cut.Band
	if band[1] <= 0 {
		band = defaultBand
	}
	s.target = opt.Target
	if s.target <= 0 {
		s.target = (band[0] + band[1]) / 2
	}
	if s.target > 0.5 {
		return s, fmt.Errorf("banded: target engagement %.3g·D is beyond half the diameter", s.target)
	}
	s.phi = bandedPhiOf(s.target)
	s.phiMax = math.Max(s.phi, bandedPhiOf(1.1*band[1]))
	base := job.Feed()
	s.feed = base * bandedChipThinning(s.phi)
	s.entry = base
	if m := job.Machine; m != nil {
		cap := math.Min(m.MaxFeed.X, m.MaxFeed.Y)
		if cap > 0 {
			s.feed = math.Min(s.feed, cap)
			s.entry = math.Min(s.entry, cap)
		}
	}
	s.helixR = job.Cut.HelixDiameter / 2
	if s.helixR <= 0 {
		s.helixR = 0.5 * s.r // common practice, no source
	}
	ramp := job.Cut.RampAngle
	if ramp <= 0 {
		ramp = DefaultRampAngle
	}
	s.ramp = ramp * math.Pi / 180
	s.minR = job.Cut.MinPathRadius
	if s.minR <= 0 {
		s.minR = 0.1 * d
	}
	s.h = opt.GridStep
	if s.h <= 0 {
		s.h = math.Max(0.05, math.Min(1, s.target*d/2.5))
	}
	s.safe = 1
	s.climbOnly = opt.ClimbOnly
	s.directTurns = opt.DirectTurns
	s.leanIslands = !opt.SquareIslands
	s.squareCorners = opt.SquareCorners
	s.pitches = &pitchCache{m: map[int]float64{}}
	return s, nil
}

// PlanBanded plans the banded strategy for every feature of the job: full
// flute-length levels, a helix at the deepest point of closed domains or a
// start in the air for open ones, fronts grown outward from there at the
// target engagement, trochoidal clearing where the fronts cannot hold it,
// links through cut material and a last pass along the walls. Fronts grow
// depth first, so the tool follows one side of a split front to its end;
// at a wall the tool turns onto the next pass by ramping along the pass
// beside it. Fronts are contours of the distance to the material left so
// far (see bandedStock). The finished path is simulated with engage;
// where the engagement rises above the band an extra pass is cut ahead of
// the stretch, where it still leaves the band the feed is lowered to hold
// the chip load, and full slotting is named in Plan.Warnings (see
// BandedOptions.NoVerify); BandedReport measures the path.
func PlanBanded(ctx context.Context, job *Job, opts BandedOptions) (*Plan, error) {
	// Later features are planned ahead, one goroutine per core, while
	// this one plans the first and then takes the rest in order (idle
	// most of the time); the verification, when it runs, takes a core of
	// its own. On one core everything is planned in order.
	n := runtime.GOMAXPROCS(0)
	workers := n
	if !opts.NoVerify && bandedRepairs(job) {
		workers = n - 1
	}
	if n < 2 {
		workers = 0
	}
	return planBanded(ctx, job, opts, workers)
}

// planBanded is PlanBanded with workers goroutines planning features
// ahead (see bandedAhead); 0 plans them in order.
func planBanded(ctx context.Context, job *Job, opts BandedOptions, workers int) (*Plan, error) {
	if job == nil {
		return nil, errors.New("banded: no job")
	}
	st, err := bandedSetup(job, opts)
	if err != nil {
		return nil, err
	}
	if err := checkPathBudget(job, "banded"); err != nil {
		return nil, err
	}
	fp := bandedParams(job, st, opts)
	plan := &Plan{Job: job, Strategy: "banded"}
	if opts.SquareIslands {
		plan.Options = append(plan.Options, "islands square")
	}
	if opts.SquareCorners {
		plan.Options = append(plan.Options, "corners square")
	}
	if opts.DirectTurns {
		plan.Options = append(plan.Options, "direct turns")
	}
	b := &builder{}
	b.path.Start = geom.Point3{X: 0, Y: 0, Z: fp.clear}
	b.pos = b.path.Start
	total := 0
	for _, f := range job.Features {
		total += len(bandedLevels(fp.top, f.Depth, job.Tool.FluteLength))
	}
	// The verification simulates each feature as it lands, while later
	// features are still being planned.
	var ver *bandedVerifier
	if !opts.NoVerify && bandedRepairs(job) {
		ver = startBandedVerifier(ctx, job)
	}
	done := 0
	err = bandedAhead(ctx, b, fp, workers, func(fi int, sum FeatureSummary) {
		plan.Features = append(plan.Features, sum)
		if ver != nil {
			start := b.path.Start
			if sum.First > 0 {
				start = b.path.Moves[sum.First-1].To
			}
			ver.add(fi, start, b.path.Moves[sum.First:sum.End])
		}
		for range sum.Levels {
			done++
			if opts.Progress != nil {
				opts.Progress(done, total)
			}
		}
	})
	var worst []map[int]float64
	if ver != nil {
		w, verr := ver.wait(err != nil)
		if err == nil && verr != nil {
			return nil, fmt.Errorf("banded: verify: %w", verr)
		}
		worst = w
	}
	if err != nil {
		return nil, err
	}
	plan.Path = b.path
	if ver != nil {
		bandedInsertRepairs(plan, ver.moves, ver.extra)
	}
	for i := range plan.Features {
		plan.Features[i].Length = opLength(&plan.Path, plan.Features[i].First, plan.Features[i].End)
	}
	for fi, w := range worst {
		bandedApplyRepair(plan, fi, w)
	}
	if ver != nil {
		for fi, sl := range ver.slots {
			if sl.length > 0 {
				plan.Warnings = append(plan.Warnings, fmt.Sprintf(
					"feature %q: the simulation finds full slotting (ae/D %.1f or more) over %.1f mm, at axial depths up to %.1f mm; the feed there is held to the chip load, but check chip evacuation and tool deflection",
					plan.Features[fi].Name, bandedSlotAeD, sl.length, sl.ap))
			}
		}
	}
	return plan, nil
}

// bandedVerifier simulates the features of a banded plan in order, on one
// goroutine, as they are handed to it, and keeps each feature's worst
// out-of-band chips for bandedApplyRepair. The simulation reads only the
// moves' geometry and their own feeds, and the repair changes only the
// feeds of the feature simulated, so this gives what simulating the
// finished plan would.
type bandedVerifier struct {
	in     chan bandedLanded
	cancel context.CancelFunc
	done   chan struct{}
	worst  []map[int]float64
	slots  []bandedSlotting
	// moves holds each feature's moves with the extra passes inserted
	// (nil where none was), extra how many.
	moves [][]geom.Move
	extra []int
	// aside counts the features verified on a clone of the material.
	aside int
	err   error
}

// bandedSlotting is where the simulation of one feature finds the tool
// slotting: cutting with ae/D of bandedSlotAeD or more.
type bandedSlotting struct {
	length float64 // cutting length, mm
	ap     float64 // deepest axial engagement there, mm
}

// bandedSlotAeD is the ae/D from which the banded verification warns of
// full slotting.
const bandedSlotAeD = 0.9

// bandedFindSlotting measures the slotting in one feature's simulation.
func bandedFindSlotting(job *Job, res *engage.Result) bandedSlotting {
	var sl bandedSlotting
	for _, smp := range res.Profile {
		if smp.Class == engage.Cut && smp.AE >= bandedSlotAeD*job.Tool.Diameter {
			sl.length += smp.Step
			sl.ap = math.Max(sl.ap, smp.AP)
		}
	}
	return sl
}

// bandedLanded is one feature handed to the verifier, its moves copied.
type bandedLanded struct {
	fi    int
	start geom.Point3
	moves []geom.Move
}

func startBandedVerifier(ctx context.Context, job *Job) *bandedVerifier {
	ctx, cancel := context.WithCancel(ctx)
	v := &bandedVerifier{
		in:     make(chan bandedLanded, len(job.Features)),
		cancel: cancel,
		done:   make(chan struct{}),
		worst:  make([]map[int]float64, len(job.Features)),
		slots:  make([]bandedSlotting, len(job.Features)),
		moves:  make([][]geom.Move, len(job.Features)),
		extra:  make([]int, len(job.Features)),
	}
	go func() {
		defer close(v.done)
		sim, err := newBandedSim(job)
		v.err = err
		record := func(fi int, fv bandedVerified, err error) {
			if err != nil {
				if v.err == nil {
					v.err = err
				}
				return
			}
			v.moves[fi], v.extra[fi], v.worst[fi], v.slots[fi] = fv.moves, fv.extra, fv.worst, fv.slot
		}
		// A feature whose reach meets none of the features before it is
		// verified on a clone of the material, beside the verifier (up
		// to a clone per core at a time), and its cells are copied back
		// before any later feature that meets it is verified, or at the
		// end (see bandedReach).
		var reach []geom.Rect
		var asides []*bandedAside
		land := func(a *bandedAside) {
			<-a.done
			if a.err == nil {
				sim.m.Restore(a.sim.m.Save(a.reach, 0))
			}
			record(a.fi, a.fv, a.err)
		}
		for l := range v.in {
			if v.err != nil {
				continue
			}
			box := bandedReach(job, l.fi, l.start, l.moves, sim.m.BandWidth())
			alone := true
			for _, r := range reach {
				if r.Overlaps(box) {
					alone = false
					break
				}
			}
			reach = append(reach, box)
			if alone && len(asides) < runtime.GOMAXPROCS(0) && l.fi+1 < len(job.Features) {
				a := &bandedAside{fi: l.fi, reach: box, sim: sim.fork(), done: make(chan struct{})}
				go func(l bandedLanded) {
					defer close(a.done)
					a.fv, a.err = a.sim.verify(ctx, l.fi, l.start, l.moves)
				}(l)
				asides = append(asides, a)
				v.aside++
				continue
			}
			// The features aside that this one meets land first.
			kept := asides[:0]
			for _, a := range asides {
				if a.reach.Overlaps(box) {
					land(a)
				} else {
					kept = append(kept, a)
				}
			}
			asides = kept
			fv, err := sim.verify(ctx, l.fi, l.start, l.moves)
			record(l.fi, fv, err)
		}
		for _, a := range asides {
			land(a)
		}
	}()
	return v
}

// bandedAside is a feature verified on a clone of the verifier's
// material while the verifier goes on with the next features.
type bandedAside struct {
	fi    int
	reach geom.Rect
	sim   *bandedSim
	done  chan struct{}
	fv    bandedVerified
	err   error
}

// bandedReach returns the XY box within which the verification of
// feature fi, whose moves start at start, reads or changes the material:
// the moves that reach below the stock top (arcs by their bounds,
// arcBounds) grown by the tool radius, and the feature's region within the stock
// (where its uncut area is measured and its extra passes run: they keep
// to its tool-centre domain), both grown by the material's exact-distance
// band (band, mm) and a margin of 0.5 mm. Moves above the stock (rapids
// between features) touch no material.
func bandedReach(job *Job, fi int, start geom.Point3, moves []geom.Move, band float64) geom.Rect {
	path := geom.EmptyRect()
	top := job.Stock.Top
	from := start
	for _, mv := range moves {
		if min(from.Z, mv.To.Z) < top+1e-6 {
			path = path.Extend(from.XY()).Extend(mv.To.XY())
			if mv.Arc {
				path = path.Union(arcBounds(from.XY(), mv.To.XY(), mv.Center, mv.CW))
			}
		}
		from = mv.To
	}
	region := job.Features[fi].Region.Bounds()
	if tgt, err := geom.Intersection(job.Features[fi].Region, job.Stock.Outline); err == nil {
		region = tgt.Bounds()
	}
	r := path.Grow(job.Tool.Radius() + band + 0.5).Union(region.Grow(band + 0.5))
	// Nothing outside the stock holds material.
	return r.Intersect(job.Stock.Outline.Bounds().Grow(band + 0.5))
}

// arcBounds returns the XY bounds of the arc from a to b about c (clockwise
// when cw): its ends and the points where it crosses an axis through c.
func arcBounds(a, b, c geom.Point, cw bool) geom.Rect {
	r := geom.EmptyRect().Extend(a).Extend(b)
	rad := a.Dist(c)
	a0 := math.Atan2(a.Y-c.Y, a.X-c.X)
	sw := geom.ArcSweep(a, b, c, cw)
	for q := range 4 {
		ang := float64(q) * math.Pi / 2
		rel := ang - a0
		if cw {
			rel = -rel
		}
		if math.Mod(rel+4*math.Pi, 2*math.Pi) <= sw {
			r = r.Extend(c.Add(geom.Pt(math.Cos(ang), math.Sin(ang)).Scale(rad)))
		}
	}
	return r
}

// add hands feature fi's moves, which start at start, to the verifier.
func (v *bandedVerifier) add(fi int, start geom.Point3, moves []geom.Move) {
	v.in <- bandedLanded{fi, start, append([]geom.Move(nil), moves...)}
}

// wait ends the verification (at once when abort is set) and returns the
// worst chips of every feature, or the first error.
func (v *bandedVerifier) wait(abort bool) ([]map[int]float64, error) {
	if abort {
		v.cancel()
	}
	close(v.in)
	<-v.done
	v.cancel()
	return v.worst, v.err
}

// bandedFeatureParams is what every feature of one banded plan shares.
type bandedFeatureParams struct {
	job             *Job
	st              bandedSettings
	tol, top, clear float64
}

// bandedParams gathers what the features of a banded plan of job share.
func bandedParams(job *Job, st bandedSettings, opts BandedOptions) bandedFeatureParams {
	fp := bandedFeatureParams{job: job, st: st, tol: opts.Tolerance, top: job.Stock.Top}
	if fp.tol <= 0 {
		fp.tol = DefaultTolerance
	}
	fp.clear = fp.top + job.Clearance
	if job.Clearance <= 0 {
		fp.clear = fp.top + 5
	}
	return fp
}

// bandedFeature plans feature fi and appends its moves to b, ending with
// the retract to the clearance height.
func bandedFeature(ctx context.Context, b *builder, fp bandedFeatureParams, fi int) (FeatureSummary, error) {
	job, st, f := fp.job, fp.st, fp.job.Features[fi]
	sum := FeatureSummary{Name: f.Name, Depth: f.Depth, First: len(b.path.Moves)}
	b.path.Ops = append(b.path.Ops, geom.Operation{Name: f.Name, First: len(b.path.Moves)})
	dom, open, err := bandedDomain(job, f, st, fp.tol)
	if err != nil {
		return sum, fmt.Errorf("banded: feature %q: %w", f.Name, err)
	}
	sum.Open = open
	inStock, _ := geom.Intersection(f.Region, job.Stock.Outline)
	sum.Area = inStock.Area()
	if len(dom) == 0 {
		return sum, &JobError{Feature: f.Name, Msg: "too narrow for this tool"}
	}
	if dom[0].open {
		// It starts in the air nearest the tool: planned ahead, say so
		// before the costly split.
		if _, err := b.where(); err != nil {
			return sum, err
		}
	}
	for i := range dom {
		// The raster's size is known before the costly split.
		if err := checkRasterBudget(f.Name, dom[i].c.Bounds(), st.h, st.r+2*st.h, 0); err != nil {
			return sum, fmt.Errorf("banded: %w", err)
		}
		z, share, err := bandedSplit(ctx, dom[i], st, fp.tol)
		if err != nil {
			return sum, fmt.Errorf("banded: feature %q: %w", f.Name, err)
		}
		dom[i].zones, dom[i].channelShare = z, share
	}
	var own geom.Shape
	for _, comp := range dom {
		own = append(own, comp.c...)
	}
	rest, err := bandedRest(job, fi, own, st, fp.tol)
	if err != nil {
		return sum, fmt.Errorf("banded: feature %q: %w", f.Name, err)
	}
	levels := bandedLevels(fp.top, f.Depth, job.Tool.FluteLength)
	sum.Levels = levels
	levelTop := fp.top
	for li, z := range levels {
		for _, comp := range dom {
			if err := bandedLevel(ctx, b, job, fi, comp, z, levelTop, fp.clear, st, &sum); err != nil {
				return sum, fmt.Errorf("banded: feature %q level %d: %w", f.Name, li+1, err)
			}
		}
		bandedEmitRest(b, rest, z, levelTop, fp.clear, st, &sum)
		levelTop = z
	}
	// Retract between features.
	b.feed(geom.Lift, p3(b.pos.XY(), fp.clear), st.feed)
	sum.End = len(b.path.Moves)
	return sum, nil
}

// bandedAhead plans every feature of fp.job onto b, in order, calling
// emit with each feature's summary as it lands. Where the machine has more
// than one core, later features are planned ahead, in parallel, from an
// unknown start at the clearance height: a feature's path does not depend
// on where the tool comes from unless it starts in the air nearest to it
// (errStartUnknown), and such a feature is planned again once the start is
// known. The result is the same, move for move, as planning in order.
// Features whose raster is large are not planned ahead, so that at most
// one large raster is held at a time.
//
// workers is the number of goroutines that plan ahead; 0 plans in order.
func bandedAhead(ctx context.Context, b *builder, fp bandedFeatureParams, workers int, emit func(int, FeatureSummary)) error {
	n := len(fp.job.Features)
	type result struct {
		b   *builder
		sum FeatureSummary
		err error
	}
	res := make([]chan result, n)
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	workers = min(workers, n-1)
	if workers > 0 {
		todo := make(chan int, n)
		for fi := 1; fi < n; fi++ {
			if bandedAheadFits(fp, fi) {
				res[fi] = make(chan result, 1)
				todo <- fi
			}
		}
		close(todo)
		var wg sync.WaitGroup
		defer wg.Wait()
		for w := 0; w < workers; w++ {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for fi := range todo {
					if err := ctx.Err(); err != nil {
						res[fi] <- result{err: err}
						continue
					}
					sb := newGuessBuilder(fp.clear)
					sum, err := bandedFeature(ctx, sb, fp, fi)
					res[fi] <- result{sb, sum, err}
				}
			}()
		}
	}
	for fi := 0; fi < n; fi++ {
		if err := ctx.Err(); err != nil {
			return err
		}
		if res[fi] != nil {
			var r result
			select {
			case r = <-res[fi]:
			case <-ctx.Done():
				return ctx.Err()
			}
			if r.err != nil && !errors.Is(r.err, errStartUnknown) {
				return r.err
			}
			if r.err == nil {
				before := len(b.path.Moves)
				if shift, ok := b.appendPlanned(r.b); ok {
					r.sum.First, r.sum.End = before, r.sum.End+shift
					emit(fi, r.sum)
					continue
				}
			}
		}
		sum, err := bandedFeature(ctx, b, fp, fi)
		if err != nil {
			return err
		}
		emit(fi, sum)
	}
	return nil
}

// bandedAheadFits reports whether feature fi may be planned ahead: its
// raster, estimated from the feature's bounds grown by the reach of its
// domain, stays below a quarter of MaxRasterBytes.
func bandedAheadFits(fp bandedFeatureParams, fi int) bool {
	bb := fp.job.Features[fi].Region.Bounds()
	bb = bb.Grow(2 * fp.st.r)
	return bandedRasterBytes(bb, fp.st.h, fp.st.r+2*fp.st.h, 0) < MaxRasterBytes/4
}

// opLength returns the length of moves [first, end) of tp.
func opLength(tp *geom.Toolpath, first, end int) float64 {
	from := tp.Start
	if first > 0 {
		from = tp.Moves[first-1].To
	}
	l := 0.0
	for _, m := range tp.Moves[first:end] {
		l += geom.MoveLength(from, m)
		from = m.To
	}
	return l
}

// neighbourParts returns, for every feature of job that take selects, the
// part of its region within dist of feature f's region (empty parts left
// out), in job order.
func neighbourParts(job *Job, f Feature, dist, tol float64, take func(i int, g Feature) bool) ([]geom.Shape, error) {
	var reach geom.Shape
	var out []geom.Shape
	for i, g := range job.Features {
		if !take(i, g) {
			continue
		}
		if reach == nil {
			r, err := offset.Offset(f.Region, dist, tol)
			if err != nil {
				return nil, err
			}
			reach = r
		}
		part, err := geom.Intersection(g.Region, reach)
		if err != nil || part.Area() < 1e-9 {
			continue
		}
		out = append(out, part)
	}
	return out, nil
}

// bandedComp is one connected part of a feature's tool-centre domain.
type bandedComp struct {
	c    geom.Shape // the domain part (one region)
	open bool       // part of it lies where the tool is in the air
	// zones is the part split into bays and channels, nil when it is
	// cleared by fronts alone (see bandedSplit).
	zones *offset.Zones
	// channelShare is the share of the part's area in channels.
	channelShare float64
}

// bandedDomain returns the tool-centre domain of a feature, split into its
// connected parts, largest first: the free space (the region, the parts of
// later features at least as deep within a tool diameter of it, and the air
// around the stock where the region leaves it) eroded by the tool radius
// plus the allowance.
func bandedDomain(job *Job, f Feature, st bandedSettings, tol float64) ([]bandedComp, bool, error) {
	stock := job.Stock.Outline
	free := f.Region
	// A later feature at least as deep removes its material at every
	// level of this one, so the tool may work there too: it reaches
	// the corners this feature shares with it. Only the part within a
	// diameter of this feature is needed. (Earlier, deeper features are
	// left out: taking their cleared space in as air made slivers of
	// domain and fronts that started in air, and the 500-pocket run
	// found gouges, rapids and uncut features from it.)
	fi := -1
	for i, g := range job.Features {
		if g.Name == f.Name {
			fi = i
			break
		}
	}
	later, err := neighbourParts(job, f, 2*st.r, tol, func(i int, g Feature) bool {
		return i > fi && g.Depth >= f.Depth-1e-9
	})
	if err != nil {
		return nil, false, err
	}
	for _, near := range later {
		if u, err := geom.Union(free, near); err == nil {
			free = u
		}
	}
	open := false
	outside, err := geom.Difference(free, stock)
	if err != nil {
		return nil, false, err
	}
	if outside.Area() > 1e-6 {
		open = true
		bb := stock.Bounds()
		m := 4*st.r + 10
		big := geom.Shape{{Outer: geom.RectRing(bb.Min.X-m, bb.Min.Y-m, bb.Max.X+m, bb.Max.Y+m)}}
		air, err := geom.Difference(big, stock)
		if err != nil {
			return nil, false, err
		}
		// Air next to the open sides only: the region grown by a few tool
		// diameters, so links may swing outside the stock there.
		near, err := offset.Offset(free, 4*st.r, tol)
		if err != nil {
			return nil, false, err
		}
		air, err = geom.Intersection(air, near)
		if err != nil {
			return nil, false, err
		}
		free, err = geom.Union(free, air)
		if err != nil {
			return nil, false, err
		}
	}
	c, err := offset.Offset(free, -(st.r + job.Cut.Allowance + tol), tol)
	if err != nil {
		return nil, false, err
	}
	var out []bandedComp
	for _, reg := range c {
		if reg.Area() < 1e-6 {
			continue
		}
		out = append(out, bandedComp{c: geom.Shape{reg}})
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].c.Area() > out[j].c.Area() })
	if open {
		grown, err := offset.Offset(stock, st.r+0.01, tol)
		if err != nil {
			return nil, false, err
		}
		for i := range out {
			d, err := geom.Difference(out[i].c, grown)
			if err == nil && d.Area() > 1e-6 {
				out[i].open = true
			}
		}
	}
	return out, open, nil
}

// bandedLevel plans one domain part of feature fi at one level and appends
// its moves.
func bandedLevel(ctx context.Context, b *builder, job *Job, fi int, comp bandedComp, z, levelTop, clear float64, st bandedSettings, sum *FeatureSummary) error {
	if comp.zones != nil {
		return bandedZoned(ctx, b, job, fi, comp, comp.zones, z, levelTop, clear, st, sum)
	}
	// In a closed part the fronts stop a target step short of the walls
	// (fc): the last pass along the walls then takes that step, in the
	// band, instead of the scraps the passes' ends leave. (Open parts
	// keep their fronts to the walls: measured worse there, the above-band
	// share of the demo's deep step 0.008 → 0.027.)
	p := newSpiralParams(st)
	w := st.r * (1 - math.Cos(st.phi))
	fc := comp.c
	if !comp.open {
		if sh, err := offset.Offset(comp.c, -w, DefaultTolerance); err == nil && len(sh) == 1 && sh.Area() > 0.8*comp.c.Area() {
			fc = sh
		}
	}
	if len(fc) > 0 && &fc[0] != &comp.c[0] && !st.squareCorners {
		// The fronts leave the corners the boundary pass fans to the
		// fans (cornerCaps). The stock the boundary pass looks for
		// there (bandedGrid.stockNear) is the stock outline's: the
		// fronts stop short of the walls.
		stock := job.Stock.Outline
		near := func(q geom.Point) bool { return stock.Contains(q) || stock.DistanceToBoundary(q) < st.r }
		if caps := cornerCaps(comp.c, w, p, near); len(caps) > 0 {
			var taken geom.Shape
			for _, k := range caps {
				taken = append(taken, k.region())
			}
			if cut, err := geom.Difference(fc, taken); err == nil && len(cut) == 1 && cut.Area() > 0.8*fc.Area() {
				fc, p.caps = cut, caps
			}
		}
	}
	if err := checkRasterBudget(sum.Name, fc.Bounds(), st.h, st.r+2*st.h, 0); err != nil {
		return err
	}
	g := newBandedGridPad(fc, st.h, st.r+2*st.h)
	g.initStock(fc, job.Stock.Outline, st.r, w)
	g.boundary = comp.c
	if len(fc) > 0 && &fc[0] != &comp.c[0] {
		g.outer = newBandedWalls(comp.c, max(1, 8*st.h))
	}
	if comp.channelShare < 0.5 {
		p.turnMin = shortTurnMin
	}
	var start []spiralFront
	var pos geom.Point
	inAir := false
	p.leanHoles = comp.open
	p.trimBoundary = comp.open
	var grown geom.Shape // the stock grown by the tool radius: outside it the tool is in the air
	if comp.open {
		var err error
		grown, err = offset.Offset(job.Stock.Outline, st.r+0.01, DefaultTolerance)
		if err != nil {
			return err
		}
		gm := newBandedGrid(grown, st.h)
		// Same raster origin: newBandedGrid pads from the shape's bounds,
		// so map by position.
		for k := range g.in {
			if !g.in[k] {
				continue
			}
			q := g.pt(k)
			// The raster of the grown outline knows it to a node; a
			// node it calls outside is checked exactly, so the tool
			// that stands there clears the stock.
			if kk := gm.node(q); (kk < 0 || !gm.in[kk]) && !grown.Contains(q) {
				g.reached[k] = true
			}
		}
		for _, ring := range grown.Rings() {
			pts := append(append([]geom.Point(nil), ring...), ring[0])
			pts = polyResample(pts, st.h, true)
			start = append(start, spiralFront{pts: pts, closed: true, steps: spiralSteps(pts, true, p)})
		}
		// Start in the air at the swept node nearest the tool.
		from, err := b.where()
		if err != nil {
			return err
		}
		bk, bd := -1, math.Inf(1)
		for k, r := range g.reached {
			if r {
				if d := g.pt(k).Dist(from); d < bd {
					bk, bd = k, d
				}
			}
		}
		if bk >= 0 {
			pos, inAir = g.pt(bk), true
		} else {
			// A part thinner than the raster has no node in the air;
			// a vertex of its outline outside the grown stock will do.
			pos, inAir = bandedAirVertex(comp.c, grown, from)
		}
	}
	if inAir {
		b.rapid(p3(b.pos.XY(), clear))
		b.rapid(p3(pos, clear))
		b.rapid(p3(pos, z+st.safe))
		b.feed(geom.Link, p3(pos, z), st.entry)
	} else {
		// A closed part, or an open one whose air start was not found.
		c, rad, _, err := offset.DeepestPointOfShape(comp.c, 0.01)
		_ = err
		hr := math.Min(st.helixR, rad-0.02)
		// Where no helix fits (a closed slot little wider than the
		// tool), the tool ramps down along a straight stretch of the
		// domain instead. A helix, even one smaller than the cut data's,
		// is preferred: it leaves a bore wider than the tool, where a
		// ramp leaves a slot of the tool's width whose ends the fronts
		// then meet in full slotting (measured on an 8 mm wide closed
		// slot for a 6 mm tool: 1 mm moving-average maximum 0.34 after
		// a helix, 0.92 after a ramp).
		if hr >= 0.1*st.r {
			g.markDisk(c, hr)
			g.stampDisk(c, hr)
			circ := geom.Circle(c, hr, max(24, int(2*math.Pi*hr/st.h)))
			// Clockwise, material outside on the left.
			pts := append(circ.Reversed(), circ.Reversed()[0])
			start = []spiralFront{{pts: pts, closed: true, steps: spiralSteps(pts, true, p)}}
			pos = pts[0]
			bandedHelixEntry(b, job, fi, c, pos, hr, levelTop, z, clear, st, sum)
		} else if ra, rb, ok := bandedRampStretch(fc, c, st.r, 0.02); ok {
			for i, n := 0, int(math.Ceil(ra.Dist(rb)/st.h)); i <= n; i++ {
				g.markDisk(ra.Lerp(rb, float64(i)/float64(n)), 0.5*st.h)
			}
			g.stampPath([]geom.Point{ra, rb})
			// The column the whole stretch sweeps lies within half its
			// length plus r of its middle.
			top := bandedEntryTop(job, fi, ra.Lerp(rb, 0.5), 0.5*ra.Dist(rb), levelTop, st)
			pos = bandedRamp(b, ra, rb, top, z, clear, st)
			sum.Entries++
			start = []spiralFront{bandedStadiumFront(ra, rb, pos, 0.5*st.h, p)}
		} else {
			return errors.New("no entry fits: the domain is narrower than a helix of a tenth of the tool radius and has no straight stretch of a tool radius for a ramp")
		}
	}
	pieces, _, err := spiralGrow(ctx, g, fc, start, pos, p)
	if err != nil {
		return err
	}
	if comp.open {
		bandedMarkApproaches(pieces, inAir, grown)
	}
	bandedEmit(b, pieces, comp.c, z, levelTop, clear, st, sum)
	return nil
}

// bandedHelixEntry takes the tool from where it stands, over the clearance
// height, to pos on the helix of radius hr about c, rapid down to st.safe
// above the material there (bandedEntryTop) and down the helix to z.
func bandedHelixEntry(b *builder, job *Job, fi int, c, pos geom.Point, hr, levelTop, z, clear float64, st bandedSettings, sum *FeatureSummary) {
	az := bandedEntryTop(job, fi, c, hr, levelTop, st) + st.safe
	b.rapid(p3(b.pos.XY(), clear))
	b.rapid(p3(pos, clear))
	b.rapid(p3(pos, az))
	bandedHelix(b, c, hr, az, z, st)
	sum.Entries++
}

// bandedEntryTop returns the top of the material a helix of radius hr
// about c meets at a level whose top is levelTop. An earlier feature whose
// region holds the whole column the tool sweeps (radius hr + r, plus the
// wall allowance and a margin of 0.1 mm) has cut it down to that feature's
// floor, so the helix may start there instead of
// cutting air from levelTop. Later features have not cut yet.
//
// Why the column is clear: every point p within hr + r of c lies within r
// of the point q on the way from c to p at max(0, |p−c| − r) from c, and q
// lies at least r + allowance + tol inside the region, so in that feature's
// tool-centre domain, which its fronts sweep whole (the uncut material they
// leave lies in corners, against walls). The margin covers the chord
// tolerance of the domain and the raster.
func bandedEntryTop(job *Job, fi int, c geom.Point, hr, levelTop float64, st bandedSettings) float64 {
	top := levelTop
	need := hr + st.r + job.Cut.Allowance + 0.1
	for _, e := range job.Features[:fi] {
		if e.Region.Contains(c) && e.Region.DistanceToBoundary(c) >= need {
			top = math.Min(top, job.Stock.Top-e.Depth)
		}
	}
	return top
}

// bandedAirVertex returns the vertex of c's outline nearest to from that
// lies outside grown (the stock outline grown by the tool radius, where the
// tool is clear of the stock); false when there is none.
func bandedAirVertex(c, grown geom.Shape, from geom.Point) (geom.Point, bool) {
	var best geom.Point
	bd := math.Inf(1)
	for _, ring := range c.Rings() {
		for _, q := range ring {
			if grown.Contains(q) || grown.DistanceToBoundary(q) < 1e-6 {
				continue
			}
			if d := q.Dist(from); d < bd {
				best, bd = q, d
			}
		}
	}
	return best, bd < math.Inf(1)
}

// bandedHelix descends from z0 to z1 on a clockwise helix of radius hr
// about c at the ramp angle, starting and ending at c + (hr, 0)… wherever
// the tool stands, then runs one full circle at z1.
func bandedHelix(b *builder, c geom.Point, hr, z0, z1 float64, st bandedSettings) {
	start := b.pos.XY()
	per := 2 * math.Pi * hr * math.Tan(st.ramp)
	turns := int(math.Ceil((z0-z1)/per - 1e-9))
	if turns < 1 {
		turns = 1
	}
	opp := c.Add(c.Sub(start))
	for i := 0; i < turns; i++ {
		zm := z0 - (z0-z1)*(float64(i)+0.5)/float64(turns)
		ze := z0 - (z0-z1)*float64(i+1)/float64(turns)
		b.arc(geom.Entry, p3(opp, zm), c, true, st.entry)
		b.arc(geom.Entry, p3(start, ze), c, true, st.entry)
	}
	b.arc(geom.Entry, p3(opp, z1), c, true, st.entry)
	b.arc(geom.Entry, p3(start, z1), c, true, st.entry)
}

// bandedMarkApproaches marks the links of an open level that start in the
// air beside the stock (outside grown, the stock grown by the tool radius),
// at the start of the level when air is set or after a lift that lands
// there, as the approach to the next pass. Those links take the tool into
// the stock's edge, often head-on (the through slot of deep_open.json bites
// 0.37 mm into the end face at ae/D 0.23): they are the open level's
// entries.
func bandedMarkApproaches(pieces []bandedPiece, air bool, grown geom.Shape) {
	for i := range pieces {
		switch pc := &pieces[i]; pc.kind {
		case pieceLift:
			air = !grown.Contains(pc.pts[len(pc.pts)-1])
		case pieceLink:
			if air {
				pc.kind = pieceApproach
			}
		default:
			air = false
		}
	}
}

// bandedEmit turns a level's pieces into moves at z: runs between lifts
// are joined into one chain and smoothed to the minimum path radius;
// boundary passes keep the corners of the walls.
func bandedEmit(b *builder, pieces []bandedPiece, c geom.Shape, z, levelTop, clear float64, st bandedSettings, sum *FeatureSummary) {
	// Fillets stay in the tool-centre domain (which lies tol inside the
	// walls, so a point on its outline is still clear of them).
	bb := c.Bounds()
	inside := func(q geom.Point) bool {
		if q.X < bb.Min.X-1e-9 || q.X > bb.Max.X+1e-9 || q.Y < bb.Min.Y-1e-9 || q.Y > bb.Max.Y+1e-9 {
			return false
		}
		return c.Contains(q) || c.DistanceToBoundary(q) < 1e-6
	}
	var pts []geom.Point
	var kinds []geom.MoveKind
	flush := func() {
		if len(pts) > 1 {
			for _, m := range smoothPath(pts, kinds, st.minR, inside) {
				m.To.Z = z
				m.Feed = st.feed
				b.add(m)
			}
		}
		pts, kinds = pts[:0], kinds[:0]
	}
	push := func(q []geom.Point, k geom.MoveKind) {
		for i, p := range q {
			if i == 0 && len(pts) > 0 {
				continue
			}
			pts = append(pts, p)
			kinds = append(kinds, k)
		}
	}
	for i, pc := range pieces {
		switch pc.kind {
		case pieceLift:
			flush()
			to := pc.pts[len(pc.pts)-1]
			// The lift starts and ends on swept nodes, but a node's
			// column may still graze a sliver of the level (the raster
			// knows the swept region to a node): rapid no lower than
			// the level's top and feed the rest.
			b.rapid(p3(b.pos.XY(), clear))
			b.rapid(p3(to, clear))
			b.rapid(p3(to, levelTop+st.safe))
			b.feed(geom.Link, p3(to, z), st.entry)
			sum.Lifts++
		case pieceBoundary:
			flush()
			if len(pc.pts) > 0 && b.pos.XY().Dist(pc.pts[0]) > 1e-6 {
				b.feed(geom.Link, p3(pc.pts[0], z), st.feed)
			}
			// Walls keep their corners but for a small rounding, so the
			// corners are cleared (uncut material) and the tool never
			// stops dead.
			kinds := make([]geom.MoveKind, len(pc.pts))
			for i := range kinds {
				kinds[i] = geom.Feed
			}
			for _, m := range smoothPath(pc.pts, kinds, math.Min(st.minR, 0.1), inside) {
				m.To.Z = z
				m.Feed = st.feed
				b.add(m)
			}
			sum.Rings++
		case pieceApproach:
			flush()
			if i == 0 || pieces[i-1].kind != pieceApproach {
				sum.Entries++
			}
			for _, q := range pc.pts {
				if b.pos.XY().Dist(q) > 1e-6 {
					b.feed(geom.Entry, p3(q, z), st.entry)
				}
			}
		case pieceLink:
			if len(pts) == 0 {
				pts = append(pts, b.pos.XY())
				kinds = append(kinds, geom.Link)
			}
			push(pc.pts, geom.Link)
		default:
			if len(pts) == 0 {
				pts = append(pts, b.pos.XY())
				kinds = append(kinds, geom.Feed)
			}
			// Runs on circles are cut as arcs: a chord runs up to half its
			// turn off the circle's direction, and the engaged arc, counted
			// on the front half about the direction of travel, with it
			// (5° more at the front of a loop cut in 10° chords, engage).
			at := 0
			for _, a := range pc.arcs {
				push(pc.pts[at:a.from+1], geom.Feed)
				flush()
				to := pc.pts[a.to]
				b.add(geom.Move{Kind: geom.Feed, To: p3(to, z), Arc: true, Center: a.c, Feed: st.feed})
				pts = append(pts, to)
				kinds = append(kinds, geom.Feed)
				at = a.to
			}
			push(pc.pts[at:], geom.Feed)
			sum.Rings++
		}
	}
	flush()
}
