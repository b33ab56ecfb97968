package pathplan

import (
	"context"
	"encoding/hex"
	"testing"
)

// TestBandedBayEntries plans generated jobs (genJob inputs) that a 500-job
// run of TestRandomPocketProperties found failing and checks the same
// properties the property test does, with its thresholds (the reliability
// issue's: uncut reachable material at most 0.5 % of the feature area, no
// wall gouge deeper than 0.005 mm, none below a floor, no rapid through
// material). The first four have two bays joined only by channels whose
// throat is too narrow for a trochoidal loop, so no front ever reached the
// second bay; the fifth has an open domain part thinner than the raster,
// with no node in the air to start from. The rest came up in later runs:
// a shallow feature's corners reachable only from a later, deeper
// neighbour's space (031b…), fronts that grew into cleared space and
// stopped (e3c9…, 1b8a…, 096e…), a lift whose landing leg crossed a
// wall corner by 0.54 mm (06b4…), and a corner of a shallow feature
// reachable only from an earlier, deeper neighbour's space (e0c7…, 0.64 %
// uncut before bandedRest).
func TestBandedBayEntries(t *testing.T) {
	jobs := []string{
		"1584dfd405aa2609f882a6ebd5f99e7663553d05130c11be48d66cd00288025fa5181afbaf650db23487f3d178c2144ff3bd3e1836b6c468dff6bf79fae92dc3",
		"3ca95606b52a90af50421dd5e60ed762505fe1ec7beabf8e8dd8b0cf67bba97221d6e509433e0b0c11161bdbba747498e3a969d141a6d858147c327b186cdd8a",
		"7d1b7838c90e8bd33bc2885c1d1b1bbef208d9d8248484dc71ccd19c58475eeb0e6fad5ba952ecc0db07b40ea29ca44e9bdeaf1065a39408dc3f7b71436ae257",
		"36223caabc5dcebd9cbbcccfc234a5fd9e1c2195af36a016ef7e9d309b73ff0bb951de1baafb2584d6613312910abe25b195b9f6c2a2652b9876cc46d39813da",
		"f3c06eedeaedce1e07874f835a5038c36ca3ad72836391e23d54da8b981efb21a2d115e509cc210f73dcb87797cbdd2c56d898ba212faddb2e286a71d5348880",
		"031b13c5a848bcb60fc04973ef54fcb61c2e33038477f0b716e948f8b5af896a4b33dfdce12da370e02dfd23b93ea4ebee87e02e3d3381033182c1df137f3de6",
		"e3c924d240bafa68a99f4f9f70964e08526348998d621bc487bffb5f0de056a2f1df1d1186177fdc734afed1bcb94f04305fc8dc31b522b3324308002647b02e",
		"1b8a2dd0f1ac5a6515fd0b09d6dac3e6b7945b7ac8c9497ae6c5c897de957d0e9ba554c14a86d8011dfbdaf7f74957f9f600d907c11f8e0fb68e99c162eb87b8",
		"096e96e2d1ad36a82458bd63e0312f39e9413804fb356fa812b9eaccc6061fd5c1848d34e2b2d5b0b1e4158256895dbe2ab10ad6d5bc5f9d64ab271459847c1e",
		"06b47f4ca7250339b13c24756bb9c1fe95d50a61581eab4c0c52ff1a7c1dc840f9e0a0785a055aeacf0d0b9c0d9ab9cf829cc3735998b587e6b0cc4ecc51a43d",
		"e0c7f90d9c1b5540328b7b1166079e09025957f66e329edc3b0e74030892a6f70a09f48ec4a997c8f68bdba64ae8fc9ff798d79f440ba60f7b78fac920e833e3",
	}
	for _, hx := range jobs {
		t.Run(hx[:16], func(t *testing.T) {
			t.Parallel()
			data, err := hex.DecodeString(hx)
			if err != nil {
				t.Fatal(err)
			}
			j := genJob(data)
			if err := j.Validate(); err != nil {
				t.Fatalf("generated job is invalid: %v", err)
			}
			p, err := PlanBanded(context.Background(), j, BandedOptions{})
			if err != nil {
				t.Fatalf("plan: %v", err)
			}
			checkPlanOutput(t, p)
			s := simulateGen(context.Background(), t, j, p, 0, 0, true)
			// Thresholds of TestRandomPocketProperties (the reliability issue).
			if g, gm := genExactGouge(p, keepShape(t, j), j.Stock.Top, j.Tool.Radius()); g > 0.005 {
				t.Errorf("wall gouge %.4f mm in move %d", g, gm)
			}
			if len(s.RapidViolations) > 0 {
				v := s.RapidViolations[0]
				t.Errorf("%d rapid(s) through material, first move %d, %.3f mm deep", len(s.RapidViolations), v.Move, v.Depth)
			}
			areas := map[string]float64{}
			for _, fs := range p.Features {
				areas[fs.Name] = fs.Area
			}
			for _, tr := range s.Targets {
				if tr.FloorGouge > 0.005 {
					t.Errorf("feature %s: cut %.4f mm below the floor", tr.Name, tr.FloorGouge)
				}
				if a := areas[tr.Name]; a > 0 && tr.UncutArea > 0.005*a {
					t.Errorf("feature %s: uncut reachable %.3f mm² of %.1f mm² (%.2f %%)", tr.Name, tr.UncutArea, a, 100*tr.UncutArea/a)
				}
			}
		})
	}
}
