package offset

import (
	"container/heap"
	"context"
	"fmt"
	"math"
	"sort"

	"github.com/chipband/chipband/geom"
)

// Zones is a tool-centre domain split by Split into wide bays, where a disk
// of radius ρ rolls freely, and the narrow channels that join or end them.
type Zones struct {
	// Bays are the components of the opening of the domain by a disk of
	// radius ρ, largest area first.
	Bays []Bay
	// Channels are the components of what the opening removes that are
	// large enough to matter, largest area first.
	Channels []Channel
	// Slivers are the pieces the opening removes that were too small to be
	// channels: the cusps left in convex corners and numerical crumbs.
	// Whoever finishes the walls clears them.
	Slivers []geom.Region
}

// Bay is a wide zone of the domain: every point of it lies on a disk of
// radius ρ inside the domain.
type Bay struct {
	Region geom.Region
	// Deepest is the centre of the largest circle inside Region and Radius
	// its radius (see DeepestPoint): the natural place for a helix entry.
	Deepest geom.Point
	Radius  float64
}

// Channel is a narrow zone of the domain, too narrow anywhere for a disk of
// radius ρ, with a spine along its middle.
type Channel struct {
	Region geom.Region
	// Spine is a polyline along the middle of the channel. With two or more
	// ends it runs from Ends[0].At to Ends[1].At; with one end it runs from
	// Ends[0].At to the far tip; with none it joins the two ends of the
	// channel that lie farthest apart along it.
	Spine []geom.Point
	// Clearance holds, for each spine point, its distance to the walls of
	// the domain (the interfaces with bays are not walls): the radius of the
	// largest loop centred there.
	Clearance []float64
	// Width is twice the radius of the largest circle inside Region.
	Width float64
	// Ends are the places where the channel opens into a bay, ordered by
	// bay index and then by position.
	Ends []ChannelEnd
	// Branches reach the ends after the first two, Branches[i] running from
	// a point of the spine (or of an earlier branch) to Ends[i+2].At.
	Branches [][]geom.Point
}

// ChannelEnd is a place where a channel opens into a bay.
type ChannelEnd struct {
	// Bay is the index of the bay in Zones.Bays.
	Bay int
	// At is the middle of the stretch of boundary the channel shares with
	// the bay, where its spine starts or ends.
	At geom.Point
}

// SplitOptions tune Split. The zero value gives the documented defaults.
type SplitOptions struct {
	// MinWidth drops pieces whose width (twice their inscribed radius) is
	// below it. Zero means 10·tol, which removes only numerical crumbs.
	MinWidth float64
	// MinReach drops a piece that opens into exactly one bay through one
	// stretch of boundary when no point of it lies as far as MinReach from
	// that bay. Such shallow pieces are the cusps the opening leaves in
	// convex corners: at a corner of interior angle θ the cusp reaches
	// ρ·(1/sin(θ/2) − 1) from the bay (0.41·ρ at a right angle). Zero means
	// ρ/2, which drops the cusps of corners wider than about 84° and keeps
	// sharper corners as dead-end channels; a negative value keeps them all.
	MinReach float64
	// Step is the spacing of the inward offsets from which a channel's spine
	// is built. Zero means a twelfth of the channel's inscribed radius, and
	// never less than 4·tol.
	Step float64
	// Progress, when not nil, is called after each piece is classified and
	// after each spine is built, with the work done and the work in total.
	Progress func(done, total int)
}

