package geom

import (
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"

	"github.com/peterstace/simplefeatures/rtree"
)

// DefaultSVGTolerance is the chord tolerance, in mm, used when flattening
// SVG curves unless SVGOptions says otherwise.
const DefaultSVGTolerance = 0.01

// SVGOptions tunes ParseSVGWith. The zero value gives the defaults.
type SVGOptions struct {
	// Tolerance is the largest distance, in mm, between a curve and the
	// chords that replace it; 0 means DefaultSVGTolerance. Values below
	// 1e-6 mm are raised to 1e-6 mm.
	Tolerance float64
	// UserUnit, when positive, is the size of one user unit in mm and
	// overrides the rule of ParseSVG.
	UserUnit float64
	// SkipOpen drops open subpaths, lines and polylines instead of
	// refusing the file.
	SkipOpen bool
	// ID, when set, reads only the element with this id attribute and,
	// when it is a group, everything inside it. A file without such an
	// element is an error.
	ID string
}

const svgNS = "http://www.w3.org/2000/svg"

// ParseSVG reads the closed outlines of an SVG drawing (W3C SVG 1.1) as a
// Shape in millimetres, with the defaults of SVGOptions.
//
// Elements read: path (commands M L H V C S Q T A Z, absolute and relative,
// implicit repetition, numbers such as "1.5.5" and "1e-3"), rect (with rx,
// ry), circle, ellipse and polygon, inside nested g elements, each with its
// transform attribute (matrix, translate, scale, rotate, skewX, skewY).
// Elements in other XML namespaces and the contents of defs, symbol,
// clipPath, mask, pattern, marker, metadata, title, desc and style are
// ignored, as are text and image elements and elements with
// display="none". A use element, a nested svg element, an open subpath,
// a line or a polyline is an error (unless SkipOpen drops the open ones).
// Fill and stroke are not looked at.
//
// Units: one user unit is 1 mm, except when the root svg element has a
// viewBox and a width: then one user unit is width/viewBox-width, with the
// width converted to mm from its unit (mm, cm, in, pt, pc, Q and px =
// 1/96 in, after CSS Values 3; no unit means mm). When a height is also
// given it must imply the same scale (within 0.1 %).
//
// Axes: SVG's y axis points down; chipband's points up. With a viewBox the
// bottom-left corner of the viewBox becomes the origin:
// x' = (x − minX)·u, y' = (minY + height − y)·u for user-unit size u, so a
// drawing inside its viewBox lands in x ≥ 0, y ≥ 0 as it looks on screen.
// Without a viewBox, x' = x·u and y' = −y·u.
//
// Curves are flattened to chords within the tolerance. Nesting decides
// holes, by even-odd depth: a closed outline inside one other outline is a
// hole of it, one inside two is a new region (an island), and so on.
// Outlines must not cross or touch each other or themselves.
//
// Errors name the element, e.g.
// `path #3 (id "pocket", line 12): arc command at offset 41: missing number`,
// where #3 is the third path element of the file and offsets count bytes
// of the attribute from 0.
func ParseSVG(r io.Reader) (Shape, error) { return ParseSVGWith(r, SVGOptions{}) }

// svgOutline is one closed outline read from the file, with the name of
// the element it came from.
type svgOutline struct {
	ring Ring
	src  string
}

type svgReader struct {
	opt      SVGOptions
	tol      float64
	budget   int
	counts   map[string]int
	outlines []svgOutline
}

// ParseSVGWith is ParseSVG with options.
func ParseSVGWith(r io.Reader, opt SVGOptions) (Shape, error) {
	rd := &svgReader{opt: opt, tol: opt.Tolerance, budget: maxSVGPoints, counts: map[string]int{}}
	if rd.tol <= 0 {
		rd.tol = DefaultSVGTolerance
	}
	rd.tol = math.Max(rd.tol, 1e-6)
	if math.IsNaN(rd.tol) || math.IsInf(rd.tol, 0) {
		return nil, fmt.Errorf("SVG: tolerance %v is not a positive finite number", opt.Tolerance)
	}
	if err := rd.read(r); err != nil {
		return nil, fmt.Errorf("SVG: %w", err)
	}
	s, err := rd.assemble()
	if err != nil {
		return nil, fmt.Errorf("SVG: %w", err)
	}
	return s, nil
}

