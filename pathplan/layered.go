package pathplan

import (
	"context"
	"fmt"
	"math"
	"sort"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
)

// PlanLayered plans the layered strategy for job:
//
//   - Each feature is cut in equal step-down levels, the fewest that do not
//     exceed cut.layered.stepdown, so the last lands exactly on the floor.
//   - At each level the free space is the union of the feature's region
//     and the regions of features planned before it that reach that level,
//     with everything beyond the stock outline as air; features planned
//     later count as stock until their turn. Rings are the inward offsets
//     of the free space by tool radius + allowance, then by the stepover,
//     kept where they come within reach of the feature's own material.
//   - Rings are cut from the one farthest from the walls to the one along
//     the walls: inside-out in closed pockets, from the air inwards on open
//     features and outside profiles. Walls lie on the right of the motion
//     (climb milling with M3). Where one region splits into several, each
//     branch is finished before the next.
//   - Links at depth are straight moves that stay clear of the walls; a
//     link that would cut more than 1.5 stepovers of fresh material is
//     replaced by a lift to the clearance height, a rapid, and a new entry.
//   - Entries ramp along the first pass at cut.ramp_angle, or helix down on
//     a circle of cut.helix_diameter where a closed first ring is shorter
//     than the tool's circumference. Descents are rapid only down to 1 mm
//     above the highest material under the tool.
//   - When the stepover exceeds the tool radius, the material that no ring
//     reaches (cusps at corners and in narrow necks) is computed exactly
//     and cleared by clean-up passes around it.
//   - With cut.finish the walls are followed once more at final size at the
//     floor of each feature. The floor itself is roughed at final depth.
//
// A feature whose material the tool cannot reach at some level is an error
// naming it ("too narrow for this tool"); a feature only partly too narrow
// is planned and the rest is reported in Plan.Warnings. Planning stops with
// ctx's error when ctx is done.
func PlanLayered(ctx context.Context, job *Job, opt Options) (*Plan, error) {
	if err := job.Validate(); err != nil {
		return nil, err
	}
	if job.Cut.Layered == (Layered{}) {
		return nil, jobErrorf("", "cut.layered (stepover and stepdown) is needed by the layered strategy")
	}
	if err := checkPathBudget(job, "layered"); err != nil {
		return nil, err
	}
	p, err := newPlanner(ctx, job, opt)
	if err != nil {
		return nil, err
	}
	return p.run()
}

type clearedSet struct {
	z   float64
	air geom.Shape // cut material together with everything outside the stock
}

type planner struct {
	ctx context.Context
	job *Job
	opt Options

	r, a, tol, guard, rho0, s, lead, margin, maxStep float64
	feed, entryFeed, slope                           float64
	top, clear                                       float64

	box     geom.Shape
	outside geom.Shape // box less the stock
	// keepGrown is the stock no feature cuts, grown by allowance, guard
	// and twice the margin: a tool centre in the free space never reaches
	// into it, so it counts as air for descents.
	keepGrown geom.Shape
	baseAir   geom.Shape // outside and keepGrown
	keepIx    *edgeIndex // outline of the stock no feature cuts
	bases     []geom.Shape

	cleared []clearedSet
	b       builder
	atDepth bool

	sum       *FeatureSummary
	processed []*node
	plan      *Plan
}

// retract is the height above the highest material under the tool at which
// rapid descents stop, mm (common practice, no source).
const retract = 1.0

