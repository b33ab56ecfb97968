package engage

import (
	"context"
	"fmt"
	"math"

	"github.com/chipband/chipband/geom"
)

// DefaultStep is the default sampling step of Simulate along the path, mm.
const DefaultStep = 0.1

// DefaultMaxSamples bounds the number of samples of one Simulate call.
const DefaultMaxSamples = 50_000_000

// SampleClass tells what the tool was doing at a sample.
type SampleClass uint8

// The classes of profile samples.
const (
	Air    SampleClass = iota // feed move that cuts nothing
	Cut                       // feed move in material (the engagement that the band is about)
	Entry                     // ramp or helix down into material, or a move marked as an entry
	Plunge                    // vertical (steeper than 45°) feed down into material
	Rapid                     // positioning at rapid rate
)

// String returns the lower-case name of c.
func (c SampleClass) String() string {
	switch c {
	case Air:
		return "air"
	case Cut:
		return "cut"
	case Entry:
		return "entry"
	case Plunge:
		return "plunge"
	case Rapid:
		return "rapid"
	}
	return "unknown"
}

// MarshalText writes the name of c (for JSON).
func (c SampleClass) MarshalText() ([]byte, error) { return []byte(c.String()), nil }

// Sample is the state of the cut at one point of a simulated path. The
// engagement is measured before material is removed at this position.
type Sample struct {
	S       float64       `json:"s"`    // arc length along the path from its start, mm
	X, Y, Z float64       `json:"-"`    // tool-centre position, tool bottom Z
	Move    int           `json:"move"` // index of the move in the toolpath
	Kind    geom.MoveKind `json:"-"`    // kind of that move
	Class   SampleClass   `json:"class"`
	Phi     float64       `json:"-"` // engagement angle φ, radians
	Entry   float64       `json:"-"` // entry immersion angle, radians
	Exit    float64       `json:"-"` // exit immersion angle, radians
	AE      float64       `json:"ae"`
	AP      float64       `json:"ap"`
	MRR     float64       `json:"mrr"`    // material-removal rate, mm³/min
	HMax    float64       `json:"h_max"`  // maximum chip thickness, mm (0 without a spindle speed)
	HMean   float64       `json:"h_mean"` // mean chip thickness, mm
	Feed    float64       `json:"feed"`   // programmed feed, mm/min (0 for rapids)
	Step    float64       `json:"-"`      // path length since the previous sample, mm
	// Volume is the material removed over the step (ae·ap·XY step plus the
	// bottom area times the descent), BottomVolume the part cut by the end
	// teeth, mm³.
	Volume       float64 `json:"-"`
	BottomVolume float64 `json:"-"`
	// Violation marks a rapid through material.
	Violation bool `json:"violation,omitempty"`
}

// PhiDeg returns the engagement angle in degrees.
func (s Sample) PhiDeg() float64 { return s.Phi * 180 / math.Pi }

// Violation is a safety problem found by Simulate.
type Violation struct {
	Move  int         `json:"move"`  // index of the offending move
	At    geom.Point3 `json:"at"`    // first position where it happens
	Depth float64     `json:"depth"` // how deep the tool bottom was below the material top, mm
}

// Target is a region that a program must clear down to Floor (a feature).
type Target struct {
	Name   string
	Region geom.Shape
	Floor  float64 // Z of the floor, below the stock top
}

// SimOptions controls Simulate. The zero value samples every DefaultStep
// and reports no band figures.
type SimOptions struct {
	Step       float64    // sampling step along the path, mm (default DefaultStep)
	Band       [2]float64 // radial-engagement band [min, max] as ae/D; zero: no band figures
	SpindleRPM float64    // spindle speed for chip thickness (0: chip thickness not computed)
	// Keep is material that must remain (part walls, islands) at every
	// height below the stock top; intrusions of the tool into it are
	// reported as gouges. The gouge is measured from the geometry of the
	// path, not the material grid: for each stretch of a move below the
	// top, r less the exact distance from the tool-centre path (line or
	// arc) to the Keep boundary, or r plus the centre's depth inside Keep
	// (then checked every Step). Intrusions below 1e-6 mm are rounding and
	// not reported.
	Keep geom.Shape
	// Targets are regions to clear to their floors; the material left in
	// them is reported.
	Targets []Target
	// Tolerance for uncut material and floor gouges in Targets, mm
	// (default 0.01).
	Tolerance float64
	// MaxSamples bounds the samples of the run (default DefaultMaxSamples);
	// a path and step that need more get an error instead of a hang.
	MaxSamples int
	// SummaryOnly drops the per-sample profile (the summary is still exact).
	SummaryOnly bool
	// Progress, when set, is called now and then with the path length done
	// and the total, mm.
	Progress func(done, total float64)
}