func attr(se xml.StartElement, name string) (string, bool) {
	for _, a := range se.Attr {
		if a.Name.Space == "" && a.Name.Local == name {
			return a.Value, true
		}
	}
	return "", false
}

// describe names an element for messages: kind, number, id and line.
func (rd *svgReader) describe(se xml.StartElement, line int) string {
	rd.counts[se.Name.Local]++
	var b strings.Builder
	fmt.Fprintf(&b, "%s #%d (", se.Name.Local, rd.counts[se.Name.Local])
	if id, ok := attr(se, "id"); ok {
		if len(id) > 40 {
			id = id[:40] + "…"
		}
		fmt.Fprintf(&b, "id %q, ", id)
	}
	fmt.Fprintf(&b, "line %d)", line)
	return b.String()
}

// ignoredContainers have contents that are not drawn where they stand.
func ignoredContainer(name string) bool {
	switch name {
	case "defs", "symbol", "clipPath", "mask", "pattern", "marker", "metadata",
		"title", "desc", "style", "script", "text", "image", "foreignObject",
		"linearGradient", "radialGradient", "filter":
		return true
	}
	return false
}

func (rd *svgReader) read(r io.Reader) error {
	dec := xml.NewDecoder(r)
	var stack []affine // transform of each open element
	var chosen []bool  // whether each open element is inside the element named by opt.ID
	skip := 0          // depth inside an ignored element
	root := false
	found := false
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		line, _ := dec.InputPos()
		if err != nil {
			return fmt.Errorf("XML: %w", err)
		}
		switch t := tok.(type) {
		case xml.StartElement:
			if skip > 0 {
				skip++
				continue
			}
			if t.Name.Space != "" && t.Name.Space != svgNS {
				skip = 1
				continue
			}
			name := t.Name.Local
			if root && len(stack) == 0 {
				return fmt.Errorf("line %d: element %q after the end of the root svg element", line, name)
			}
			if !root {
				if name != "svg" {
					return fmt.Errorf("root element is %q, want svg", name)
				}
				root = true
				m, err := rootTransform(t, rd.opt.UserUnit)
				if err != nil {
					return fmt.Errorf("svg element: %w", err)
				}
				stack = append(stack, m)
				chosen = append(chosen, rd.opt.ID == "")
				continue
			}
			if v, _ := attr(t, "display"); strings.TrimSpace(v) == "none" || ignoredContainer(name) {
				skip = 1
				continue
			}
			src := rd.describe(t, line)
			switch name {
			case "svg":
				return fmt.Errorf("%s: nested svg elements are not supported", src)
			case "use":
				return fmt.Errorf("%s: use elements are not supported; expand them into paths in the drawing", src)
			}
			m := stack[len(stack)-1]
			if tr, ok := attr(t, "transform"); ok {
				local, err := parseTransform(tr)
				if err != nil {
					return fmt.Errorf("%s: transform: %w", src, err)
				}
				m = m.then(local)
			}
			stack = append(stack, m)
			sel := chosen[len(chosen)-1]
			if id, ok := attr(t, "id"); ok && rd.opt.ID != "" && id == rd.opt.ID {
				sel, found = true, true
			}
			chosen = append(chosen, sel)
			if !sel {
				continue
			}
			if err := rd.element(t, src, m); err != nil {
				return err
			}
		case xml.EndElement:
			if skip > 0 {
				skip--
				continue
			}
			if len(stack) > 0 {
				stack = stack[:len(stack)-1]
				chosen = chosen[:len(chosen)-1]
			}
		}
	}
	if !root {
		return errors.New("no svg element")
	}
	if rd.opt.ID != "" && !found {
		return fmt.Errorf("no element with id %q", rd.opt.ID)
	}
	return nil
}

