package pathplan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sync"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
	"github.com/chipband/chipband/timing"
)

// DefaultMaterial is the work material whose Kienzle constants Compare uses
// for spindle power when CompareOptions names none (the job file has no
// material key). It is an entry of engage.TypicalKienzle.
const DefaultMaterial = "aluminium"

// MachineFor returns the machine to time a job on, and where it comes
// from: override when set ("option"), else the job's own ("job"), else
// DemoMachine ("default"). Compare and the banded plan report use it.
func MachineFor(job *Job, override *timing.Machine) (timing.Machine, string) {
	switch {
	case override != nil:
		return *override, "option"
	case job.Machine != nil:
		return *job.Machine, "job"
	}
	return DemoMachine(), "default"
}

// DemoMachine returns the machine Compare uses when neither the caller nor
// the job names one: a small bench mill with the values of
// testdata/machines/bench-mill.json (an invented machine).
func DemoMachine() timing.Machine {
	return timing.Machine{
		Name:            "bench mill",
		MaxFeed:         timing.Axes{X: 5000, Y: 5000, Z: 3000},
		Rapid:           timing.Axes{X: 10000, Y: 10000, Z: 6000},
		Accel:           timing.Axes{X: 500, Y: 500, Z: 300},
		Jerk:            timing.Axes{X: 10000, Y: 10000, Z: 6000},
		CornerTolerance: 0.02,
		ToolChangeS:     8,
		SpindleStartS:   2,
	}
}

// Strategy names used by Compare.
const (
	StrategyLayered = "layered"
	StrategyBanded  = "banded"
)

// CompareOptions tune Compare. The zero value is fine.
type CompareOptions struct {
	// Machine gives the motion limits. When nil, the job's machine is
	// used, and when the job has none, DemoMachine.
	Machine *timing.Machine
	// Material names the work material for spindle power (an entry of
	// engage.TypicalKienzle); empty means DefaultMaterial. Kienzle, when
	// its Kc11 is positive, overrides the table.
	Material string
	Kienzle  engage.Kienzle
	// Layered and Banded are passed to PlanLayered and PlanBanded. Their
	// Progress fields are ignored; use Progress below.
	Layered Options
	Banded  BandedOptions
	// CellSize is the grid spacing of the simulation, mm; zero means
	// engage.DefaultCellSize.
	CellSize float64
	// Detail keeps, per feature and strategy, the downsampled traces a
	// report draws (FeatureResult.Detail). It costs memory and some time.
	Detail bool
	// Progress, when set, is called now and then with the state of one
	// strategy. The two strategies run concurrently, but calls are never
	// concurrent.
	Progress func(CompareProgress)
}

// CompareProgress is the state of one strategy's work in Compare.
type CompareProgress struct {
	// Strategy is StrategyLayered or StrategyBanded.
	Strategy string
	// Stage is "planning", "timing" or "simulating".
	Stage string
	// Feature is the index of the feature being worked on (−1 when not
	// known), Features the number of features.
	Feature, Features int
	// Fraction is the share of the current stage done for that feature,
	// 0 to 1.
	Fraction float64
}

// Comparison is the outcome of Compare: both strategies planned, timed and
// simulated, and a recommendation per feature.
type Comparison struct {
	// Job is the job compared.
	Job *Job `json:"-"`
	// JobName repeats the job's name.
	JobName string `json:"job"`
	// Machine is the machine the times are for; MachineSource says where
	// it came from: "option", "job" or "default".
	Machine       timing.Machine `json:"machine"`
	MachineSource string         `json:"machine_source"`
	// Material names the Kienzle constants used for spindle power.
	Material string         `json:"material"`
	Kienzle  engage.Kienzle `json:"kienzle"`
	// Models lists the speed models timed: "R1", and "jerk" when the
	// machine gives a jerk limit. Recommendations follow R1.
	Models []string `json:"models"`
	// Band is the radial-engagement band of the job (ae/D).
	Band [2]float64 `json:"band"`
	// SquareIslands is set when the banded plan left its pass ends square
	// to islands (CompareOptions.Banded.SquareIslands).
	SquareIslands bool `json:"square_islands"`
	// SquareCorners is set when the banded plan left the inside corners
	// of its pass along the walls square (CompareOptions.Banded.SquareCorners).
	SquareCorners bool `json:"square_corners"`
	// DirectTurns is set when the banded plan turned straight onto the
	// next pass at walls (CompareOptions.Banded.DirectTurns).
	DirectTurns bool `json:"direct_turns"`
	// Layered and Banded are the plans compared.
	Layered *Plan `json:"-"`
	Banded  *Plan `json:"-"`
	// Features holds one comparison per feature, in job order.
	Features []FeatureComparison `json:"features"`
	// Totals sums the features (and any moves outside them).
	Totals Totals `json:"totals"`
	// Warnings collects the planners' warnings, prefixed by strategy.
	Warnings []string `json:"warnings,omitempty"`
}