// Summary condenses a simulated profile. Engagement figures cover the
// cutting samples only (class Cut): entries, plunges, air and rapids are
// counted apart.
type Summary struct {
	Length       float64 `json:"length"`        // total path length, mm
	CutLength    float64 `json:"cut_length"`    // length of class Cut, mm
	EntryLength  float64 `json:"entry_length"`  // length of class Entry, mm
	PlungeLength float64 `json:"plunge_length"` // length of class Plunge, mm
	AirLength    float64 `json:"air_length"`    // length of class Air, mm
	RapidLength  float64 `json:"rapid_length"`  // length of rapids, mm

	MaxAeD  float64 `json:"max_ae_d"`       // largest ae/D of a cutting sample
	MeanAeD float64 `json:"mean_ae_d"`      // length-weighted mean ae/D over cutting
	MaxPhi  float64 `json:"max_phi_deg"`    // largest engagement angle, degrees
	MeanPhi float64 `json:"mean_phi_deg"`   // length-weighted mean angle, degrees
	MaxEng  float64 `json:"max_engagement"` // largest 1 mm moving average of ae/D over cutting
	// MaxEngFull is MaxEng over full 1 mm windows only. A window runs over
	// consecutive cutting samples and trails the sample it ends at; at the
	// start of a run (after air, an entry or a rapid), until 1 mm has been
	// cut, MaxEng counts the window over the length cut so far, so a run
	// shorter than 1 mm counts over its own length and the first sample of
	// a run alone. MaxEngFull leaves those short windows out (0 when no run
	// reaches 1 mm). The two readings differ where the tool first bites
	// after air.
	MaxEngFull float64 `json:"max_engagement_full"`

	Band              [2]float64 `json:"band"`
	InBandFraction    float64    `json:"in_band_fraction"`    // share of cutting length with ae/D in [0.8·min, 1.1·max]
	AboveBandFraction float64    `json:"above_band_fraction"` // share of cutting length with ae/D > 1.15·max
	AirFraction       float64    `json:"air_fraction"`        // air length over all feed length

	// LinkCutLength is the length of link moves (geom.Link) that cut, mm,
	// and LinkMaxAeD their largest ae/D: a planner's links are meant to
	// run through cut material only. Programs read from G-code have no
	// links, so both read 0 there.
	LinkCutLength float64 `json:"link_cut_length"`
	LinkMaxAeD    float64 `json:"link_max_ae_d"`

	Plunges         int         `json:"plunges"`          // vertical feeds into material
	RapidViolations []Violation `json:"rapid_violations"` // rapids through material, always listed
	MaxAP           float64     `json:"max_ap"`           // deepest axial engagement, mm
	BeyondFlute     float64     `json:"beyond_flute"`     // path length with ap above the flute length, mm
	Volume          float64     `json:"volume"`           // material removed (sum of the sample volumes), mm³

	MaxGouge  float64     `json:"max_gouge"`  // deepest intrusion into the Keep shape, mm (exact geometry, see SimOptions.Keep)
	GougeAt   geom.Point3 `json:"gouge_at"`   // where it happens
	GougeMove int         `json:"gouge_move"` // in which move (−1 when none)

	Targets []TargetResidual `json:"targets,omitempty"`
}

// TargetResidual is the material left in one target after the simulation.
type TargetResidual struct {
	Name       string  `json:"name"`
	UncutArea  float64 `json:"uncut_area"`
	MaxAbove   float64 `json:"max_above"`
	FloorGouge float64 `json:"floor_gouge"`
}

// Result is the outcome of Simulate.
type Result struct {
	Profile []Sample
	Summary Summary
}

// moveGeom is a move prepared for sampling.
type moveGeom struct {
	arc        bool
	a, b       geom.Point
	za, zb     float64
	o          geom.Point
	rad, th0   float64
	sweep      float64 // signed
	length     float64 // in space
	lengthXY   float64
	kind       geom.MoveKind
	feed       float64
	descending bool
}

