package engage

import (
	"fmt"
	"math"

	"github.com/chipband/chipband/geom"
)

// SpindleSpeed returns the spindle speed in rpm for a cutting speed vc
// (m/min) and a tool diameter d (mm): n = 1000·vc/(π·d).
func SpindleSpeed(vc, d float64) (float64, error) {
	if !finite(vc, d) || vc <= 0 || d <= 0 {
		return 0, fmt.Errorf("spindle speed: cutting speed and diameter must be positive, got vc = %v m/min and D = %v mm", vc, d)
	}
	return 1000 * vc / (math.Pi * d), nil
}

// EngagementAngle returns the engagement angle of a straight cut at radial
// width ae with a tool of diameter d: φ = arccos(1 − ae/r), π for ae ≥ d.
func EngagementAngle(ae, d float64) float64 {
	r := d / 2
	switch {
	case ae <= 0:
		return 0
	case ae >= d:
		return math.Pi
	}
	return math.Acos(1 - ae/r)
}

// ChipThinningFactor returns the factor by which the feed per tooth may be
// raised at radial width ae so that the maximum chip thickness equals the
// feed per tooth of a cut at ae ≥ r: 1/sin φ for ae < r, else 1.
func ChipThinningFactor(ae, d float64) (float64, error) {
	if !finite(ae, d) || d <= 0 || ae <= 0 || ae > d {
		return 0, fmt.Errorf("chip thinning: need 0 < ae ≤ D, got ae = %v mm and D = %v mm", ae, d)
	}
	if ae >= d/2 {
		return 1, nil
	}
	return 1 / math.Sin(EngagementAngle(ae, d)), nil
}

// CutData is what a feed calculation needs besides the tool.
type CutData struct {
	SpindleRPM float64 // n, rpm
	ChipLoad   float64 // target maximum chip thickness h_max, mm per tooth
	MaxFeed    float64 // machine or user feed cap, mm/min (0: none)
	MinFeed    float64 // lowest feed to program, mm/min (feed scheduling only)
}

func (c CutData) validate() error {
	switch {
	case !finite(c.SpindleRPM) || c.SpindleRPM <= 0:
		return fmt.Errorf("spindle speed must be positive, got %v rpm", c.SpindleRPM)
	case !finite(c.ChipLoad) || c.ChipLoad <= 0:
		return fmt.Errorf("chip load must be positive, got %v mm", c.ChipLoad)
	case !finite(c.MaxFeed) || c.MaxFeed < 0:
		return fmt.Errorf("maximum feed must not be negative, got %v mm/min", c.MaxFeed)
	case !finite(c.MinFeed) || c.MinFeed < 0:
		return fmt.Errorf("minimum feed must not be negative, got %v mm/min", c.MinFeed)
	case c.MaxFeed > 0 && c.MinFeed > c.MaxFeed:
		return fmt.Errorf("minimum feed %v mm/min is above the maximum %v mm/min", c.MinFeed, c.MaxFeed)
	}
	return nil
}

// Feed returns the feed in mm/min for tool t cutting at radial width ae:
// vf = fz·k·z·n with the chip-thinning factor k, capped at c.MaxFeed.
func Feed(t Tool, c CutData, ae float64) (float64, error) {
	if err := t.Validate(); err != nil {
		return 0, fmt.Errorf("feed: %w", err)
	}
	if err := c.validate(); err != nil {
		return 0, fmt.Errorf("feed: %w", err)
	}
	k, err := ChipThinningFactor(ae, t.Diameter)
	if err != nil {
		return 0, fmt.Errorf("feed: %w", err)
	}
	vf := c.ChipLoad * k * float64(t.Flutes) * c.SpindleRPM
	if c.MaxFeed > 0 {
		vf = math.Min(vf, c.MaxFeed)
	}
	return vf, nil
}

// ScheduleFeeds returns a feed per move of tp (0 for rapids) that keeps the
// maximum chip thickness of every cutting move at c.ChipLoad, from the
// engagement in prof (the profile of Simulate on tp). The worst sample of a
// move sets its feed; the feed is clamped to [c.MinFeed, c.MaxFeed]. Moves
// that cut nothing keep their programmed feed, clamped the same way.
func ScheduleFeeds(tp *geom.Toolpath, prof []Sample, t Tool, c CutData) ([]float64, error) {
	if err := t.Validate(); err != nil {
		return nil, fmt.Errorf("schedule feeds: %w", err)
	}
	if err := c.validate(); err != nil {
		return nil, fmt.Errorf("schedule feeds: %w", err)
	}
	if tp == nil {
		return nil, fmt.Errorf("schedule feeds: toolpath is required")
	}
	worst := make([]float64, len(tp.Moves)) // largest h_max/fz in each move
	for _, s := range prof {
		if s.Move < 0 || s.Move >= len(tp.Moves) {
			return nil, fmt.Errorf("schedule feeds: sample at s = %.3f mm names move %d of %d", s.S, s.Move, len(tp.Moves))
		}
		if s.Class == Air || s.Class == Rapid || s.Phi <= 0 {
			continue
		}
		g := chipRatio(s)
		worst[s.Move] = math.Max(worst[s.Move], g)
	}
	clamp := func(v float64) float64 {
		if c.MaxFeed > 0 {
			v = math.Min(v, c.MaxFeed)
		}
		return math.Max(v, c.MinFeed)
	}
	out := make([]float64, len(tp.Moves))
	zn := float64(t.Flutes) * c.SpindleRPM
	for i, mv := range tp.Moves {
		switch {
		case mv.Kind == geom.Rapid:
		case worst[i] > 0:
			out[i] = clamp(c.ChipLoad / worst[i] * zn)
		default:
			out[i] = clamp(mv.Feed)
		}
	}
	return out, nil
}

// chipRatio returns h_max/fz of a sample from its engagement: sin of the
// largest immersion on the engaged arc (1 when it passes π/2, and 1 for a
// plunge).
func chipRatio(s Sample) float64 {
	if s.Class == Plunge || s.Phi >= math.Pi {
		return 1
	}
	if s.Entry <= math.Pi/2 && s.Exit >= math.Pi/2 {
		return 1
	}
	return math.Max(math.Sin(s.Entry), math.Sin(s.Exit))
}

// WithFeeds returns a copy of tp with the feed of every move replaced by
// feeds[i] where it is positive.
func WithFeeds(tp *geom.Toolpath, feeds []float64) (*geom.Toolpath, error) {
	if tp == nil || len(feeds) != len(tp.Moves) {
		return nil, fmt.Errorf("with feeds: need one feed per move")
	}
	out := &geom.Toolpath{Start: tp.Start, Moves: append([]geom.Move(nil), tp.Moves...), Ops: append([]geom.Operation(nil), tp.Ops...)}
	for i, f := range feeds {
		if f > 0 && out.Moves[i].Kind != geom.Rapid {
			out.Moves[i].Feed = f
		}
	}
	return out, nil
}