// Totals are the job's figures.
type Totals struct {
	// LayeredS and BandedS are the cycle times of the whole programs
	// under R1, s; LayeredJerkS and BandedJerkS under the jerk-limited
	// model (zero when not timed).
	LayeredS     float64 `json:"layered_s"`
	BandedS      float64 `json:"banded_s"`
	LayeredJerkS float64 `json:"layered_jerk_s,omitempty"`
	BandedJerkS  float64 `json:"banded_jerk_s,omitempty"`
	// BestS is the time when every feature is cut with its recommended
	// strategy (R1; moves outside features counted with the faster
	// program's).
	BestS float64 `json:"best_s"`
	// Volume is the material removed, mm³ (banded simulation).
	Volume float64 `json:"volume_mm3"`
}

// FeatureComparison compares the two strategies on one feature.
type FeatureComparison struct {
	Name string `json:"name"`
	// Depth is the feature's depth, mm, and DepthPerD that depth over the
	// tool diameter.
	Depth     float64 `json:"depth"`
	DepthPerD float64 `json:"depth_per_d"`
	// Open is set when the feature's region leaves the stock.
	Open bool `json:"open"`
	// Area is the feature's area inside the stock, mm².
	Area float64 `json:"area_mm2"`
	// ChannelShare is the share of the tool-centre domain at the floor
	// that lies in narrow channels (offset.Split with a disk of the tool
	// radius: zones of the feature narrower than two tool diameters).
	ChannelShare float64 `json:"channel_share"`
	// Width is the diameter of the largest circle inside the feature's
	// region within the stock, mm: the width of a slot.
	Width float64 `json:"width_mm"`
	// Layered and Banded are the strategies' results.
	Layered FeatureResult `json:"layered"`
	Banded  FeatureResult `json:"banded"`
	// Recommended is the strategy with the shorter R1 cycle time.
	Recommended string `json:"recommended"`
	// SavingS is how much shorter the recommended strategy is, s, and
	// SavingShare that saving over the slower strategy's time.
	SavingS     float64 `json:"saving_s"`
	SavingShare float64 `json:"saving_share"`
	// Reason says in words which is faster, by how much and why.
	Reason string `json:"reason"`
}