func (g *moveGeom) at(t float64) (geom.Point, float64) {
	z := g.za + (g.zb-g.za)*t
	if !g.arc {
		return g.a.Lerp(g.b, t), z
	}
	s, c := math.Sincos(g.th0 + g.sweep*t)
	return geom.Pt(g.o.X+g.rad*c, g.o.Y+g.rad*s), z
}

func (g *moveGeom) tangent(t float64) geom.Point {
	if !g.arc {
		return g.b.Sub(g.a).Unit()
	}
	s, c := math.Sincos(g.th0 + g.sweep*t)
	if g.sweep < 0 {
		return geom.Pt(s, -c)
	}
	return geom.Pt(-s, c)
}

func (g *moveGeom) piece(t0, t1 float64) piece {
	if !g.arc {
		a, za := g.at(t0)
		b, zb := g.at(t1)
		return piece{a: a, b: b, za: za, zb: zb}
	}
	_, za := g.at(t0)
	_, zb := g.at(t1)
	return piece{arc: true, o: g.o, rad: g.rad, th0: g.th0 + g.sweep*t0, sweep: g.sweep * (t1 - t0), za: za, zb: zb}
}

// prepare checks move i starting at from and returns its geometry.
func prepare(i int, from geom.Point3, mv geom.Move) (moveGeom, error) {
	to := mv.To
	if !finite(to.X, to.Y, to.Z) {
		return moveGeom{}, fmt.Errorf("move %d: end point must be finite, got (%v, %v, %v)", i, to.X, to.Y, to.Z)
	}
	if mv.Kind > geom.Finish {
		return moveGeom{}, fmt.Errorf("move %d: unknown move kind %d", i, mv.Kind)
	}
	if mv.Kind != geom.Rapid && (!finite(mv.Feed) || mv.Feed <= 0) {
		return moveGeom{}, fmt.Errorf("move %d (%v): feed must be positive, got %v mm/min", i, mv.Kind, mv.Feed)
	}
	g := moveGeom{a: from.XY(), b: to.XY(), za: from.Z, zb: to.Z, kind: mv.Kind, feed: mv.Feed, descending: to.Z < from.Z-1e-9}
	if mv.Arc {
		if !finite(mv.Center.X, mv.Center.Y) {
			return moveGeom{}, fmt.Errorf("move %d: arc centre must be finite", i)
		}
		g.arc = true
		g.o = mv.Center
		g.rad = from.XY().Dist(mv.Center)
		r1 := to.XY().Dist(mv.Center)
		if g.rad < 1e-6 {
			return moveGeom{}, fmt.Errorf("move %d: arc radius is zero", i)
		}
		if math.Abs(r1-g.rad) > 1e-3*math.Max(1, g.rad) {
			return moveGeom{}, fmt.Errorf("move %d: arc end radius %.4f mm differs from start radius %.4f mm", i, r1, g.rad)
		}
		g.th0 = math.Atan2(from.Y-mv.Center.Y, from.X-mv.Center.X)
		sw := geom.ArcSweep(from.XY(), to.XY(), mv.Center, mv.CW)
		if mv.CW {
			sw = -sw
		}
		g.sweep = sw
		g.lengthXY = g.rad * math.Abs(sw)
	} else {
		g.lengthXY = g.a.Dist(g.b)
	}
	g.length = math.Hypot(g.lengthXY, to.Z-from.Z)
	return g, nil
}

// Cut removes the material swept by tool t along move mv from from, without
// measuring anything. Planners use it to keep a model up to date.
func (m *Material) Cut(t Tool, from geom.Point3, mv geom.Move) error {
	if err := t.Validate(); err != nil {
		return err
	}
	if !finite(from.X, from.Y, from.Z) {
		return fmt.Errorf("cut: start point must be finite")
	}
	if mv.Kind == geom.Rapid {
		mv.Feed = 1
	}
	g, err := prepare(0, from, mv)
	if err != nil {
		return fmt.Errorf("cut: %w", err)
	}
	m.stamp(g.piece(0, 1), t.Radius())
	return nil
}

