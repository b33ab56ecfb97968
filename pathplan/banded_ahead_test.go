package pathplan

import (
	"context"
	"errors"
	"math"
	"reflect"
	"testing"

	"github.com/chipband/chipband/geom"
)

// planAhead plans job's features through bandedAhead with the given number
// of workers, without verification.
func planAhead(t *testing.T, job *Job, workers int) (geom.Toolpath, []FeatureSummary) {
	t.Helper()
	st, err := bandedSetup(job, BandedOptions{})
	if err != nil {
		t.Fatal(err)
	}
	fp := bandedParams(job, st, BandedOptions{})
	b := &builder{}
	b.path.Start = geom.Point3{Z: fp.clear}
	b.pos = b.path.Start
	var sums []FeatureSummary
	err = bandedAhead(context.Background(), b, fp, workers, func(_ int, s FeatureSummary) { sums = append(sums, s) })
	if err != nil {
		t.Fatal(err)
	}
	return b.path, sums
}

// TestBandedAheadMatchesInOrder checks that planning later features ahead,
// in parallel, gives the same path move for move and the same summaries as
// planning them in order. The jobs hold closed features planned ahead and
// open ones that need the start and are planned again.
func TestBandedAheadMatchesInOrder(t *testing.T) {
	jobs := map[string]*Job{"demo": DemoJob()}
	for _, f := range []string{"deep_open.json", "two_depths.json"} {
		j, err := LoadJob("../testdata/jobs/" + f)
		if err != nil {
			t.Fatal(err)
		}
		jobs[f] = j
	}
	for name, job := range jobs {
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			want, wantSums := planAhead(t, job, 0)
			for _, w := range []int{1, 3} {
				got, gotSums := planAhead(t, job, w)
				if !reflect.DeepEqual(got, want) {
					t.Errorf("workers %d: path differs from the one planned in order (%d vs %d moves)", w, len(got.Moves), len(want.Moves))
				}
				if !reflect.DeepEqual(gotSums, wantSums) {
					t.Errorf("workers %d: summaries differ:\n got %+v\nwant %+v", w, gotSums, wantSums)
				}
			}
		})
	}
}

// TestBandedAheadNeedsStart checks which features can be planned ahead: an
// open feature starts in the air nearest the tool and so needs to know
// where the tool stands; a closed one enters by a helix at its deepest
// point wherever the tool comes from.
func TestBandedAheadNeedsStart(t *testing.T) {
	for _, c := range []struct {
		file    string
		feature int
		open    bool
	}{
		{"deep_open.json", 1, true},
		{"two_depths.json", 1, false},
	} {
		job, err := LoadJob("../testdata/jobs/" + c.file)
		if err != nil {
			t.Fatal(err)
		}
		st, err := bandedSetup(job, BandedOptions{})
		if err != nil {
			t.Fatal(err)
		}
		fp := bandedParams(job, st, BandedOptions{})
		_, err = bandedFeature(context.Background(), newGuessBuilder(fp.clear), fp, c.feature)
		if got := errors.Is(err, errStartUnknown); got != c.open {
			t.Errorf("%s feature %d: start needed = %v (err %v), want %v", c.file, c.feature, got, err, c.open)
		}
	}
}

// TestAppendPlanned checks the stitching of a path planned ahead: a first
// rapid to where the tool already stands is elided, as the builder would
// have done, and operation indices shift with the moves.
func TestAppendPlanned(t *testing.T) {
	b := &builder{}
	b.rapid(geom.Point3{X: 1, Y: 2, Z: 5})
	s := newGuessBuilder(5)
	s.path.Ops = append(s.path.Ops, geom.Operation{Name: "f", First: 0})
	s.rapid(geom.Point3{X: s.pos.X, Y: s.pos.Y, Z: 5}) // up from the unknown start: dropped
	s.rapid(geom.Point3{X: 1, Y: 2, Z: 5})             // where b stands: kept here, elided there
	s.feed(geom.Feed, geom.Point3{X: 1, Y: 2, Z: -1}, 100)
	if len(s.path.Moves) != 2 {
		t.Fatalf("guess builder kept %d moves, want 2", len(s.path.Moves))
	}
	shift, ok := b.appendPlanned(s)
	if !ok {
		t.Fatal("appendPlanned refused a path without NaN")
	}
	if len(b.path.Moves) != 2 || b.path.Moves[1].To.Z != -1 {
		t.Fatalf("moves after append: %+v", b.path.Moves)
	}
	if shift != 0 || b.path.Ops[0].First != 1 || b.pos.Z != -1 {
		t.Errorf("shift %d, op first %d, pos %+v; want 0, 1, z −1", shift, b.path.Ops[0].First, b.pos)
	}
	bad := newGuessBuilder(5)
	bad.feed(geom.Feed, geom.Point3{X: bad.pos.X, Y: 0, Z: 0}, 100)
	if _, ok := (&builder{}).appendPlanned(bad); ok {
		t.Error("appendPlanned took a move that read the unknown start")
	}
}