// FeatureResult is one strategy's figures on one feature.
type FeatureResult struct {
	// Strategy is StrategyLayered or StrategyBanded.
	Strategy string `json:"strategy"`
	// Levels is the number of depth levels cut.
	Levels int `json:"levels"`
	// CycleS is the time of the feature's moves under R1, s; JerkS under
	// the jerk-limited model (zero when the machine gives no jerk).
	CycleS float64 `json:"cycle_s"`
	JerkS  float64 `json:"jerk_s,omitempty"`
	// CutS is the time of feed moves in material, AirS of feed moves that
	// cut nothing (passes, entries and finishing through air) and LinkS
	// of links, lifts and rapids, s (R1). Feed moves that are partly in
	// material are split by the simulated length.
	CutS  float64 `json:"cut_s"`
	AirS  float64 `json:"air_s"`
	LinkS float64 `json:"link_s"`
	// RapidS is the part of LinkS spent in rapids, s.
	RapidS float64 `json:"rapid_s"`
	// AccelShare is the share of motion time lost to accelerating and
	// braking (timing's AccelLossS over feed and rapid time, R1).
	AccelShare float64 `json:"accel_share"`
	// Length is the path length, CutLength the part in material, mm.
	Length    float64 `json:"length_mm"`
	CutLength float64 `json:"cut_length_mm"`
	// Volume is the material removed, mm³ (the change of the simulated
	// height field), and MRR that volume over the cycle time, cm³/min.
	Volume float64 `json:"volume_mm3"`
	MRR    float64 `json:"mrr_cm3_min"`
	// MaxEngagement is the largest 1 mm moving average of ae/D over
	// cutting, MaxAeD the largest sample and MeanAeD the length-weighted
	// mean; InBand the share of cutting length inside [0.8·min, 1.1·max]
	// of the band.
	MaxEngagement float64 `json:"max_engagement"`
	MaxAeD        float64 `json:"max_ae_d"`
	MeanAeD       float64 `json:"mean_ae_d"`
	InBand        float64 `json:"in_band_fraction"`
	// FluteUsage is the share of the flute length that does work: the
	// height bands of engage.FluteWear (1/40 of the flute length each)
	// that are in the cut for at least half the path length of the band
	// in the cut the longest.
	FluteUsage float64 `json:"flute_usage"`
	// PeakPowerKW is the largest cutting power of a sample (Kienzle), kW.
	PeakPowerKW float64 `json:"peak_power_kw"`
	// MaxGouge is the deepest intrusion into the walls, mm; RapidViolations
	// counts rapids through material; UncutArea is the material left above
	// the floor, mm².
	MaxGouge        float64 `json:"max_gouge_mm"`
	RapidViolations int     `json:"rapid_violations"`
	UncutArea       float64 `json:"uncut_mm2"`
	// Detail holds the traces of a report; nil unless
	// CompareOptions.Detail is set.
	Detail *Detail `json:"-"`
}

// Detail holds the downsampled traces a report draws for one strategy on
// one feature.
type Detail struct {
	// Runs are the top view of the path: polylines whose moves share a
	// class and an engagement colour bin.
	Runs []Run
	// Engagement is ae/D against path length, downsampled: the largest and
	// the mean ae/D of the cutting samples in each bucket.
	Engagement []EngagementBucket
	// Speed is the planned path speed against time (R1), downsampled.
	Speed []SpeedBucket
	// Wear is the flute-wear profile (engage.FluteWear).
	Wear []engage.WearBand
	// PathLength and Time are the extents of the traces, mm and s.
	PathLength, Time float64
}

// RunClass tells what a run of the top view is.
type RunClass uint8

// The classes of a Run.
const (
	RunCut   RunClass = iota // feed moves in material
	RunAir                   // feed moves that cut nothing
	RunRapid                 // rapids
)

// Run is a polyline of the top view.
type Run struct {
	Class RunClass
	// AeD is the largest ae/D of the run's cutting samples (RunCut).
	AeD float64
	Pts []geom.Point
}

// EngagementBucket is a stretch of path length [S0, S1) mm.
type EngagementBucket struct {
	S0, S1    float64
	Max, Mean float64
}

// SpeedBucket is a stretch of time [T0, T1) s with the lowest and highest
// planned speed in it, mm/s.
type SpeedBucket struct {
	T0, T1   float64
	Min, Max float64
	Rapid    bool // the bucket is mostly rapid motion
}

