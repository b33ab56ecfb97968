// Package offset is chipband's polygon offsetter: outward and inward offsets
// with round joins, opening and closing by a disk, and series of inward
// offsets, all computed by our own algorithm.
//
// # Method
//
// Every ring of the input is turned into a raw offset curve: each edge is
// moved sideways by the offset distance, an arc polyline is put at every
// vertex that is convex for the direction of the offset, and at every other
// vertex the two offset edge ends are joined through the vertex itself. The
// region sought is the set of points whose winding number with respect to
// all raw curves together is at least 1 (X. Chen, S. McMains, "Polygon
// offsetting by computing winding numbers", ASME IDETC 2005, DETC2005-85513).
//
// Why the joins go through the vertex: as a chain, the raw curve is the
// boundary ∂A of the input plus the boundaries of the rectangles swept by
// the edges and of the circular sectors at the arc vertices. For an outward
// offset these all run counter-clockwise, so the winding number is
// 1_A + Σ 1_rect + Σ 1_sector, which is ≥ 1 exactly on A ⊕ D (every point
// within d of A is in A or has its nearest boundary point on an edge or at
// a convex vertex). For an inward offset they run clockwise, the winding
// number is 1_A − Σ 1_rect − Σ 1_sector, which is 1 exactly on the points
// of A at distance ≥ d from its boundary. Joining the offset edge ends by a
// straight chord instead would be wrong once d exceeds the length of the
// edges next to the vertex. Holes need no special treatment.
//
// The curves are noded on a fixed grid of 1 nm with exact integer
// predicates and snap rounding, the winding number of every face of the
// resulting planar graph is computed, and the edges between winding ≥ 1 and
// winding ≤ 0 are linked into simple rings.
//
// Three things keep this fast and accurate. Raw segments that lie entirely
// within |d| − tol of a simple input's boundary can never bound the result
// (prune.go); they are left out of the noding and only count in exact ray
// counts that classify the faces (arrangement.go). Where an arc polyline
// crosses another raw curve, the exact crossing of the true curves is
// inserted into both before noding, so that narrow wedges of the result end
// where they should (corners.go). Inward arc polylines are area-balanced
// (arcRadius).
//
// # Conventions
//
// Units are millimetres. Results are normalised (outer rings
// counter-clockwise, holes clockwise), rings are simple, holes lie inside
// their outer ring, and regions do not overlap; rings may touch at single
// vertices. Output coordinates lie on the 1 nm grid. Overlapping input
// regions are taken as their union (non-zero winding rule).
//
// Arcs are approximated by chords that deviate from the true arc by at
// most the tolerance, plus the grid rounding of ≤ 1 nm. Outward their
// vertices lie on the arc (the result stays within d of the input); inward
// the vertices lie slightly outside it so that each chord cuts off as much
// area as it leaves (see arcRadius).
package offset

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/chipband/chipband/geom"
)

// DefaultTolerance is the chord tolerance, in mm, used when a tolerance of
// zero or less is given.
const DefaultTolerance = 0.001

// MaxVertices bounds the work of one offset: the number of raw offset
// vertices plus crossings. Beyond it Offset returns ErrTooComplex instead of
// running for a long time.
const MaxVertices = 5_000_000

// MaxCoordinate is the largest absolute coordinate, and the largest absolute
// offset distance, accepted, in mm.
const MaxCoordinate = 1e6

// MinTolerance is the smallest chord tolerance accepted, in mm (ten grid
// units).
const MinTolerance = 1e-5

// MinRingArea is the area, in mm², below which a result ring is dropped as
// a rounding artefact (10⁻⁸ mm², a square of 100 nm side). Holes of a
// dropped outer ring are dropped with it.
const MinRingArea = 1e-8

// MaxSeries is the largest number of offsets Series returns before it gives
// up with an error.
const MaxSeries = 10_000

// ErrInvalidInput is wrapped by every error about bad arguments or shapes.
var ErrInvalidInput = errors.New("invalid input")

