package engage

import (
	"fmt"
	"math"
)

// Tool is a flat end mill.
type Tool struct {
	Diameter    float64 // cutting diameter D, mm
	FluteLength float64 // usable length of the flutes from the tip, mm
	Flutes      int     // number of teeth
}

// Radius returns half the diameter.
func (t Tool) Radius() float64 { return t.Diameter / 2 }

// Validate reports the first thing wrong with t, naming the field.
func (t Tool) Validate() error {
	switch {
	case math.IsNaN(t.Diameter) || math.IsInf(t.Diameter, 0):
		return fmt.Errorf("tool diameter must be a finite number, got %v", t.Diameter)
	case t.Diameter <= 0:
		return fmt.Errorf("tool diameter must be positive, got %g", t.Diameter)
	case math.IsNaN(t.FluteLength) || math.IsInf(t.FluteLength, 0):
		return fmt.Errorf("tool flute length must be a finite number, got %v", t.FluteLength)
	case t.FluteLength <= 0:
		return fmt.Errorf("tool flute length must be positive, got %g", t.FluteLength)
	case t.Flutes <= 0:
		return fmt.Errorf("tool flutes must be at least 1, got %d", t.Flutes)
	}
	return nil
}

// finite reports whether every value is a finite number.
func finite(vs ...float64) bool {
	for _, v := range vs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}