// Split divides a tool-centre domain c into bays and channels for a disk of
// radius rho (ρ), without a medial axis or Voronoi diagram:
//
//   - the bays are the components of Open(c, ρ): everything a disk of
//     radius ρ reaches while it stays inside c;
//   - the channels are the components of what the opening removes, less the
//     slivers that SplitOptions.MinWidth and MinReach describe;
//   - each channel's spine comes from the collapse of its inward offsets:
//     offsets at SplitOptions.Step until the channel vanishes, keeping at
//     each level the boundary points that are farther than one step from the
//     next level (where the offset front collapses), then the shortest path
//     through those points between the channel's ends, centred between the
//     walls and simplified within tol.
//
// To keep the set difference robust where the opening shares a straight wall
// Between parallel walls the spine lies on the centre line within tol
// (it is centred by casting rays to the walls); where branches of the
// collapse meet, as at the square end of a slot, within about one step.
// At a free end the spine follows the collapse into a corner.
//
// To keep the set difference robust where the opening shares a straight wall
// with c, the bays are grown by 2·tol before they are subtracted; a channel
// therefore stops 2·tol short of its bays. A zone exactly 2ρ wide is a
// channel (the disk does not fit with room to spare). tol ≤ 0 means
// DefaultTolerance. The output is deterministic. Split honours ctx between
// offsets.
func Split(ctx context.Context, c geom.Shape, rho, tol float64, opt SplitOptions) (Zones, error) {
	if math.IsNaN(rho) || math.IsInf(rho, 0) || rho <= 0 {
		return Zones{}, fmt.Errorf("split: disk radius %v must be positive and finite", rho)
	}
	if math.IsNaN(tol) || math.IsInf(tol, 0) {
		return Zones{}, fmt.Errorf("split: tolerance %v is not finite", tol)
	}
	if tol <= 0 {
		tol = DefaultTolerance
	}
	if opt.MinWidth == 0 {
		opt.MinWidth = 10 * tol
	}
	if opt.MinReach == 0 {
		opt.MinReach = rho / 2
	}
	if math.IsNaN(opt.MinWidth) || math.IsNaN(opt.MinReach) || math.IsNaN(opt.Step) || opt.Step < 0 {
		return Zones{}, fmt.Errorf("split: options %+v: MinWidth, MinReach and Step must be numbers, Step not negative", opt)
	}
	c = c.Normalized()
	if len(c) == 0 {
		return Zones{}, nil
	}
	if err := ctx.Err(); err != nil {
		return Zones{}, fmt.Errorf("split: %w", err)
	}

	open, err := Open(c, rho, tol)
	if err != nil {
		return Zones{}, fmt.Errorf("split: opening by %g: %w", rho, err)
	}
	if err := ctx.Err(); err != nil {
		return Zones{}, fmt.Errorf("split: %w", err)
	}
	var z Zones
	bays := append(geom.Shape(nil), open.Normalized()...)
	sortRegions(bays, tol*tol)
	for i, g := range bays {
		if err := ctx.Err(); err != nil {
			return Zones{}, fmt.Errorf("split: %w", err)
		}
		p, r, err := DeepestPoint(g, tol)
		if err != nil {
			return Zones{}, fmt.Errorf("split: bay %d: %w", i, err)
		}
		z.Bays = append(z.Bays, Bay{Region: g, Deepest: p, Radius: r})
	}

	rest := c
	grow := 2 * tol
	if len(bays) > 0 {
		grown, err := Offset(bays, grow, tol)
		if err != nil {
			return Zones{}, fmt.Errorf("split: growing the bays by %g: %w", grow, err)
		}
		if rest, err = differenceCtx(ctx, c, grown); err != nil {
			return Zones{}, fmt.Errorf("split: domain less bays: %w", err)
		}
	}
	rest = rest.Normalized()
	sortRegions(rest, tol*tol)

	walls := newSegIndex(c.Rings(), rho/4)
	bayEps := grow + 4*tol
	total := 2 * len(rest)
	done := 0
	progress := func() {
		done++
		if opt.Progress != nil {
			opt.Progress(done, total)
		}
	}
	type piece struct {
		g      geom.Region
		radius float64
		ends   []ChannelEnd
	}
	var keep []piece
	for _, g := range rest {
		if err := ctx.Err(); err != nil {
			return Zones{}, fmt.Errorf("split: %w", err)
		}
		_, r, err := DeepestPoint(g, tol)
		if err != nil || 2*r < opt.MinWidth {
			z.Slivers = append(z.Slivers, g)
			progress()
			continue
		}
		ends := interfaces(g, z.Bays, bayEps)
		if len(ends) == 1 && opt.MinReach > 0 && reach(g, z.Bays[ends[0].Bay].Region) < opt.MinReach {
			z.Slivers = append(z.Slivers, g)
			progress()
			continue
		}
		keep = append(keep, piece{g, r, ends})
		progress()
	}
	total = len(rest) + len(keep)
	for i, p := range keep {
		if err := ctx.Err(); err != nil {
			return Zones{}, fmt.Errorf("split: %w", err)
		}
		ch, err := buildChannel(ctx, p.g, p.radius, p.ends, walls, c, tol, opt.Step)
		if err != nil {
			return Zones{}, fmt.Errorf("split: channel %d: %w", i, err)
		}
		z.Channels = append(z.Channels, ch)
		progress()
	}
	return z, nil
}

