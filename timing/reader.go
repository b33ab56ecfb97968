package timing

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
)

// MaxLineBytes is the longest program line the Reader accepts.
const MaxLineBytes = 64 << 10

// Kind says what a Block does.
type Kind uint8

// The kinds of block the Reader produces.
const (
	// KindRapid is a straight rapid traverse (G0).
	KindRapid Kind = iota + 1
	// KindLine is a straight feed move (G1).
	KindLine
	// KindArc is a feed move along an arc in the XY plane, possibly
	// helical (G2 clockwise, G3 counter-clockwise).
	KindArc
	// KindDwell is a pause of Block.Dwell seconds (G4).
	KindDwell
	// KindStop is a program stop or optional stop (M0, M1, M60).
	KindStop
	// KindToolChange is a tool change (M6) to Block.Tool.
	KindToolChange
	// KindSpindleStart starts the spindle (M3, M4) at Block.Spindle rpm.
	KindSpindleStart
	// KindEnd ends the program (M2, M30).
	KindEnd
)

// String returns the kind's name in lower case, e.g. "rapid".
func (k Kind) String() string {
	switch k {
	case KindRapid:
		return "rapid"
	case KindLine:
		return "line"
	case KindArc:
		return "arc"
	case KindDwell:
		return "dwell"
	case KindStop:
		return "stop"
	case KindToolChange:
		return "tool change"
	case KindSpindleStart:
		return "spindle start"
	case KindEnd:
		return "end"
	}
	return fmt.Sprintf("Kind(%d)", uint8(k))
}

// IsMotion reports whether blocks of this kind move the tool.
func (k Kind) IsMotion() bool { return k == KindRapid || k == KindLine || k == KindArc }

// Block is one timed action of a program: a move, a dwell, a stop, a tool
// change or a spindle start. Coordinates are absolute millimetres in the
// program's work coordinates, whatever G20/G21 and G90/G91 said.
type Block struct {
	// Line is the 1-based line of the program the block came from; zero
	// for blocks built in memory.
	Line int
	// Kind says what the block does.
	Kind Kind
	// From and To are the start and end points (X, Y, Z) of a move, mm.
	// Other kinds hold the current position in both.
	From, To [3]float64
	// Center is the arc centre in XY, mm (KindArc). An arc whose end
	// equals its start in XY is a full circle.
	Center [2]float64
	// CW is true for a clockwise arc (G2), seen from +Z.
	CW bool
	// Feed is the programmed feed, mm/min (KindLine, KindArc).
	Feed float64
	// Dwell is the pause in seconds (KindDwell).
	Dwell float64
	// Tool is the selected tool number.
	Tool int
	// Spindle is the programmed spindle speed, rpm.
	Spindle float64
	// Op is the name of the operation the block belongs to, from the last
	// "(op: NAME)" comment; empty before the first one.
	Op string
}

// Rapid returns a rapid traverse from one point to another (mm).
func Rapid(from, to [3]float64) Block { return Block{Kind: KindRapid, From: from, To: to} }

// Line returns a straight feed move at feed mm/min.
func Line(from, to [3]float64, feed float64) Block {
	return Block{Kind: KindLine, From: from, To: to, Feed: feed}
}

// Arc returns an arc feed move around center (XY) at feed mm/min; cw picks
// clockwise. The Z change from from to to makes it helical; to equal to from
// in XY makes it a full circle.
func Arc(from, to [3]float64, center [2]float64, cw bool, feed float64) Block {
	return Block{Kind: KindArc, From: from, To: to, Center: center, CW: cw, Feed: feed}
}

// Dwell returns a pause of s seconds.
func Dwell(s float64) Block { return Block{Kind: KindDwell, Dwell: s} }

// OpComment returns the comment line that starts an operation named name,
// "(op: NAME)". chipband's G-code writer emits exactly this, and the Reader
// tags every following block with the name. Parentheses, semicolons and
// line breaks in name are replaced by '_' so the comment stays one comment.
func OpComment(name string) string {
	name = strings.Map(func(r rune) rune {
		switch r {
		case '(', ')', ';', '\n', '\r':
			return '_'
		}
		return r
	}, name)
	return "(op: " + strings.TrimSpace(name) + ")"
}

// opPrefix starts an operation comment inside the parentheses.
const opPrefix = "op:"

// LineError is an error in one line of a program.
type LineError struct {
	// Line is the 1-based line number.
	Line int
	// Msg says what is wrong.
	Msg string
	// Err is the underlying error, if any.
	Err error
}

