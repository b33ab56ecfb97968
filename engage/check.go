package engage

import (
	"context"
	"fmt"

	"github.com/chipband/chipband/geom"
)

// CheckInput describes the stock and features a program is checked against.
type CheckInput struct {
	Stock geom.Shape // stock outline
	Top   float64    // stock top Z (0 by convention)
	// Removed are regions already machined before the program runs (their
	// Floor is the depth reached); Targets are the features the program
	// must clear. Both may be empty.
	Removed []Target
	Targets []Target
	// Keep is material that must remain (part walls, islands); optional.
	// When it is empty and Targets are given, Check uses
	// KeepOf(Stock, the target regions): the stock less every target,
	// islands included.
	Keep geom.Shape
	// Band is the radial-engagement band as ae/D; zero for none.
	Band       [2]float64
	SpindleRPM float64         // for chip thickness; optional
	Step       float64         // sampling step, mm (default DefaultStep)
	Material   MaterialOptions // resolution and cell budget
	Progress   func(done, total float64)
}

// Check builds the material of in, simulates tool t along tp through it and
// returns the profile and summary. It is the whole of a program check:
// Summary.MaxEng is the largest 1 mm moving average of ae/D and
// Summary.InBandFraction the share of cutting length within
// [0.8·band min, 1.1·band max], entries excluded.
func Check(ctx context.Context, in CheckInput, t Tool, tp *geom.Toolpath) (*Result, error) {
	if err := t.Validate(); err != nil {
		return nil, fmt.Errorf("check: %w", err)
	}
	m, err := NewMaterial(in.Stock, in.Top, in.Material)
	if err != nil {
		return nil, fmt.Errorf("check: %w", err)
	}
	for i, r := range in.Removed {
		if err := m.Remove(r.Region, r.Floor); err != nil {
			return nil, fmt.Errorf("check: removed region %d %q: %w", i, r.Name, err)
		}
	}
	keep := in.Keep
	if len(keep) == 0 && len(in.Targets) > 0 {
		regions := make([]geom.Shape, len(in.Targets))
		for i, tg := range in.Targets {
			regions[i] = tg.Region
		}
		if keep, err = KeepOf(in.Stock, regions); err != nil {
			return nil, fmt.Errorf("check: %w", err)
		}
	}
	res, err := Simulate(ctx, m, t, tp, SimOptions{
		Step: in.Step, Band: in.Band, SpindleRPM: in.SpindleRPM,
		Keep: keep, Targets: in.Targets, Progress: in.Progress,
	})
	if err != nil {
		return nil, fmt.Errorf("check: %w", err)
	}
	return res, nil
}
