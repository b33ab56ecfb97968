package pathplan

import (
	"context"
	"math"
	"sort"
	"strings"
	"testing"

	"github.com/chipband/chipband/geom"
)

func mustLoad(t testing.TB, path string) *Job {
	t.Helper()
	j, err := LoadJob(path)
	if err != nil {
		t.Fatal(err)
	}
	return j
}

func mustPlan(t testing.TB, j *Job) *Plan {
	t.Helper()
	p, err := PlanLayered(context.Background(), j, Options{})
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func TestLevels(t *testing.T) {
	// Equal levels, the fewest not deeper than the step-down, the last on
	// the floor (design notes: "the last level lands exactly on the floor").
	for _, c := range []struct {
		depth, step float64
		want        []float64
	}{
		{5, 2, []float64{-5.0 / 3, -10.0 / 3, -5}},
		{4, 1, []float64{-1, -2, -3, -4}},
		{3, 5, []float64{-3}},
		{14, 1, nil},
	} {
		got := levelsFor(0, c.depth, c.step)
		if got[len(got)-1] != -c.depth {
			t.Errorf("depth %v: last level %v, want exactly %v", c.depth, got[len(got)-1], -c.depth)
		}
		prev := 0.0
		for _, z := range got {
			if prev-z > c.step+1e-12 {
				t.Errorf("depth %v: step %v exceeds the step-down %v", c.depth, prev-z, c.step)
			}
			prev = z
		}
		if c.want != nil {
			if len(got) != len(c.want) {
				t.Fatalf("depth %v step %v: levels %v, want %v", c.depth, c.step, got, c.want)
			}
			for i := range got {
				if math.Abs(got[i]-c.want[i]) > 1e-12 {
					t.Errorf("depth %v step %v: levels %v, want %v", c.depth, c.step, got, c.want)
				}
			}
		}
	}
}

// TestStepdownNotDividingDepth: depth 5 at step-down 2 is cut in three
// equal levels and every cutting move lies on one of them.
func TestStepdownNotDividingDepth(t *testing.T) {
	j := mustLoad(t, "../testdata/jobs/closed_pocket.json")
	p := mustPlan(t, j)
	zs := map[float64]bool{}
	minZ := math.Inf(1)
	for _, m := range p.Path.Moves {
		if m.Kind == geom.Feed {
			zs[math.Round(m.To.Z*1e6)/1e6] = true
		}
		minZ = math.Min(minZ, m.To.Z)
	}
	var got []float64
	for z := range zs {
		got = append(got, z)
	}
	sort.Float64s(got)
	want := []float64{-5, -3.333333, -1.666667}
	if len(got) != 3 {
		t.Fatalf("cutting levels %v, want %v", got, want)
	}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-6 {
			t.Errorf("cutting levels %v, want %v", got, want)
		}
	}
	if minZ != -5 {
		t.Errorf("deepest point %v, want the floor -5", minZ)
	}
}

// TestOpenFeatureStartsInTheAir: an open slot needs no ramp or helix; each
// level starts with the tool lowered outside the stock, its whole disk
// clear of the outline.
func TestOpenFeatureStartsInTheAir(t *testing.T) {
	j := mustLoad(t, "../testdata/jobs/open_slot.json")
	p := mustPlan(t, j)
	f := p.Features[0]
	if !f.Open {
		t.Error("slot not detected as open")
	}
	if f.Entries != 0 {
		t.Errorf("%d ramp or helix entries, want none", f.Entries)
	}
	r := j.Tool.Diameter / 2
	from := p.Path.Start
	for i, m := range p.Path.Moves {
		// every descent below the top happens outside the stock
		if m.Kind == geom.Rapid && m.To.Z < from.Z && m.To.Z < j.Stock.Top {
			q := m.To.XY()
			if j.Stock.Outline.Contains(q) || j.Stock.Outline.DistanceToBoundary(q) < r {
				t.Errorf("move %d: descent at %v touches the stock", i, q)
			}
		}
		from = m.To
	}
}

// TestIslandsStayUncut: no tool position below the top comes nearer to an
// island than the tool radius (plus allowance 0).
func TestIslandsStayUncut(t *testing.T) {
	j := mustLoad(t, "../testdata/jobs/pocket_islands.json")
	p := mustPlan(t, j)
	r := j.Tool.Diameter / 2
	holes := j.Features[0].Region[0].Holes
	if len(holes) != 2 {
		t.Fatalf("job has %d islands, want 2", len(holes))
	}
	near := make([]float64, len(holes))
	for i := range near {
		near[i] = math.Inf(1)
	}
	from := p.Path.Start
	for _, m := range p.Path.Moves {
		if m.To.Z < j.Stock.Top && !m.Arc {
			for i, h := range holes {
				for k := range h {
					d := segDistRef(from.XY(), m.To.XY(), h[k], h[(k+1)%len(h)])
					near[i] = math.Min(near[i], d)
				}
				if (geom.Region{Outer: h.Reversed()}).Contains(m.To.XY()) {
					t.Fatalf("tool centre inside island %d at %v", i, m.To)
				}
			}
		}
		from = m.To
	}
	for i, d := range near {
		// the wall pass runs at the tool radius: nearest approach r, to
		// the chord tolerance
		if d < r-0.005 || d > r+0.01 {
			t.Errorf("island %d: nearest tool centre %.4f mm, want the radius %.1f mm (wall pass at final size)", i, d, r)
		}
	}
}

