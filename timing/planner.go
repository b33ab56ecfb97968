package timing

import (
	"errors"
	"fmt"
	"math"
)

// Model names a speed model.
type Model int

const (
	// ModelR1 is reference model R1 of chipband's design notes §6:
	// constant acceleration per segment, trapezoid or triangle profiles.
	ModelR1 Model = iota
	// ModelJerk keeps R1's caps and junction rule but limits jerk inside
	// every segment: each speed change is an S-curve (jerk up, constant
	// acceleration, jerk down), after Erkorkmaz and Altintas (2001), and
	// the passes use the speed such S-curves reach within a segment. The
	// acceleration returns to zero at every segment boundary, so on paths
	// of many short segments the model is pessimistic. It needs
	// Machine.Jerk.
	ModelJerk
)

// String returns "R1" or "jerk".
func (m Model) String() string {
	switch m {
	case ModelR1:
		return "R1"
	case ModelJerk:
		return "jerk"
	}
	return fmt.Sprintf("Model(%d)", int(m))
}

// ParseModel returns the model named s ("R1" or "jerk").
func ParseModel(s string) (Model, error) {
	switch s {
	case "R1", "r1":
		return ModelR1, nil
	case "jerk":
		return ModelJerk, nil
	}
	return 0, fmt.Errorf("unknown timing model %q (want R1 or jerk)", s)
}

// DefaultWindow is the look-ahead window, in segments, when Options.Window
// is zero. At 8192 segments it covers the braking distance from full feed
// for segments down to a few hundredths of a millimetre on common machines.
const DefaultWindow = 8192

// Options tune an estimate. The zero value is model R1 with the default
// window and no per-block callback.
type Options struct {
	// Model is the speed model.
	Model Model
	// Window is the number of segments planned ahead; zero means
	// DefaultWindow. Memory is proportional to it. When the window fills
	// without a stop, the backward pass assumes a stop after its last
	// segment. That is exact for every segment before the last junction
	// whose speed is set by its own limit (a stop, a corner, a cap) within
	// the window, and conservative (too slow, never too fast) otherwise;
	// Report.WindowLimited counts the conservative moves.
	Window int
	// OnBlock, when set, receives the time of every timed block in program
	// order, so per-block times need no memory in the planner.
	OnBlock func(BlockTime)
}

// BlockTime is the predicted time of one block.
type BlockTime struct {
	// Line is the program line of the block (0 for blocks built in memory).
	Line int
	// Kind is the block's kind.
	Kind Kind
	// Op is the operation the block belongs to.
	Op string
	// Seconds is the block's duration.
	Seconds float64
	// Length is the path length of a move, mm.
	Length float64
	// Entry, Peak and Exit are the path speeds at the start, the highest
	// point and the end of a move, mm/s.
	Entry, Peak, Exit float64
}

// OpTime sums the time of one operation.
type OpTime struct {
	// Name is the NAME of "(op: NAME)"; empty for blocks before the first
	// operation comment.
	Name string `json:"name"`
	// TotalS is the operation's time, s.
	TotalS float64 `json:"total_s"`
	// FeedS, RapidS and DwellS split it by kind of block; OtherS holds
	// tool changes and spindle starts.
	FeedS  float64 `json:"feed_s"`
	RapidS float64 `json:"rapid_s"`
	DwellS float64 `json:"dwell_s"`
	OtherS float64 `json:"other_s"`
	// Blocks counts the operation's timed blocks.
	Blocks int64 `json:"blocks"`
}