// sortRegions orders regions by area, largest first, then by the lower-left
// corner of their bounds, for deterministic output. Areas are compared in
// whole multiples of quantum so that mirror images whose computed areas
// differ only by rounding are ordered by position.
func sortRegions(s geom.Shape, quantum float64) {
	type key struct {
		a    float64
		x, y float64
	}
	keys := make([]key, len(s))
	for i, g := range s {
		b := g.Bounds()
		keys[i] = key{math.Round(g.Area() / quantum), b.Min.X, b.Min.Y}
	}
	idx := make([]int, len(s))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(i, j int) bool {
		a, b := keys[idx[i]], keys[idx[j]]
		switch {
		case a.a != b.a:
			return a.a > b.a
		case a.x != b.x:
			return a.x < b.x
		}
		return a.y < b.y
	})
	out := make(geom.Shape, len(s))
	for i, k := range idx {
		out[i] = s[k]
	}
	copy(s, out)
}

// interfaces finds the stretches of g's boundary that lie within eps of a
// bay's boundary, one ChannelEnd per unbroken stretch, at its middle by
// length.
func interfaces(g geom.Region, bays []Bay, eps float64) []ChannelEnd {
	gb := g.Bounds()
	var near []int
	for i, b := range bays {
		bb := b.Region.Bounds()
		if bb.Min.X-eps <= gb.Max.X && gb.Min.X <= bb.Max.X+eps && bb.Min.Y-eps <= gb.Max.Y && gb.Min.Y <= bb.Max.Y+eps {
			near = append(near, i)
		}
	}
	if len(near) == 0 {
		return nil
	}
	var ends []ChannelEnd
	for _, r := range g.Rings() {
		n := len(r)
		owner := make([]int, n) // bay of edge i (r[i] to r[i+1]) or −1
		for i := range r {
			owner[i] = -1
			m := r[i].Lerp(r[(i+1)%n], 0.5)
			for _, bi := range near {
				if bays[bi].Region.DistanceToBoundary(m) <= eps {
					owner[i] = bi
					break
				}
			}
		}
		// Start the walk at an edge that begins a stretch, so that no
		// stretch is cut in two by the ring's seam.
		start := -1
		for i := range r {
			if owner[i] >= 0 && owner[(i+n-1)%n] != owner[i] {
				start = i
				break
			}
		}
		if start < 0 {
			if owner[0] >= 0 { // the whole ring borders one bay
				ends = append(ends, ChannelEnd{Bay: owner[0], At: chainMiddle(r, 0, n)})
			}
			continue
		}
		for k := 0; k < n; {
			i := (start + k) % n
			if owner[i] < 0 {
				k++
				continue
			}
			l := 1
			for k+l < n && owner[(i+l)%n] == owner[i] {
				l++
			}
			ends = append(ends, ChannelEnd{Bay: owner[i], At: chainMiddle(r, i, l)})
			k += l
		}
	}
	sort.SliceStable(ends, func(i, j int) bool {
		a, b := ends[i], ends[j]
		switch {
		case a.Bay != b.Bay:
			return a.Bay < b.Bay
		case a.At.X != b.At.X:
			return a.At.X < b.At.X
		}
		return a.At.Y < b.At.Y
	})
	return ends
}

// chainMiddle returns the point halfway along the l edges of r starting at
// edge i.
func chainMiddle(r geom.Ring, i, l int) geom.Point {
	n := len(r)
	var total float64
	for k := 0; k < l; k++ {
		total += r[(i+k)%n].Dist(r[(i+k+1)%n])
	}
	half := total / 2
	for k := 0; k < l; k++ {
		a, b := r[(i+k)%n], r[(i+k+1)%n]
		e := a.Dist(b)
		if half <= e && e > 0 {
			return a.Lerp(b, half/e)
		}
		half -= e
	}
	return r[(i+l)%n]
}