// ErrTooComplex is wrapped by the error returned when an offset would exceed
// MaxVertices.
var ErrTooComplex = errors.New("offset too complex")

// Offset returns the shape at signed distance d from s: outward (dilation
// by a disk of radius d) for d > 0, inward (erosion by a disk of radius −d)
// for d < 0, and a normalised copy of s for d = 0. Round joins are drawn as
// chords deviating from the true arc by at most tol mm; tol ≤ 0 means
// DefaultTolerance. Components may split, merge or vanish; the result may
// be empty (nil). Holes of s grow under inward offsets and shrink, possibly
// to nothing, under outward offsets.
func Offset(s geom.Shape, d, tol float64) (geom.Shape, error) {
	if err := checkShape(s); err != nil {
		return nil, err
	}
	if math.IsNaN(d) || math.IsInf(d, 0) || math.Abs(d) > MaxCoordinate {
		return nil, fmt.Errorf("offset: %w: distance %v is not a finite number within ±%g mm", ErrInvalidInput, d, MaxCoordinate)
	}
	tol, err := checkTol(tol)
	if err != nil {
		return nil, err
	}
	if d == 0 {
		return s.Normalized(), nil
	}
	return offset(s, d, tol)
}

// Open returns the opening of s by a disk of radius r: s eroded by r, then
// dilated by r. It removes the parts of s narrower than 2r and rounds convex
// corners to radius r. r = 0 returns a normalised copy; r < 0 is an error.
func Open(s geom.Shape, r, tol float64) (geom.Shape, error) {
	return morph(s, r, tol, -1, "open")
}

// Close returns the closing of s by a disk of radius r: s dilated by r,
// then eroded by r. It fills gaps and notches narrower than 2r and rounds
// reflex corners to radius r. r = 0 returns a normalised copy; r < 0 is an
// error.
func Close(s geom.Shape, r, tol float64) (geom.Shape, error) {
	return morph(s, r, tol, +1, "close")
}

func morph(s geom.Shape, r, tol float64, first float64, name string) (geom.Shape, error) {
	if math.IsNaN(r) || math.IsInf(r, 0) || r < 0 || r > MaxCoordinate {
		return nil, fmt.Errorf("offset: %s: %w: radius %v must be a finite number in [0, %g] mm", name, ErrInvalidInput, r, MaxCoordinate)
	}
	a, err := Offset(s, first*r, tol)
	if err != nil {
		return nil, fmt.Errorf("offset: %s: %w", name, err)
	}
	if r == 0 {
		return a, nil
	}
	b, err := Offset(a, -first*r, tol)
	if err != nil {
		return nil, fmt.Errorf("offset: %s: %w", name, err)
	}
	return b, nil
}

// Series returns the inward offsets of s at the distances first,
// first+step, first+2·step, … up to (not including) the first one that is
// empty. first must be ≥ 0 and step > 0. Each offset is computed from s
// itself, so errors do not accumulate. It stops with ctx's error when ctx
// is done, and with an error after MaxSeries offsets.
func Series(ctx context.Context, s geom.Shape, first, step, tol float64) ([]geom.Shape, error) {
	if math.IsNaN(first) || math.IsInf(first, 0) || first < 0 || first > MaxCoordinate {
		return nil, fmt.Errorf("offset: series: %w: first distance %v must be a finite number in [0, %g] mm", ErrInvalidInput, first, MaxCoordinate)
	}
	if math.IsNaN(step) || math.IsInf(step, 0) || step <= 0 {
		return nil, fmt.Errorf("offset: series: %w: step %v must be a finite positive number", ErrInvalidInput, step)
	}
	var out []geom.Shape
	for k := 0; ; k++ {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("offset: series: %w", err)
		}
		if k >= MaxSeries {
			return nil, fmt.Errorf("offset: series: %w: more than %d offsets (step %g mm too small for the shape)", ErrTooComplex, MaxSeries, step)
		}
		d := first + float64(k)*step
		if d > MaxCoordinate {
			break
		}
		r, err := Offset(s, -d, tol)
		if err != nil {
			return nil, fmt.Errorf("offset: series: offset %d (%g mm): %w", k, d, err)
		}
		if len(r) == 0 {
			break
		}
		out = append(out, r)
	}
	return out, nil
}