// element reads one drawing element (groups and unknown elements add
// nothing themselves).
func (rd *svgReader) element(se xml.StartElement, src string, m affine) error {
	fl := &flattener{m: m, tol: rd.tol, budget: &rd.budget}
	var subs []subpath
	var err error
	switch se.Name.Local {
	case "path":
		d, _ := attr(se, "d")
		subs, err = parsePathData(d, fl)
	case "rect":
		subs, err = rectOutline(se, fl)
	case "circle", "ellipse":
		subs, err = ellipseOutline(se, fl)
	case "polygon", "polyline":
		pts, _ := attr(se, "points")
		subs, err = pointsOutline(pts, fl, se.Name.Local == "polygon")
	case "line":
		if !rd.opt.SkipOpen {
			return fmt.Errorf("%s: a line encloses no area; remove it or pass SkipOpen", src)
		}
		return nil
	default:
		return nil
	}
	if err != nil {
		return fmt.Errorf("%s: %w", src, err)
	}
	for i, sp := range subs {
		if !sp.closed && len(sp.pts) > 1 && sp.pts[0] != sp.pts[len(sp.pts)-1] {
			if rd.opt.SkipOpen {
				continue
			}
			return fmt.Errorf("%s: subpath %d is open (starts at %s, ends at %s); close it with Z or pass SkipOpen",
				src, i, fmtPoint(sp.pts[0]), fmtPoint(sp.pts[len(sp.pts)-1]))
		}
		r := Ring(sp.pts).Clean()
		if len(r) < 2 {
			continue // a lone moveto draws nothing
		}
		name := src
		if len(subs) > 1 {
			name = fmt.Sprintf("%s, subpath %d", src, i)
		}
		rd.outlines = append(rd.outlines, svgOutline{r, name})
	}
	return nil
}

// lengthAttr reads a plain number attribute (user units; SVG 1.1
// "coordinate" or "length" without a unit). A missing attribute is def.
func lengthAttr(se xml.StartElement, name string, def float64) (float64, error) {
	v, ok := attr(se, name)
	if !ok {
		return def, nil
	}
	sc := numScanner{s: strings.TrimSpace(v)}
	x, err := sc.number()
	if err != nil || !sc.done() {
		u := strings.TrimSpace(v)
		if err == nil {
			u = sc.s[sc.i:]
		}
		return 0, fmt.Errorf("attribute %s=%q: want a number in user units (found %q)", name, v, u)
	}
	return x, nil
}

// rectOutline builds the outline of a rect after W3C SVG 1.1, 9.2: rx and
// ry default to each other, are clamped to half the width and height, and a
// zero width or height disables rendering.
func rectOutline(se xml.StartElement, fl *flattener) ([]subpath, error) {
	var v [4]float64
	for i, n := range []string{"x", "y", "width", "height"} {
		var err error
		if v[i], err = lengthAttr(se, n, 0); err != nil {
			return nil, err
		}
	}
	x, y, w, h := v[0], v[1], v[2], v[3]
	if w < 0 || h < 0 {
		return nil, fmt.Errorf("negative width or height (%g × %g)", w, h)
	}
	if w == 0 || h == 0 {
		return nil, nil
	}
	rx, err := lengthAttr(se, "rx", -1)
	if err != nil {
		return nil, err
	}
	ry, err := lengthAttr(se, "ry", -1)
	if err != nil {
		return nil, err
	}
	_, hasRx := attr(se, "rx")
	_, hasRy := attr(se, "ry")
	if (hasRx && rx < 0) || (hasRy && ry < 0) {
		return nil, fmt.Errorf("negative corner radius")
	}
	switch {
	case !hasRx && !hasRy:
		rx, ry = 0, 0
	case !hasRx:
		rx = ry
	case !hasRy:
		ry = rx
	}
	rx = math.Min(rx, w/2)
	ry = math.Min(ry, h/2)
	sp := subpath{closed: true}
	if rx == 0 || ry == 0 {
		sp.pts = []Point{fl.m.apply(Point{x, y})}
		for _, p := range []Point{{x + w, y}, {x + w, y + h}, {x, y + h}} {
			if sp.pts, err = fl.line(sp.pts, p); err != nil {
				return nil, err
			}
		}
		return []subpath{sp}, nil
	}
	// The outline of W3C SVG 1.1, 9.2, steps 1–9: four edges joined by
	// quarter arcs (sweep flag 1, large-arc flag 0).
	sp.pts = []Point{fl.m.apply(Point{x + rx, y})}
	steps := []struct {
		line, arcEnd Point
	}{
		{Point{x + w - rx, y}, Point{x + w, y + ry}},
		{Point{x + w, y + h - ry}, Point{x + w - rx, y + h}},
		{Point{x + rx, y + h}, Point{x, y + h - ry}},
		{Point{x, y + ry}, Point{x + rx, y}},
	}
	for _, st := range steps {
		if sp.pts, err = fl.line(sp.pts, st.line); err != nil {
			return nil, err
		}
		if sp.pts, err = fl.arc(sp.pts, st.line, rx, ry, 0, false, true, st.arcEnd); err != nil {
			return nil, err
		}
	}
	return []subpath{sp}, nil
}

