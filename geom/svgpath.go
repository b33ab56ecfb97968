package geom

import (
	"fmt"
	"math"
	"strconv"
)

// affine is the 2D affine map x' = a·x + c·y + e, y' = b·x + d·y + f, in
// the order of SVG's matrix(a b c d e f) (W3C SVG 1.1, 7.4).
type affine struct{ a, b, c, d, e, f float64 }

// identity returns the map that leaves every point in place.
func identity() affine { return affine{1, 0, 0, 1, 0, 0} }

// apply maps p.
func (m affine) apply(p Point) Point {
	return Point{m.a*p.X + m.c*p.Y + m.e, m.b*p.X + m.d*p.Y + m.f}
}

// then returns the map that applies n first and m after it (m ∘ n).
func (m affine) then(n affine) affine {
	return affine{
		a: m.a*n.a + m.c*n.b,
		b: m.b*n.a + m.d*n.b,
		c: m.a*n.c + m.c*n.d,
		d: m.b*n.c + m.d*n.d,
		e: m.a*n.e + m.c*n.f + m.e,
		f: m.b*n.e + m.d*n.f + m.f,
	}
}

// maxScale returns the largest factor by which m stretches a length (the
// largest singular value of its linear part).
func (m affine) maxScale() float64 {
	// For the 2×2 matrix [a c; b d]: σ² = (s ± √(s² − 4·det²))/2 with
	// s = a²+b²+c²+d².
	s := m.a*m.a + m.b*m.b + m.c*m.c + m.d*m.d
	det := m.a*m.d - m.b*m.c
	q := s*s - 4*det*det
	if q < 0 {
		q = 0
	}
	return math.Sqrt((s + math.Sqrt(q)) / 2)
}

// numScanner reads the numbers, flags and separators of SVG path data,
// point lists and transform lists (W3C SVG 1.1, 8.3.9 grammar: a number
// ends where the next cannot continue it, so "1.5.5" is 1.5 then .5 and
// "1-2" is 1 then −2).
type numScanner struct {
	s string
	i int
}