// Error returns "line N: message".
func (e *LineError) Error() string {
	if e.Err != nil {
		return fmt.Sprintf("line %d: %s: %v", e.Line, e.Msg, e.Err)
	}
	return fmt.Sprintf("line %d: %s", e.Line, e.Msg)
}

// Unwrap returns the underlying error.
func (e *LineError) Unwrap() error { return e.Err }

// motion modes
const (
	motionNone = -1
	motionG0   = 0
	motionG1   = 1
	motionG2   = 2
	motionG3   = 3
)

// Reader reads a G-code program as a stream of Blocks, in constant memory.
//
// It understands the RS-274 subset shop programs use (NIST RS274/NGC
// Interpreter Version 3, NISTIR 6556): G0, G1, G2, G3 (I J and R forms,
// helical arcs, full circles), G4 P (seconds), G17, G20, G21, G40, G43 (H is
// ignored), G49, G54–G59, G64, G80, G90, G91, G90.1, G91.1 (arc centres
// incremental by default), G94, G98, G99; F, S, T, N; M0, M1, M2, M3, M4,
// M5, M6, M7, M8, M9, M30, M60; comments in parentheses and after ';';
// '%' lines and block delete '/'. Words within a line run in the order of
// the NIST interpreter (feed, speed, tool, M6, spindle, dwell, modes,
// motion, stop). Codes it cannot time correctly (other planes, cutter
// radius compensation, canned cycles, inverse-time feed, machine
// coordinates, homing, offsets, subprograms, extra axes) are errors.
//
// The program is assumed to start at X0 Y0 Z0 of the work coordinates, in
// G21, G90, G91.1, G17, with no motion mode active. Work offsets (G54–G59)
// are accepted but not known, so they do not move the tool. Lines after M2
// or M30 are not read.
type Reader struct {
	sc   *bufio.Scanner
	line int
	err  error

	pos         [3]float64
	motion      int
	inch        bool
	incremental bool
	arcAbs      bool
	feedRaw     float64 // F as written, in the units active at the move
	spindle     float64
	tool        int
	op          string
	done        bool

	q      [8]Block
	qh, qn int

	// per-line scratch
	gs   [16]int
	ng   int
	ms   [16]int
	nm   int
	val  [26]float64
	have uint32
}

// NewReader returns a Reader of the program in r.
func NewReader(r io.Reader) *Reader {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, MaxLineBytes), MaxLineBytes)
	return &Reader{sc: sc, motion: motionNone}
}

// Line returns the number of the last line read.
func (r *Reader) Line() int { return r.line }

// Next returns the next block. It returns io.EOF after the last block, and
// a *LineError for bad input; after an error it keeps returning it.
func (r *Reader) Next() (Block, error) {
	for r.qn == 0 {
		if r.err != nil {
			return Block{}, r.err
		}
		if r.done {
			r.err = io.EOF
			return Block{}, io.EOF
		}
		if !r.sc.Scan() {
			err := r.sc.Err()
			switch {
			case err == nil:
				r.err = io.EOF
			case errors.Is(err, bufio.ErrTooLong):
				r.err = &LineError{Line: r.line + 1, Msg: fmt.Sprintf("line longer than %d bytes", MaxLineBytes)}
			default:
				r.err = &LineError{Line: r.line + 1, Msg: "read", Err: err}
			}
			continue
		}
		r.line++
		if err := r.parseLine(r.sc.Bytes()); err != nil {
			r.err = err
			r.qn = 0
		}
	}
	b := r.q[r.qh]
	r.qh++
	r.qn--
	return b, nil
}

func (r *Reader) errf(format string, args ...any) error {
	return &LineError{Line: r.line, Msg: fmt.Sprintf(format, args...)}
}

func (r *Reader) push(b Block) {
	b.Line = r.line
	b.Op = r.op
	b.Tool = r.tool
	b.Spindle = r.spindle
	if b.Kind != KindArc && !b.Kind.IsMotion() {
		b.From, b.To = r.pos, r.pos
	}
	r.q[r.qn] = b
	r.qn++
}

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\r' || c == '\f' || c == '\v' }

func letterBit(c byte) uint32 { return 1 << (c - 'A') }

