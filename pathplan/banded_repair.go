package pathplan

import (
	"fmt"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// The feed repair is the last resort of the banded verification, after
// the extra passes (banded_extra.go): each feature is simulated with
// engage (bandedVerifier, as it lands), and on every cutting move where the simulated engagement leaves the band (ae/D
// above 1.1 × its maximum, the upper edge the in-band share counts) and the
// largest chip (engage's h_max = fz·sin of the largest immersion angle met,
// Altintas 2012, ch. 2, from memory) exceeds the chip load, the feed is
// lowered so that the chip equals the chip load again. The feed is only
// ever lowered; within the band the feed stays the one set for the target.
// Each feature records the moves and length slowed, a warning names them,
// and the report and the G-code carry the lowered feeds.
//
// A smaller step (moving the pass itself) is not built: it would hand the
// overload to the next pass.

// bandedRepairs reports whether job gives the chip load the feed repair
// holds.
func bandedRepairs(job *Job) bool {
	return job.Cut.ChipLoad > 0 && job.Cut.SpindleRPM > 0 && job.Tool.Flutes > 0
}

// bandedWorstChips returns, from the simulation of one feature, the largest
// chip h_max of each move (by index in the feature) where the engagement
// leaves the band.
func bandedWorstChips(job *Job, res *engage.Result) map[int]float64 {
	over := bandedOverLimit(job)
	worst := map[int]float64{}
	for _, smp := range res.Profile {
		if smp.Class != engage.Cut || smp.AE <= over*job.Tool.Diameter {
			continue
		}
		if smp.HMax > worst[smp.Move] {
			worst[smp.Move] = smp.HMax
		}
	}
	return worst
}

// bandedApplyRepair lowers the feeds of feature fi's moves whose worst
// chip exceeds the chip load, counts them in its summary and adds the
// warning.
func bandedApplyRepair(plan *Plan, fi int, worst map[int]float64) {
	load := plan.Job.Cut.ChipLoad
	fs := &plan.Features[fi]
	from := plan.featureStart(fi)
	for i := fs.First; i < fs.End; i++ {
		mv := &plan.Path.Moves[i]
		h := worst[i-fs.First]
		if (mv.Kind == geom.Feed || mv.Kind == geom.Link) && h > load && mv.Feed > 0 {
			mv.Feed *= load / h
			fs.SlowedMoves++
			fs.SlowedLength += geom.MoveLength(from, *mv)
		}
		from = mv.To
	}
	if fs.SlowedMoves > 0 {
		plan.Warnings = append(plan.Warnings, fmt.Sprintf(
			"feature %q: feed lowered on %d moves (%.0f mm of %.0f mm) where the simulated engagement leaves the band and the chip would be thicker than the chip load",
			fs.Name, fs.SlowedMoves, fs.SlowedLength, fs.Length))
	}
}

// bandedOverLimit returns the ae/D above which the banded verification
// counts a sample out of band: 1.1 × the band maximum, the upper edge of
// the in-band share (issue figures).
func bandedOverLimit(job *Job) float64 {
	band := job.Cut.Band
	if band[1] <= 0 {
		band = defaultBand
	}
	return 1.1 * band[1]
}