// reach returns how far g extends from bay: the largest distance from a
// vertex of g to the bay's boundary.
func reach(g geom.Region, bay geom.Region) float64 {
	var m float64
	for _, r := range g.Rings() {
		for _, p := range r {
			m = math.Max(m, bay.DistanceToBoundary(p))
		}
	}
	return m
}

// buildChannel builds the spine of channel region g from the collapse of its
// inward offsets.
func buildChannel(ctx context.Context, g geom.Region, radius float64, ends []ChannelEnd, walls *segIndex, c geom.Shape, tol, step float64) (Channel, error) {
	ch := Channel{Region: g, Width: 2 * radius, Ends: ends}
	s := step
	if s == 0 {
		s = radius / 12
	}
	s = math.Max(s, 4*tol)

	// Collapse samples: boundary points of each inward offset that lie
	// farther than one step (plus a margin) from the next offset.
	margin := math.Max(0.05*s, 2*tol)
	var samples []geom.Point
	cur := geom.Shape{g}
	const maxLevels = 100_000
	for k := 1; len(cur) > 0; k++ {
		if k > maxLevels {
			return Channel{}, fmt.Errorf("inward offsets did not vanish after %d steps of %g", maxLevels, s)
		}
		if err := ctx.Err(); err != nil {
			return Channel{}, err
		}
		next, err := Offset(geom.Shape{g}, -float64(k)*s, tol)
		if err != nil {
			return Channel{}, fmt.Errorf("inward offset by %g: %w", float64(k)*s, err)
		}
		var idx *segIndex
		if len(next) > 0 {
			idx = newSegIndex(next.Rings(), s)
		}
		for _, r := range cur.Rings() {
			for _, p := range densify(r, s/2) {
				if idx == nil || !idx.within(p, s+margin) {
					samples = append(samples, p)
				}
			}
		}
		cur = next
	}
	if len(samples) == 0 {
		return Channel{}, fmt.Errorf("no collapse points found (step %g)", s)
	}

	var anchors []geom.Point
	for _, e := range ends {
		anchors = append(anchors, e.At)
	}
	var raw []geom.Point
	var branches [][]geom.Point
	for hr := 2.1 * s; ; hr *= 2 {
		gr := newSpineGraph(samples, anchors, hr, walls, c)
		var ok bool
		raw, branches, ok = gr.paths(len(anchors))
		if ok {
			break
		}
		if hr > 4*radius+10*s {
			return Channel{}, fmt.Errorf("collapse points do not join up (%d points, step %g)", len(samples), s)
		}
	}
	ch.Spine = refineSpine(raw, s, tol, c, len(anchors) > 0, len(anchors) > 1)
	for _, b := range branches {
		ch.Branches = append(ch.Branches, refineSpine(b, s, tol, c, true, true))
	}
	for _, p := range ch.Spine {
		ch.Clearance = append(ch.Clearance, c.DistanceToBoundary(p))
	}
	return ch, nil
}

// densify returns the points of r with extra points on every edge longer
// than h, so that consecutive points are at most h apart.
func densify(r geom.Ring, h float64) []geom.Point {
	var out []geom.Point
	n := len(r)
	for i := range r {
		a, b := r[i], r[(i+1)%n]
		out = append(out, a)
		if k := int(math.Ceil(a.Dist(b) / h)); k > 1 {
			for j := 1; j < k; j++ {
				out = append(out, a.Lerp(b, float64(j)/float64(k)))
			}
		}
	}
	return out
}

// spineGraph joins collapse samples closer than a radius whose joining
// segment stays clear of the walls, plus anchors at the channel's ends.
type spineGraph struct {
	pts []geom.Point
	adj [][]int
	na  int // anchors are the last na points
}