func newPlanner(ctx context.Context, job *Job, opt Options) (*planner, error) {
	p := &planner{ctx: ctx, job: job, opt: opt}
	p.tol = opt.Tolerance
	if p.tol <= 0 {
		p.tol = DefaultTolerance
	}
	D := job.Tool.Diameter
	p.r = D / 2
	p.a = job.Cut.Allowance
	p.guard = p.tol + 0.0005
	p.rho0 = p.r + p.a + p.guard
	p.s = job.Cut.Layered.Stepover * D
	p.lead = 0.1*D + 0.2
	p.margin = 0.05
	p.maxStep = 1.5 * p.s
	p.feed = job.Feed()
	// Entries at half the cutting feed: common practice, no source.
	p.entryFeed = p.feed / 2
	p.slope = math.Tan(job.Cut.RampAngle * math.Pi / 180)
	p.top = job.Stock.Top
	p.clear = p.top + job.Clearance

	bb := job.Stock.Outline.Bounds()
	for _, f := range job.Features {
		bb = bb.Union(f.Region.Bounds())
	}
	diag := math.Hypot(bb.Width(), bb.Height())
	m := diag + p.rho0 + p.r + p.lead + p.s + 1
	p.box = geom.Shape{{Outer: geom.RectRing(bb.Min.X-m, bb.Min.Y-m, bb.Max.X+m, bb.Max.Y+m)}}
	var err error
	if p.outside, err = geom.Difference(p.box, job.Stock.Outline); err != nil {
		return nil, fmt.Errorf("stock outline: %w", err)
	}
	keep := job.Stock.Outline
	for _, f := range job.Features {
		if keep, err = geom.Difference(keep, f.Region); err != nil {
			return nil, jobErrorf(f.Name, "region against the stock: %v", err)
		}
	}
	p.baseAir = p.outside
	if len(keep) > 0 {
		p.keepIx = newEdgeIndex(keep)
		if p.keepGrown, err = offset.Offset(keep, p.a+p.guard+2*p.margin, p.tol); err != nil {
			return nil, fmt.Errorf("walls: %w", err)
		}
		if p.baseAir, err = geom.Union(p.outside, p.keepGrown); err != nil {
			return nil, fmt.Errorf("walls: %w", err)
		}
	}
	for _, f := range job.Features {
		in, err := geom.Intersection(f.Region, job.Stock.Outline)
		if err != nil {
			return nil, jobErrorf(f.Name, "region against the stock: %v", err)
		}
		p.bases = append(p.bases, in)
	}
	p.b.path.Start = geom.Point3{Z: p.clear}
	p.b.pos = p.b.path.Start
	return p, nil
}

func (p *planner) run() (*Plan, error) {
	job := p.job
	p.plan = &Plan{Job: job, Strategy: "layered"}
	total, done := 0, 0
	levels := make([][]float64, len(job.Features))
	for i, f := range job.Features {
		levels[i] = levelsFor(p.top, f.Depth, job.Cut.Layered.Stepdown)
		total += len(levels[i])
	}
	for fi, f := range job.Features {
		open, err := geom.Difference(f.Region, job.Stock.Outline)
		if err != nil {
			return nil, jobErrorf(f.Name, "region against the stock: %v", err)
		}
		sum := FeatureSummary{Name: f.Name, Depth: f.Depth, Open: open.Area() > 1e-6,
			Levels: levels[fi], Area: p.bases[fi].Area(), First: len(p.b.path.Moves)}
		p.sum = &sum
		p.b.path.Ops = append(p.b.path.Ops, geom.Operation{Name: f.Name, First: len(p.b.path.Moves)})
		cache := map[string]*levelGeom{}
		zPrev := p.top
		var last *levelGeom
		for li, z := range levels[fi] {
			if err := p.ctx.Err(); err != nil {
				return nil, err
			}
			if len(p.b.path.Moves) > MaxMoves {
				return nil, errTooManyMoves
			}
			var mask []int
			key := ""
			for g := 0; g < fi; g++ {
				if p.top-job.Features[g].Depth <= z+1e-9 {
					mask = append(mask, g)
					key += fmt.Sprintf("%d,", g)
				}
			}
			g, ok := cache[key]
			if !ok {
				g, err = p.geometry(fi, mask)
				if err != nil {
					return nil, err
				}
				cache[key] = g
			}
			if g.mArea > 1e-6 {
				if !g.work {
					return nil, p.tooNarrow(fi, g)
				}
				if err := p.cutLevel(g, z); err != nil {
					return nil, err
				}
				p.cleared = append(p.cleared, clearedSet{z: z, air: g.air})
			}
			if li == len(levels[fi])-1 {
				last = g
				sum.UnreachableArea = g.unreachable
				for _, w := range g.narrow {
					p.plan.Warnings = append(p.plan.Warnings, fmt.Sprintf("feature %q: %s", f.Name, w))
				}
			}
			zPrev = z
			done++
			if p.opt.Progress != nil {
				p.opt.Progress(done, total)
			}
		}
		_ = zPrev
		if job.Cut.Finish && last != nil && last.mArea > 1e-6 {
			if err := p.finish(fi, last, levels[fi][len(levels[fi])-1]); err != nil {
				return nil, err
			}
		}
		p.liftToClearance()
		sum.End = len(p.b.path.Moves)
		sum.Length = (&geom.Toolpath{Start: p.posBefore(sum.First), Moves: p.b.path.Moves[sum.First:sum.End]}).Length()
		p.plan.Features = append(p.plan.Features, sum)
	}
	p.plan.Path = p.b.path
	return p.plan, nil
}

