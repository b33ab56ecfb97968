package geom

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/peterstace/simplefeatures/rtree"
)

// MaxCoord is the largest coordinate magnitude, in millimetres, that a valid
// ring may hold. Larger values are almost always a unit mistake (metres or
// micrometres read as millimetres) and would cost precision in the exact
// predicates.
const MaxCoord = 1e6

// The kinds of validation failure. A *ValidationError wraps exactly one of
// them, so callers can test with errors.Is.
var (
	ErrNotFinite        = errors.New("coordinate is not finite")
	ErrOutOfRange       = errors.New("coordinate beyond ±1e6 mm")
	ErrTooFewPoints     = errors.New("fewer than 3 distinct points")
	ErrRepeatedPoint    = errors.New("repeated point")
	ErrZeroArea         = errors.New("zero area")
	ErrSelfIntersection = errors.New("ring self-intersects")
	ErrHoleOutside      = errors.New("hole not inside its outer ring")
	ErrHolesOverlap     = errors.New("holes overlap")
	ErrRegionsOverlap   = errors.New("regions overlap")
)

// ValidationError tells what is wrong with a ring, region or shape and where.
// Indices of regions, holes, vertices and edges count from 0, as in Go; edge
// i runs from vertex i to vertex i+1 (the last edge closes the ring).
type ValidationError struct {
	// Where locates the faulty part, for example "region 2, hole 1"; it is
	// empty for a lone ring.
	Where string
	// Kind is one of the Err… values of this package.
	Kind error
	// Detail completes the message, for example "at edges 3 and 7".
	Detail string
	// At is a point at or near the fault; meaningful when HasAt is set.
	At    Point
	HasAt bool
}

// Error returns the message, e.g.
// "region 2, hole 1: ring self-intersects at edges 3 and 7 near (12.5, 4)".
func (e *ValidationError) Error() string {
	var b strings.Builder
	if e.Where != "" {
		b.WriteString(e.Where)
		b.WriteString(": ")
	}
	b.WriteString(e.Kind.Error())
	if e.Detail != "" {
		b.WriteString(" ")
		b.WriteString(e.Detail)
	}
	if e.HasAt {
		b.WriteString(" near ")
		b.WriteString(fmtPoint(e.At))
	}
	return b.String()
}

// Unwrap returns the kind of failure.
func (e *ValidationError) Unwrap() error { return e.Kind }

// within returns a copy of e located inside the part named by where.
func (e *ValidationError) within(where string) *ValidationError {
	c := *e
	if c.Where == "" {
		c.Where = where
	} else {
		c.Where = where + ", " + c.Where
	}
	return &c
}

// fmtNum formats a coordinate for messages: at most 7 significant digits.
func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', 7, 64) }

// fmtPoint formats a point for messages as "(x, y)".
func fmtPoint(p Point) string { return "(" + fmtNum(p.X) + ", " + fmtNum(p.Y) + ")" }

// Validate reports the first thing wrong with r, or nil: a coordinate that
// is NaN or infinite or beyond ±MaxCoord, fewer than 3 distinct points, a
// point repeated by its successor (including a last point that repeats the
// first: rings close implicitly), zero enclosed area, or edges that cross or
// touch other than at the vertex two neighbouring edges share (a spike that
// folds back on its own edge counts as touching). Orientation is not
// checked; see Region.Normalized. Intersection tests are exact and run in
// about O(n log n) time on ordinary rings.
func (r Ring) Validate() error {
	if e := r.validate(); e != nil {
		return e
	}
	return nil
}

// checkCoords reports the first vertex of r that is not finite or beyond
// ±MaxCoord.
func (r Ring) checkCoords() *ValidationError {
	for i, p := range r {
		if math.IsNaN(p.X) || math.IsNaN(p.Y) || math.IsInf(p.X, 0) || math.IsInf(p.Y, 0) {
			return &ValidationError{Kind: ErrNotFinite, Detail: "at vertex " + strconv.Itoa(i) + " " + fmtPoint(p)}
		}
		if math.Abs(p.X) > MaxCoord || math.Abs(p.Y) > MaxCoord {
			return &ValidationError{Kind: ErrOutOfRange, Detail: "at vertex " + strconv.Itoa(i) + " " + fmtPoint(p)}
		}
	}
	return nil
}