// Report is the predicted cycle time of a program and its breakdown.
type Report struct {
	// Machine is the machine's name and Model the speed model used.
	Machine string `json:"machine,omitempty"`
	Model   string `json:"model"`
	// TotalS is the cycle time, s: FeedS + RapidS + DwellS + ToolChangeS +
	// SpindleS.
	TotalS float64 `json:"total_s"`
	// FeedS is the time of feed moves (G1, G2, G3), RapidS of rapid
	// traverses (G0), DwellS of dwells (G4), ToolChangeS of tool changes
	// (M6) and SpindleS of spindle starts (M3, M4).
	FeedS       float64 `json:"feed_s"`
	RapidS      float64 `json:"rapid_s"`
	DwellS      float64 `json:"dwell_s"`
	ToolChangeS float64 `json:"tool_change_s"`
	SpindleS    float64 `json:"spindle_s"`
	// NaiveS is the motion time if every move ran at its capped programmed
	// speed throughout: length / min(F, axis feed caps) for feed moves,
	// length / rapid cap for rapids.
	NaiveS float64 `json:"naive_s"`
	// AccelLossS is the time lost to acceleration and braking, including
	// the arc speed cap: FeedS + RapidS − NaiveS.
	AccelLossS float64 `json:"accel_loss_s"`
	// FeedLength and RapidLength are the path lengths, mm.
	FeedLength  float64 `json:"feed_length_mm"`
	RapidLength float64 `json:"rapid_length_mm"`
	// Blocks counts timed blocks: moves of non-zero length, dwells, stops,
	// tool changes, timed spindle starts and the program end.
	Blocks int64 `json:"blocks"`
	// WindowLimited counts moves whose speeds were bounded conservatively
	// because the look-ahead window held no point where the speed is fixed
	// independently of later blocks. Zero means the result equals planning
	// the whole program at once.
	WindowLimited int64 `json:"window_limited"`
	// Operations sums time per operation in order of first appearance.
	Operations []OpTime `json:"operations"`
}

// seg is one planned motion segment.
type seg struct {
	l, vmax, acc, jerk float64 // mm, mm/s, mm/s², mm/s³
	naive              float64 // s
	tin, tout          [3]float64
	jin                float64 // junction speed limit at entry
	fin                float64 // forward-pass entry speed
	bin                float64 // backward-pass entry speed
	rapid              bool
	kind               Kind
	line               int
	op                 string
}

// Planner plans the speeds of a stream of blocks with a bounded look-ahead
// window and sums their times. Feed it blocks in program order with Add and
// call Finish once at the end. A Planner is not safe for concurrent use.
type Planner struct {
	m      Machine
	opt    Options
	jerk   bool
	mf, rp [3]float64 // mm/s
	ac, jk [3]float64
	axy    float64
	jxy    float64
	tol    float64
	window int

	buf []seg
	rep Report

	opIdx   map[string]int
	lastOp  string
	lastIdx int
	done    bool
}

// NewPlanner returns a planner for machine m.
func NewPlanner(m Machine, opt Options) (*Planner, error) {
	if err := m.Validate(); err != nil {
		return nil, err
	}
	if opt.Model != ModelR1 && opt.Model != ModelJerk {
		return nil, fmt.Errorf("timing: unknown model %d", int(opt.Model))
	}
	if opt.Model == ModelJerk && !m.HasJerk() {
		return nil, errors.New("timing: the jerk model needs the machine's jerk limits (key \"jerk\")")
	}
	w := opt.Window
	if w == 0 {
		w = DefaultWindow
	}
	if w < 2 {
		return nil, fmt.Errorf("timing: look-ahead window must be at least 2 segments, got %d", w)
	}
	p := &Planner{m: m, opt: opt, jerk: opt.Model == ModelJerk, tol: m.CornerTolerance, window: w,
		buf: make([]seg, 0, w), opIdx: map[string]int{}, lastIdx: -1}
	for i := range 3 {
		p.mf[i] = m.MaxFeed.get(i) / 60
		p.rp[i] = m.Rapid.get(i) / 60
		p.ac[i] = m.Accel.get(i)
		p.jk[i] = m.Jerk.get(i)
	}
	p.axy = min(p.ac[0], p.ac[1])
	p.jxy = min(p.jk[0], p.jk[1])
	p.rep.Machine = m.Name
	p.rep.Model = opt.Model.String()
	return p, nil
}

func blockErr(b Block, msg string) error {
	if b.Line > 0 {
		return &LineError{Line: b.Line, Msg: msg}
	}
	return errors.New("timing: " + msg)
}