// Compare plans both strategies for every feature of job, times them on the
// machine (model R1, and the jerk-limited model when the machine gives a
// jerk), simulates them with engage and recommends, per feature, the
// strategy with the shorter R1 cycle time, with the reason in words.
func Compare(ctx context.Context, job *Job, opts CompareOptions) (*Comparison, error) {
	if job == nil {
		return nil, errors.New("compare: no job")
	}
	if err := job.Validate(); err != nil {
		return nil, err
	}
	c, err := newComparison(job, opts)
	if err != nil {
		return nil, err
	}

	var mu sync.Mutex
	report := func(p CompareProgress) {
		if opts.Progress == nil {
			return
		}
		mu.Lock()
		defer mu.Unlock()
		opts.Progress(p)
	}
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	type outcome struct {
		plan *Plan
		ev   *evaluation
		err  error
	}
	var wg sync.WaitGroup
	var res [2]outcome
	for i, name := range []string{StrategyLayered, StrategyBanded} {
		wg.Add(1)
		go func() {
			defer wg.Done()
			plan, ev, err := runStrategy(ctx, job, name, c, opts, report)
			if err != nil {
				cancel()
			}
			res[i] = outcome{plan, ev, err}
		}()
	}
	wg.Wait()
	for _, r := range res {
		if r.err != nil && !errors.Is(r.err, context.Canceled) {
			return nil, r.err
		}
	}
	for _, r := range res {
		if r.err != nil {
			return nil, r.err
		}
	}
	c.Layered, c.Banded = res[0].plan, res[1].plan
	for _, w := range c.Layered.Warnings {
		c.Warnings = append(c.Warnings, StrategyLayered+": "+w)
	}
	for _, w := range c.Banded.Warnings {
		c.Warnings = append(c.Warnings, StrategyBanded+": "+w)
	}
	lev, bev := res[0].ev, res[1].ev
	c.Totals = Totals{
		LayeredS: lev.totalS, BandedS: bev.totalS,
		LayeredJerkS: lev.totalJerkS, BandedJerkS: bev.totalJerkS,
	}
	c.Totals.BestS = math.Min(lev.otherS, bev.otherS)
	for fi, f := range job.Features {
		fc := FeatureComparison{
			Name:      f.Name,
			Depth:     f.Depth,
			DepthPerD: f.Depth / job.Tool.Diameter,
			Open:      c.Banded.Features[fi].Open || c.Layered.Features[fi].Open,
			Area:      c.Banded.Features[fi].Area,
			Layered:   lev.features[fi],
			Banded:    bev.features[fi],
		}
		share, width, err := featureShape(ctx, job, f, opts.Layered.Tolerance)
		if err != nil {
			return nil, fmt.Errorf("compare: feature %q: %w", f.Name, err)
		}
		fc.ChannelShare, fc.Width = share, width
		decide(&fc, c.Models)
		if fc.Recommended == StrategyLayered {
			c.Totals.BestS += fc.Layered.CycleS
		} else {
			c.Totals.BestS += fc.Banded.CycleS
		}
		c.Totals.Volume += fc.Banded.Volume
		c.Features = append(c.Features, fc)
	}
	return c, nil
}

// BandedVariants describes, in words for a report header, the banded
// options the comparison was planned with that change the path; empty for
// the defaults.
func (c *Comparison) BandedVariants() []string {
	var out []string
	if c.SquareIslands {
		out = append(out, "pass ends square to islands")
	}
	if c.SquareCorners {
		out = append(out, "wall pass square in inside corners")
	}
	if c.DirectTurns {
		out = append(out, "turns straight onto the next pass at walls")
	}
	return out
}

// newComparison resolves the machine, the band and the work material of a
// comparison.
func newComparison(job *Job, opts CompareOptions) (*Comparison, error) {
	c := &Comparison{Job: job, JobName: job.Name, Band: job.Cut.Band, SquareIslands: opts.Banded.SquareIslands, SquareCorners: opts.Banded.SquareCorners, DirectTurns: opts.Banded.DirectTurns}
	if c.Band[1] <= 0 {
		c.Band = [2]float64{0.05, 0.10} // the planners' default band
	}
	c.Machine, c.MachineSource = MachineFor(job, opts.Machine)
	if err := c.Machine.Validate(); err != nil {
		return nil, &JobError{Msg: fmt.Sprintf("machine: %v", err)}
	}
	c.Models = []string{timing.ModelR1.String()}
	if c.Machine.HasJerk() {
		c.Models = append(c.Models, timing.ModelJerk.String())
	}
	c.Material = opts.Material
	if c.Material == "" {
		c.Material = DefaultMaterial
	}
	if opts.Kienzle.Kc11 > 0 {
		if err := opts.Kienzle.Validate(); err != nil {
			return nil, &JobError{Msg: err.Error()}
		}
		c.Kienzle = opts.Kienzle
		if opts.Material == "" {
			c.Material = "custom"
		}
	} else {
		k, err := engage.LookupKienzle(c.Material)
		if err != nil {
			return nil, &JobError{Msg: err.Error()}
		}
		c.Kienzle = k
	}

	return c, nil
}