func (p *planner) posBefore(i int) geom.Point3 {
	if i == 0 {
		return p.b.path.Start
	}
	return p.b.path.Moves[i-1].To
}

// levelGeom is the geometry of one feature at a set of levels that share
// the same free space.
type levelGeom struct {
	W           geom.Shape // stock that must remain at this level
	wIx         *edgeIndex
	A           geom.Shape // the box less W: free space with the air around
	X           []geom.Shape
	M           geom.Shape // the feature's material still to cut
	mArea       float64
	D           geom.Shape // M grown by tool radius + lead: where rings are kept
	dIx         *edgeIndex
	air         geom.Shape // what is air once this level is cut: the rings' swept disks, the outside and the grown walls
	unreachable float64
	narrow      []string
	roots       []*node
	work        bool
}

// node is one region of one ring level; its children are the regions of
// the next level inside it.
type node struct {
	k        int
	region   geom.Region
	ix       *edgeIndex
	parent   *node
	children []*node
	pieces   []piece
	cusps    []piece
	work     bool
	done     bool
}

func (n *node) index() *edgeIndex {
	if n.ix == nil {
		n.ix = newEdgeIndex(geom.Shape{n.region})
	}
	return n.ix
}

func unionAll(shapes ...geom.Shape) (geom.Shape, error) {
	var out geom.Shape
	for _, s := range shapes {
		if len(s) == 0 {
			continue
		}
		if len(out) == 0 {
			out = s
			continue
		}
		u, err := geom.Union(out, s)
		if err != nil {
			return nil, err
		}
		out = u
	}
	return out, nil
}