// parseLine reads the words of one line and executes them.
func (r *Reader) parseLine(b []byte) error {
	r.qh, r.qn = 0, 0
	r.ng, r.nm, r.have = 0, 0, 0
	i := 0
	for i < len(b) && isSpace(b[i]) {
		i++
	}
	if i < len(b) && b[i] == '%' {
		return nil
	}
	if i < len(b) && b[i] == '/' {
		i++
	}
	var opName []byte
	opSeen := false
	for i < len(b) {
		c := b[i]
		switch {
		case isSpace(c):
			i++
			continue
		case c == ';':
			i = len(b)
			continue
		case c == '(':
			j := i + 1
			for j < len(b) && b[j] != ')' {
				if b[j] == '(' {
					return r.errf("nested comment")
				}
				j++
			}
			if j == len(b) {
				return r.errf("comment not closed with ')'")
			}
			if name, ok := opFromComment(b[i+1 : j]); ok {
				opName, opSeen = name, true
			}
			i = j + 1
			continue
		}
		if c >= 'a' && c <= 'z' {
			c -= 'a' - 'A'
		}
		if c < 'A' || c > 'Z' {
			return r.errf("unexpected character %q", rune(b[i]))
		}
		i++
		for i < len(b) && isSpace(b[i]) {
			i++
		}
		v, n, ok := parseNumber(b[i:])
		if !ok {
			if strings.ContainsAny(string(b[i:i+n]), "0123456789") {
				// RS-274 numbers are decimals a float64 holds; one beyond
				// ±1.8e308 is a damaged or generated-wrong line.
				return r.errf("word %c: number of %d characters is out of range (too long for a float64)", c, n)
			}
			return r.errf("word %c needs a number", c)
		}
		i += n
		switch c {
		case 'G':
			code := math.Round(v * 10)
			if v < 0 || math.Abs(v*10-code) > 1e-6 || code > 9999 {
				return r.errf("G%s is not a G-code", fmtNum(v))
			}
			if r.ng == len(r.gs) {
				return r.errf("too many G words")
			}
			r.gs[r.ng] = int(code)
			r.ng++
		case 'M':
			if v < 0 || v != math.Trunc(v) || v > 9999 {
				return r.errf("M%s is not an M-code", fmtNum(v))
			}
			if r.nm == len(r.ms) {
				return r.errf("too many M words")
			}
			r.ms[r.nm] = int(v)
			r.nm++
		case 'N':
			// line number: no effect
		case 'F', 'S', 'T', 'P', 'X', 'Y', 'Z', 'I', 'J', 'K', 'R', 'H', 'D':
			bt := letterBit(c)
			if r.have&bt != 0 {
				return r.errf("word %c appears twice", c)
			}
			r.have |= bt
			r.val[c-'A'] = v
		case 'A', 'B', 'C', 'U', 'V', 'W':
			return r.errf("axis %c not supported (X, Y and Z only)", c)
		case 'O':
			return r.errf("O words (subprograms) not supported")
		default:
			return r.errf("word %c not supported", c)
		}
	}
	if opSeen && string(opName) != r.op {
		r.op = string(opName)
	}
	if r.ng == 0 && r.nm == 0 && r.have == 0 {
		return nil
	}
	return r.execute()
}

// opFromComment returns NAME for a comment "op: NAME".
func opFromComment(c []byte) ([]byte, bool) {
	for len(c) > 0 && isSpace(c[0]) {
		c = c[1:]
	}
	if len(c) < len(opPrefix) || string(c[:len(opPrefix)]) != opPrefix {
		return nil, false
	}
	c = c[len(opPrefix):]
	for len(c) > 0 && isSpace(c[0]) {
		c = c[1:]
	}
	for len(c) > 0 && isSpace(c[len(c)-1]) {
		c = c[:len(c)-1]
	}
	return c, true
}

func fmtNum(v float64) string { return fmt.Sprint(v) }

func (r *Reader) has(c byte) bool    { return r.have&letterBit(c) != 0 }
func (r *Reader) get(c byte) float64 { return r.val[c-'A'] }

func (r *Reader) unit() float64 {
	if r.inch {
		return 25.4
	}
	return 1
}