// Evaluate times and simulates a plan made by PlanLayered or PlanBanded the
// way Compare does, and returns one result per feature. Only the machine,
// material, cell size and Detail fields of opts are used.
func Evaluate(ctx context.Context, plan *Plan, opts CompareOptions) ([]FeatureResult, error) {
	if plan == nil || plan.Job == nil {
		return nil, errors.New("evaluate: no plan")
	}
	c, err := newComparison(plan.Job, opts)
	if err != nil {
		return nil, err
	}
	ev, err := evaluate(ctx, plan, c, opts, func(string, int, float64) {})
	if err != nil {
		return nil, fmt.Errorf("evaluate %s: %w", plan.Strategy, err)
	}
	return ev.features, nil
}

// evaluation is one strategy's timed and simulated plan.
type evaluation struct {
	features           []FeatureResult
	totalS, totalJerkS float64
	otherS             float64 // R1 time of moves outside every feature
}

// runStrategy plans, times and simulates one strategy.
func runStrategy(ctx context.Context, job *Job, name string, c *Comparison, opts CompareOptions, report func(CompareProgress)) (*Plan, *evaluation, error) {
	nf := len(job.Features)
	prog := func(stage string, fi int, frac float64) {
		report(CompareProgress{Strategy: name, Stage: stage, Feature: fi, Features: nf, Fraction: frac})
	}
	var plan *Plan
	var err error
	// The planners count levels, per feature or for the whole job; the
	// feature is not known here.
	levelProgress := func(done, total int) {
		if total > 0 {
			prog("planning", -1, float64(done)/float64(total))
		}
	}
	prog("planning", -1, 0)
	switch name {
	case StrategyLayered:
		o := opts.Layered
		o.Progress = levelProgress
		plan, err = PlanLayered(ctx, job, o)
	default:
		o := opts.Banded
		o.Progress = levelProgress
		plan, err = PlanBanded(ctx, job, o)
	}
	if err != nil {
		return nil, nil, err
	}
	if len(plan.Features) != nf {
		return nil, nil, fmt.Errorf("compare: %s plan has %d features, the job %d", name, len(plan.Features), nf)
	}
	ev, err := evaluate(ctx, plan, c, opts, prog)
	if err != nil {
		return nil, nil, fmt.Errorf("compare: %s: %w", name, err)
	}
	return plan, ev, nil
}

// moveInfo is what the simulation and the timing found about one move.
type moveInfo struct {
	seconds  float64 // R1 time
	cutLen   float64 // simulated length in material
	simLen   float64 // simulated length
	maxAeD   float64 // largest ae/D of its cutting samples
	hasCut   bool
	entryV   float64
	peakV    float64
	exitV    float64
	feedCapV float64
}