// TestBandedHelixStartsOnEarlierFloor checks that a helix starts just
// above the floor an earlier feature has cut where that feature's region
// holds the whole column the helix sweeps, and at the stock top where it
// does not. two_depths: the deep pocket's helix (radius 1.5, tool radius 3)
// about (75, 40) lies 5 mm inside the 3 mm counterbore, so its column of
// radius 4.5 is clear to z = −3 (elementary geometry); moved 1 mm nearer
// the counterbore's edge, it is not. The rapids are checked against the
// material by simulation (engage).
func TestBandedHelixStartsOnEarlierFloor(t *testing.T) {
	for _, c := range []struct {
		shift float64 // the counterbore's right edge moves by this, mm
		want  float64 // height of the first helix move's start
	}{
		{0, -3 + 1},
		{-1, 0 + 1},
	} {
		job, err := LoadJob("../testdata/jobs/two_depths.json")
		if err != nil {
			t.Fatal(err)
		}
		if c.shift != 0 {
			x := 80 + c.shift
			job.Features[0].Region = geom.Shape{geom.Region{Outer: geom.Ring{{X: 20, Y: 20}, {X: x, Y: 20}, {X: x, Y: 60}, {X: 20, Y: 60}}}}
		}
		p, err := PlanBanded(context.Background(), job, BandedOptions{NoVerify: true})
		if err != nil {
			t.Fatal(err)
		}
		f := p.Features[1]
		var start float64
		found := false
		for i := f.First; i < f.End; i++ {
			if p.Path.Moves[i].Kind == geom.Entry {
				start = p.Path.Moves[i-1].To.Z
				found = true
				break
			}
		}
		if !found {
			t.Fatalf("shift %g: the deep pocket has no entry", c.shift)
		}
		if math.Abs(start-c.want) > 1e-9 {
			t.Errorf("shift %g: helix starts at z %.4f, want %.4f", c.shift, start, c.want)
		}
		s := simulate(t, job, p).Summary
		if len(s.RapidViolations) > 0 {
			t.Errorf("shift %g: %d rapid(s) through material, first at %v", c.shift, len(s.RapidViolations), s.RapidViolations[0].At)
		}
	}
}

// TestBandedProgress checks that Options.Progress counts levels done over
// the whole plan, as it documents: one call per level, rising by one, the
// last with done == total.
func TestBandedProgress(t *testing.T) {
	job, err := LoadJob("../testdata/jobs/two_depths.json")
	if err != nil {
		t.Fatal(err)
	}
	var calls [][2]int
	opts := BandedOptions{NoVerify: true}
	opts.Progress = func(done, total int) { calls = append(calls, [2]int{done, total}) }
	p, err := PlanBanded(context.Background(), job, opts)
	if err != nil {
		t.Fatal(err)
	}
	levels := 0
	for _, f := range p.Features {
		levels += len(f.Levels)
	}
	if len(calls) != levels {
		t.Fatalf("%d progress calls for %d levels: %v", len(calls), levels, calls)
	}
	for i, c := range calls {
		if c != [2]int{i + 1, levels} {
			t.Errorf("call %d: %v, want [%d %d]", i, c, i+1, levels)
		}
	}
}

// TestBandedVerifyAsFeaturesLand checks that verifying each feature as it
// lands, while later ones are planned, repairs the plan exactly as
// simulating the finished plan does (bandedRepairFeeds): the same extra
// passes, feeds, summaries and warnings.
func TestBandedVerifyAsFeaturesLand(t *testing.T) {
	job, err := LoadJob("../testdata/jobs/two_depths.json")
	if err != nil {
		t.Fatal(err)
	}
	got, err := PlanBanded(context.Background(), job, BandedOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want, err := PlanBanded(context.Background(), job, BandedOptions{NoVerify: true})
	if err != nil {
		t.Fatal(err)
	}
	if err := bandedRepairFeeds(context.Background(), want, true); err != nil {
		t.Fatal(err)
	}
	slowed := 0
	for _, f := range want.Features {
		slowed += f.SlowedMoves
	}
	if slowed == 0 {
		t.Fatal("the repair slowed no move: the test shows nothing")
	}
	extra := 0
	for _, f := range want.Features {
		extra += f.ExtraPasses
	}
	if extra == 0 {
		t.Fatal("the verification cut no extra pass: the test shows nothing")
	}
	if !reflect.DeepEqual(got.Path, want.Path) {
		t.Error("paths differ")
	}
	if !reflect.DeepEqual(got.Features, want.Features) {
		t.Errorf("summaries differ:\n got %+v\nwant %+v", got.Features, want.Features)
	}
	if !reflect.DeepEqual(got.Warnings, want.Warnings) {
		t.Errorf("warnings differ:\n got %q\nwant %q", got.Warnings, want.Warnings)
	}
}