// finite3 reports whether all three values are finite: x−x is NaN for
// NaN and ±Inf, zero otherwise.
func finite3(v [3]float64) bool {
	return v[0]-v[0] == 0 && v[1]-v[1] == 0 && v[2]-v[2] == 0
}

// Add plans one block. Moves of zero length are skipped.
func (p *Planner) Add(b Block) error {
	if p.done {
		return errors.New("timing: Add after Finish")
	}
	switch b.Kind {
	case KindRapid, KindLine, KindArc:
		return p.addMove(b)
	case KindDwell:
		if !(b.Dwell >= 0) || math.IsInf(b.Dwell, 0) {
			return blockErr(b, fmt.Sprintf("bad dwell %v s", b.Dwell))
		}
		p.flush()
		p.event(b, b.Dwell)
	case KindStop, KindEnd:
		p.flush()
		p.event(b, 0)
	case KindToolChange:
		p.flush()
		p.event(b, p.m.ToolChangeS)
	case KindSpindleStart:
		if p.m.SpindleStartS > 0 {
			p.flush()
			p.event(b, p.m.SpindleStartS)
		}
	default:
		return blockErr(b, fmt.Sprintf("unknown block kind %d", b.Kind))
	}
	return nil
}

// addMove turns a move into a segment and plans it.
func (p *Planner) addMove(b Block) error {
	if !finite3(b.From) || !finite3(b.To) || !finite3([3]float64{b.Center[0], b.Center[1], 0}) {
		return blockErr(b, "coordinates are not finite")
	}
	s := seg{kind: b.Kind, line: b.Line, op: b.Op, rapid: b.Kind == KindRapid}
	if b.Kind != KindRapid && (!(b.Feed > 0) || math.IsInf(b.Feed, 0)) {
		return blockErr(b, fmt.Sprintf("feed move needs a positive feed, got %v mm/min", b.Feed))
	}
	if b.Kind == KindArc {
		if err := p.arcSeg(&s, b); err != nil {
			return err
		}
	} else if !p.lineSeg(&s, b) {
		return nil
	}
	if s.l <= 0 {
		return nil
	}
	if !finite3([3]float64{s.l, s.naive, 0}) {
		return blockErr(b, "move too long to time")
	}
	n := len(p.buf)
	if n > 0 && p.buf[n-1].rapid != s.rapid {
		p.flush() // design notes §6: stop at every rapid/feed change
		n = 0
	}
	if n > 0 {
		prev := &p.buf[n-1]
		s.jin = p.junction(prev, &s)
		s.fin = min(s.jin, p.reach(prev.fin, prev))
	}
	p.buf = append(p.buf, s)
	if len(p.buf) == p.window {
		p.flushWindow()
	}
	return nil
}

// lineSeg fills a straight segment; false for a zero-length move.
func (p *Planner) lineSeg(s *seg, b Block) bool {
	d := [3]float64{b.To[0] - b.From[0], b.To[1] - b.From[1], b.To[2] - b.From[2]}
	l := math.Sqrt(d[0]*d[0] + d[1]*d[1] + d[2]*d[2])
	if l < 1e-9 {
		return false
	}
	u := [3]float64{d[0] / l, d[1] / l, d[2] / l}
	v := math.Inf(1)
	caps := &p.rp
	if !s.rapid {
		v = b.Feed / 60
		caps = &p.mf
	}
	acc, jerk := math.Inf(1), math.Inf(1)
	for i := range 3 {
		if u[i] != 0 {
			a := math.Abs(u[i])
			v = min(v, caps[i]/a)
			acc = min(acc, p.ac[i]/a)
			if p.jerk {
				jerk = min(jerk, p.jk[i]/a)
			}
		}
	}
	s.l, s.vmax, s.acc, s.jerk = l, v, acc, jerk
	s.naive = l / v
	s.tin, s.tout = u, u
	return true
}