func checkTol(tol float64) (float64, error) {
	if math.IsNaN(tol) || math.IsInf(tol, 0) {
		return 0, fmt.Errorf("offset: %w: tolerance %v is not a finite number", ErrInvalidInput, tol)
	}
	if tol <= 0 {
		return DefaultTolerance, nil
	}
	if tol < MinTolerance {
		return 0, fmt.Errorf("offset: %w: tolerance %g mm is below the minimum %g mm", ErrInvalidInput, tol, MinTolerance)
	}
	return tol, nil
}

func checkShape(s geom.Shape) error {
	for i, g := range s {
		for j, r := range g.Rings() {
			what := "outer ring"
			if j > 0 {
				what = fmt.Sprintf("hole %d", j-1)
			}
			for k, p := range r {
				if math.IsNaN(p.X) || math.IsNaN(p.Y) || math.IsInf(p.X, 0) || math.IsInf(p.Y, 0) {
					return fmt.Errorf("offset: %w: region %d, %s, point %d: coordinate is not a finite number", ErrInvalidInput, i, what, k)
				}
				if math.Abs(p.X) > MaxCoordinate || math.Abs(p.Y) > MaxCoordinate {
					return fmt.Errorf("offset: %w: region %d, %s, point %d: coordinate (%g, %g) beyond ±%g mm", ErrInvalidInput, i, what, k, p.X, p.Y, MaxCoordinate)
				}
			}
		}
	}
	return nil
}

// offset computes a non-zero offset of a checked shape.
func offset(s geom.Shape, d, tol float64) (geom.Shape, error) {
	r := math.Abs(d)
	// Angle step of the arc polylines: a chord of angle θ deviates from
	// its arc by r·(1 − cos(θ/2)).
	step := math.Pi / 2
	if tol < r {
		step = min(step, 2*math.Acos(1-tol/r))
	}
	var rings [][]ipt
	var arcN []int // arc vertices per ring
	total := 0
	for _, g := range s.Normalized() {
		for _, ring := range g.Rings() {
			q := snapRing(ring)
			if len(q) < 3 {
				continue
			}
			nb := arcBudget(q, d > 0, step)
			rings = append(rings, q)
			arcN = append(arcN, nb)
			total += 2*len(q) + nb
			if total > MaxVertices {
				return nil, fmt.Errorf("offset: %w: the raw offset curve would have more than %d vertices", ErrTooComplex, MaxVertices)
			}
		}
	}
	sc := &ints{}
	var pr *pruner
	if simpleRings(rings, sc) {
		pr = newPruner(rings, d, tol)
	}
	// All raw curves go into one flat buffer: chain k is
	// pts[chainStart[k]:chainStart[k+1]].
	est, estMax, base0 := 0, 0, 0
	for k, q := range rings {
		e := 3*len(q) + arcN[k] + 8
		est += e
		estMax = max(estMax, e)
		base0 += len(q)
	}
	cb := &curveBuf{
		pts:        make([]ipt, 0, est),
		arc:        make([]int32, 0, est),
		chainStart: make([]int32, 1, len(rings)+1),
		src:        make([]int32, 0, estMax),
	}
	if pr != nil {
		cb.pruned = make([]bool, 0, est)
	}
	centres := make([]ipt, 0, base0)
	base := int32(0)
	for _, q := range rings {
		rawCurve(cb, q, d, step, tol, base, pr)
		cb.chainStart = append(cb.chainStart, int32(len(cb.pts)))
		centres = append(centres, q...)
		base += int32(len(q))
	}
	bnd, err := windingBoundary(cb.pts, cb.chainStart, cb.pruned, cb.arc, centres, r*gridScale, tol*gridScale, MaxVertices, sc)
	if err != nil {
		return nil, fmt.Errorf("offset: %w", err)
	}
	return assemble(bnd), nil
}