func (p *planner) geometry(fi int, mask []int) (*levelGeom, error) {
	job := p.job
	f := job.Features[fi]
	fail := func(what string, err error) error {
		return fmt.Errorf("feature %q: %s: %w", f.Name, what, err)
	}
	var others []geom.Shape
	for _, g := range mask {
		others = append(others, job.Features[g].Region)
	}
	free, err := unionAll(append([]geom.Shape{f.Region}, others...)...)
	if err != nil {
		return nil, fail("free space", err)
	}
	g := &levelGeom{}
	if g.W, err = geom.Difference(job.Stock.Outline, free); err != nil {
		return nil, fail("walls", err)
	}
	g.wIx = newEdgeIndex(g.W)
	if g.A, err = geom.Difference(p.box, g.W); err != nil {
		return nil, fail("free space", err)
	}
	g.M = p.bases[fi]
	if len(others) > 0 {
		cut, err := unionAll(others...)
		if err != nil {
			return nil, fail("cut regions", err)
		}
		if g.M, err = geom.Difference(g.M, cut); err != nil {
			return nil, fail("material", err)
		}
	}
	g.mArea = g.M.Area()
	if g.mArea <= 1e-6 {
		return g, nil
	}
	if g.X, err = offset.Series(p.ctx, g.A, p.rho0, p.s, p.tol); err != nil {
		return nil, fail("rings", err)
	}
	if g.D, err = offset.Offset(g.M, p.r+p.lead, p.tol); err != nil {
		return nil, fail("reach", err)
	}
	g.dIx = newEdgeIndex(g.D)
	g.air = p.outside
	reach := geom.Shape(nil)
	if len(g.X) > 0 {
		grown, err := offset.Offset(g.X[0], p.rho0, p.tol)
		if err != nil {
			return nil, fail("reach", err)
		}
		if reach, err = geom.Intersection(g.M, grown); err != nil {
			return nil, fail("reach", err)
		}
		// What the rings actually cut: the tool's disk swept along X[0]
		// reaches r past it, which stops the allowance and guard short of
		// the level's walls. The opening by rho0 (reach) would count that
		// strip as cut; where the wall is a later, deeper feature that strip
		// still stands at this level, and a descent sized by it meets
		// material (elementary geometry: X[0] ⊕ disk(r) ⊂ X[0] ⊕ disk(rho0)).
		swept, err := offset.Offset(g.X[0], p.r, p.tol)
		if err != nil {
			return nil, fail("cut area", err)
		}
		cut, err := geom.Intersection(g.M, swept)
		if err != nil {
			return nil, fail("cut area", err)
		}
		if g.air, err = unionAll(cut, p.outside, p.keepGrown); err != nil {
			return nil, fail("cut area", err)
		}
	}
	un, err := geom.Difference(g.M, reach)
	if err != nil {
		return nil, fail("reach", err)
	}
	g.unreachable = un.Area()
	// Unreachable parts larger than the corner left by a round tool in an
	// acute corner are narrow zones: report them.
	for _, u := range un {
		if u.Area() > 2.5*p.rho0*p.rho0 {
			b := u.Bounds()
			g.narrow = append(g.narrow, fmt.Sprintf("%.1f mm² near (%.1f, %.1f) too narrow for this tool, left uncut",
				u.Area(), (b.Min.X+b.Max.X)/2, (b.Min.Y+b.Max.Y)/2))
		}
	}
	// Nodes of the ring tree.
	var prev []*node
	levelsNodes := make([][]*node, len(g.X))
	for k, xs := range g.X {
		if err := p.ctx.Err(); err != nil {
			return nil, err
		}
		for _, reg := range xs {
			n := &node{k: k, region: reg}
			for _, ring := range reg.Rings() {
				n.pieces = append(n.pieces, g.dIx.clip(ring, true)...)
			}
			if k == 0 {
				g.roots = append(g.roots, n)
			} else {
				q := reg.Outer[0]
				for _, c := range prev {
					if c.region.Bounds().Contains(q) && c.region.Contains(q) {
						n.parent = c
						break
					}
				}
				if n.parent == nil {
					// cannot happen for nested offsets; keep it reachable
					g.roots = append(g.roots, n)
				} else {
					n.parent.children = append(n.parent.children, n)
				}
			}
			levelsNodes[k] = append(levelsNodes[k], n)
		}
		prev = levelsNodes[k]
	}
	// Cusps: material no ring reaches, only possible when the stepover
	// exceeds the tool radius (between rings k and k+1 every point lies
	// within r of one of them when s ≤ r).
	if p.s > p.r+1e-9 {
		for k := range g.X {
			inner, err := offset.Offset(g.A, -(p.rho0 + float64(k)*p.s + p.r), p.tol)
			if err != nil {
				return nil, fail("cusps", err)
			}
			if len(inner) == 0 {
				continue
			}
			u := inner
			if k+1 < len(g.X) {
				outer, err := offset.Offset(g.X[k+1], p.r, p.tol)
				if err != nil {
					return nil, fail("cusps", err)
				}
				if u, err = geom.Difference(inner, outer); err != nil {
					return nil, fail("cusps", err)
				}
			}
			if len(u) == 0 {
				continue
			}
			if u, err = geom.Intersection(u, g.M); err != nil {
				return nil, fail("cusps", err)
			}
			for _, c := range u {
				if c.Area() < 1e-3 {
					continue
				}
				var owner *node
				q := c.Outer[0]
				for _, n := range levelsNodes[k] {
					if n.region.Contains(q) {
						owner = n
						break
					}
				}
				if owner == nil {
					owner = nearestNode(levelsNodes[k], q)
				}
				if owner == nil {
					continue
				}
				for _, ring := range c.Rings() {
					owner.cusps = append(owner.cusps, piece{pts: ring.Reversed(), closed: true})
				}
			}
		}
	}
	var mark func(n *node) bool
	mark = func(n *node) bool {
		w := len(n.pieces) > 0 || len(n.cusps) > 0
		for _, c := range n.children {
			if mark(c) {
				w = true
			}
		}
		n.work = w
		return w
	}
	for _, r := range g.roots {
		if mark(r) {
			g.work = true
		}
	}
	return g, nil
}

func nearestNode(ns []*node, q geom.Point) *node {
	var best *node
	bd := math.Inf(1)
	for _, n := range ns {
		if d := n.region.DistanceToBoundary(q); d < bd {
			best, bd = n, d
		}
	}
	return best
}

