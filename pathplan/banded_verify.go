package pathplan

import (
	"context"
	"fmt"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
	"github.com/chipband/chipband/timing"
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
	var out []engage.Summary
	err := bandedSimEach(ctx, plan, true, func(_ int, res *engage.Result) error {
		out = append(out, res.Summary)
		return nil
	})
	return out, err
}

// featureStart returns where the tool is when feature fi's moves begin:
// the end of the move before them, or the path's start.
func (p *Plan) featureStart(fi int) geom.Point3 {
	if k := p.Features[fi].First; k > 0 {
		return p.Path.Moves[k-1].To
	}
	return p.Path.Start
}

// bandedSimEach simulates the moves of each feature of plan with engage, on
// the material left by the features before it, and hands each result to
// each with the feature's index; profile keeps the per-sample profile.
func bandedSimEach(ctx context.Context, plan *Plan, summaryOnly bool, each func(fi int, res *engage.Result) error) error {
	sim, err := newBandedSim(plan.Job)
	if err != nil {
		return err
	}
	for fi, fs := range plan.Features {
		start := plan.featureStart(fi)
		res, err := sim.feature(ctx, fi, start, plan.Path.Moves[fs.First:fs.End], summaryOnly)
		if err != nil {
			return err
		}
		if err := each(fi, res); err != nil {
			return err
		}
	}
	return nil
}

// bandedSim simulates the features of one job in order on one material.
type bandedSim struct {
	job  *Job
	tool engage.Tool
	m    *engage.Material
	keep geom.Shape
	band [2]float64
	// domains caches the tool-centre domain of each feature the extra
	// passes keep to (allowed).
	domains map[int]geom.Shape
	// trailBudget is the memory, bytes, a feature's trail may hold
	// (extraTrailBudget).
	trailBudget int
}

// fork returns a bandedSim that simulates on a clone of s's material and
// shares nothing with s that either changes.
func (s *bandedSim) fork() *bandedSim {
	f := *s
	f.m = s.m.Clone()
	f.domains = nil
	return &f
}

func newBandedSim(job *Job) (*bandedSim, error) {
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
	tool := engage.Tool{Diameter: job.Tool.Diameter, FluteLength: job.Tool.FluteLength, Flutes: job.Tool.Flutes}
	return &bandedSim{job: job, tool: tool, m: m, keep: keep, band: band, trailBudget: extraTrailBudget}, nil
}

// feature simulates the moves of feature fi, from start, on the material
// the features simulated before it left.
func (s *bandedSim) feature(ctx context.Context, fi int, start geom.Point3, moves []geom.Move, summaryOnly bool) (*engage.Result, error) {
	job := s.job
	tp := &geom.Toolpath{Start: start, Moves: moves}
	f := job.Features[fi]
	tgt, err := geom.Intersection(f.Region, job.Stock.Outline)
	if err != nil {
		return nil, err
	}
	targets := []engage.Target{{Name: f.Name, Region: tgt, Floor: job.Stock.Top - f.Depth}}
	if reach, err := bandedReachable(job, f, tgt); err == nil {
		targets = append(targets, engage.Target{Name: f.Name + " (reachable)", Region: reach, Floor: job.Stock.Top - f.Depth})
	}
	res, err := engage.Simulate(ctx, s.m, s.tool, tp, engage.SimOptions{
		Band:        s.band,
		SpindleRPM:  job.Cut.SpindleRPM,
		Keep:        s.keep,
		Targets:     targets,
		SummaryOnly: summaryOnly,
	})
	if err != nil {
		return nil, fmt.Errorf("simulate feature %q: %w", f.Name, err)
	}
	return res, nil
}