// Simulate runs tool t along tp through m, removing material as it goes,
// and returns the profile and its summary. m is changed; Clone it first to
// keep the original. Simulate stops with the context's error when ctx is
// cancelled.
func Simulate(ctx context.Context, m *Material, t Tool, tp *geom.Toolpath, opt SimOptions) (*Result, error) {
	if err := t.Validate(); err != nil {
		return nil, fmt.Errorf("simulate: %w", err)
	}
	if m == nil || tp == nil {
		return nil, fmt.Errorf("simulate: material and toolpath are required")
	}
	if opt.Step == 0 {
		opt.Step = DefaultStep
	}
	if !finite(opt.Step) || opt.Step <= 0 {
		return nil, fmt.Errorf("simulate: sampling step must be positive, got %v", opt.Step)
	}
	if opt.Tolerance == 0 {
		opt.Tolerance = 0.01
	}
	if opt.MaxSamples == 0 {
		opt.MaxSamples = DefaultMaxSamples
	}
	if opt.MaxSamples < 0 {
		return nil, fmt.Errorf("simulate: sample budget must be positive, got %d", opt.MaxSamples)
	}
	if !finite(opt.Tolerance, opt.SpindleRPM, opt.Band[0], opt.Band[1]) || opt.Tolerance < 0 || opt.SpindleRPM < 0 {
		return nil, fmt.Errorf("simulate: tolerance and spindle speed must be finite and not negative")
	}
	if opt.Band[0] < 0 || opt.Band[1] < opt.Band[0] || opt.Band[1] > 1 {
		return nil, fmt.Errorf("simulate: band must satisfy 0 ≤ min ≤ max ≤ 1 (as ae/D), got [%g, %g]", opt.Band[0], opt.Band[1])
	}
	if !finite(tp.Start.X, tp.Start.Y, tp.Start.Z) {
		return nil, fmt.Errorf("simulate: toolpath start must be finite")
	}
	geoms := make([]moveGeom, len(tp.Moves))
	total := 0.0
	from := tp.Start
	for i, mv := range tp.Moves {
		g, err := prepare(i, from, mv)
		if err != nil {
			return nil, fmt.Errorf("simulate: %w", err)
		}
		geoms[i] = g
		total += g.length
		from = mv.To
	}
	if est := total/opt.Step + float64(len(tp.Moves)); est > float64(opt.MaxSamples) {
		return nil, fmt.Errorf("simulate: %w: a sampling step of %g mm gives about %.3g samples for %.1f mm of path, more than the budget of %d; use a larger step (≥ %.3g mm)",
			ErrSampleBudget, opt.Step, est, total, opt.MaxSamples, total/float64(opt.MaxSamples)*1.01)
	}
	r := t.Radius()
	sim := simulator{m: m, t: t, r: r, opt: opt, total: total}
	if len(opt.Keep) > 0 {
		if err := checkShape(opt.Keep, "keep"); err != nil {
			return nil, fmt.Errorf("simulate: %w", err)
		}
		sim.keep = &intrusion{ix: newEdgeIndex(opt.Keep, 2*r), r: r, step: opt.Step}
	}
	for i, tg := range opt.Targets {
		if err := checkShape(tg.Region, "target"); err != nil {
			return nil, fmt.Errorf("simulate: target %d %q: %w", i, tg.Name, err)
		}
		if !finite(tg.Floor) {
			return nil, fmt.Errorf("simulate: target %d %q: floor must be finite", i, tg.Name)
		}
		sim.floors = append(sim.floors, floorCheck{
			in:    intrusion{ix: newEdgeIndex(tg.Region, 2*r), r: r, step: opt.Step},
			floor: tg.Floor,
		})
	}

	sim.sum.RapidViolations = []Violation{}
	sim.sum.GougeMove = -1
	sim.sum.Band = opt.Band
	if !opt.SummaryOnly {
		est := int(total/opt.Step) + len(tp.Moves) + 1
		sim.prof = make([]Sample, 0, min(est, 1<<22))
	}
	from = tp.Start
	for i := range geoms {
		if err := sim.move(ctx, i, &geoms[i]); err != nil {
			return nil, err
		}
	}
	sim.flush()
	sim.finish()
	for i, tg := range opt.Targets {
		res, err := m.Residual(tg.Region, tg.Floor, opt.Tolerance)
		if err != nil {
			return nil, fmt.Errorf("simulate: target %q: %w", tg.Name, err)
		}
		sim.sum.Targets = append(sim.sum.Targets, TargetResidual{Name: tg.Name, UncutArea: res.UncutArea, MaxAbove: res.MaxAbove, FloorGouge: sim.floors[i].gouge})
	}
	if opt.Progress != nil {
		opt.Progress(total, total)
	}
	return &Result{Profile: sim.prof, Summary: sim.sum}, nil
}