// tooNarrow builds the error for a feature whose material no ring reaches.
func (p *planner) tooNarrow(fi int, g *levelGeom) error {
	f := p.job.Features[fi]
	widest := 0.0
	for _, m := range g.M {
		c, _, err := offset.DeepestPoint(m, 0)
		if err != nil {
			continue
		}
		for _, a := range g.A {
			if a.Contains(c) {
				if _, rad, err := offset.DeepestPoint(a, 0); err == nil && 2*rad > widest {
					widest = 2 * rad
				}
			}
		}
	}
	extra := ""
	if p.a > 0 {
		extra = fmt.Sprintf(" plus allowance %g mm a side", p.a)
	}
	return jobErrorf(f.Name, "too narrow for this tool (widest free circle %.1f mm, tool %g mm%s)",
		widest, p.job.Tool.Diameter, extra)
}

// cutLevel cuts one level of the ring tree of g at height z.
func (p *planner) cutLevel(g *levelGeom, z float64) error {
	p.processed = p.processed[:0]
	var reset func(n *node)
	reset = func(n *node) {
		n.done = false
		for _, c := range n.children {
			reset(c)
		}
	}
	for _, r := range g.roots {
		reset(r)
	}
	remaining := append([]*node(nil), g.roots...)
	for len(remaining) > 0 {
		i := p.nearest(remaining)
		n := remaining[i]
		remaining = append(remaining[:i], remaining[i+1:]...)
		if err := p.visit(g, n, z); err != nil {
			return err
		}
	}
	return nil
}

// nearest returns the index of the node nearest to the tool.
func (p *planner) nearest(ns []*node) int {
	cur := p.b.pos.XY()
	best, bd := 0, math.Inf(1)
	for i, n := range ns {
		d := math.Inf(1)
		if !n.work {
			d = -1
		} else if len(n.pieces) > 0 {
			for _, pc := range n.pieces {
				d = math.Min(d, nearestOn(pc, cur).Dist(cur))
			}
		} else {
			b := n.region.Bounds()
			d = cur.Dist(geom.Pt((b.Min.X+b.Max.X)/2, (b.Min.Y+b.Max.Y)/2))
		}
		if d < bd {
			best, bd = i, d
		}
	}
	return best
}

func (p *planner) visit(g *levelGeom, n *node, z float64) error {
	if err := p.ctx.Err(); err != nil {
		return err
	}
	if n.work {
		rest := append([]*node(nil), n.children...)
		for len(rest) > 0 {
			i := p.nearest(rest)
			c := rest[i]
			rest = append(rest[:i], rest[i+1:]...)
			if err := p.visit(g, c, z); err != nil {
				return err
			}
		}
		if err := p.cutPieces(g, n, n.pieces, z, geom.Feed, p.r+p.a); err != nil {
			return err
		}
		if len(n.cusps) > 0 {
			p.sum.Cleanups += len(n.cusps)
			if err := p.cutPieces(g, n, n.cusps, z, geom.Feed, p.r+p.a); err != nil {
				return err
			}
		}
	}
	n.done = true
	keep := p.processed[:0]
	for _, q := range p.processed {
		if !isDescendant(q, n) {
			keep = append(keep, q)
		}
	}
	p.processed = append(keep, n)
	return nil
}

func isDescendant(q, n *node) bool {
	for a := q.parent; a != nil; a = a.parent {
		if a == n {
			return true
		}
	}
	return false
}

// cutPieces cuts pieces in nearest-first order.
func (p *planner) cutPieces(g *levelGeom, n *node, pcs []piece, z float64, kind geom.MoveKind, minWall float64) error {
	rest := append([]piece(nil), pcs...)
	for len(rest) > 0 {
		cur := p.b.pos.XY()
		bi, bd := 0, math.Inf(1)
		for i, pc := range rest {
			if d := nearestOn(pc, cur).Dist(cur); d < bd {
				bi, bd = i, d
			}
		}
		pc := rest[bi]
		rest = append(rest[:bi], rest[bi+1:]...)
		if err := p.pass(g, n, pc, z, kind, minWall); err != nil {
			return err
		}
	}
	return nil
}

