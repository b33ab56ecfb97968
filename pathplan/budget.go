package pathplan

import (
	"fmt"
	"math"

	"github.com/chipband/chipband/geom"
)

// MaxPathLength is the longest toolpath a plan may have, mm (20 km: more
// than 300 hours at 1 m/min). A job whose estimated path is longer is
// refused before planning, with the estimate in the error, rather than left
// to exhaust memory or run for hours.
const MaxPathLength = 2e7

// MaxMoves is the largest number of moves a plan may hold.
const MaxMoves = 10_000_000

// EstimatePathLength returns a quick upper estimate of the cutting length
// of the named strategy ("layered" or "banded") on the job, mm: for every
// feature, its area inside the stock over the stepover, times its levels,
// twice over for the banded strategy's trochoidal loops and transitions.
// It returns 0 when the job lacks the strategy's cut data.
func (j *Job) EstimatePathLength(strategy string) float64 {
	var total float64
	for _, f := range j.Features {
		in, err := geom.Intersection(f.Region, j.Stock.Outline)
		if err != nil {
			in = f.Region
		}
		a := in.Area()
		switch strategy {
		case "layered":
			l := j.Cut.Layered
			if l.Stepover <= 0 || l.Stepdown <= 0 {
				return 0
			}
			total += a / (l.Stepover * j.Tool.Diameter) * math.Ceil(f.Depth/l.Stepdown)
		case "banded":
			b := j.Cut.Band
			if b[0] <= 0 || j.Tool.FluteLength <= 0 {
				return 0
			}
			total += 2 * a / (b[0] * j.Tool.Diameter) * math.Ceil(f.Depth/j.Tool.FluteLength)
		default:
			return 0
		}
	}
	return total
}

// checkPathBudget refuses a job whose estimated path for strategy exceeds
// MaxPathLength.
func checkPathBudget(j *Job, strategy string) error {
	if est := j.EstimatePathLength(strategy); est > MaxPathLength {
		return jobErrorf("", "the %s path would be about %.0f km long, above the limit of %.0f km; use a larger tool, a larger stepover or split the job",
			strategy, est/1e6, MaxPathLength/1e6)
	}
	return nil
}

// errTooManyMoves is returned when a plan outgrows MaxMoves.
var errTooManyMoves = fmt.Errorf("plan exceeds %d moves; use a larger tool or stepover, or split the job", MaxMoves)

// MaxRasterBytes bounds the memory of the banded strategy's front raster
// for one domain part (1.5 GiB): its nodes, the level's material on them,
// and one mask per bay. A part that needs more is refused with the figure
// rather than left to exhaust memory.
const MaxRasterBytes = 3 << 29

// bandedRasterBytes estimates the bytes of the front raster of a domain
// part with bounds b, node spacing h, padding pad and bays bays: 44 bytes a
// node for the raster and its material (see bandedGrid and bandedStock),
// 14 more a node for every bay mask.
func bandedRasterBytes(b geom.Rect, h, pad float64, bays int) float64 {
	nx := math.Ceil((b.Width()+2*pad)/h) + 1
	ny := math.Ceil((b.Height()+2*pad)/h) + 1
	return nx * ny * float64(44+14*bays)
}

// checkRasterBudget refuses a domain part whose front raster would exceed
// MaxRasterBytes.
func checkRasterBudget(feature string, b geom.Rect, h, pad float64, bays int) error {
	if need := bandedRasterBytes(b, h, pad, bays); need > MaxRasterBytes {
		return jobErrorf(feature, "the front raster (%.0f × %.0f mm at %.3g mm) would need about %.1f GiB, above the limit of %.1f GiB; use a larger tool, a wider band or split the feature",
			b.Width(), b.Height(), h, need/(1<<30), float64(MaxRasterBytes)/(1<<30))
	}
	return nil
}