func (r Ring) validate() *ValidationError {
	if e := r.checkCoords(); e != nil {
		return e
	}
	if d := distinctUpTo3(r); d < 3 {
		return &ValidationError{Kind: ErrTooFewPoints, Detail: fmt.Sprintf("(ring has %d)", d)}
	}
	n := len(r)
	for i := range r {
		j := (i + 1) % n
		if r[i] == r[j] {
			detail := fmt.Sprintf("at vertex %d, same as vertex %d", j, i)
			if j == 0 {
				detail = fmt.Sprintf("at vertex %d, same as vertex 0 (rings close implicitly; drop the closing point)", i)
			}
			return &ValidationError{Kind: ErrRepeatedPoint, Detail: detail, At: r[i], HasAt: true}
		}
	}
	if allCollinear(r) {
		return &ValidationError{Kind: ErrZeroArea, Detail: "(all points on one line)"}
	}
	if c, ok := firstContact([]Ring{r}, nil, true); ok {
		return &ValidationError{Kind: ErrSelfIntersection,
			Detail: fmt.Sprintf("at edges %d and %d", c.edgeA, c.edgeB), At: c.at, HasAt: true}
	}
	b := r.Bounds()
	diag2 := b.Width()*b.Width() + b.Height()*b.Height()
	// A simple ring whose area is below 1e-12 of its bounding box's squared
	// diagonal is a sliver about 1e-12 of its size wide: nothing a cutter
	// can follow, and in practice the rounding noise of collinear points.
	if a := r.Area(); a <= 1e-12*diag2 {
		return &ValidationError{Kind: ErrZeroArea, Detail: fmt.Sprintf("(%g mm² within a %g × %g mm box)", a, b.Width(), b.Height())}
	}
	return nil
}

// allCollinear reports whether every point of r lies on one line (exact).
func allCollinear(r Ring) bool {
	a := r[0]
	k := 1
	for k < len(r) && r[k] == a {
		k++
	}
	if k == len(r) {
		return true
	}
	b := r[k]
	for _, p := range r[k+1:] {
		if Orient(a, b, p) != 0 {
			return false
		}
	}
	return true
}

// distinctUpTo3 returns the number of distinct points of r, counting at
// most to 3.
func distinctUpTo3(r Ring) int {
	if len(r) == 0 {
		return 0
	}
	a := r[0]
	k := -1
	for i, p := range r {
		if p != a {
			k = i
			break
		}
	}
	if k < 0 {
		return 1
	}
	b := r[k]
	for _, p := range r[k:] {
		if p != a && p != b {
			return 3
		}
	}
	return 2
}

// Validate reports the first thing wrong with g, or nil: a faulty ring (see
// Ring.Validate), a hole that is not strictly inside the outer ring, or
// holes that cross, touch or lie one inside another. chipband is stricter
// than OGC Simple Features here: no two rings of a region may share any
// point, because a tool cannot pass through a point contact.
func (g Region) Validate() error {
	if e := g.validate(); e != nil {
		return e
	}
	return nil
}

func holeName(k int) string { return "hole " + strconv.Itoa(k) }