// evaluate times and simulates every feature of plan.
func evaluate(ctx context.Context, plan *Plan, c *Comparison, opts CompareOptions, prog func(string, int, float64)) (*evaluation, error) {
	job := plan.Job
	moves := plan.Path.Moves
	info := make([]moveInfo, len(moves))
	ev := &evaluation{features: make([]FeatureResult, len(plan.Features))}

	// Timing: each feature's moves as a program of their own (a feature
	// starts and ends at rest, as rapid↔feed changes stop the machine),
	// and the moves between features as one more.
	prog("timing", 0, 0)
	covered := make([]bool, len(moves))
	for fi, fs := range plan.Features {
		for i := fs.First; i < fs.End; i++ {
			covered[i] = true
		}
		rep, err := timeMoves(ctx, &plan.Path, fs.First, fs.End, c.Machine, timing.ModelR1, info)
		if err != nil {
			return nil, fmt.Errorf("timing feature %q: %w", fs.Name, err)
		}
		fr := &ev.features[fi]
		fr.Strategy = plan.Strategy
		fr.Levels = len(fs.Levels)
		fr.CycleS = rep.TotalS
		if motion := rep.FeedS + rep.RapidS; motion > 0 {
			fr.AccelShare = rep.AccelLossS / motion
		}
		ev.totalS += rep.TotalS
		if c.Machine.HasJerk() {
			jr, err := timeMoves(ctx, &plan.Path, fs.First, fs.End, c.Machine, timing.ModelJerk, nil)
			if err != nil {
				return nil, fmt.Errorf("timing feature %q (jerk): %w", fs.Name, err)
			}
			fr.JerkS = jr.TotalS
			ev.totalJerkS += jr.TotalS
		}
	}
	// Moves outside every feature, in runs.
	for i := 0; i < len(moves); {
		if covered[i] {
			i++
			continue
		}
		j := i
		for j < len(moves) && !covered[j] {
			j++
		}
		rep, err := timeMoves(ctx, &plan.Path, i, j, c.Machine, timing.ModelR1, info)
		if err != nil {
			return nil, fmt.Errorf("timing: %w", err)
		}
		ev.totalS += rep.TotalS
		ev.otherS += rep.TotalS
		if c.Machine.HasJerk() {
			jr, err := timeMoves(ctx, &plan.Path, i, j, c.Machine, timing.ModelJerk, nil)
			if err != nil {
				return nil, fmt.Errorf("timing (jerk): %w", err)
			}
			ev.totalJerkS += jr.TotalS
		}
		i = j
	}
	// Machine-level times that belong to no move (spindle start).
	if c.Machine.SpindleStartS > 0 {
		ev.totalS += c.Machine.SpindleStartS
		ev.otherS += c.Machine.SpindleStartS
		if c.Machine.HasJerk() {
			ev.totalJerkS += c.Machine.SpindleStartS
		}
	}

	// Simulation, feature after feature on the material the earlier ones
	// left.
	tool := engage.Tool{Diameter: job.Tool.Diameter, FluteLength: job.Tool.FluteLength, Flutes: job.Tool.Flutes}
	m, err := engage.NewMaterial(job.Stock.Outline, job.Stock.Top, engage.MaterialOptions{CellSize: opts.CellSize})
	if err != nil {
		return nil, fmt.Errorf("simulate: %w", err)
	}
	keep := job.Stock.Outline
	for _, f := range job.Features {
		k, err := geom.Difference(keep, f.Region)
		if err != nil {
			return nil, fmt.Errorf("simulate: walls: %w", err)
		}
		keep = k
	}
	for fi, fs := range plan.Features {
		f := job.Features[fi]
		start := plan.Path.Start
		if fs.First > 0 {
			start = moves[fs.First-1].To
		}
		tp := &geom.Toolpath{Start: start, Moves: moves[fs.First:fs.End]}
		tgt, err := geom.Intersection(f.Region, job.Stock.Outline)
		if err != nil {
			return nil, fmt.Errorf("simulate feature %q: %w", f.Name, err)
		}
		total := tp.Length()
		before := heights(m)
		res, err := engage.Simulate(ctx, m, tool, tp, engage.SimOptions{
			Band:       c.Band,
			SpindleRPM: job.Cut.SpindleRPM,
			Keep:       keep,
			Targets:    []engage.Target{{Name: f.Name, Region: tgt, Floor: job.Stock.Top - f.Depth}},
			Progress: func(done, _ float64) {
				if total > 0 {
					prog("simulating", fi, done/total)
				}
			},
		})
		if err != nil {
			return nil, fmt.Errorf("simulate feature %q: %w", f.Name, err)
		}
		fr := &ev.features[fi]
		wear, err := fr.fromSimulation(res, tool, job, c, info, fs.First)
		if err != nil {
			return nil, fmt.Errorf("feature %q: %w", f.Name, err)
		}
		fr.Volume = removed(m, before)
		fr.split(moves, info, fs.First, fs.End)
		if fr.CycleS > 0 {
			fr.MRR = fr.Volume / 1000 / (fr.CycleS / 60)
		}
		if opts.Detail {
			fr.Detail = newDetail(tp, res.Profile, info[fs.First:fs.End], wear, tool)
		}
	}
	return ev, nil
}

