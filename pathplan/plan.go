package pathplan

import (
	"errors"
	"math"

	"github.com/chipband/chipband/geom"
)

// Options tune planning. The zero value is fine.
type Options struct {
	// Tolerance is the chord tolerance of offsets, mm; zero means
	// DefaultTolerance.
	Tolerance float64
	// Progress, when set, is called after each level is planned with the
	// number of levels done and the total.
	Progress func(done, total int)
}

// DefaultTolerance is the chord tolerance of the offsets a plan is built
// from, mm. Ring vertices lie on the exact offsets; the rings are placed
// this much farther from the walls so that no chord comes nearer than the
// allowance.
const DefaultTolerance = 0.002

// Plan is a planned roughing path with its summary.
type Plan struct {
	// Job is the job the plan was made for.
	Job *Job
	// Strategy names the strategy, e.g. "layered".
	Strategy string
	// Path is the toolpath; Path.Ops holds one operation per feature.
	Path geom.Toolpath
	// Features summarises the plan per feature, in job order.
	Features []FeatureSummary
	// Warnings are problems that did not stop planning, such as parts of a
	// feature too narrow for the tool.
	Warnings []string
	// Options names the options the plan was made with that change the
	// path, for the G-code header: "islands square" and "direct turns"
	// (BandedOptions); empty for the defaults.
	Options []string
}

// FeatureSummary describes the plan of one feature.
type FeatureSummary struct {
	// Name and Depth repeat the job's feature.
	Name  string  `json:"name"`
	Depth float64 `json:"depth"`
	// Open is set when the region extends past the stock outline.
	Open bool `json:"open"`
	// Levels are the Z heights of the step-down levels, top first.
	Levels []float64 `json:"levels"`
	// Area is the area of the feature inside the stock, mm².
	Area float64 `json:"area_mm2"`
	// UnreachableArea is the part of Area at the floor that the tool
	// cannot reach because the feature is narrower there than the tool
	// plus allowance, mm² (corners of radius r excluded).
	UnreachableArea float64 `json:"unreachable_mm2"`
	// Rings counts the passes cut, clean-up passes included.
	Rings int `json:"rings"`
	// Cleanups counts the clean-up passes cut over cusps.
	Cleanups int `json:"cleanups"`
	// Entries counts ramp and helix entries and, in open features of a
	// banded plan, the approaches from the air into the stock; Lifts
	// counts lifts to the clearance height.
	Entries int `json:"entries"`
	Lifts   int `json:"lifts"`
	// Length is the path length of the feature's operation, mm.
	Length float64 `json:"length_mm"`
	// SlowedMoves and SlowedLength count the moves, and their length in
	// mm, whose feed the banded verification lowered because the
	// simulated chip was thicker than the chip load (see
	// BandedOptions.NoVerify).
	SlowedMoves  int     `json:"slowed_moves,omitempty"`
	SlowedLength float64 `json:"slowed_mm,omitempty"`
	// ExtraPasses counts the extra passes the banded verification cut
	// ahead of stretches whose simulated engagement rose above the band
	// (the extra-pass repair, before the feed repair).
	ExtraPasses int `json:"extra_passes,omitempty"`
	// First and End delimit the feature's moves in Path.Moves.
	First int `json:"-"`
	End   int `json:"-"`
}

// Length returns the total path length, mm.
func (p *Plan) Length() float64 { return p.Path.Length() }

// LengthByKind returns the path length per kind of move, mm.
func (p *Plan) LengthByKind() map[geom.MoveKind]float64 {
	out := map[geom.MoveKind]float64{}
	from := p.Path.Start
	for _, m := range p.Path.Moves {
		out[m.Kind] += geom.MoveLength(from, m)
		from = m.To
	}
	return out
}

// builder accumulates moves.
type builder struct {
	path geom.Toolpath
	pos  geom.Point3
	// guess marks a builder whose start is not known yet (a later
	// feature planned ahead, see newGuessBuilder): until its first move
	// the tool stands at an unknown point at the clearance height.
	guess bool
}

// errStartUnknown is returned by a plan made ahead that needs to know where
// the tool stands before its first move.
var errStartUnknown = errors.New("start position not known yet")

// newGuessBuilder returns a builder for a feature planned ahead of the
// features before it: the tool stands somewhere at height clear. Moves
// straight up to clear from there are dropped (the real start, at clear
// after the retract that ends every feature, would elide them too), and the
// first move is always kept; appendPlanned settles both once the start is
// known.
func newGuessBuilder(clear float64) *builder {
	nan := math.NaN()
	return &builder{pos: geom.Point3{X: nan, Y: nan, Z: clear}, guess: true}
}

// where returns where the tool stands, or errStartUnknown before the first
// move of a builder made by newGuessBuilder.
func (b *builder) where() (geom.Point, error) {
	if b.guess && len(b.path.Moves) == 0 {
		return geom.Point{}, errStartUnknown
	}
	return b.pos.XY(), nil
}

func (b *builder) add(m geom.Move) {
	if b.guess && len(b.path.Moves) == 0 && math.IsNaN(m.To.X) && m.To.Z == b.pos.Z && !m.Arc {
		return // up from the unknown start to where it already is
	}
	if !m.Arc && m.To == b.pos {
		return
	}
	b.path.Moves = append(b.path.Moves, m)
	b.pos = m.To
}

// appendPlanned appends the moves and operations of s, planned ahead by a
// builder from newGuessBuilder, as if they had been planned here: the first
// move is elided when it goes where the tool already stands. It returns the
// index shift of s's moves, or false when s holds a move that read the
// unknown start (NaN), which must then be planned again from here.
func (b *builder) appendPlanned(s *builder) (int, bool) {
	for _, m := range s.path.Moves {
		if math.IsNaN(m.To.X) || math.IsNaN(m.To.Y) || math.IsNaN(m.Center.X) || math.IsNaN(m.Center.Y) {
			return 0, false
		}
	}
	moves := s.path.Moves
	skip := 0
	if len(moves) > 0 && !moves[0].Arc && moves[0].To == b.pos {
		skip = 1
	}
	shift := len(b.path.Moves) - skip
	for _, op := range s.path.Ops {
		op.First = max(len(b.path.Moves), op.First+shift)
		b.path.Ops = append(b.path.Ops, op)
	}
	b.path.Moves = append(b.path.Moves, moves[skip:]...)
	if len(moves) > 0 {
		b.pos = s.pos
	}
	return shift, true
}

func (b *builder) rapid(to geom.Point3) { b.add(geom.Move{Kind: geom.Rapid, To: to}) }

func (b *builder) feed(kind geom.MoveKind, to geom.Point3, f float64) {
	b.add(geom.Move{Kind: kind, To: to, Feed: f})
}

func (b *builder) arc(kind geom.MoveKind, to geom.Point3, c geom.Point, cw bool, f float64) {
	b.add(geom.Move{Kind: kind, To: to, Arc: true, Center: c, CW: cw, Feed: f})
}

func p3(p geom.Point, z float64) geom.Point3 { return geom.Point3{X: p.X, Y: p.Y, Z: z} }

// levelsFor returns the step-down levels of a feature: n equal steps, the
// fewest that do not exceed stepdown, so the last lands exactly on the
// floor (depth 5 at step-down 2 gives −1.667, −3.333, −5).
func levelsFor(top, depth, stepdown float64) []float64 {
	n := int(math.Ceil(depth/stepdown - 1e-9))
	if n < 1 {
		n = 1
	}
	out := make([]float64, n)
	for i := range out {
		out[i] = top - depth*float64(i+1)/float64(n)
	}
	out[n-1] = top - depth
	return out
}