// snapRing puts a ring on the grid and drops repeated points.
func snapRing(r geom.Ring) []ipt {
	q := make([]ipt, 0, len(r))
	for _, p := range r {
		g := snap(p)
		if len(q) > 0 && q[len(q)-1] == g {
			continue
		}
		q = append(q, g)
	}
	for len(q) > 1 && q[len(q)-1] == q[0] {
		q = q[:len(q)-1]
	}
	return q
}

// convexFor reports whether the turn from edge u to edge v is convex for
// an offset to the right (outward, right=true) or to the left, and returns
// the signed sweep of the offset normal in radians.
func convexFor(ux, uy, vx, vy int64, right bool) (bool, float64) {
	t := crossSign(ux, uy, vx, vy)
	if t == 0 {
		if dot(ux, uy, vx, vy).sign() >= 0 {
			return false, 0 // straight on
		}
		// A spike: half a turn, round on the offset side.
		if right {
			return true, math.Pi
		}
		return true, -math.Pi
	}
	if (t > 0) != right {
		return false, 0
	}
	fux, fuy, fvx, fvy := float64(ux), float64(uy), float64(vx), float64(vy)
	return true, math.Atan2(fux*fvy-fuy*fvx, fux*fvx+fuy*fvy)
}

func arcBudget(q []ipt, right bool, step float64) int {
	n := len(q)
	total := 0
	for i := 0; i < n; i++ {
		a, b, c := q[(i+n-1)%n], q[i], q[(i+1)%n]
		if ok, sw := convexFor(b.x-a.x, b.y-a.y, c.x-b.x, c.y-b.y, right); ok {
			total += int(math.Abs(sw)/step) + 1
		}
	}
	return total
}