func (g Region) validate() *ValidationError {
	if e := g.Outer.validate(); e != nil {
		return e.within("outer ring")
	}
	for k, h := range g.Holes {
		if e := h.validate(); e != nil {
			return e.within(holeName(k))
		}
	}
	if len(g.Holes) == 0 {
		return nil
	}
	rings := g.Rings()
	if c, ok := firstContact(rings, nil, false); ok {
		if c.ringA == 0 {
			return &ValidationError{Where: holeName(c.ringB - 1), Kind: ErrHoleOutside,
				Detail: fmt.Sprintf("(its edge %d meets edge %d of the outer ring)", c.edgeB, c.edgeA),
				At:     c.at, HasAt: true}
		}
		return &ValidationError{Kind: ErrHolesOverlap,
			Detail: fmt.Sprintf("(hole %d edge %d meets hole %d edge %d)", c.ringA-1, c.edgeA, c.ringB-1, c.edgeB),
			At:     c.at, HasAt: true}
	}
	// No two rings meet, so one vertex of a ring tells on which side of
	// another ring the whole ring lies.
	for k, h := range g.Holes {
		if g.Outer.Winding(h[0]) == 0 {
			return &ValidationError{Where: holeName(k), Kind: ErrHoleOutside,
				Detail: "(it lies outside)", At: h[0], HasAt: true}
		}
	}
	if i, j, ok := nestedRing(g.Holes); ok {
		return &ValidationError{Kind: ErrHolesOverlap,
			Detail: fmt.Sprintf("(hole %d lies inside hole %d)", i, j), At: g.Holes[i][0], HasAt: true}
	}
	return nil
}

// nestedRing finds a ring of rs that lies inside another, given that no two
// rings meet: it returns the inner and the outer index.
func nestedRing(rs []Ring) (inner, outer int, ok bool) {
	items := make([]rtree.BulkItem, len(rs))
	for i, r := range rs {
		items[i] = rtree.BulkItem{Box: toBox(r.Bounds()), RecordID: i}
	}
	tree := rtree.BulkLoad(items)
	for i, r := range rs {
		p := r[0]
		best := -1
		_ = tree.RangeSearch(rtree.Box{MinX: p.X, MinY: p.Y, MaxX: p.X, MaxY: p.Y}, func(j int) error {
			if j != i && (best < 0 || j < best) && rs[j].Winding(p) != 0 {
				best = j
			}
			return nil
		})
		if best >= 0 {
			return i, best, true
		}
	}
	return 0, 0, false
}

// Validate reports the first thing wrong with s, or nil: a faulty region
// (see Region.Validate), or two regions that cross, touch or lie one inside
// the other (a region inside a hole of another is fine). An empty shape is
// valid.
func (s Shape) Validate() error {
	if e := s.validate(); e != nil {
		return e
	}
	return nil
}

func regionName(k int) string { return "region " + strconv.Itoa(k) }

func (s Shape) validate() *ValidationError {
	for k, g := range s {
		if e := g.validate(); e != nil {
			return e.within(regionName(k))
		}
	}
	if i, j, at, how, ok := overlappingGroups(s, nil); ok {
		return &ValidationError{Kind: ErrRegionsOverlap,
			Detail: fmt.Sprintf("(regions %d and %d %s)", i, j, how), At: at, HasAt: true}
	}
	return nil
}

// overlappingGroups looks for two regions of s from different groups that
// meet or nest; group[k] is the group of region k (nil: every region is its
// own group). The regions must each be valid. It returns the two groups,
// a point near the contact and a phrase telling how they meet.
func overlappingGroups(s Shape, group []int) (ga, gb int, at Point, how string, found bool) {
	if len(s) < 2 {
		return
	}
	if group == nil {
		group = make([]int, len(s))
		for i := range group {
			group[i] = i
		}
	}
	var rings []Ring
	var ringGroup, ringRegion []int
	for k, g := range s {
		for _, r := range g.Rings() {
			rings = append(rings, r)
			ringGroup = append(ringGroup, group[k])
			ringRegion = append(ringRegion, k)
		}
	}
	if c, ok := firstContact(rings, ringGroup, false); ok {
		a, b := ringGroup[c.ringA], ringGroup[c.ringB]
		if a > b {
			a, b = b, a
		}
		return a, b, c.at, "cross or touch", true
	}
	items := make([]rtree.BulkItem, len(s))
	for i, g := range s {
		items[i] = rtree.BulkItem{Box: toBox(g.Outer.Bounds()), RecordID: i}
	}
	tree := rtree.BulkLoad(items)
	for i, g := range s {
		p := g.Outer[0]
		best := -1
		_ = tree.RangeSearch(rtree.Box{MinX: p.X, MinY: p.Y, MaxX: p.X, MaxY: p.Y}, func(j int) error {
			if group[j] != group[i] && (best < 0 || j < best) && s[j].Contains(p) {
				best = j
			}
			return nil
		})
		if best >= 0 {
			a, b := group[i], group[best]
			if a > b {
				a, b = b, a
			}
			return a, b, p, "lie one inside the other", true
		}
	}
	return
}