func newSpineGraph(samples, anchors []geom.Point, hr float64, walls *segIndex, c geom.Shape) *spineGraph {
	g := &spineGraph{pts: append(append([]geom.Point(nil), samples...), anchors...), na: len(anchors)}
	g.adj = make([][]int, len(g.pts))
	buckets := map[[2]int][]int{}
	cellOf := func(p geom.Point) [2]int {
		return [2]int{int(math.Floor(p.X / hr)), int(math.Floor(p.Y / hr))}
	}
	for i, p := range samples {
		k := cellOf(p)
		buckets[k] = append(buckets[k], i)
	}
	for i, p := range samples {
		k := cellOf(p)
		for dx := -1; dx <= 1; dx++ {
			for dy := -1; dy <= 1; dy++ {
				for _, j := range buckets[[2]int{k[0] + dx, k[1] + dy}] {
					if j <= i || p.Dist(samples[j]) > hr || walls.crosses(p, samples[j]) {
						continue
					}
					g.adj[i] = append(g.adj[i], j)
					g.adj[j] = append(g.adj[j], i)
				}
			}
		}
	}
	// An anchor sees every sample inside the disk about it that stays in
	// the domain, plus one step.
	for a, p := range anchors {
		ai := len(samples) + a
		ra := c.DistanceToBoundary(p) + hr/2
		for j, q := range samples {
			if p.Dist(q) <= ra && !walls.crosses(p, q) {
				g.adj[ai] = append(g.adj[ai], j)
				g.adj[j] = append(g.adj[j], ai)
			}
		}
	}
	for i := range g.adj {
		sort.Ints(g.adj[i])
	}
	return g
}

// dijkstra returns the distance to every point from the sources and the
// predecessor on a shortest path.
func (g *spineGraph) dijkstra(src []int) ([]float64, []int) {
	dist := make([]float64, len(g.pts))
	prev := make([]int, len(g.pts))
	for i := range dist {
		dist[i] = math.Inf(1)
		prev[i] = -1
	}
	q := &nodeQueue{}
	for _, s := range src {
		dist[s] = 0
		heap.Push(q, node{s, 0})
	}
	for q.Len() > 0 {
		n := heap.Pop(q).(node)
		if n.d > dist[n.i] {
			continue
		}
		for _, j := range g.adj[n.i] {
			if d := n.d + g.pts[n.i].Dist(g.pts[j]); d < dist[j] {
				dist[j], prev[j] = d, n.i
				heap.Push(q, node{j, d})
			}
		}
	}
	return dist, prev
}

func (g *spineGraph) trace(prev []int, to int) []geom.Point {
	var out []geom.Point
	for i := to; i >= 0; i = prev[i] {
		out = append(out, g.pts[i])
	}
	for i, j := 0, len(out)-1; i < j; i, j = i+1, j-1 {
		out[i], out[j] = out[j], out[i]
	}
	return out
}

// farthest returns the finite-distance sample farthest from the sources
// (anchors excluded), or −1.
func (g *spineGraph) farthest(dist []float64) int {
	best, bi := -1.0, -1
	for i := 0; i < len(g.pts)-g.na; i++ {
		if !math.IsInf(dist[i], 1) && dist[i] > best {
			best, bi = dist[i], i
		}
	}
	return bi
}

// paths returns the main spine path and the branches to further anchors;
// ok is false when the graph does not join what it must.
func (g *spineGraph) paths(na int) (main []geom.Point, branches [][]geom.Point, ok bool) {
	ns := len(g.pts) - g.na
	switch na {
	case 0:
		d0, _ := g.dijkstra([]int{0})
		u := g.farthest(d0)
		if u < 0 {
			return nil, nil, false
		}
		// Every sample must be reachable, or the spine misses a part.
		for i := 0; i < ns; i++ {
			if math.IsInf(d0[i], 1) {
				return nil, nil, false
			}
		}
		du, prev := g.dijkstra([]int{u})
		v := g.farthest(du)
		return g.trace(prev, v), nil, true
	case 1:
		d, prev := g.dijkstra([]int{ns})
		v := g.farthest(d)
		if v < 0 {
			return nil, nil, false
		}
		return g.trace(prev, v), nil, true
	}
	d, prev := g.dijkstra([]int{ns})
	if math.IsInf(d[ns+1], 1) {
		return nil, nil, false
	}
	main = g.trace(prev, ns+1)
	// Branches to the remaining anchors start from the nearest point of
	// what is built so far.
	onTree := map[int]bool{}
	for i := ns + 1; i >= 0; i = prev[i] {
		onTree[i] = true
	}
	for a := 2; a < na; a++ {
		var tree []int
		for i := range onTree {
			tree = append(tree, i)
		}
		sort.Ints(tree)
		da, pa := g.dijkstra(tree)
		if math.IsInf(da[ns+a], 1) {
			return nil, nil, false
		}
		br := g.trace(pa, ns+a)
		branches = append(branches, br)
		for i := ns + a; i >= 0; i = pa[i] {
			onTree[i] = true
		}
	}
	return main, branches, true
}