// nearestOn returns the point of pc nearest to q: any point of a closed
// ring, the start of an open piece (open pieces run one way only).
func nearestOn(pc piece, q geom.Point) geom.Point {
	if !pc.closed {
		return pc.pts[0]
	}
	best, bd := pc.pts[0], math.Inf(1)
	n := len(pc.pts)
	for i := range pc.pts {
		c := geom.ClosestOnSegment(q, pc.pts[i], pc.pts[(i+1)%n])
		if d := c.Dist(q); d < bd {
			best, bd = c, d
		}
	}
	return best
}

// rotateTo returns the closed ring pts starting at its point nearest to q.
func rotateTo(pts []geom.Point, q geom.Point) []geom.Point {
	n := len(pts)
	bi, bd := 0, math.Inf(1)
	var bc geom.Point
	for i := range pts {
		c := geom.ClosestOnSegment(q, pts[i], pts[(i+1)%n])
		if d := c.Dist(q); d < bd {
			bi, bd, bc = i, d, c
		}
	}
	out := make([]geom.Point, 0, n+1)
	out = append(out, bc)
	for j := 1; j <= n; j++ {
		v := pts[(bi+j)%n]
		if v.Dist(bc) < 1e-9 {
			continue
		}
		out = append(out, v)
	}
	return dedupe(out)
}

// pass moves the tool to the start of pc at height z — by a link at depth
// where that is clear, otherwise by a lift, a rapid and an entry — and cuts
// it.
func (p *planner) pass(g *levelGeom, n *node, pc piece, z float64, kind geom.MoveKind, minWall float64) error {
	pts := pc.pts
	cur := p.b.pos.XY()
	if pc.closed {
		pts = rotateTo(pts, cur)
	}
	if len(pts) < 2 {
		return nil
	}
	start := pts[0]
	linked := false
	if p.atDepth && math.Abs(p.b.pos.Z-z) < 1e-9 {
		if mk, ok := p.linkKind(g, cur, start, minWall); ok {
			p.b.feed(mk, p3(start, z), p.feed)
			linked = true
		}
	}
	if !linked {
		h := p.descend(start, z)
		if h > z+1e-9 {
			var err error
			if pts, err = p.entry(g, n, pts, pc.closed, h, z, minWall); err != nil {
				return err
			}
		} else {
			p.b.feed(geom.Entry, p3(start, z), p.entryFeed)
		}
		p.atDepth = true
	}
	p.sum.Rings++
	for _, q := range pts[1:] {
		p.b.feed(kind, p3(q, z), p.feed)
	}
	if pc.closed {
		p.b.feed(kind, p3(pts[0], z), p.feed)
	}
	return nil
}

// linkKind decides whether a straight move at depth from a to b is allowed:
// it must keep minWall from the walls, and the fresh material it cuts
// (its length inside the reach of the material, less what lies inside
// regions already cleared at this level) must not exceed maxStep.
func (p *planner) linkKind(g *levelGeom, a, b geom.Point, minWall float64) (geom.MoveKind, bool) {
	if a.Dist(b) < 1e-9 {
		return geom.Link, true
	}
	if g.wIx.clearance(a, b, minWall+1) < minWall-1e-6 || g.W.Contains(a.Lerp(b, 0.5)) {
		return 0, false
	}
	uncut := 0.0
	for _, part := range g.dIx.insideParts(a, b) {
		l := part[0].Dist(part[1])
		for _, q := range p.processed {
			if l <= 1e-9 {
				break
			}
			l -= q.index().insideLength(part[0], part[1])
		}
		uncut += math.Max(0, l)
	}
	switch {
	case uncut <= 1e-6:
		return geom.Link, true
	case uncut <= p.maxStep:
		return geom.Feed, true
	}
	return 0, false
}

// liftToClearance takes the tool up to the clearance height: at feed as
// far as material may lie beside the tool (up to 0.2 mm above the lowest
// height at which its disk is clear of all material left by earlier
// levels), then at rapid.
func (p *planner) liftToClearance() {
	if p.b.pos.Z >= p.clear-1e-9 {
		return
	}
	if p.atDepth {
		q := p.b.pos.XY()
		h := p.airHeight(q, p.b.pos.Z)
		if p.nearKeep(q) {
			h = math.Max(h, p.top)
		}
		if h > p.b.pos.Z+1e-9 {
			p.b.feed(geom.Lift, p3(q, math.Min(h+0.2, p.clear)), p.feed)
		}
		if p.sum != nil {
			p.sum.Lifts++
		}
	}
	p.atDepth = false
	p.b.rapid(geom.Point3{X: p.b.pos.X, Y: p.b.pos.Y, Z: p.clear})
}