func toBox(r Rect) rtree.Box {
	return rtree.Box{MinX: r.Min.X, MinY: r.Min.Y, MaxX: r.Max.X, MaxY: r.Max.Y}
}

// contact is a pair of edges that share a point.
type contact struct {
	ringA, edgeA, ringB, edgeB int
	at                         Point
}

// firstContact returns the first pair of edges of rings, in ring-then-edge
// order, that share a point. Edges of the same ring are compared only when
// self is set, and then neighbouring edges only count when they fold back
// over each other. Edges of different rings are compared only when their
// groups differ (nil group: every ring is its own group). The coordinates
// must be finite and no ring may repeat a point consecutively.
func firstContact(rings []Ring, group []int, self bool) (contact, bool) {
	type edge struct{ ring, i int }
	var edges []edge
	var items []rtree.BulkItem
	for k, r := range rings {
		n := len(r)
		for i := 0; i < n; i++ {
			a, b := r[i], r[(i+1)%n]
			items = append(items, rtree.BulkItem{
				Box: rtree.Box{
					MinX: math.Min(a.X, b.X), MinY: math.Min(a.Y, b.Y),
					MaxX: math.Max(a.X, b.X), MaxY: math.Max(a.Y, b.Y),
				},
				RecordID: len(edges),
			})
			edges = append(edges, edge{k, i})
		}
	}
	sameGroup := func(a, b int) bool {
		if group == nil {
			return a == b
		}
		return group[a] == group[b]
	}
	boxes := make([]rtree.Box, len(items))
	for i, it := range items {
		boxes[i] = it.Box
	}
	tree := rtree.BulkLoad(items) // reorders items
	for id, e := range edges {
		r := rings[e.ring]
		n := len(r)
		a, b := r[e.i], r[(e.i+1)%n]
		best := -1
		var bestAt Point
		_ = tree.RangeSearch(boxes[id], func(jd int) error {
			if jd <= id || (best >= 0 && jd > best) {
				return nil
			}
			f := edges[jd]
			if f.ring == e.ring {
				if !self {
					return nil
				}
			} else if sameGroup(e.ring, f.ring) {
				return nil
			}
			s := rings[f.ring]
			c, d := s[f.i], s[(f.i+1)%len(s)]
			var at Point
			var ok bool
			if f.ring == e.ring && (f.i == e.i+1 || (e.i == 0 && f.i == n-1)) {
				at, ok = foldBack(a, b, c, d)
			} else {
				at, ok = segmentContact(a, b, c, d)
			}
			if ok {
				best, bestAt = jd, at
			}
			return nil
		})
		if best >= 0 {
			f := edges[best]
			return contact{e.ring, e.i, f.ring, f.i, bestAt}, true
		}
	}
	return contact{}, false
}

// foldBack reports whether two neighbouring edges ab and cd of one ring
// (sharing b = c, or d = a for the closing pair) overlap beyond their shared
// vertex, and returns that vertex.
func foldBack(a, b, c, d Point) (Point, bool) {
	var p, q, v Point // edges v→p and v→q from the shared vertex v
	switch {
	case b == c:
		v, p, q = b, a, d
	case d == a:
		v, p, q = a, b, c
	default:
		return Point{}, false
	}
	if Orient(v, p, q) != 0 {
		return Point{}, false
	}
	if p.Sub(v).Dot(q.Sub(v)) > 0 {
		return v, true
	}
	return Point{}, false
}