// ellipseOutline builds a circle (W3C SVG 1.1, 9.3) or an ellipse (9.4)
// from two half arcs; a zero radius disables rendering.
func ellipseOutline(se xml.StartElement, fl *flattener) ([]subpath, error) {
	cx, err := lengthAttr(se, "cx", 0)
	if err != nil {
		return nil, err
	}
	cy, err := lengthAttr(se, "cy", 0)
	if err != nil {
		return nil, err
	}
	var rx, ry float64
	if se.Name.Local == "circle" {
		if rx, err = lengthAttr(se, "r", 0); err != nil {
			return nil, err
		}
		ry = rx
	} else {
		if rx, err = lengthAttr(se, "rx", 0); err != nil {
			return nil, err
		}
		if ry, err = lengthAttr(se, "ry", 0); err != nil {
			return nil, err
		}
	}
	if rx < 0 || ry < 0 {
		return nil, fmt.Errorf("negative radius")
	}
	if rx == 0 || ry == 0 {
		return nil, nil
	}
	// Two half arcs: from (cx+rx, cy) through (cx−rx, cy) and back.
	p0, p1 := Point{cx + rx, cy}, Point{cx - rx, cy}
	sp := subpath{pts: []Point{fl.m.apply(p0)}, closed: true}
	if sp.pts, err = fl.arc(sp.pts, p0, rx, ry, 0, false, true, p1); err != nil {
		return nil, err
	}
	if sp.pts, err = fl.arc(sp.pts, p1, rx, ry, 0, false, true, p0); err != nil {
		return nil, err
	}
	return []subpath{sp}, nil
}

// pointsOutline reads the points attribute of polygon and polyline (W3C
// SVG 1.1, 9.7 and 9.6).
func pointsOutline(s string, fl *flattener, closed bool) ([]subpath, error) {
	sc := numScanner{s: s}
	var pts []Point
	sc.skipWSP()
	for !sc.done() {
		x, err := sc.number()
		if err != nil {
			return nil, fmt.Errorf("points %w", err)
		}
		sc.skipSep()
		y, err := sc.number()
		if err != nil {
			return nil, fmt.Errorf("points %w", err)
		}
		sc.skipSep()
		q := fl.m.apply(Point{x, y})
		if !finiteFar(q) {
			return nil, errFar
		}
		if pts, err = fl.emit(pts, q); err != nil {
			return nil, err
		}
	}
	if len(pts) == 0 {
		return nil, nil
	}
	return []subpath{{pts: pts, closed: closed}}, nil
}

// parseTransform reads a transform list (W3C SVG 1.1, 7.6). The list
// applies right to left to a point: "translate(10) scale(2)" scales
// first, then translates.
func parseTransform(s string) (affine, error) {
	m := identity()
	i := 0
	for {
		for i < len(s) && (isWSP(s[i]) || s[i] == ',') {
			i++
		}
		if i >= len(s) {
			return m, nil
		}
		j := i
		for j < len(s) && (s[j] >= 'a' && s[j] <= 'z' || s[j] >= 'A' && s[j] <= 'Z') {
			j++
		}
		name := s[i:j]
		for j < len(s) && isWSP(s[j]) {
			j++
		}
		if j >= len(s) || s[j] != '(' {
			return m, fmt.Errorf("at offset %d: want a transform such as translate(…), found %q", i, s[i:min(len(s), i+20)])
		}
		k := strings.IndexByte(s[j:], ')')
		if k < 0 {
			return m, fmt.Errorf("at offset %d: %s( has no closing parenthesis", i, name)
		}
		sc := numScanner{s: s[j+1 : j+k]}
		var args []float64
		sc.skipWSP()
		for !sc.done() {
			v, err := sc.number()
			if err != nil {
				return m, fmt.Errorf("%s: %w", name, err)
			}
			args = append(args, v)
			sc.skipSep()
		}
		t, err := transformFunc(name, args)
		if err != nil {
			return m, fmt.Errorf("at offset %d: %w", i, err)
		}
		m = m.then(t)
		i = j + k + 1
	}
}

