package pathplan

import (
	"bytes"
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"strconv"
	"testing"
	"time"
)

// propertyPockets is the number of generated jobs the property test plans:
// the full 500 of the reliability issue when CHIPBAND_LONG=1, a short run
// otherwise (CHIPBAND_POCKETS=N overrides both).
func propertyPockets() int {
	if v, err := strconv.Atoi(os.Getenv("CHIPBAND_POCKETS")); err == nil && v > 0 {
		return v
	}
	if os.Getenv("CHIPBAND_LONG") == "1" {
		return 500
	}
	return 30
}

// TestRandomPocketProperties plans generated jobs — rectangles and
// star-shaped pockets, islands, features open on one side, two features of
// different depths — with both strategies and checks by material-removal
// simulation (engage) the reliability issue's properties:
//
//   - no wall or island gouge deeper than 0.005 mm (exact distances from
//     the tool-centre trace to the walls) and none below a floor (simulation),
//   - no rapid move through material,
//   - reachable material left uncut at most 0.5 % of the feature area
//     (reachable: within the opening of the free space by the tool radius
//     plus allowance, mathematical morphology),
//   - the same job planned twice gives the same G-code bytes (design notes
//     §3: deterministic output); for banded, once with later features
//     planned ahead in parallel and once in order.
//
// Jobs the job validation rejects are regenerated; features too narrow for
// the tool must be rejected with an error that says so, and are counted.
func TestRandomPocketProperties(t *testing.T) {
	n := propertyPockets()
	if testing.Short() {
		n = min(n, 10)
	}
	for _, strat := range []string{"layered", "banded"} {
		t.Run(strat, func(t *testing.T) {
			// The same generated jobs for both strategies.
			rnd := rand.New(rand.NewPCG(8, 2026))
			start := time.Now()
			planned, narrow, tries := 0, 0, 0
			var worstGouge, worstSimGouge, worstUncut float64
			for planned+narrow < n {
				tries++
				if tries > 20*n {
					t.Fatalf("only %d of %d generated jobs are valid", planned+narrow, n)
				}
				data := make([]byte, 64)
				for i := range data {
					data[i] = byte(rnd.UintN(256))
				}
				j := genJob(data)
				if j.Validate() != nil {
					continue
				}
				name := fmt.Sprintf("job %d (%x)", tries, data)
				key := fmt.Sprintf("%s/%x", strat, data[:8])
				known, isKnown := knownPropertyDefects()[key]
				failf := func(format string, args ...any) {
					if isKnown {
						t.Logf("known defect (%s): "+format, append([]any{known}, args...)...)
						return
					}
					t.Errorf(format, args...)
				}
				p, err := planWith(context.Background(), strat, j)
				if err != nil {
					if IsJobError(err) && bytes.Contains([]byte(err.Error()), []byte("too narrow")) {
						narrow++
						continue
					}
					failf("%s: %v", name, err)
					planned++
					continue
				}
				planned++
				prog := checkPlanOutput(t, p)
				// The second plan of a banded job plans its features in
				// order, the first ahead on the other cores: the two must
				// agree byte for byte as well.
				var p2 *Plan
				if strat == "banded" {
					p2, err = planBanded(context.Background(), j, BandedOptions{}, 0)
				} else {
					p2, err = planWith(context.Background(), strat, j)
				}
				if err != nil {
					t.Fatalf("%s: second plan: %v", name, err)
				}
				if prog2 := checkPlanOutput(t, p2); !bytes.Equal(prog, prog2) {
					failf("%s: two plans of one job differ (%d and %d bytes)", name, len(prog), len(prog2))
				}
				s := simulateGen(context.Background(), t, j, p, 0, 0, true)
				g, gm := genExactGouge(p, keepShape(t, j), j.Stock.Top, j.Tool.Radius())
				worstGouge = max(worstGouge, g)
				worstSimGouge = max(worstSimGouge, s.MaxGouge)
				if g > 0.005 {
					failf("%s: wall gouge %.4f mm in move %d %+v", name, g, gm, p.Path.Moves[gm])
				}
				for _, tr := range s.Targets {
					if tr.FloorGouge > 0.005 {
						failf("%s: feature %s: cut %.4f mm below the floor", name, tr.Name, tr.FloorGouge)
					}
				}
				if len(s.RapidViolations) > 0 {
					v := s.RapidViolations[0]
					failf("%s: %d rapid(s) through material, first move %d at %v, %.3f mm deep", name, len(s.RapidViolations), v.Move, v.At, v.Depth)
				}
				areas := map[string]float64{}
				for _, fs := range p.Features {
					areas[fs.Name] = fs.Area
				}
				for _, tr := range s.Targets {
					area := areas[tr.Name]
					if area <= 0 {
						continue
					}
					worstUncut = max(worstUncut, tr.UncutArea/area)
					if tr.UncutArea > 0.005*area {
						failf("%s: feature %s: uncut reachable %.3f mm² of %.1f mm² (%.2f %%)", name, tr.Name, tr.UncutArea, area, 100*tr.UncutArea/area)
					}
				}
			}
			el := time.Since(start)
			t.Logf("%s: %d jobs planned and verified, %d rejected as too narrow, %d generated; worst gouge %.4f mm exact (%.4f mm by the simulation's distance field), worst uncut %.3f %%; %.1f s (%.0f ms per job)",
				strat, planned, narrow, tries, worstGouge, worstSimGouge, 100*worstUncut, el.Seconds(), float64(el.Milliseconds())/float64(max(1, planned+narrow)))
		})
	}
}

func planWith(ctx context.Context, strat string, j *Job) (*Plan, error) {
	if strat == "banded" {
		return PlanBanded(ctx, j, BandedOptions{})
	}
	return PlanLayered(ctx, j, Options{})
}

// knownPropertyDefects lists generated jobs (strategy / first 8 bytes of
// their generator input) that fail a property on the current main, with the
// defect; they are logged instead of failing the test until fixed. The
// reproductions are in the closing note of the reliability issue.
func knownPropertyDefects() map[string]string {
	return map[string]string{}
}