// rawCurve returns the raw offset curve of ring q (interior on its left) at
// signed distance d: offset edges, arcs at vertices convex for the offset
// direction, joins through the vertex elsewhere (none where the ring runs
// straight on). base is the index of q's first edge among all input edges
// (for pr). When pr is not nil, the joins through the vertex get an extra
// vertex where they come within pr's threshold of the vertex, and the
// segments (out[i]→out[i+1]) that pr certifies as prunable are marked.
// The curve is appended to cb.pts, per segment its arc (the input vertex
// it is a chord about, or −1) to cb.arc and, when pr is not nil, its
// pruning mark to cb.pruned; cb's scratch slices are reused.
func rawCurve(cb *curveBuf, q []ipt, d, step, tol float64, base int32, pr *pruner) {
	n := len(q)
	right := d > 0
	r := math.Abs(d)
	// Unit normals towards the offset side, in mm.
	cb.grow(n)
	nx, ny, short, xs := cb.nx, cb.ny, cb.short, cb.xs
	for i := 0; i < n; i++ {
		a, b := q[i], q[(i+1)%n]
		ex, ey := float64(b.x-a.x), float64(b.y-a.y)
		l := math.Hypot(ex, ey)
		if right {
			nx[i], ny[i] = ey/l, -ex/l
		} else {
			nx[i], ny[i] = -ey/l, ex/l
		}
	}
	// Where the two offset edges meet at a vertex that is not convex for
	// the offset side, and the turn is at most 90° and both edges are at
	// least r·sin φ long, the kite (vertex, both offset edge ends, their
	// crossing X) lies in the rectangles of both edges, so the loop through
	// the vertex can be cut off at X without changing which points have
	// winding ≥ 1 (each point in m such kites lies in ≥ m+1 rectangles).
	// short[i]: join at q[(i+1)%n] cut at the crossing xs[i].
	for i := 0; i < n; i++ {
		short[i] = false
		a, b, c := q[i], q[(i+1)%n], q[(i+2)%n]
		ux, uy, vx, vy := b.x-a.x, b.y-a.y, c.x-b.x, c.y-b.y
		// Not convex for the offset side, not straight on, not a spike.
		if t := crossSign(ux, uy, vx, vy); t == 0 || (t > 0) == right || dot(ux, uy, vx, vy).sign() < 0 {
			continue
		}
		j := (i + 1) % n
		cosv := nx[i]*nx[j] + ny[i]*ny[j]
		sinv := math.Sqrt(max(0, 1-cosv*cosv))
		li := math.Hypot(float64(ux), float64(uy)) / gridScale
		lj := math.Hypot(float64(vx), float64(vy)) / gridScale
		need := r*sinv*(1+1e-9) + 1e-5
		if li < need || lj < need {
			continue
		}
		pb := b.point()
		k := r / (1 + cosv)
		short[i] = true
		xs[i] = geom.Point{X: pb.X + k*(nx[i]+nx[j]), Y: pb.Y + k*(ny[i]+ny[j])}
	}
	// If every vertex were cut, a point could lie in all n kites but only
	// n rectangles; one join through its vertex restores the count.
	all := true
	for i := 0; i < n && all; i++ {
		all = short[i]
	}
	if all {
		short[0] = false
	}
	// The chain starts at the end of the last offset edge and then runs,
	// for every vertex q[i], through the join at q[i] and the offset edge
	// i. src[k] is the input edge the segment ending at out[k] comes from
	// (for a join: the edge before its vertex); src[0] is for the closing
	// segment.
	s0 := len(cb.pts)
	all0, arc0 := cb.pts, cb.arc
	out := all0[s0:s0]
	src := cb.src[:0]
	arc := arc0[s0:s0] // input vertex of the arc the segment ending here is a chord of, or −1
	arcAt := int32(-1)
	add := func(g ipt, e int) {
		if len(out) == 0 || out[len(out)-1] != g {
			out = append(out, g)
			src = append(src, base+int32(e))
			arc = append(arc, arcAt)
		}
	}
	end := func(i int) geom.Point { // end of offset edge i
		if short[i] {
			return xs[i]
		}
		pb := q[(i+1)%n].point()
		return geom.Point{X: pb.X + r*nx[i], Y: pb.Y + r*ny[i]}
	}
	add(snap(end(n-1)), n-1)
	for i := 0; i < n; i++ {
		h := (i + n - 1) % n // edge before q[i]
		if !short[h] {
			b, a, c := q[i], q[h], q[(i+1)%n]
			ok, sw := convexFor(b.x-a.x, b.y-a.y, c.x-b.x, c.y-b.y, right)
			pb := b.point()
			switch {
			case ok:
				arcAt = base + int32(i)
				k := int(math.Ceil(math.Abs(sw) / step))
				a0 := math.Atan2(ny[h], nx[h])
				rho := arcRadius(r, math.Abs(sw)/float64(k), d, tol)
				for m := 1; m < k; m++ {
					t := a0 + sw*float64(m)/float64(k)
					add(snap(geom.Point{X: pb.X + rho*math.Cos(t), Y: pb.Y + rho*math.Sin(t)}), h)
				}
			case crossSign(b.x-a.x, b.y-a.y, c.x-b.x, c.y-b.y) != 0:
				// Join through the vertex itself, split where it comes
				// within the pruning threshold of the vertex unless the
				// neighbour edge already certifies all of it.
				e := out[len(out)-1]
				if pr != nil && pr.d2(float64(e.x), float64(e.y), base+int32(i)) >= pr.thr2 {
					add(splitSpoke(b, e, pr.thr), h)
				}
				add(b, h)
				if pr != nil {
					s := snap(geom.Point{X: pb.X + r*nx[i], Y: pb.Y + r*ny[i]})
					if pr.d2(float64(s.x), float64(s.y), base+int32(h)) >= pr.thr2 {
						add(splitSpoke(b, s, pr.thr), h)
					}
				}
			}
			add(snap(geom.Point{X: pb.X + r*nx[i], Y: pb.Y + r*ny[i]}), h)
			arcAt = -1
		}
		if i < n-1 {
			add(snap(end(i)), i)
		}
	}
	if len(out) > 1 {
		src[0], arc[0] = base+int32(n-1), -1
	}
	for len(out) > 1 && out[len(out)-1] == out[0] {
		src[0], arc[0] = src[len(src)-1], arc[len(arc)-1]
		out = out[:len(out)-1]
		src = src[:len(src)-1]
		arc = arc[:len(arc)-1]
	}
	// Shift arc so that arc[k] describes segment out[k]→out[k+1].
	m := len(out)
	if m > 0 {
		a0 := arc[0]
		copy(arc, arc[1:])
		arc[m-1] = a0
	}
	cb.pts = append(all0[:s0], out...)
	cb.arc = append(arc0[:s0], arc...)
	cb.src = src
	if pr == nil {
		return
	}
	for k := 0; k < m; k++ {
		cb.pruned = append(cb.pruned, pr.covered(out[k], out[(k+1)%m], src[(k+1)%m]))
	}
}