// transformFunc builds one transform after W3C SVG 1.1, 7.6.
func transformFunc(name string, a []float64) (affine, error) {
	bad := func(want string) (affine, error) {
		return affine{}, fmt.Errorf("%s takes %s, got %d numbers", name, want, len(a))
	}
	rad := func(deg float64) float64 { return deg * math.Pi / 180 }
	switch name {
	case "matrix":
		if len(a) != 6 {
			return bad("6 numbers")
		}
		return affine{a[0], a[1], a[2], a[3], a[4], a[5]}, nil
	case "translate":
		switch len(a) {
		case 1:
			return affine{1, 0, 0, 1, a[0], 0}, nil
		case 2:
			return affine{1, 0, 0, 1, a[0], a[1]}, nil
		}
		return bad("1 or 2 numbers")
	case "scale":
		switch len(a) {
		case 1:
			return affine{a[0], 0, 0, a[0], 0, 0}, nil
		case 2:
			return affine{a[0], 0, 0, a[1], 0, 0}, nil
		}
		return bad("1 or 2 numbers")
	case "rotate":
		if len(a) != 1 && len(a) != 3 {
			return bad("1 or 3 numbers")
		}
		c, s := math.Cos(rad(a[0])), math.Sin(rad(a[0]))
		r := affine{c, s, -s, c, 0, 0}
		if len(a) == 3 {
			// rotate(a, cx, cy) = translate(cx, cy) rotate(a) translate(−cx, −cy)
			r = affine{1, 0, 0, 1, a[1], a[2]}.then(r).then(affine{1, 0, 0, 1, -a[1], -a[2]})
		}
		return r, nil
	case "skewX":
		if len(a) != 1 {
			return bad("1 number")
		}
		return affine{1, 0, math.Tan(rad(a[0])), 1, 0, 0}, nil
	case "skewY":
		if len(a) != 1 {
			return bad("1 number")
		}
		return affine{1, math.Tan(rad(a[0])), 0, 1, 0, 0}, nil
	}
	return affine{}, fmt.Errorf("unknown transform %q", name)
}

// mmPerUnit converts CSS absolute length units to millimetres (CSS Values
// and Units Level 3, §5.2: 1in = 2.54cm = 96px = 72pt = 6pc, 1Q = 0.25mm).
func mmPerUnit(u string) (float64, bool) {
	switch u {
	case "", "mm":
		return 1, true
	case "cm":
		return 10, true
	case "Q":
		return 0.25, true
	case "in":
		return 25.4, true
	case "pt":
		return 25.4 / 72, true
	case "pc":
		return 25.4 / 6, true
	case "px":
		return 25.4 / 96, true
	}
	return 0, false
}

// lengthMM reads a root width or height in mm; ok is false for a missing
// value or a percentage.
func lengthMM(se xml.StartElement, name string) (float64, bool, error) {
	v, has := attr(se, name)
	v = strings.TrimSpace(v)
	if !has || v == "" || strings.HasSuffix(v, "%") || v == "auto" {
		return 0, false, nil
	}
	sc := numScanner{s: v}
	x, err := sc.number()
	if err != nil {
		return 0, false, fmt.Errorf("%s=%q: %w", name, v, err)
	}
	k, ok := mmPerUnit(strings.TrimSpace(sc.s[sc.i:]))
	if !ok {
		return 0, false, fmt.Errorf("%s=%q: unknown unit %q", name, v, sc.s[sc.i:])
	}
	if !(x > 0) {
		return 0, false, fmt.Errorf("%s=%q: want a positive length", name, v)
	}
	return x * k, true, nil
}

