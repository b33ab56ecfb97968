package pathplan

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
	"time"
)

// fuzzPlanCell and fuzzPlanStep are the coarse simulation resolution of the
// planning fuzz targets, mm: enough to see a rapid through material, fast
// enough for many executions.
const (
	fuzzPlanCell = 0.5
	fuzzPlanStep = 0.25
)

// FuzzPlanLayered plans small jobs decoded from the fuzz bytes (genJob)
// with the layered strategy: no panic; an error is a clear one; a plan that
// succeeds writes G-code that reads back through the timing reader, has no
// wall gouge deeper than 0.005 mm (exact distances) and no rapid through
// material (engage simulation at a coarse resolution).
func FuzzPlanLayered(f *testing.F) {
	fuzzPlanSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) { fuzzPlan(t, "layered", data) })
}

// FuzzPlanBanded is FuzzPlanLayered for the banded strategy; the last
// byte's three low bits also set BandedOptions.SquareIslands, DirectTurns
// and SquareCorners.
func FuzzPlanBanded(f *testing.F) {
	fuzzPlanSeeds(f)
	f.Fuzz(func(t *testing.T, data []byte) { fuzzPlan(t, "banded", data) })
}

func fuzzPlanSeeds(f *testing.F) {
	f.Add([]byte{})
	f.Add([]byte{128, 128, 1, 128, 0, 0, 0, 128, 128, 128, 0, 0, 128, 128, 0, 200, 200, 1, 1, 0, 128})
}

func fuzzPlan(t *testing.T, strat string, data []byte) {
	j := genJob(data)
	if j.Validate() != nil {
		return
	}
	// A small job must not take long; a minute means a hang.
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	var p *Plan
	var err error
	if n := len(data); strat == "banded" && n > 0 {
		p, err = PlanBanded(ctx, j, BandedOptions{SquareIslands: data[n-1]&1 != 0, DirectTurns: data[n-1]&2 != 0, SquareCorners: data[n-1]&4 != 0})
	} else {
		p, err = planWith(ctx, strat, j)
	}
	if err != nil {
		if errors.Is(err, context.DeadlineExceeded) {
			t.Fatalf("planning a %d-feature job took more than a minute", len(j.Features))
		}
		if strings.TrimSpace(err.Error()) == "" {
			t.Fatalf("empty error")
		}
		return
	}
	checkPlanOutput(t, p)
	for _, m := range p.Path.Moves {
		for _, v := range []float64{m.To.X, m.To.Y, m.To.Z, m.Feed} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("move %+v has a non-finite number", m)
			}
		}
	}
	if g, at := genExactGouge(p, keepShape(t, j), j.Stock.Top, j.Tool.Radius()); g > 0.005 {
		t.Fatalf("wall gouge %.4f mm in move %d %+v", g, at, p.Path.Moves[at])
	}
	s := simulateGen(ctx, t, j, p, fuzzPlanCell, fuzzPlanStep, false)
	if n := len(s.RapidViolations); n > 0 {
		v := s.RapidViolations[0]
		t.Fatalf("%d rapid(s) through material; first: move %d at %v, %.3f mm deep", n, v.Move, v.At, v.Depth)
	}
}
