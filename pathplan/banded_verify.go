package pathplan

import (
	"context"
	"fmt"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// bandedKeep returns the material that must stay: the stock less every
// feature region.
func bandedKeep(job *Job) (geom.Shape, error) {
	keep := job.Stock.Outline
	for _, f := range job.Features {
		k, err := geom.Difference(keep, f.Region)
		if err != nil {
			return nil, err
		}
		keep = k
	}
	return keep, nil
}

// bandedFeatureSim simulates the moves of each feature of plan with engage,
// on the material left by the features before it, and returns one engage
// summary per feature.
func bandedFeatureSim(ctx context.Context, plan *Plan) ([]engage.Summary, error) {
	job := plan.Job
	tool := engage.Tool{Diameter: job.Tool.Diameter, FluteLength: job.Tool.FluteLength, Flutes: job.Tool.Flutes}
	m, err := engage.NewMaterial(job.Stock.Outline, job.Stock.Top, engage.MaterialOptions{})
	if err != nil {
		return nil, fmt.Errorf("simulate: %w", err)
	}
	keep, err := bandedKeep(job)
	if err != nil {
		return nil, err
	}
	band := job.Cut.Band
	if band[1] <= 0 {
		band = defaultBand
	}
	var out []engage.Summary
	for fi, fs := range plan.Features {
		start := plan.Path.Start
		if fs.First > 0 {
			start = plan.Path.Moves[fs.First-1].To
		}
		tp := &geom.Toolpath{Start: start, Moves: plan.Path.Moves[fs.First:fs.End]}
		f := job.Features[fi]
		tgt, err := geom.Intersection(f.Region, job.Stock.Outline)
		if err != nil {
			return nil, err
		}
		res, err := engage.Simulate(ctx, m, tool, tp, engage.SimOptions{
			Band:        band,
			SpindleRPM:  job.Cut.SpindleRPM,
			Keep:        keep,
			Targets:     []engage.Target{{Name: f.Name, Region: tgt, Floor: job.Stock.Top - f.Depth}},
			SummaryOnly: true,
		})
		if err != nil {
			return nil, fmt.Errorf("simulate feature %q: %w", f.Name, err)
		}
		out = append(out, res.Summary)
	}
	return out, nil
}