// TestTwoDepths: where a deep pocket overlaps a shallow counterbore the
// overlap goes to the deep floor, and the rest of the counterbore is not
// cut below its own floor (engage's floor gouge of the counterbore less
// the pocket).
func TestTwoDepths(t *testing.T) {
	j := mustLoad(t, "../testdata/jobs/two_depths.json")
	p := mustPlan(t, j)
	res := simulate(t, j, p)
	for i, tr := range res.Summary.Targets {
		// exact check (engage's grid figure is logged)
		if g := exactFloorGouge(t, j, p, i); g > 0.005 {
			t.Errorf("%s: cut %.4f mm below its floor (engage reads %.4f)", tr.Name, g, tr.FloorGouge)
		}
		t.Logf("%s: engage floor gouge %.4f mm", tr.Name, tr.FloorGouge)
		if tr.UncutArea > 0.002*p.Features[i].Area {
			t.Errorf("%s: %.3f mm² uncut", tr.Name, tr.UncutArea)
		}
	}
	// the overlap (x 60..80, y 30..50) is reached at the deep floor
	deepest := 0.0
	for _, m := range p.Path.Moves[p.Features[1].First:p.Features[1].End] {
		if m.To.X > 61 && m.To.X < 79 && m.To.Y > 31 && m.To.Y < 49 {
			deepest = math.Min(deepest, m.To.Z)
		}
	}
	if deepest != -9 {
		t.Errorf("deepest cut in the overlap %v, want -9", deepest)
	}
}

// TestCuspCleanup: with a stepover of 0.85 D in a triangle the rings leave
// cusps at the corners (a corner of angle θ is swept clean only while the
// stepover ≤ D·sin(θ/2), plane geometry; here θ ≈ 56°, sin 28° ≈ 0.47);
// clean-up passes must clear them.
func TestCuspCleanup(t *testing.T) {
	text := strings.NewReplacer(
		`"POLYGON ((20 20, 80 20, 80 40, 20 40, 20 20))"`, `"POLYGON ((10 10, 90 10, 50 55, 10 10))"`,
		`"stepover": 0.5`, `"stepover": 0.85`,
	).Replace(baseJob)
	j, err := ReadJob(strings.NewReader(text))
	if err != nil {
		t.Fatal(err)
	}
	p := mustPlan(t, j)
	if p.Features[0].Cleanups == 0 {
		t.Error("no clean-up passes at a stepover of 0.85 D")
	}
	res := simulate(t, j, p)
	tr := res.Summary.Targets[0]
	t.Logf("clean-ups %d, uncut %.3f mm² of %.0f", p.Features[0].Cleanups, tr.UncutArea, p.Features[0].Area)
	if tr.UncutArea > 0.002*p.Features[0].Area {
		t.Errorf("uncut reachable material %.3f mm², more than 0.2 %% of %.0f mm²", tr.UncutArea, p.Features[0].Area)
	}
	if g, _ := exactGouge(t, j, p); g > 0.005 {
		t.Errorf("wall gouge %.4f mm", g)
	}
	if len(res.Summary.RapidViolations) > 0 {
		t.Errorf("rapid through material: %+v", res.Summary.RapidViolations[0])
	}
}

// TestRampAngle: every entry move that descends while moving sideways does
// so at no more than the ramp angle (3° by default, common practice).
func TestRampAngle(t *testing.T) {
	for name, j := range testJobs(t) {
		p := mustPlan(t, j)
		lim := math.Tan(j.Cut.RampAngle*math.Pi/180) * (1 + 1e-6)
		from := p.Path.Start
		for i, m := range p.Path.Moves {
			l := geom.MoveLength(from, m)
			dz := from.Z - m.To.Z
			xy := math.Sqrt(math.Max(0, l*l-dz*dz))
			if m.Kind == geom.Entry && dz > 0 && xy > 1e-6 && dz/xy > lim {
				t.Errorf("%s: move %d descends at %.2f°", name, i, math.Atan(dz/xy)*180/math.Pi)
			}
			from = m.To
		}
	}
}

func TestPlanCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := PlanLayered(ctx, DemoJob(), Options{}); err == nil {
		t.Fatal("planning a cancelled context succeeded")
	}
}