// execute runs the words of the current line in the NIST order.
func (r *Reader) execute() error {
	motion := -2 // no motion code on this line
	dwell := false
	for _, g := range r.gs[:r.ng] {
		switch g {
		case 0, 10, 20, 30:
			if motion != -2 {
				return r.errf("two motion codes on one line")
			}
			motion = g / 10
		case 800:
			if motion != -2 {
				return r.errf("two motion codes on one line")
			}
			motion = motionNone
		case 40:
			dwell = true
		case 170, 210, 200, 400, 430, 490, 540, 550, 560, 570, 580, 590, 591, 592, 593,
			640, 900, 910, 901, 911, 940, 980, 990:
			// handled below or no effect on timing
		case 180, 190:
			return r.errf("G%d (plane other than XY) not supported; only G17", g/10)
		case 410, 420:
			return r.errf("G%d (cutter radius compensation) not supported", g/10)
		case 930:
			return r.errf("G93 (inverse time feed) not supported")
		case 950:
			return r.errf("G95 (feed per revolution) not supported")
		case 610, 611:
			return r.errf("G%s (exact stop mode) not supported; use G64", gName(g))
		default:
			if g >= 810 && g <= 890 {
				return r.errf("G%s (canned cycle) not supported", gName(g))
			}
			return r.errf("G%s not supported", gName(g))
		}
	}
	// NIST RS274NGC v3 §3.4: two G codes of one modal group on a line are
	// an error (which one wins would be a guess).
	var gGroups [10]bool
	for _, g := range r.gs[:r.ng] {
		grp := -1
		switch g {
		case 170, 180, 190: // plane
			grp = 0
		case 200, 210: // units
			grp = 1
		case 900, 910: // distance mode
			grp = 2
		case 901, 911: // arc distance mode
			grp = 3
		case 930, 940, 950: // feed rate mode
			grp = 4
		case 400, 410, 420: // cutter radius compensation
			grp = 5
		case 430, 490: // tool length offset
			grp = 6
		case 540, 550, 560, 570, 580, 590, 591, 592, 593: // coordinate system
			grp = 7
		case 980, 990: // canned cycle return mode
			grp = 8
		case 610, 611, 640: // path control
			grp = 9
		}
		if grp >= 0 {
			if gGroups[grp] {
				return r.errf("two G codes of one modal group on a line (G%s)", gName(g))
			}
			gGroups[grp] = true
		}
	}
	// NIST RS274NGC v3: at most one M code of each modal group per line
	var groups [5]bool
	for _, m := range r.ms[:r.nm] {
		g := -1
		switch m {
		case 0, 1, 2, 30, 60:
			g = 0
		case 6:
			g = 1
		case 3, 4, 5:
			g = 2
		case 7, 8, 9:
			g = 3
		case 48, 49:
			g = 4
		}
		if g >= 0 {
			if groups[g] {
				return r.errf("two M codes of one modal group on a line")
			}
			groups[g] = true
		}
		switch m {
		case 0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 30, 48, 49, 60:
		case 98, 99:
			return r.errf("M%d (subprogram) not supported", m)
		default:
			return r.errf("M%d not supported", m)
		}
	}
	// 3 feed rate, 4 spindle speed, 5 tool select
	if r.has('F') {
		f := r.get('F')
		if f < 0 {
			return r.errf("negative feed F%s", fmtNum(f))
		}
		r.feedRaw = f
	}
	if r.has('S') {
		s := r.get('S')
		if s < 0 {
			return r.errf("negative spindle speed S%s", fmtNum(s))
		}
		r.spindle = s
	}
	if r.has('T') {
		t := r.get('T')
		if t < 0 || t != math.Trunc(t) || t > 1e9 {
			return r.errf("T%s is not a tool number", fmtNum(t))
		}
		r.tool = int(t)
	}
	// 6 tool change, 7 spindle on
	for _, m := range r.ms[:r.nm] {
		if m == 6 {
			r.push(Block{Kind: KindToolChange})
		}
	}
	for _, m := range r.ms[:r.nm] {
		if m == 3 || m == 4 {
			r.push(Block{Kind: KindSpindleStart})
		}
	}
	// 10 dwell
	if dwell {
		if !r.has('P') {
			return r.errf("G4 needs P (seconds)")
		}
		p := r.get('P')
		if p < 0 {
			return r.errf("negative dwell P%s", fmtNum(p))
		}
		if r.has('X') || r.has('Y') || r.has('Z') {
			return r.errf("axis words on a G4 line")
		}
		r.push(Block{Kind: KindDwell, Dwell: p})
	}
	// 12 units, 17 distance mode
	for _, g := range r.gs[:r.ng] {
		switch g {
		case 200:
			r.inch = true
		case 210:
			r.inch = false
		case 900:
			r.incremental = false
		case 910:
			r.incremental = true
		case 901:
			r.arcAbs = true
		case 911:
			r.arcAbs = false
		}
	}
	// 20 motion
	if motion != -2 {
		r.motion = motion
	}
	axes := r.has('X') || r.has('Y') || r.has('Z')
	arcWords := r.has('I') || r.has('J') || r.has('K') || r.has('R')
	if arcWords && r.motion != motionG2 && r.motion != motionG3 {
		return r.errf("I, J, K or R word without G2 or G3")
	}
	isArc := r.motion == motionG2 || r.motion == motionG3
	if axes || (isArc && arcWords) {
		if err := r.move(); err != nil {
			return err
		}
	}
	// 21 stop
	for _, m := range r.ms[:r.nm] {
		switch m {
		case 0, 1, 60:
			r.push(Block{Kind: KindStop})
		case 2, 30:
			r.push(Block{Kind: KindEnd})
			r.done = true
		}
	}
	return nil
}