type node struct {
	i int
	d float64
}

type nodeQueue []node

func (q nodeQueue) Len() int { return len(q) }
func (q nodeQueue) Less(i, j int) bool {
	if q[i].d != q[j].d {
		return q[i].d < q[j].d
	}
	return q[i].i < q[j].i
}
func (q nodeQueue) Swap(i, j int) { q[i], q[j] = q[j], q[i] }
func (q *nodeQueue) Push(x any)   { *q = append(*q, x.(node)) }
func (q *nodeQueue) Pop() any {
	old := *q
	n := old[len(old)-1]
	*q = old[:len(old)-1]
	return n
}

// refineSpine turns a path through collapse samples, which lie within about
// one step of the middle, into a clean spine: simplify within a step,
// resample at a step, move each inner point along the local normal to the
// midpoint between the walls (by at most 1.5 steps), and simplify within tol.
// fixStart and fixEnd keep the end points where they are (anchors).
func refineSpine(path []geom.Point, s, tol float64, c geom.Shape, fixStart, fixEnd bool) []geom.Point {
	if len(path) < 2 {
		return append([]geom.Point(nil), path...)
	}
	coarse := simplify(path, s)
	var pts []geom.Point
	for i := 0; i+1 < len(coarse); i++ {
		a, b := coarse[i], coarse[i+1]
		k := int(math.Max(1, math.Ceil(a.Dist(b)/s)))
		for j := 0; j < k; j++ {
			pts = append(pts, a.Lerp(b, float64(j)/float64(k)))
		}
	}
	pts = append(pts, coarse[len(coarse)-1])
	out := make([]geom.Point, len(pts))
	copy(out, pts)
	rings := c.Rings()
	for i := range pts {
		if (i == 0 && fixStart) || (i == len(pts)-1 && fixEnd) {
			continue
		}
		a, b := pts[max(i-1, 0)], pts[min(i+1, len(pts)-1)]
		n := b.Sub(a).Unit().Perp()
		if n == (geom.Point{}) {
			continue
		}
		d1 := rayHit(rings, pts[i], n)
		d2 := rayHit(rings, pts[i], n.Scale(-1))
		if math.IsInf(d1, 1) || math.IsInf(d2, 1) {
			continue
		}
		if shift := (d1 - d2) / 2; math.Abs(shift) <= 1.5*s {
			out[i] = pts[i].Add(n.Scale(shift))
		}
	}
	return simplify(out, tol)
}

// rayHit returns the distance from p along unit direction u to the first
// ring edge it meets, or +Inf.
func rayHit(rings []geom.Ring, p, u geom.Point) float64 {
	best := math.Inf(1)
	for _, r := range rings {
		n := len(r)
		for i := range r {
			a, b := r[i], r[(i+1)%n]
			e := b.Sub(a)
			den := u.Cross(e)
			if den == 0 {
				continue
			}
			ap := a.Sub(p)
			t := ap.Cross(e) / den // along the ray
			v := ap.Cross(u) / den // along the edge
			if t > 0 && v >= 0 && v <= 1 && t < best {
				best = t
			}
		}
	}
	return best
}

// simplify drops points of the polyline that lie within eps of the chord
// of their neighbours (Douglas–Peucker), keeping both ends.
func simplify(p []geom.Point, eps float64) []geom.Point {
	if len(p) < 3 {
		return append([]geom.Point(nil), p...)
	}
	keep := make([]bool, len(p))
	keep[0], keep[len(p)-1] = true, true
	type span struct{ i, j int }
	stack := []span{{0, len(p) - 1}}
	for len(stack) > 0 {
		sp := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		far, fi := -1.0, -1
		for k := sp.i + 1; k < sp.j; k++ {
			if d := geom.SegmentDistance(p[k], p[sp.i], p[sp.j]); d > far {
				far, fi = d, k
			}
		}
		if fi >= 0 && far > eps {
			keep[fi] = true
			stack = append(stack, span{sp.i, fi}, span{fi, sp.j})
		}
	}
	var out []geom.Point
	for i, k := range keep {
		if k {
			out = append(out, p[i])
		}
	}
	return out
}

