package engage

import (
	"fmt"
	"math"
)

// WearBand is the work done by one height band of the flutes.
type WearBand struct {
	From, To float64 // band heights above the tool tip, mm
	Volume   float64 // material removed by this band, mm³
	Contact  float64 // path length with this band in the cut, mm
}

// FluteWear splits the work of a simulated profile over height bands of the
// flutes, band mm high from the tip up to the flute length. The side cut of
// a sample (ae·ap over the XY step) is spread evenly over the heights it
// covers; what the end teeth cut (ramps, helices, plunges) counts in the
// tip band. Material above the flute length is left out (the shank cannot
// cut it; see Summary.BeyondFlute).
func FluteWear(prof []Sample, t Tool, band float64) ([]WearBand, error) {
	if err := t.Validate(); err != nil {
		return nil, fmt.Errorf("flute wear: %w", err)
	}
	if !finite(band) || band <= 0 {
		return nil, fmt.Errorf("flute wear: band height must be positive, got %v mm", band)
	}
	n := int(math.Ceil(t.FluteLength/band - 1e-9))
	if n > 100000 {
		return nil, fmt.Errorf("flute wear: %d bands of %g mm is too many; use wider bands", n, band)
	}
	out := make([]WearBand, n)
	for i := range out {
		out[i].From = float64(i) * band
		out[i].To = math.Min(float64(i+1)*band, t.FluteLength)
	}
	for _, s := range prof {
		if s.Class == Air || s.Class == Rapid || s.AP <= 0 {
			continue
		}
		side := s.Volume - s.BottomVolume
		if s.BottomVolume > 0 {
			out[0].Volume += s.BottomVolume
		}
		ap := math.Min(s.AP, t.FluteLength)
		for i := range out {
			lo, hi := out[i].From, math.Min(out[i].To, ap)
			if hi <= lo {
				break
			}
			out[i].Contact += s.Step
			out[i].Volume += side * (hi - lo) / s.AP
		}
	}
	return out, nil
}