// curveBuf collects the raw curves of one offset in flat slices and holds
// the per-ring scratch of rawCurve.
type curveBuf struct {
	pts        []ipt
	arc        []int32
	pruned     []bool
	chainStart []int32
	// scratch
	nx, ny []float64
	short  []bool
	xs     []geom.Point
	src    []int32
}

// grow makes the per-vertex scratch slices n long.
func (cb *curveBuf) grow(n int) {
	if cap(cb.nx) < n {
		cb.nx = make([]float64, n)
		cb.ny = make([]float64, n)
		cb.short = make([]bool, n)
		cb.xs = make([]geom.Point, n)
	}
	cb.nx, cb.ny, cb.short, cb.xs = cb.nx[:n], cb.ny[:n], cb.short[:n], cb.xs[:n]
}

// arcRadius returns the radius of the inner vertices of the arc polyline of
// radius r with angle step θ. Outward (d > 0) they lie on the arc, so the
// result stays within distance d of the input. Inward they lie at
// r·√(θ / sin θ), where a chord's polygon sector has the area of the disk
// sector (½ρ² sin θ = ½r²θ): the carved area is then right on average,
// while the chords still deviate from the arc by less than the on-arc
// sagitta (≈ rθ²/12 outside at the vertices and ≈ rθ²/24 inside at the
// chord midpoints, against rθ²/8), and never by more than tol.
func arcRadius(r, theta, d, tol float64) float64 {
	if d > 0 || theta <= 0 {
		return r
	}
	rho := r * math.Sqrt(theta/math.Sin(theta))
	return min(rho, r+tol, r/math.Cos(theta/2))
}

// splitSpoke returns the grid point on segment be at distance about thr
// (grid units) from b, rounded so that it stays within thr of b.
func splitSpoke(b, e ipt, thr float64) ipt {
	dx, dy := float64(e.x-b.x), float64(e.y-b.y)
	t := (thr - 2) / math.Hypot(dx, dy)
	return ipt{b.x + int64(math.Round(t*dx)), b.y + int64(math.Round(t*dy))}
}