// descend lifts the tool, moves it over q and brings it down to the lowest
// height h ≥ z at which the tool's disk at q is clear of material, rapid to
// retract above h and at feed from there. It returns h.
func (p *planner) descend(q geom.Point, z float64) float64 {
	p.liftToClearance()
	p.b.rapid(p3(q, p.clear))
	h := p.airHeight(q, z)
	hz := math.Min(h+retract, p.clear)
	if p.nearKeep(q) {
		// Beside a wall rapids stay above the top: the tool passes the
		// wall at the allowance only, too close for a rapid.
		hz = math.Min(math.Max(h, p.top)+retract, p.clear)
	}
	p.b.rapid(p3(q, hz))
	if h < hz {
		p.b.feed(geom.Entry, p3(q, h), p.entryFeed)
	}
	return h
}

// nearKeep reports whether the tool's disk at q comes within twice the
// margin of the allowance left on stock that no feature cuts. The
// allowance strip stands to the top at every level, so a disk on the
// outermost ring touches it (the ring keeps the allowance and guard from
// the wall, no more).
func (p *planner) nearKeep(q geom.Point) bool {
	if p.keepIx == nil {
		return false
	}
	lim := p.r + p.a + p.guard + 2*p.margin
	return p.keepIx.clearance(q, q, lim+1) < lim
}

// airHeight returns the lowest of z, the cleared levels above it and the
// stock top such that all material under the tool's disk at q lies at or
// below it.
func (p *planner) airHeight(q geom.Point, z float64) float64 {
	rr := p.r + p.margin
	in := func(s geom.Shape) bool { return s.Contains(q) && s.DistanceToBoundary(q) >= rr }
	cands := []float64{z}
	for _, c := range p.cleared {
		if c.z > z && c.z < p.top {
			cands = append(cands, c.z)
		}
	}
	sort.Float64s(cands)
	if in(p.baseAir) {
		return z
	}
	for _, h := range cands {
		for _, c := range p.cleared {
			if c.z <= h+1e-9 && in(c.air) {
				return h
			}
		}
	}
	return p.top
}

// entry takes the tool from (pts[0], h) down to z into material: a helix
// where a closed first ring is shorter than the tool's circumference and a
// helix fits, otherwise a ramp along the path. It returns the path to cut
// from the point where the entry ends.
func (p *planner) entry(g *levelGeom, n *node, pts []geom.Point, closed bool, h, z, minWall float64) ([]geom.Point, error) {
	p.sum.Entries++
	perim := piece{pts: pts, closed: closed}.length()
	D := p.job.Tool.Diameter
	if closed && perim < math.Pi*D && n != nil {
		if c, R, ok := p.helixSpot(g, n, minWall); ok {
			hs := geom.Pt(c.X+R, c.Y)
			// The helix start must be reachable from the ring start in the
			// air above h and the tool must come back to the ring at depth
			// without touching the walls.
			if g.wIx.clearance(hs, pts[0], minWall+1) >= minWall-1e-6 {
				p.b.feed(geom.Entry, p3(hs, h), p.entryFeed)
				turn := 2 * math.Pi * R * p.slope
				nt := int(math.Ceil((h - z) / turn))
				for i := 1; i <= nt; i++ {
					zz := h - (h-z)*float64(i)/float64(nt)
					p.b.arc(geom.Entry, p3(hs, zz), c, false, p.entryFeed)
				}
				p.b.arc(geom.Feed, p3(hs, z), c, false, p.feed)
				p.b.feed(geom.Feed, p3(pts[0], z), p.feed)
				return pts, nil
			}
		}
	}
	if closed {
		return p.rampClosed(pts, h, z), nil
	}
	p.rampOpen(pts, h, z)
	return pts, nil
}

// helixSpot finds the centre and radius of a helix inside node n's region
// that keeps minWall from the walls.
func (p *planner) helixSpot(g *levelGeom, n *node, minWall float64) (geom.Point, float64, bool) {
	c, _, err := offset.DeepestPoint(n.region, 0.01)
	if err != nil {
		return geom.Point{}, 0, false
	}
	room := g.wIx.clearance(c, c, 1e6) - minWall - 0.01
	R := math.Min(p.job.Cut.HelixDiameter/2, room)
	if R < 0.1*p.job.Tool.Diameter {
		return geom.Point{}, 0, false
	}
	return c, R, true
}