// arcSeg fills an arc segment.
func (p *Planner) arcSeg(s *seg, b Block) error {
	cx, cy := b.Center[0], b.Center[1]
	sx, sy := b.From[0]-cx, b.From[1]-cy
	ex, ey := b.To[0]-cx, b.To[1]-cy
	r0, r1 := math.Hypot(sx, sy), math.Hypot(ex, ey)
	if r0 < 1e-9 || r1 < 1e-9 {
		return blockErr(b, "arc radius is zero")
	}
	var sweep float64
	if math.Hypot(b.To[0]-b.From[0], b.To[1]-b.From[1]) < 1e-9 {
		sweep = 2 * math.Pi // full circle
	} else {
		a0, a1 := math.Atan2(sy, sx), math.Atan2(ey, ex)
		if b.CW {
			sweep = a0 - a1
		} else {
			sweep = a1 - a0
		}
		for sweep <= 0 {
			sweep += 2 * math.Pi
		}
		for sweep > 2*math.Pi {
			sweep -= 2 * math.Pi
		}
	}
	r := (r0 + r1) / 2
	arc := r * sweep
	dz := b.To[2] - b.From[2]
	l := math.Hypot(arc, dz)
	xy, z := arc/l, dz/l
	dir := 1.0
	if b.CW {
		dir = -1
	}
	s.tin = [3]float64{-dir * sy / r0 * xy, dir * sx / r0 * xy, z}
	s.tout = [3]float64{-dir * ey / r1 * xy, dir * ex / r1 * xy, z}
	// Axis feed caps use the largest share of the path speed each axis
	// takes along the arc: arc/l for X and Y, |dz|/l for Z.
	v := min(b.Feed/60, min(p.mf[0], p.mf[1])/xy)
	acc, jerk := p.axy, p.jxy
	if dz != 0 {
		az := math.Abs(z)
		v = min(v, p.mf[2]/az)
		acc = min(acc, p.ac[2]/az)
		jerk = min(jerk, p.jk[2]/az)
	}
	s.naive = l / v
	// design notes §6: arcs also v <= sqrt(a_xy·R)
	v = min(v, math.Sqrt(p.axy*r))
	s.l, s.vmax, s.acc, s.jerk = l, v, acc, jerk
	return nil
}

// junction is the speed limit where segment b follows segment a (both of
// the same kind): design notes §6, s = cos(α/2), R_b = tol·s/(1−s),
// v_j = min(caps, sqrt(min(a_a, a_b)·R_b)).
func (p *Planner) junction(a, b *seg) float64 {
	v := min(a.vmax, b.vmax)
	c := a.tout[0]*b.tin[0] + a.tout[1]*b.tin[1] + a.tout[2]*b.tin[2]
	c = max(-1, min(1, c))
	s := math.Sqrt((1 + c) / 2)
	if s >= 1 {
		return v // straight on
	}
	rb := p.tol * s / (1 - s)
	return min(v, math.Sqrt(min(a.acc, b.acc)*rb))
}

// reach is the highest exit speed of s from entry speed v.
func (p *Planner) reach(v float64, s *seg) float64 {
	if p.jerk {
		return reachJerk(v, s.acc, s.jerk, s.l)
	}
	return reachR1(v, s.acc, s.l)
}

// backward runs the backward pass over the window with exit speed end after
// the last segment. It returns the largest index k >= 1 whose entry speed
// is fixed by its own junction limit, hence exact whatever follows; 0 if
// there is none.
func (p *Planner) backward(end float64) int {
	b := end
	clip := 0
	buf := p.buf
	for k := len(buf) - 1; k >= 0; k-- {
		s := &buf[k]
		v := p.reach(b, s)
		if v >= s.jin {
			v = s.jin
			if clip == 0 {
				clip = k
			}
		}
		s.bin = v
		b = v
	}
	return clip
}

// flush plans every segment in the window to a stop and emits them.
func (p *Planner) flush() {
	if len(p.buf) == 0 {
		return
	}
	p.backward(0)
	p.emit(len(p.buf))
	p.buf = p.buf[:0]
}

