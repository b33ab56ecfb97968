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

func TestRasterBudgetBanded(t *testing.T) {
	// A square ring channel 2 m across and 20 mm wide: 0.16 m² of area, so
	// its path (2 × 1.6e5 mm² / 0.3 mm ≈ 1.1e6 mm) is within MaxPathLength,
	// but its front raster spans the whole square: (2006.7 / 0.18)² ≈ 1.24e8
	// nodes × 44 bytes ≈ 5.1 GiB, above MaxRasterBytes (arithmetic, worked
	// by hand).
	j := &Job{
		Stock: Stock{Outline: geom.Shape{{Outer: geom.RectRing(0, 0, 2100, 2100)}}},
		Features: []Feature{{Name: "moat", Region: geom.Shape{{
			Outer: geom.RectRing(50, 50, 2050, 2050),
			Holes: []geom.Ring{geom.RectRing(70, 70, 2030, 2030).Reversed()},
		}}, Depth: 5}},
		Tool:      Tool{Diameter: 6, FluteLength: 20, Flutes: 3},
		Cut:       Cut{SpindleRPM: 18000, ChipLoad: 0.03, RampAngle: 3, HelixDiameter: 3, Band: [2]float64{0.05, 0.1}},
		Clearance: 5,
	}
	if err := j.Validate(); err != nil {
		t.Fatalf("the test job is invalid: %v", err)
	}
	if est := j.EstimatePathLength("banded"); est > MaxPathLength {
		t.Fatalf("path estimate %.3g mm is over the path limit; the test would not reach the raster", est)
	}
	_, err := PlanBanded(context.Background(), j, BandedOptions{})
	if err == nil || !strings.Contains(err.Error(), "front raster") || !strings.Contains(err.Error(), `"moat"`) || !IsJobError(err) {
		t.Fatalf("PlanBanded: err %v, want the raster limit naming the feature as a job error", err)
	}
	t.Log(err)
}