// rampClosed ramps along the closed ring pts from h to z, going round as
// often as needed, and returns the ring starting where the ramp ends.
func (p *planner) rampClosed(pts []geom.Point, h, z float64) []geom.Point {
	need := (h - z) / p.slope
	n := len(pts)
	done := 0.0
	for lap := 0; ; lap++ {
		for i := 0; i < n; i++ {
			a, b := pts[i], pts[(i+1)%n]
			l := a.Dist(b)
			if done+l >= need-1e-9 {
				t := (need - done) / math.Max(l, 1e-12)
				q := a.Lerp(b, math.Min(1, math.Max(0, t)))
				p.b.feed(geom.Entry, p3(q, z), p.entryFeed)
				out := []geom.Point{q}
				for j := 1; j <= n; j++ {
					out = append(out, pts[(i+j)%n])
				}
				return dedupe(out)
			}
			done += l
			p.b.feed(geom.Entry, p3(b, h-done*p.slope), p.entryFeed)
		}
		if lap > 10000 {
			break
		}
	}
	return pts
}

// rampOpen ramps back and forth along the start of the open path pts from
// h to z, ending at pts[0].
func (p *planner) rampOpen(pts []geom.Point, h, z float64) {
	need := (h - z) / p.slope
	plen := piece{pts: pts}.length()
	leg := math.Min(plen, need/2)
	if leg < 1e-3 {
		p.b.feed(geom.Entry, p3(pts[0], z), p.entryFeed/2)
		return
	}
	legs := int(math.Ceil(need / leg))
	if legs%2 == 1 {
		legs++
	}
	if legs > 400 {
		legs = 400
	}
	drop := (h - z) / (float64(legs) * leg)
	fwd := prefix(pts, leg)
	zc := h
	for i := 0; i < legs; i++ {
		path := fwd
		if i%2 == 1 {
			path = reversed(fwd)
		}
		for j := 1; j < len(path); j++ {
			zc -= path[j-1].Dist(path[j]) * drop
			if i == legs-1 && j == len(path)-1 {
				zc = z
			}
			p.b.feed(geom.Entry, p3(path[j], math.Max(zc, z)), p.entryFeed)
		}
	}
	p.b.feed(geom.Entry, p3(pts[0], z), p.entryFeed)
}

func prefix(pts []geom.Point, l float64) []geom.Point {
	out := []geom.Point{pts[0]}
	for i := 1; i < len(pts); i++ {
		d := pts[i-1].Dist(pts[i])
		if d >= l {
			out = append(out, pts[i-1].Lerp(pts[i], l/math.Max(d, 1e-12)))
			return dedupe(out)
		}
		l -= d
		out = append(out, pts[i])
	}
	return out
}

func reversed(pts []geom.Point) []geom.Point {
	out := make([]geom.Point, len(pts))
	for i, q := range pts {
		out[len(pts)-1-i] = q
	}
	return out
}

// finish follows the walls at final size at the floor z.
func (p *planner) finish(fi int, g *levelGeom, z float64) error {
	xs, err := offset.Offset(g.A, -(p.r + p.guard), p.tol)
	if err != nil {
		return fmt.Errorf("feature %q: finishing pass: %w", p.job.Features[fi].Name, err)
	}
	var pcs []piece
	for _, ring := range xs.Rings() {
		for _, pc := range g.dIx.clip(ring, true) {
			// keep only the parts that run along a wall
			if touchesWall(g, pc, p.r+p.guard+0.01) {
				pcs = append(pcs, pc)
			}
		}
	}
	if len(pcs) == 0 {
		return nil
	}
	// Re-run the link rules with the whole floor level counted as cleared.
	save := p.processed
	p.processed = append([]*node(nil), g.roots...)
	err = p.cutPieces(g, nil, pcs, z, geom.Finish, p.r)
	p.processed = save
	return err
}

func touchesWall(g *levelGeom, pc piece, d float64) bool {
	for i := 1; i < len(pc.pts); i++ {
		if g.wIx.clearance(pc.pts[i-1], pc.pts[i], d+1) <= d {
			return true
		}
	}
	return false
}