// bandedReachable returns the part of target tgt of feature f that the
// tool can reach at all: its tool-centre domain (free space eroded by the
// radius and the allowance) dilated by the radius again, which leaves out
// the inside corners a round tool cannot reach and the allowance.
func bandedReachable(job *Job, f Feature, tgt geom.Shape) (geom.Shape, error) {
	st, err := bandedSetup(job, BandedOptions{})
	if err != nil {
		return nil, err
	}
	comps, _, err := bandedDomain(job, f, st, DefaultTolerance)
	if err != nil {
		return nil, err
	}
	var c geom.Shape
	for _, comp := range comps {
		c = append(c, comp.c...)
	}
	grown, err := offset.Offset(c, st.r, DefaultTolerance)
	if err != nil {
		return nil, err
	}
	return geom.Intersection(grown, tgt)
}

// BandedFeatureReport is the report of one feature of a banded plan.
type BandedFeatureReport struct {
	Name string `json:"name"`
	// Engagement is the engage simulation of the feature's moves on the
	// material the features before it left (entries excluded from the
	// engagement figures).
	Engagement engage.Summary `json:"engagement"`
	// CycleS is the feature's time on the machine (timing, model R1), s.
	CycleS float64 `json:"cycle_s"`
	// BoundS is the material-removal bound V/(ae_target·ap·vf), s, with V
	// the volume the simulation removed and vf the cutting feed.
	BoundS float64 `json:"bound_s"`
	// Ratio is CycleS/BoundS.
	Ratio float64 `json:"ratio"`
}

// BandedReport simulates a plan feature by feature and times it on machine
// m (model R1): the report of `chipband plan --strategy banded --report`.
// ap is taken as the level depth of each feature.
func BandedReport(ctx context.Context, plan *Plan, m timing.Machine) ([]BandedFeatureReport, error) {
	sums, err := bandedFeatureSim(ctx, plan)
	if err != nil {
		return nil, err
	}
	times, err := bandedOpTimes(ctx, plan, m)
	if err != nil {
		return nil, err
	}
	st, err := bandedSetup(plan.Job, BandedOptions{})
	if err != nil {
		return nil, err
	}
	var out []BandedFeatureReport
	for i, fs := range plan.Features {
		ap := fs.Depth
		if n := len(fs.Levels); n > 0 {
			ap = fs.Depth / float64(n)
		}
		vf := st.feed / 60
		bound := sums[i].Volume / (st.target * plan.Job.Tool.Diameter * ap * vf)
		r := BandedFeatureReport{Name: fs.Name, Engagement: sums[i], CycleS: times[fs.Name], BoundS: bound}
		if bound > 0 {
			r.Ratio = r.CycleS / bound
		}
		out = append(out, r)
	}
	return out, nil
}

// bandedOpTimes times the plan's path per operation with timing's R1 model.
func bandedOpTimes(ctx context.Context, plan *Plan, m timing.Machine) (map[string]float64, error) {
	var blocks []timing.Block
	from := plan.Path.Start
	op := ""
	next := 0
	for i, mv := range plan.Path.Moves {
		for next < len(plan.Path.Ops) && plan.Path.Ops[next].First == i {
			op = plan.Path.Ops[next].Name
			next++
		}
		b := timing.Block{Kind: timing.KindLine, From: [3]float64{from.X, from.Y, from.Z}, To: [3]float64{mv.To.X, mv.To.Y, mv.To.Z}, Feed: mv.Feed, Op: op}
		switch {
		case mv.Kind == geom.Rapid:
			b.Kind = timing.KindRapid
		case mv.Arc:
			b.Kind = timing.KindArc
			b.Center = [2]float64{mv.Center.X, mv.Center.Y}
			b.CW = mv.CW
		}
		blocks = append(blocks, b)
		from = mv.To
	}
	rep, err := timing.Estimate(ctx, blocks, m, timing.Options{})
	if err != nil {
		return nil, fmt.Errorf("timing: %w", err)
	}
	out := map[string]float64{}
	for _, o := range rep.Operations {
		out[o.Name] += o.TotalS
	}
	return out, nil
}
