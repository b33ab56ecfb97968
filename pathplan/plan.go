package pathplan

import (
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
	// Entries counts ramp and helix entries; Lifts counts lifts to the
	// clearance height.
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
}

func (b *builder) add(m geom.Move) {
	if !m.Arc && m.To == b.pos {
		return
	}
	b.path.Moves = append(b.path.Moves, m)
	b.pos = m.To
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