// TimePlan predicts the cycle time of a plan on machine m without writing
// G-code: every move becomes a timing block (rapids, lines and arcs as the
// G-code writer would emit them), tagged with the name of its feature so
// that Report.Operations gives the time per feature. The spindle start of
// the written program is not included.
func TimePlan(ctx context.Context, plan *Plan, m timing.Machine, opt timing.Options) (timing.Report, error) {
	if plan == nil {
		return timing.Report{}, errors.New("time plan: no plan")
	}
	tp := &plan.Path
	blocks := make([]timing.Block, 0, len(tp.Moves))
	from := tp.Start
	op, oi := "", 0
	for i, mv := range tp.Moves {
		for oi < len(tp.Ops) && tp.Ops[oi].First == i {
			op = tp.Ops[oi].Name
			oi++
		}
		blk := moveBlock(from, mv)
		blk.Op = op
		blocks = append(blocks, blk)
		from = mv.To
	}
	return timing.Estimate(ctx, blocks, m, opt)
}

// moveBlock returns the timing block of move mv from from.
func moveBlock(from geom.Point3, mv geom.Move) timing.Block {
	a := [3]float64{from.X, from.Y, from.Z}
	b := [3]float64{mv.To.X, mv.To.Y, mv.To.Z}
	switch {
	case mv.Kind == geom.Rapid:
		return timing.Rapid(a, b)
	case mv.Arc:
		return timing.Arc(a, b, [2]float64{mv.Center.X, mv.Center.Y}, mv.CW, mv.Feed)
	}
	return timing.Line(a, b, mv.Feed)
}

// timeMoves times moves [first, end) of tp as one program under model and,
// when info is not nil, stores each move's time and speeds in it.
func timeMoves(ctx context.Context, tp *geom.Toolpath, first, end int, m timing.Machine, model timing.Model, info []moveInfo) (timing.Report, error) {
	if first >= end {
		return timing.Report{}, nil
	}
	from := tp.Start
	if first > 0 {
		from = tp.Moves[first-1].To
	}
	blocks := make([]timing.Block, 0, end-first)
	for i := first; i < end; i++ {
		mv := tp.Moves[i]
		blk := moveBlock(from, mv)
		blk.Line = i + 1 // the move's index, so block times map back
		blocks = append(blocks, blk)
		from = mv.To
	}
	o := timing.Options{Model: model}
	if info != nil {
		o.OnBlock = func(bt timing.BlockTime) {
			i := bt.Line - 1
			if i < first || i >= end {
				return
			}
			info[i].seconds += bt.Seconds
			info[i].entryV, info[i].peakV, info[i].exitV = bt.Entry, bt.Peak, bt.Exit
		}
	}
	rep, err := timing.Estimate(ctx, blocks, m, o)
	if err != nil {
		return rep, err
	}
	return rep, nil
}

// fromSimulation fills the engagement, wear and power figures of fr and the
// per-move cut lengths in info (moves numbered from first).
func (fr *FeatureResult) fromSimulation(res *engage.Result, tool engage.Tool, job *Job, c *Comparison, info []moveInfo, first int) ([]engage.WearBand, error) {
	s := res.Summary
	fr.Length = s.Length
	fr.CutLength = s.CutLength
	fr.MaxEngagement = s.MaxEng
	fr.MaxAeD = s.MaxAeD
	fr.MeanAeD = s.MeanAeD
	fr.InBand = s.InBandFraction
	fr.MaxGouge = s.MaxGouge
	fr.RapidViolations = len(s.RapidViolations)
	for _, t := range s.Targets {
		fr.UncutArea += t.UncutArea
	}
	for _, smp := range res.Profile {
		mi := &info[first+smp.Move]
		mi.simLen += smp.Step
		switch smp.Class {
		case engage.Cut, engage.Entry, engage.Plunge:
			mi.cutLen += smp.Step
			mi.hasCut = true
			if a := smp.AE / tool.Diameter; smp.Class == engage.Cut && a > mi.maxAeD {
				mi.maxAeD = a
			}
		}
	}
	band := tool.FluteLength / 40
	wear, err := engage.FluteWear(res.Profile, tool, band)
	if err != nil {
		return nil, fmt.Errorf("flute wear: %w", err)
	}
	fr.FluteUsage = fluteUsage(wear, tool.FluteLength)
	loads, err := engage.Loads(res.Profile, tool, job.Cut.SpindleRPM, c.Kienzle)
	if err != nil {
		return nil, fmt.Errorf("power: %w", err)
	}
	for _, l := range loads {
		fr.PeakPowerKW = math.Max(fr.PeakPowerKW, l.Power)
	}
	return wear, nil
}