// assemble turns the simple boundary rings into a normalised, sorted shape.
func assemble(bnd [][]ipt) geom.Shape {
	type ring struct {
		pts  []ipt
		area float64 // signed, mm²
		box  [4]int64
	}
	var outers, holes []ring
	for _, r := range bnd {
		r = dropCollinear(r)
		if len(r) < 3 {
			continue
		}
		ar := areaMM2(r)
		if math.Abs(ar) < MinRingArea {
			continue
		}
		r = rotateMin(r)
		b := [4]int64{r[0].x, r[0].y, r[0].x, r[0].y}
		for _, p := range r {
			b[0], b[1] = min(b[0], p.x), min(b[1], p.y)
			b[2], b[3] = max(b[2], p.x), max(b[3], p.y)
		}
		if ar > 0 {
			outers = append(outers, ring{r, ar, b})
		} else {
			holes = append(holes, ring{r, ar, b})
		}
	}
	// Smallest outer first, so that a hole goes to the innermost outer
	// holding it.
	order := make([]int, len(outers))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(i, j int) int {
		switch {
		case outers[i].area < outers[j].area:
			return -1
		case outers[i].area > outers[j].area:
			return 1
		}
		return cmpIpt(outers[i].pts[0], outers[j].pts[0])
	})
	regHoles := make([][]geom.Ring, len(outers))
	for _, h := range holes {
		// Doubled midpoint of the first edge: never on another ring.
		m := ipt{h.pts[0].x + h.pts[1].x, h.pts[0].y + h.pts[1].y}
		for _, i := range order {
			o := outers[i]
			if o.area < -h.area || 2*o.box[0] > m.x || 2*o.box[2] < m.x || 2*o.box[1] > m.y || 2*o.box[3] < m.y {
				continue
			}
			if windingDoubled(o.pts, m) != 0 {
				regHoles[i] = append(regHoles[i], toRing(h.pts))
				break
			}
		}
		// A hole with no outer around it cannot arise from a winding
		// boundary; it is dropped.
	}
	out := make(geom.Shape, 0, len(outers))
	for i, o := range outers {
		hs := regHoles[i]
		slices.SortFunc(hs, func(a, b geom.Ring) int { return cmpPoint(a[0], b[0]) })
		out = append(out, geom.Region{Outer: toRing(o.pts), Holes: hs})
	}
	slices.SortFunc(out, func(a, b geom.Region) int { return cmpPoint(a.Outer[0], b.Outer[0]) })
	if len(out) == 0 {
		return nil
	}
	return out
}

func cmpPoint(p, q geom.Point) int { return cmp.Or(cmp.Compare(p.X, q.X), cmp.Compare(p.Y, q.Y)) }

func toRing(r []ipt) geom.Ring {
	out := make(geom.Ring, len(r))
	for i, p := range r {
		out[i] = p.point()
	}
	return out
}

// windingDoubled returns the winding number of ring r about the point m/2,
// exactly (m is given in doubled grid coordinates and must not lie on r).
func windingDoubled(r []ipt, m ipt) int {
	w := 0
	n := len(r)
	for i := 0; i < n; i++ {
		a, b := r[i], r[(i+1)%n]
		a2, b2 := ipt{2 * a.x, 2 * a.y}, ipt{2 * b.x, 2 * b.y}
		if a2.y <= m.y {
			if b2.y > m.y && orient(a2, b2, m) > 0 {
				w++
			}
		} else if b2.y <= m.y && orient(a2, b2, m) < 0 {
			w--
		}
	}
	return w
}

// dropCollinear removes vertices lying on the straight line through their
// neighbours, in place.
func dropCollinear(r []ipt) []ipt {
	out := r[:0]
	for _, p := range r {
		for len(out) >= 2 && orient(out[len(out)-2], out[len(out)-1], p) == 0 {
			out = out[:len(out)-1]
		}
		out = append(out, p)
	}
	// Wrap around.
	for changed := true; changed && len(out) >= 3; {
		changed = false
		n := len(out)
		if orient(out[n-2], out[n-1], out[0]) == 0 {
			out = out[:n-1]
			changed = true
			continue
		}
		if orient(out[n-1], out[0], out[1]) == 0 {
			out = out[1:]
			changed = true
		}
	}
	return out
}

func areaMM2(r []ipt) float64 {
	o := r[0]
	var s i128
	for i := 1; i+1 < len(r); i++ {
		s = s.add(cross(r[i].x-o.x, r[i].y-o.y, r[i+1].x-o.x, r[i+1].y-o.y))
	}
	return s.float() / 2 / (gridScale * gridScale)
}

// rotateMin rotates r, in place, to start at its smallest vertex (x, then
// y).
func rotateMin(r []ipt) []ipt {
	k := 0
	for i, p := range r {
		if p.less(r[k]) {
			k = i
		}
	}
	if k > 0 {
		slices.Reverse(r[:k])
		slices.Reverse(r[k:])
		slices.Reverse(r)
	}
	return r
}