// simulator is the running state of Simulate.
type simulator struct {
	m      *Material
	t      Tool
	r      float64
	opt    SimOptions
	keep   *intrusion   // the Keep shape, nil without one
	floors []floorCheck // one per target
	total  float64

	s    float64 // arc length done
	n    int     // samples done
	prof []Sample
	sum  Summary

	cache circleCache

	// pending is the stretch of move pg from pt0 to pt1 not yet stamped.
	pg       *moveGeom
	pt0, pt1 float64

	prevPlunge bool
	// running sums
	cutAeD, cutPhi float64
	// moving average window over cutting samples
	win    []winItem
	winAt  int // first live item of win
	winSum float64
	winLen float64
}

type winItem struct{ l, v float64 }

func (s *simulator) flush() {
	if s.pg != nil && s.pt1 > s.pt0 {
		s.m.stamp(s.pg.piece(s.pt0, s.pt1), s.r)
		s.cache.reset()
	}
	if s.pg != nil {
		s.pt0 = s.pt1
	}
}

func (s *simulator) move(ctx context.Context, i int, g *moveGeom) error {
	s.flush()
	s.cache.reset()
	s.pg, s.pt0, s.pt1 = g, 0, 0
	m := s.m
	top := m.top
	s.gouges(i, g)
	rapid := g.kind == geom.Rapid
	if rapid && math.Min(g.za, g.zb) >= top-epsZ {
		// Above all material: one sample at the end.
		s.s += g.length
		s.sum.Length += g.length
		s.sum.RapidLength += g.length
		s.pt0, s.pt1 = 1, 1
		if !s.opt.SummaryOnly {
			p, z := g.at(1)
			s.prof = append(s.prof, Sample{S: s.s, X: p.X, Y: p.Y, Z: z, Move: i, Kind: g.kind, Class: Rapid, Step: g.length})
		}
		s.prevPlunge = false
		return nil
	}
	n := max(1, int(math.Ceil(g.length/s.opt.Step-1e-9)))
	step := g.length / float64(n)
	stepXY := g.lengthXY / float64(n)
	dzStep := (g.zb - g.za) / float64(n)
	steep := stepXY < math.Abs(dzStep)
	tight := g.arc && g.rad < s.r+float64(m.band)+m.cell
	eagerFlush := rapid || g.descending || tight || steep
	violated := false
	for k := 1; k <= n; k++ {
		s.n++
		if s.n&255 == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
			if s.opt.Progress != nil && s.n&4095 == 0 {
				s.opt.Progress(s.s, s.total)
			}
		}
		tk := float64(k) / float64(n)
		tprev := float64(k-1) / float64(n)
		if eagerFlush || (g.arc && math.Abs(g.sweep)*(tprev-s.pt0) > math.Pi/4) {
			s.pt1 = tprev
			s.flush()
		}
		p, z := g.at(tk)
		var dir geom.Point
		if !steep {
			dir = g.tangent(tk)
		}
		var e Engagement
		if z < top-epsZ {
			e = m.engage(s.t, geom.Point3{X: p.X, Y: p.Y, Z: z}, dir, &s.cache)
		}
		var bottom, above float64
		if g.descending || rapid {
			bottom, above = m.diskMaterial(p, z, s.r)
		}
		s.pt1 = tk
		s.s += step
		smp := Sample{S: s.s, X: p.X, Y: p.Y, Z: z, Move: i, Kind: g.kind, Feed: g.feed, Step: step,
			Phi: e.Phi, Entry: e.Entry, Exit: e.Exit, AE: e.AE, AP: e.AP}
		engaged := e.Phi > 0 || bottom > 0
		if engaged {
			smp.AP = math.Max(smp.AP, above)
			side := e.AE * e.AP * stepXY
			if e.Full {
				side = 0
			}
			bv := 0.0
			if g.descending {
				bv = bottom * -dzStep
			}
			smp.Volume = side + bv
			smp.BottomVolume = bv
			if !rapid && step > 0 {
				smp.MRR = smp.Volume * g.feed / step
			}
			if s.opt.SpindleRPM > 0 && !rapid {
				fz := g.feed / (s.opt.SpindleRPM * float64(s.t.Flutes))
				if e.Full || steep {
					fz *= math.Abs(dzStep) / step
					smp.HMax, smp.HMean = fz, fz
				} else {
					smp.HMax, smp.HMean = fz*e.SinMax, fz*e.SinMean
				}
			}
		}
		plunge := false
		switch {
		case rapid:
			smp.Class = Rapid
			smp.Feed = 0
			// The grid is the first filter; rapidHits confirms from the
			// cut distances that the disk overlaps material still there.
			if engaged && m.rapidHits(p, z, s.r) {
				smp.Violation = true
				if !violated {
					s.sum.RapidViolations = append(s.sum.RapidViolations, Violation{Move: i, At: geom.Point3{X: p.X, Y: p.Y, Z: z}, Depth: math.Max(above, e.AP)})
					violated = true
				} else {
					v := &s.sum.RapidViolations[len(s.sum.RapidViolations)-1]
					v.Depth = math.Max(v.Depth, math.Max(above, e.AP))
				}
			}
		case !engaged:
			smp.Class = Air
		case steep && g.descending:
			smp.Class = Plunge
			plunge = true
			if !s.prevPlunge {
				s.sum.Plunges++
			}
		case g.descending || g.kind == geom.Entry:
			smp.Class = Entry
		default:
			smp.Class = Cut
		}
		s.prevPlunge = plunge
		s.account(&smp)
		if !s.opt.SummaryOnly {
			s.prof = append(s.prof, smp)
		}
	}
	return nil
}