// fluteUsage returns the share of the flute length whose bands are in the
// cut for at least half the path length of the band in the cut the
// longest. Contact rather than volume decides, so that what the end teeth
// cut in entries (counted in the tip band) does not hide the side work.
func fluteUsage(wear []engage.WearBand, flute float64) float64 {
	peak := 0.0
	for _, w := range wear {
		peak = math.Max(peak, w.Contact)
	}
	if peak <= 0 || flute <= 0 {
		return 0
	}
	used := 0.0
	for _, w := range wear {
		if w.Contact >= 0.5*peak {
			used += w.To - w.From
		}
	}
	return math.Min(1, used/flute)
}

// split divides the R1 time of moves [first, end) into cutting, air and
// link time.
func (fr *FeatureResult) split(moves []geom.Move, info []moveInfo, first, end int) {
	for i := first; i < end; i++ {
		mi := info[i]
		switch moves[i].Kind {
		case geom.Rapid:
			fr.LinkS += mi.seconds
			fr.RapidS += mi.seconds
		case geom.Link, geom.Lift:
			fr.LinkS += mi.seconds
		default:
			share := 1.0
			if mi.simLen > 0 {
				share = math.Min(1, mi.cutLen/mi.simLen)
			}
			fr.CutS += share * mi.seconds
			fr.AirS += (1 - share) * mi.seconds
		}
	}
}

// featureShape returns the share of the feature's tool-centre domain at
// the floor that lies in channels narrower than two tool diameters, and
// the diameter of the largest circle inside the feature within the stock.
func featureShape(ctx context.Context, job *Job, f Feature, tol float64) (share, width float64, err error) {
	tol = math.Max(tol, 0.01)
	if in, err := geom.Intersection(f.Region, job.Stock.Outline); err == nil && len(in) > 0 {
		if _, rad, _, err := offset.DeepestPointOfShape(in, tol); err == nil {
			width = 2 * rad
		}
	}
	r := job.Tool.Radius()
	dom, err := offset.Offset(f.Region, -(r + job.Cut.Allowance), tol)
	if err != nil {
		return 0, width, fmt.Errorf("tool-centre domain: %w", err)
	}
	if len(dom) == 0 {
		return 0, width, nil
	}
	z, err := offset.Split(ctx, dom, r, tol, offset.SplitOptions{})
	if err != nil {
		return 0, width, fmt.Errorf("bays and channels: %w", err)
	}
	return channelShare(z), width, nil
}

// heights returns the material top of every cell of m, NaN where there is
// none.
func heights(m *engage.Material) []float64 {
	nx, ny := m.Size()
	b, cs := m.Bounds(), m.CellSize()
	out := make([]float64, nx*ny)
	for j := 0; j < ny; j++ {
		for i := 0; i < nx; i++ {
			p := geom.Point{X: b.Min.X + (float64(i)+0.5)*cs, Y: b.Min.Y + (float64(j)+0.5)*cs}
			h, ok := m.HeightAt(p)
			if !ok {
				h = math.NaN()
			}
			out[j*nx+i] = h
		}
	}
	return out
}

// removed returns the volume of material taken from m since its heights
// were before, mm³. Cells with no material left count down to the lowest
// height seen in the grid.
func removed(m *engage.Material, before []float64) float64 {
	after := heights(m)
	floor := math.Inf(1)
	for _, h := range after {
		if !math.IsNaN(h) {
			floor = math.Min(floor, h)
		}
	}
	cs := m.CellSize()
	v := 0.0
	for k, hb := range before {
		if math.IsNaN(hb) {
			continue
		}
		ha := after[k]
		if math.IsNaN(ha) {
			ha = math.Min(floor, hb)
		}
		if hb > ha {
			v += (hb - ha) * cs * cs
		}
	}
	return v
}