// segIndex buckets the edges of some rings on a square grid for "is any
// edge within r of p" and "does segment pq cross an edge" queries. Each
// edge is registered in the cells of points sampled along it at most one
// cell apart, so every point of an edge lies within half a cell of a
// registered cell's sample; queries widen their search by that much.
type segIndex struct {
	cell  float64
	a, b  []geom.Point
	cells map[[2]int][]int32
}

func newSegIndex(rings []geom.Ring, cell float64) *segIndex {
	x := &segIndex{cell: cell, cells: map[[2]int][]int32{}}
	for _, r := range rings {
		n := len(r)
		for i := range r {
			a, b := r[i], r[(i+1)%n]
			id := int32(len(x.a))
			x.a = append(x.a, a)
			x.b = append(x.b, b)
			k := int(math.Ceil(a.Dist(b)/cell)) + 1
			var last [2]int
			for j := 0; j <= k; j++ {
				c := x.key(a.Lerp(b, float64(j)/float64(k)))
				if j > 0 && c == last {
					continue
				}
				last = c
				if l := x.cells[c]; len(l) == 0 || l[len(l)-1] != id {
					x.cells[c] = append(l, id)
				}
			}
		}
	}
	return x
}

func (x *segIndex) key(p geom.Point) [2]int {
	return [2]int{int(math.Floor(p.X / x.cell)), int(math.Floor(p.Y / x.cell))}
}

// candidates calls f for each edge registered near the box [lo, hi], in a
// fixed order, until f returns true. An edge may come more than once.
func (x *segIndex) candidates(lo, hi geom.Point, f func(i int32) bool) {
	pad := x.cell
	k0 := x.key(geom.Pt(lo.X-pad, lo.Y-pad))
	k1 := x.key(geom.Pt(hi.X+pad, hi.Y+pad))
	for i := k0[0]; i <= k1[0]; i++ {
		for j := k0[1]; j <= k1[1]; j++ {
			for _, id := range x.cells[[2]int{i, j}] {
				if f(id) {
					return
				}
			}
		}
	}
}

func (x *segIndex) within(p geom.Point, r float64) bool {
	found := false
	x.candidates(geom.Pt(p.X-r, p.Y-r), geom.Pt(p.X+r, p.Y+r), func(i int32) bool {
		found = geom.SegmentDistance(p, x.a[i], x.b[i]) <= r
		return found
	})
	return found
}

// crosses reports whether pq properly crosses an indexed edge (touching at
// an end point does not count).
func (x *segIndex) crosses(p, q geom.Point) bool {
	lo := geom.Pt(math.Min(p.X, q.X), math.Min(p.Y, q.Y))
	hi := geom.Pt(math.Max(p.X, q.X), math.Max(p.Y, q.Y))
	found := false
	x.candidates(lo, hi, func(i int32) bool {
		a, b := x.a[i], x.b[i]
		d1 := q.Sub(p).Cross(a.Sub(p))
		d2 := q.Sub(p).Cross(b.Sub(p))
		d3 := b.Sub(a).Cross(p.Sub(a))
		d4 := b.Sub(a).Cross(q.Sub(a))
		found = ((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))
		return found
	})
	return found
}

// differenceCtx is geom.Difference that returns as soon as ctx is done.
// The set operation itself cannot be interrupted: it runs on in its own
// goroutine until it finishes, and its result is dropped.
func differenceCtx(ctx context.Context, a, b geom.Shape) (geom.Shape, error) {
	type result struct {
		s   geom.Shape
		err error
	}
	done := make(chan result, 1)
	go func() {
		s, err := geom.Difference(a, b)
		done <- result{s, err}
	}()
	select {
	case <-ctx.Done():
		return nil, ctx.Err()
	case r := <-done:
		return r.s, r.err
	}
}