// account adds a sample to the running summary.
func (s *simulator) account(p *Sample) {
	sum := &s.sum
	sum.Length += p.Step
	sum.Volume += p.Volume
	switch p.Class {
	case Rapid:
		sum.RapidLength += p.Step
	case Air:
		sum.AirLength += p.Step
	case Entry:
		sum.EntryLength += p.Step
	case Plunge:
		sum.PlungeLength += p.Step
	case Cut:
		sum.CutLength += p.Step
	}
	if p.Class != Rapid && p.Class != Air {
		sum.MaxAP = math.Max(sum.MaxAP, p.AP)
		if p.AP > s.t.FluteLength+epsZ {
			sum.BeyondFlute += p.Step
		}
	}
	if p.Class != Cut {
		s.win, s.winAt, s.winSum, s.winLen = s.win[:0], 0, 0, 0
		return
	}
	aed := p.AE / s.t.Diameter
	if p.Kind == geom.Link {
		sum.LinkCutLength += p.Step
		sum.LinkMaxAeD = math.Max(sum.LinkMaxAeD, aed)
	}
	phi := p.PhiDeg()
	sum.MaxAeD = math.Max(sum.MaxAeD, aed)
	sum.MaxPhi = math.Max(sum.MaxPhi, phi)
	s.cutAeD += aed * p.Step
	s.cutPhi += phi * p.Step
	if b := s.opt.Band; b[1] > 0 {
		if aed >= 0.8*b[0] && aed <= 1.1*b[1] {
			sum.InBandFraction += p.Step
		}
		if aed > 1.15*b[1] {
			sum.AboveBandFraction += p.Step
		}
	}
	// 1 mm moving average of ae/D over consecutive cutting samples.
	s.win = append(s.win, winItem{p.Step, aed})
	s.winSum += p.Step * aed
	s.winLen += p.Step
	for len(s.win)-s.winAt > 1 && s.winLen-s.win[s.winAt].l >= 1-1e-9 {
		s.winSum -= s.win[s.winAt].l * s.win[s.winAt].v
		s.winLen -= s.win[s.winAt].l
		s.winAt++
	}
	if s.winAt > 1024 {
		s.win = append(s.win[:0], s.win[s.winAt:]...)
		s.winAt = 0
	}
	if s.winLen > 0 {
		sum.MaxEng = math.Max(sum.MaxEng, s.winSum/s.winLen)
		if s.winLen >= 1-1e-9 {
			sum.MaxEngFull = math.Max(sum.MaxEngFull, s.winSum/s.winLen)
		}
	}
}

// finish turns the running sums into means and fractions.
func (s *simulator) finish() {
	sum := &s.sum
	if sum.CutLength > 0 {
		sum.MeanAeD = s.cutAeD / sum.CutLength
		sum.MeanPhi = s.cutPhi / sum.CutLength
		sum.InBandFraction /= sum.CutLength
		sum.AboveBandFraction /= sum.CutLength
	} else {
		sum.InBandFraction, sum.AboveBandFraction = 0, 0
	}
	if feed := sum.Length - sum.RapidLength; feed > 0 {
		sum.AirFraction = sum.AirLength / feed
	}
}
