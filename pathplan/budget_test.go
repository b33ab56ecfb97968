package pathplan

import (
	"context"
	"strings"
	"testing"

	"github.com/chipband/chipband/geom"
)

func TestPathBudget(t *testing.T) {
	// A 4 m × 4 m sheet pocketed 50 mm deep with a 1 mm tool at a 0.1 mm
	// stepover, 0.2 mm step-down: 16e6 mm² / 0.1 mm × 250 levels = 4e10 mm,
	// far above MaxPathLength (arithmetic, worked by hand).
	j := &Job{
		Stock:     Stock{Outline: geom.Shape{{Outer: geom.RectRing(0, 0, 4000, 4000)}}},
		Features:  []Feature{{Name: "sheet", Region: geom.Shape{{Outer: geom.RectRing(10, 10, 3990, 3990)}}, Depth: 50}},
		Tool:      Tool{Diameter: 1, FluteLength: 60, Flutes: 2},
		Cut:       Cut{SpindleRPM: 20000, ChipLoad: 0.01, RampAngle: 3, HelixDiameter: 0.5, Band: [2]float64{0.05, 0.1}, Layered: Layered{Stepover: 0.1, Stepdown: 0.2}},
		Clearance: 5,
	}
	est := j.EstimatePathLength("layered")
	if want := 3980.0 * 3980 / 0.1 * 250; est < want*0.999 || est > want*1.001 {
		t.Errorf("layered estimate %g, want %g", est, want)
	}
	_, err := PlanLayered(context.Background(), j, Options{})
	if err == nil || !strings.Contains(err.Error(), "km long") || !IsJobError(err) {
		t.Fatalf("PlanLayered: err %v, want the path-length limit as a job error", err)
	}
	// Banded: 2 × area / (band min · D) × levels = 2 × 15.84e6 / 0.05 × 1.
	if got, want := j.EstimatePathLength("banded"), 2*3980.0*3980/0.05; got < want*0.999 || got > want*1.001 {
		t.Errorf("banded estimate %g, want %g", got, want)
	}
}

func TestPathBudgetBanded(t *testing.T) {
	// The same 4 m sheet as TestPathBudget: 2 × 15.84e6 mm² / (0.05 × 1 mm)
	// ≈ 6.3e8 mm, above MaxPathLength.
	j := &Job{
		Stock:     Stock{Outline: geom.Shape{{Outer: geom.RectRing(0, 0, 4000, 4000)}}},
		Features:  []Feature{{Name: "sheet", Region: geom.Shape{{Outer: geom.RectRing(10, 10, 3990, 3990)}}, Depth: 50}},
		Tool:      Tool{Diameter: 1, FluteLength: 60, Flutes: 2},
		Cut:       Cut{SpindleRPM: 20000, ChipLoad: 0.01, RampAngle: 3, HelixDiameter: 0.5, Band: [2]float64{0.05, 0.1}},
		Clearance: 5,
	}
	_, err := PlanBanded(context.Background(), j, BandedOptions{})
	if err == nil || !strings.Contains(err.Error(), "km long") || !IsJobError(err) {
		t.Fatalf("PlanBanded: err %v, want the path-length limit as a job error", err)
	}
}