func gName(g int) string {
	if g%10 == 0 {
		return fmt.Sprint(g / 10)
	}
	return fmt.Sprintf("%d.%d", g/10, g%10)
}

// move executes the motion of the current line.
func (r *Reader) move() error {
	if r.motion == motionNone {
		return r.errf("axis words but no motion mode (G0, G1, G2 or G3) active")
	}
	u := r.unit()
	from := r.pos
	to := from
	for i, c := range [3]byte{'X', 'Y', 'Z'} {
		if !r.has(c) {
			continue
		}
		v := r.get(c) * u
		if r.incremental {
			to[i] += v
		} else {
			to[i] = v
		}
	}
	feed := r.feedRaw * u
	if r.motion != motionG0 && feed <= 0 {
		return r.errf("G%d with no feed rate (program F first)", r.motion)
	}
	switch r.motion {
	case motionG0:
		r.push(Block{Kind: KindRapid, From: from, To: to})
	case motionG1:
		r.push(Block{Kind: KindLine, From: from, To: to, Feed: feed})
	default:
		cw := r.motion == motionG2
		c, err := r.arcCenter(from, to, cw, u)
		if err != nil {
			return err
		}
		r.push(Block{Kind: KindArc, From: from, To: to, Center: c, CW: cw, Feed: feed})
	}
	r.pos = to
	return nil
}

// arcTol is how far the end radius of an I J arc may differ from the start
// radius, and how far an R arc's chord may exceed its diameter, mm.
// Common practice, no source.
func arcTol(r float64) float64 { return max(0.002, 1e-3*r) }

func (r *Reader) arcCenter(from, to [3]float64, cw bool, u float64) ([2]float64, error) {
	if r.has('K') {
		return [2]float64{}, r.errf("K word on a G17 arc")
	}
	hasIJ := r.has('I') || r.has('J')
	if r.has('R') {
		if hasIJ {
			return [2]float64{}, r.errf("arc with both R and I/J")
		}
		R := r.get('R') * u
		dx, dy := to[0]-from[0], to[1]-from[1]
		d := math.Hypot(dx, dy)
		if d < 1e-9 {
			return [2]float64{}, r.errf("R-form arc needs an end point other than its start (use I and J for a full circle)")
		}
		if R == 0 {
			return [2]float64{}, r.errf("arc radius R is zero")
		}
		h2 := R*R - d*d/4
		h := 0.0
		if h2 < 0 {
			if d/2-math.Abs(R) > arcTol(math.Abs(R)) {
				return [2]float64{}, r.errf("arc radius R%s is smaller than half the distance to the end point", fmtNum(r.get('R')))
			}
		} else {
			h = math.Sqrt(h2)
		}
		// centre left of the chord for CCW with R > 0
		side := 1.0
		if cw {
			side = -side
		}
		if R < 0 {
			side = -side
		}
		mx, my := (from[0]+to[0])/2, (from[1]+to[1])/2
		return [2]float64{mx - side*h*dy/d, my + side*h*dx/d}, nil
	}
	if !hasIJ {
		return [2]float64{}, r.errf("arc needs I and J or R")
	}
	i, j := r.get('I')*u, r.get('J')*u
	if !r.has('I') {
		i = 0
	}
	if !r.has('J') {
		j = 0
	}
	c := [2]float64{i, j}
	if !r.arcAbs {
		c = [2]float64{from[0] + i, from[1] + j}
	}
	r0 := math.Hypot(from[0]-c[0], from[1]-c[1])
	r1 := math.Hypot(to[0]-c[0], to[1]-c[1])
	if r0 < 1e-9 {
		return [2]float64{}, r.errf("arc radius is zero")
	}
	if math.Abs(r0-r1) > arcTol(r0) {
		return [2]float64{}, r.errf("arc end radius %.4f mm differs from start radius %.4f mm", r1, r0)
	}
	return c, nil
}