// flushWindow emits what a full window allows. The backward pass assumes a
// stop after the window's last segment; segments before the last junction
// whose speed is fixed by its own limit are exact. If that junction lies in
// the window's first half, the first half is emitted anyway with the
// conservative speeds (counted in Report.WindowLimited).
func (p *Planner) flushWindow() {
	n := len(p.buf)
	clip := p.backward(0)
	e := clip
	if e < n/2 {
		e = n / 2
		p.rep.WindowLimited += int64(e - clip)
		s := &p.buf[e]
		s.fin = min(s.fin, s.bin)
		for k := e + 1; k < n; k++ {
			prev, s := &p.buf[k-1], &p.buf[k]
			v := min(s.jin, p.reach(prev.fin, prev))
			if v >= s.fin {
				break
			}
			s.fin = v
		}
	}
	p.emit(e)
	m := copy(p.buf, p.buf[e:])
	p.buf = p.buf[:m]
}

// emit times the first e segments of the window.
func (p *Planner) emit(e int) {
	buf := p.buf
	for k := 0; k < e; k++ {
		s := &buf[k]
		v0 := min(s.fin, s.bin)
		v1 := 0.0
		if k+1 < len(buf) {
			v1 = min(buf[k+1].fin, buf[k+1].bin)
		}
		var t, peak float64
		if p.jerk {
			t, peak = timeJerk(s.l, v0, v1, s.vmax, s.acc, s.jerk)
		} else {
			t, peak = timeR1(s.l, v0, v1, s.vmax, s.acc)
		}
		r := &p.rep
		r.NaiveS += s.naive
		o := p.opFor(s.op)
		if s.rapid {
			r.RapidS += t
			r.RapidLength += s.l
			o.RapidS += t
		} else {
			r.FeedS += t
			r.FeedLength += s.l
			o.FeedS += t
		}
		o.TotalS += t
		o.Blocks++
		r.Blocks++
		if p.opt.OnBlock != nil {
			p.opt.OnBlock(BlockTime{Line: s.line, Kind: s.kind, Op: s.op, Seconds: t, Length: s.l,
				Entry: v0, Peak: peak, Exit: v1})
		}
	}
}

// event accounts a non-motion block taking t seconds at a stop.
func (p *Planner) event(b Block, t float64) {
	r := &p.rep
	o := p.opFor(b.Op)
	switch b.Kind {
	case KindDwell:
		r.DwellS += t
		o.DwellS += t
	case KindToolChange:
		r.ToolChangeS += t
		o.OtherS += t
	case KindSpindleStart:
		r.SpindleS += t
		o.OtherS += t
	}
	o.TotalS += t
	o.Blocks++
	r.Blocks++
	if p.opt.OnBlock != nil {
		p.opt.OnBlock(BlockTime{Line: b.Line, Kind: b.Kind, Op: b.Op, Seconds: t})
	}
}

func (p *Planner) opFor(name string) *OpTime {
	if p.lastIdx >= 0 && name == p.lastOp {
		return &p.rep.Operations[p.lastIdx]
	}
	i, ok := p.opIdx[name]
	if !ok {
		i = len(p.rep.Operations)
		p.rep.Operations = append(p.rep.Operations, OpTime{Name: name})
		p.opIdx[name] = i
	}
	p.lastOp, p.lastIdx = name, i
	return &p.rep.Operations[i]
}

// Finish plans the rest of the program to a stop and returns the report.
// Later calls return the same report.
func (p *Planner) Finish() Report {
	if !p.done {
		p.flush()
		p.done = true
		r := &p.rep
		r.TotalS = r.FeedS + r.RapidS + r.DwellS + r.ToolChangeS + r.SpindleS
		r.AccelLossS = r.FeedS + r.RapidS - r.NaiveS
		if r.Operations == nil {
			r.Operations = []OpTime{}
		}
	}
	rep := p.rep
	rep.Operations = append([]OpTime(nil), p.rep.Operations...)
	return rep
}