// rootTransform maps user units of the root svg element to chipband's
// frame (see ParseSVG for the rule).
func rootTransform(se xml.StartElement, userUnit float64) (affine, error) {
	var vb []float64
	if v, ok := attr(se, "viewBox"); ok {
		sc := numScanner{s: v}
		sc.skipWSP()
		for !sc.done() {
			x, err := sc.number()
			if err != nil {
				return affine{}, fmt.Errorf("viewBox %w", err)
			}
			vb = append(vb, x)
			sc.skipSep()
		}
		if len(vb) != 4 {
			return affine{}, fmt.Errorf("viewBox=%q: want 4 numbers", v)
		}
		if !(vb[2] > 0) || !(vb[3] > 0) {
			return affine{}, fmt.Errorf("viewBox=%q: width and height must be positive", v)
		}
	}
	u := 1.0
	if userUnit > 0 && !math.IsInf(userUnit, 0) {
		u = userUnit
	} else if vb != nil {
		w, hasW, err := lengthMM(se, "width")
		if err != nil {
			return affine{}, err
		}
		h, hasH, err := lengthMM(se, "height")
		if err != nil {
			return affine{}, err
		}
		switch {
		case hasW:
			u = w / vb[2]
			if hasH {
				if uh := h / vb[3]; math.Abs(uh-u) > 1e-3*u {
					return affine{}, fmt.Errorf("width and height give different scales (%g and %g mm per user unit); make them proportional to the viewBox", u, uh)
				}
			}
		case hasH:
			u = h / vb[3]
		}
	}
	if vb == nil {
		return affine{u, 0, 0, -u, 0, 0}, nil
	}
	return affine{u, 0, 0, -u, -vb[0] * u, (vb[1] + vb[3]) * u}, nil
}

// assemble checks the outlines and sorts them into regions by nesting
// depth.
func (rd *svgReader) assemble() (Shape, error) {
	outs := rd.outlines
	if len(outs) == 0 {
		return nil, errors.New("no closed outline found")
	}
	rings := make([]Ring, len(outs))
	for i, o := range outs {
		if err := o.ring.Validate(); err != nil {
			return nil, fmt.Errorf("%s: %w", o.src, err)
		}
		rings[i] = o.ring
	}
	if c, ok := firstContact(rings, nil, false); ok {
		return nil, fmt.Errorf("%s and %s cross or touch near %s; outlines must be apart or nested",
			outs[c.ringA].src, outs[c.ringB].src, fmtPoint(c.at))
	}
	// Larger outlines first: a container has more area than what it holds.
	order := make([]int, len(rings))
	area := make([]float64, len(rings))
	for i := range order {
		order[i] = i
		area[i] = rings[i].Area()
	}
	sort.SliceStable(order, func(a, b int) bool { return area[order[a]] > area[order[b]] })
	items := make([]rtree.BulkItem, len(rings))
	for i, r := range rings {
		items[i] = rtree.BulkItem{Box: toBox(r.Bounds()), RecordID: i}
	}
	tree := rtree.BulkLoad(items)
	parent := make([]int, len(rings))
	depth := make([]int, len(rings))
	for _, i := range order {
		p := rings[i][0]
		best := -1
		_ = tree.RangeSearch(rtree.Box{MinX: p.X, MinY: p.Y, MaxX: p.X, MaxY: p.Y}, func(j int) error {
			if j != i && area[j] > area[i] && rings[j].Winding(p) != 0 &&
				(best < 0 || area[j] < area[best] || (area[j] == area[best] && j < best)) {
				best = j
			}
			return nil
		})
		parent[i] = best
		if best >= 0 {
			depth[i] = depth[best] + 1
		}
	}
	regionOf := make([]int, len(rings))
	var s Shape
	for i, r := range rings { // document order
		if depth[i]%2 == 0 {
			regionOf[i] = len(s)
			s = append(s, Region{Outer: r})
		}
	}
	for i, r := range rings {
		if depth[i]%2 == 1 {
			g := &s[regionOf[parent[i]]]
			g.Holes = append(g.Holes, r)
		}
	}
	s = s.Clean()
	if err := s.Validate(); err != nil {
		return nil, err
	}
	return s, nil
}