func isWSP(c byte) bool { return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' }

// skipSep skips white space and at most one comma.
func (sc *numScanner) skipSep() {
	for sc.i < len(sc.s) && isWSP(sc.s[sc.i]) {
		sc.i++
	}
	if sc.i < len(sc.s) && sc.s[sc.i] == ',' {
		sc.i++
		for sc.i < len(sc.s) && isWSP(sc.s[sc.i]) {
			sc.i++
		}
	}
}

func (sc *numScanner) skipWSP() {
	for sc.i < len(sc.s) && isWSP(sc.s[sc.i]) {
		sc.i++
	}
}

func (sc *numScanner) done() bool { return sc.i >= len(sc.s) }

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

// startsNumber reports whether a number begins at the current position.
func (sc *numScanner) startsNumber() bool {
	if sc.i >= len(sc.s) {
		return false
	}
	c := sc.s[sc.i]
	if isDigit(c) || c == '.' || c == '+' || c == '-' {
		return true
	}
	return false
}

// number reads one number. It returns an error naming the offset when the
// text there is not a number or the number does not fit a float64.
func (sc *numScanner) number() (float64, error) {
	start := sc.i
	j := sc.i
	if j < len(sc.s) && (sc.s[j] == '+' || sc.s[j] == '-') {
		j++
	}
	digits := 0
	for j < len(sc.s) && isDigit(sc.s[j]) {
		j++
		digits++
	}
	if j < len(sc.s) && sc.s[j] == '.' {
		j++
		for j < len(sc.s) && isDigit(sc.s[j]) {
			j++
			digits++
		}
	}
	if digits == 0 {
		if start >= len(sc.s) {
			return 0, fmt.Errorf("at offset %d: missing number", start)
		}
		return 0, fmt.Errorf("at offset %d: missing number (found %q)", start, sc.s[start])
	}
	if j < len(sc.s) && (sc.s[j] == 'e' || sc.s[j] == 'E') {
		k := j + 1
		if k < len(sc.s) && (sc.s[k] == '+' || sc.s[k] == '-') {
			k++
		}
		if k < len(sc.s) && isDigit(sc.s[k]) {
			for k < len(sc.s) && isDigit(sc.s[k]) {
				k++
			}
			j = k
		}
	}
	v, err := strconv.ParseFloat(sc.s[start:j], 64)
	if err != nil || math.IsInf(v, 0) {
		return 0, fmt.Errorf("at offset %d: number %q out of range", start, sc.s[start:j])
	}
	sc.i = j
	return v, nil
}

// flag reads an arc flag: a single 0 or 1, which needs no separator after
// it (W3C SVG 1.1, 8.3.9: "flag").
func (sc *numScanner) flag() (bool, error) {
	if sc.i < len(sc.s) {
		switch sc.s[sc.i] {
		case '0':
			sc.i++
			return false, nil
		case '1':
			sc.i++
			return true, nil
		}
	}
	return false, fmt.Errorf("at offset %d: missing flag (0 or 1)", sc.i)
}

// flattener turns path segments, given in user units, into points of the
// output frame (millimetres, y up), within a chord tolerance.
type flattener struct {
	m      affine
	tol    float64
	budget *int // points left before the file is refused
}

// maxCurveSegments bounds the chords one curve may produce.
const maxCurveSegments = 100000

// errTooManyPoints is returned when flattening would exceed the point
// budget of a file.
var errTooManyPoints = fmt.Errorf("more than %d points after flattening curves; raise the tolerance", maxSVGPoints)

// maxSVGPoints bounds the points read from one SVG file.
const maxSVGPoints = 5000000

func (fl *flattener) emit(out []Point, p Point) ([]Point, error) {
	if *fl.budget <= 0 {
		return out, errTooManyPoints
	}
	*fl.budget--
	return append(out, p), nil
}

// finiteFar reports whether a mapped point is finite and not absurdly far
// out; anything beyond is rejected before curve flattening so that huge
// numbers cannot make huge loops.
func finiteFar(p Point) bool {
	const lim = 100 * MaxCoord
	return !math.IsNaN(p.X) && !math.IsNaN(p.Y) && math.Abs(p.X) <= lim && math.Abs(p.Y) <= lim
}

var errFar = fmt.Errorf("coordinate beyond ±%g mm after units and transforms", 100*MaxCoord)

// line appends the end of a straight segment.
func (fl *flattener) line(out []Point, to Point) ([]Point, error) {
	q := fl.m.apply(to)
	if !finiteFar(q) {
		return out, errFar
	}
	return fl.emit(out, q)
}

// bezier appends the points of a Bézier curve of degree len(ctl)−1 (2 or
// 3) from ctl[0], excluding ctl[0]. The number of chords comes from Wang's
// formula (G. Wang 1984; see T. Sederberg, "Computer Aided Geometric
// Design" course notes, §10.6): n = ⌈√(d(d−1)·M / (8·tol))⌉ chords keep a
// degree-d curve within tol of its chords, where M is the largest norm of
// the second differences of the control points.
func (fl *flattener) bezier(out []Point, ctl []Point) ([]Point, error) {
	q := make([]Point, len(ctl))
	for i, p := range ctl {
		q[i] = fl.m.apply(p)
		if !finiteFar(q[i]) {
			return out, errFar
		}
	}
	deg := len(q) - 1
	var mx float64
	for i := 0; i+2 < len(q); i++ {
		dd := q[i].Sub(q[i+1].Scale(2)).Add(q[i+2])
		mx = math.Max(mx, dd.Len())
	}
	n := int(math.Ceil(math.Sqrt(float64(deg*(deg-1)) * mx / (8 * fl.tol))))
	n = max(1, min(n, maxCurveSegments))
	var err error
	for k := 1; k <= n; k++ {
		t := float64(k) / float64(n)
		var p Point
		if k == n {
			p = q[deg]
		} else {
			p = deCasteljau(q, t)
		}
		if out, err = fl.emit(out, p); err != nil {
			return out, err
		}
	}
	return out, nil
}

// deCasteljau evaluates the Bézier curve with control points q at t.
func deCasteljau(q []Point, t float64) Point {
	var buf [4]Point
	w := buf[:len(q)]
	copy(w, q)
	for r := len(w) - 1; r > 0; r-- {
		for i := 0; i < r; i++ {
			w[i] = w[i].Lerp(w[i+1], t)
		}
	}
	return w[0]
}

// arc appends the points of an SVG elliptical arc from p0 to p1 (both in
// user units), excluding p0, following the endpoint-to-centre conversion
// of W3C SVG 1.1, Appendix F.6.5, with out-of-range radii scaled up as in
// F.6.6. The chord count keeps the sagitta r·(1 − cos(Δ/2)) of each chord
// within the tolerance for the largest radius after the transform.
func (fl *flattener) arc(out []Point, p0 Point, rx, ry, phiDeg float64, large, sweep bool, p1 Point) ([]Point, error) {
	if p0 == p1 {
		return out, nil // F.6.2: an arc to the current point is omitted
	}
	rx, ry = math.Abs(rx), math.Abs(ry)
	if rx == 0 || ry == 0 {
		return fl.line(out, p1) // F.6.2: zero radius means a straight line
	}
	phi := phiDeg * math.Pi / 180
	cos, sin := math.Cos(phi), math.Sin(phi)
	// F.6.5 step 1
	dx, dy := (p0.X-p1.X)/2, (p0.Y-p1.Y)/2
	x1 := cos*dx + sin*dy
	y1 := -sin*dx + cos*dy
	// F.6.6 step 3: scale radii up when no ellipse fits.
	if lam := x1*x1/(rx*rx) + y1*y1/(ry*ry); lam > 1 {
		s := math.Sqrt(lam)
		rx, ry = rx*s, ry*s
	}
	// F.6.5 step 2
	num := rx*rx*ry*ry - rx*rx*y1*y1 - ry*ry*x1*x1
	den := rx*rx*y1*y1 + ry*ry*x1*x1
	k := 0.0
	if num > 0 && den > 0 {
		k = math.Sqrt(num / den)
	}
	if large == sweep {
		k = -k
	}
	cx1 := k * rx * y1 / ry
	cy1 := -k * ry * x1 / rx
	// F.6.5 step 3
	cx := cos*cx1 - sin*cy1 + (p0.X+p1.X)/2
	cy := sin*cx1 + cos*cy1 + (p0.Y+p1.Y)/2
	// F.6.5 step 4
	angle := func(ux, uy, vx, vy float64) float64 {
		return math.Atan2(ux*vy-uy*vx, ux*vx+uy*vy)
	}
	ux, uy := (x1-cx1)/rx, (y1-cy1)/ry
	vx, vy := (-x1-cx1)/rx, (-y1-cy1)/ry
	th1 := angle(1, 0, ux, uy)
	dth := angle(ux, uy, vx, vy)
	if !sweep && dth > 0 {
		dth -= 2 * math.Pi
	} else if sweep && dth < 0 {
		dth += 2 * math.Pi
	}
	if math.IsNaN(cx) || math.IsNaN(cy) || math.IsNaN(th1) || math.IsNaN(dth) {
		return out, errFar
	}
	r := math.Max(rx, ry) * fl.m.maxScale()
	if !(r <= 100*MaxCoord) {
		return out, errFar
	}
	n := 1
	if r > fl.tol {
		step := 2 * math.Acos(1-fl.tol/r)
		n = int(math.Ceil(math.Abs(dth) / step))
	}
	n = max(1, min(n, maxCurveSegments))
	var err error
	for i := 1; i <= n; i++ {
		var p Point
		if i == n {
			p = p1
		} else {
			t := th1 + dth*float64(i)/float64(n)
			ex, ey := rx*math.Cos(t), ry*math.Sin(t)
			p = Point{cos*ex - sin*ey + cx, sin*ex + cos*ey + cy}
		}
		q := fl.m.apply(p)
		if !finiteFar(q) {
			return out, errFar
		}
		if out, err = fl.emit(out, q); err != nil {
			return out, err
		}
	}
	return out, nil
}

// subpath is one flattened subpath of path data, in output coordinates.
type subpath struct {
	pts    []Point
	closed bool
}

// commandName returns the name W3C SVG 1.1, 8.3 gives an upper-case path
// command.
func commandName(c byte) string {
	switch c {
	case 'M':
		return "moveto"
	case 'L':
		return "lineto"
	case 'H':
		return "horizontal lineto"
	case 'V':
		return "vertical lineto"
	case 'C':
		return "curveto"
	case 'S':
		return "smooth curveto"
	case 'Q':
		return "quadratic curveto"
	case 'T':
		return "smooth quadratic curveto"
	case 'A':
		return "arc"
	case 'Z':
		return "closepath"
	}
	return ""
}

// argCount returns the number of values an upper-case path command takes
// (W3C SVG 1.1, 8.3), or −1 for a byte that is no command.
func argCount(c byte) int {
	switch c {
	case 'M', 'L', 'T':
		return 2
	case 'H', 'V':
		return 1
	case 'C':
		return 6
	case 'S', 'Q':
		return 4
	case 'A':
		return 7
	case 'Z':
		return 0
	}
	return -1
}

func upper(c byte) byte {
	if c >= 'a' && c <= 'z' {
		return c - 'a' + 'A'
	}
	return c
}

// parsePathData flattens SVG path data (W3C SVG 1.1, 8.3: commands M L H V
// C S Q T A Z, absolute and relative, with implicit repetition) into
// subpaths.
func parsePathData(d string, fl *flattener) ([]subpath, error) {
	sc := numScanner{s: d}
	var subs []subpath
	var cur, start Point // user units
	var sub *subpath
	var cmd byte
	var prevCmd byte   // upper-case command of the previous segment
	var prevCtrl Point // last control point, for S and T
	begin := func() {
		subs = append(subs, subpath{pts: []Point{fl.m.apply(start)}})
		sub = &subs[len(subs)-1]
	}
	var err error
	for {
		sc.skipWSP()
		if sc.done() {
			break
		}
		at := sc.i
		c := d[sc.i]
		if cmd == 0 && upper(c) != 'M' {
			return subs, fmt.Errorf("at offset %d: path data must begin with a moveto command (M or m), found %q", at, c)
		}
		if argCount(upper(c)) >= 0 {
			cmd = c
			sc.i++
		} else if !sc.startsNumber() {
			return subs, fmt.Errorf("at offset %d: unexpected %q", at, c)
		} else if upper(cmd) == 'Z' {
			return subs, fmt.Errorf("at offset %d: number after closepath", at)
		} else if cmd == 'M' {
			cmd = 'L' // W3C SVG 1.1, 8.3.2: extra moveto pairs are lineto
		} else if cmd == 'm' {
			cmd = 'l'
		}
		U := upper(cmd)
		rel := cmd != U
		name := commandName(U)
		var a [7]float64
		for k := 0; k < argCount(U); k++ {
			sc.skipSep()
			if U == 'A' && (k == 3 || k == 4) {
				f, ferr := sc.flag()
				if ferr != nil {
					return subs, fmt.Errorf("%s command %w", name, ferr)
				}
				if f {
					a[k] = 1
				}
				continue
			}
			if a[k], err = sc.number(); err != nil {
				return subs, fmt.Errorf("%s command %w", name, err)
			}
		}
		sc.skipSep()
		if U == 'Z' {
			if sub != nil {
				sub.closed = true
				sub = nil
			}
			cur = start
			prevCmd = 'Z'
			continue
		}
		if U == 'M' {
			p := Point{a[0], a[1]}
			if rel {
				// A leading m is absolute in effect: cur starts at the origin.
				p = p.Add(cur)
			}
			cur, start = p, p
			sub = nil
			begin()
			prevCmd = 'M'
			continue
		}
		if sub == nil {
			// W3C SVG 1.1, 8.3.3: after closepath the next subpath starts
			// at the same initial point.
			begin()
		}
		base := Point{}
		if rel {
			base = cur
		}
		var end Point
		switch U {
		case 'L':
			end = base.Add(Point{a[0], a[1]})
			sub.pts, err = fl.line(sub.pts, end)
		case 'H':
			end = Point{base.X + a[0], cur.Y}
			if !rel {
				end.X = a[0]
			}
			sub.pts, err = fl.line(sub.pts, end)
		case 'V':
			end = Point{cur.X, base.Y + a[0]}
			if !rel {
				end.Y = a[0]
			}
			sub.pts, err = fl.line(sub.pts, end)
		case 'C':
			c1 := base.Add(Point{a[0], a[1]})
			c2 := base.Add(Point{a[2], a[3]})
			end = base.Add(Point{a[4], a[5]})
			sub.pts, err = fl.bezier(sub.pts, []Point{cur, c1, c2, end})
			prevCtrl = c2
		case 'S':
			c1 := cur
			if prevCmd == 'C' || prevCmd == 'S' {
				c1 = cur.Scale(2).Sub(prevCtrl) // reflection, W3C SVG 1.1, 8.3.6
			}
			c2 := base.Add(Point{a[0], a[1]})
			end = base.Add(Point{a[2], a[3]})
			sub.pts, err = fl.bezier(sub.pts, []Point{cur, c1, c2, end})
			prevCtrl = c2
		case 'Q':
			c1 := base.Add(Point{a[0], a[1]})
			end = base.Add(Point{a[2], a[3]})
			sub.pts, err = fl.bezier(sub.pts, []Point{cur, c1, end})
			prevCtrl = c1
		case 'T':
			c1 := cur
			if prevCmd == 'Q' || prevCmd == 'T' {
				c1 = cur.Scale(2).Sub(prevCtrl) // reflection, W3C SVG 1.1, 8.3.7
			}
			end = base.Add(Point{a[0], a[1]})
			sub.pts, err = fl.bezier(sub.pts, []Point{cur, c1, end})
			prevCtrl = c1
		case 'A':
			end = base.Add(Point{a[5], a[6]})
			sub.pts, err = fl.arc(sub.pts, cur, a[0], a[1], a[2], a[3] != 0, a[4] != 0, end)
		}
		if err != nil {
			return subs, fmt.Errorf("%s command at offset %d: %w", name, at, err)
		}
		cur = end
		prevCmd = U
	}
	return subs, nil
}
