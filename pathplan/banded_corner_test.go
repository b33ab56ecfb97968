package pathplan

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// cornerMA returns the largest 1 mm moving average of ae/D (windows
// trailing each sample, over runs of cutting samples, as engage's MaxEng:
// within the first millimetre of a run a window covers what the run has
// cut so far) among the samples of moves from the index first on, and
// before end when end is positive, that lie within rad of any of the
// points at.
func cornerMA(res *engage.Result, d float64, first, end int, at []geom.Point, rad float64) float64 {
	best := 0.0
	p := res.Profile
	for i := 0; i < len(p); {
		if p[i].Class != engage.Cut {
			i++
			continue
		}
		j := i
		for j < len(p) && p[j].Class == engage.Cut {
			j++
		}
		for k := i; k < j; k++ {
			near := false
			for _, c := range at {
				if p[k].Move < first || end > 0 && p[k].Move >= end {
					break
				}
				if math.Hypot(p[k].X-c.X, p[k].Y-c.Y) <= rad {
					near = true
				}
			}
			if !near {
				continue
			}
			l, v := 0.0, 0.0
			for m := k; m >= i && l < 1; m-- {
				l += p[m].Step
				v += p[m].Step * p[m].AE / d
			}
			if l > 0 {
				best = math.Max(best, v/l)
			}
		}
		i = j
	}
	return best
}

// TestBandedCornerFans checks the fans at the inside corners of a
// rectangular closed pocket (testdata closed_pocket.json, 8 mm tool, band
// 5–10 %), with sharp corners and with the corners rounded to 5 mm.
//
// Sharp: without fans the last pass along the walls runs into each corner
// and meets the strip along the next wall head-on. Over the last w (the
// strip's width, one 7.5 % step, 0.6 mm) of the approach the engaged arc is
// the side arc plus the head-on chord's, 3·arccos(1 − w/r) ≈ 95°, ae/D ≈
// 0.55, so a 1 mm window there averages at least 0.6·0.55 ≈ 0.33
// (elementary geometry).
//
// Rounded to 5 mm: the tool centre turns each corner on an arc of 1 mm,
// convex to the strip; by spiralPhi's convex relation (ρ = 1, s = w) the
// arc engaged there is 73°, ae/D 0.35.
//
// With the fans the windows about the corners stay within issue 6's bound,
// band max + 0.03, and the corners left uncut stay within its 0.2 % of
// the feature's area, climb only too.
func TestBandedCornerFans(t *testing.T) {
	if testing.Short() {
		t.Skip("plans and simulates a pocket six times")
	}
	sharp, err := LoadJob("../testdata/jobs/closed_pocket.json")
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	r := sharp.Tool.Diameter / 2
	// The same pocket (20..80 × 15..55) with corners of radius 5.
	rounded := *sharp
	const rc = 5.0
	var ring geom.Ring
	for k, c := range []geom.Point{{X: 80 - rc, Y: 15 + rc}, {X: 80 - rc, Y: 55 - rc}, {X: 20 + rc, Y: 55 - rc}, {X: 20 + rc, Y: 15 + rc}} {
		for i := 0; i <= 12; i++ {
			a := (float64(k) - 1 + float64(i)/12) * math.Pi / 2
			ring = append(ring, geom.Pt(c.X+rc*math.Cos(a), c.Y+rc*math.Sin(a)))
		}
	}
	rounded.Features = []Feature{{Name: "pocket", Region: geom.Shape{{Outer: ring}}, Depth: sharp.Features[0].Depth}}
	read := func(job *Job, corners []geom.Point, rad float64, square, climb bool) (ma, uncut float64) {
		plan, rep := planBandedReport(t, job, BandedOptions{SquareCorners: square, ClimbOnly: climb, NoVerify: true}, *job.Machine)
		if got := slices.Contains(plan.Options, "corners square"); got != square {
			t.Errorf("square corners %v: plan options %q", square, plan.Options)
		}
		err = bandedSimEach(ctx, plan, false, func(fi int, res *engage.Result) error {
			// The pass along the walls, with its fans, is the last of
			// the level; the fronts before it stay a step off the
			// walls. It starts with the move before the first sample
			// on a wall.
			first := -1
			for _, q := range res.Profile {
				if q.Class == engage.Cut && math.Min(math.Min(q.X-(20+r), 80-r-q.X), math.Min(q.Y-(15+r), 55-r-q.Y)) < 0.01 {
					first = q.Move - 1
					break
				}
			}
			if first < 0 {
				t.Fatal("no cut on the walls")
			}
			ma = cornerMA(res, job.Tool.Diameter, first, 0, corners, rad)
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		uncut = math.Inf(1)
		for _, tg := range rep[0].Engagement.Targets {
			if strings.HasSuffix(tg.Name, " (reachable)") {
				uncut = tg.UncutArea / plan.Features[0].Area
			}
		}
		t.Logf("%s, square corners %v, climb only %v: corners %.3f, uncut %.3f %%, cycle %.1f s, feature max (full windows) %.3f",
			job.Features[0].Name, square, climb, ma, 100*uncut, rep[0].CycleS, rep[0].Engagement.MaxEngFull)
		return ma, uncut
	}
	lim := sharp.Cut.Band[1] + 0.03
	for _, tc := range []struct {
		name    string
		job     *Job
		corners []geom.Point
		rad     float64
		least   float64 // what square corners read at least
	}{
		{"sharp", sharp, []geom.Point{{X: 20 + r, Y: 15 + r}, {X: 80 - r, Y: 15 + r}, {X: 80 - r, Y: 55 - r}, {X: 20 + r, Y: 55 - r}}, r, 0.33},
		{"rounded", &rounded, []geom.Point{{X: 20 + rc, Y: 15 + rc}, {X: 80 - rc, Y: 15 + rc}, {X: 80 - rc, Y: 55 - rc}, {X: 20 + rc, Y: 55 - rc}}, rc, 0.35},
	} {
		if square, _ := read(tc.job, tc.corners, tc.rad, true, false); square < 0.9*tc.least {
			t.Errorf("%s: square corners read %.3f, under 0.9 × the estimate %.2f: the test does not see the corners", tc.name, square, tc.least)
		}
		for _, climb := range []bool{false, true} {
			if fan, uncut := read(tc.job, tc.corners, tc.rad, false, climb); fan > lim || uncut > 0.002 {
				t.Errorf("%s, climb only %v: with fans the corners read %.3f (issue 6: at most band max + 0.03 = %.3f), uncut %.3f %% (at most 0.2 %%)",
					tc.name, climb, fan, lim, 100*uncut)
			}
		}
	}
}

// TestCornerRadii checks the fan's radii on a right-angle corner: each
// fillet's bisector point lies one convex step (spiralStep) inside the
// last one's, the bisector distance of a fillet of radius ρ being
// ρ·(√2 − 1) at 90° (elementary geometry), and the fan ends at its last
// radius. With the demo's 6 mm tool a right angle keeps every fillet down
// to the last, 0.02r: no step is wider than the convex step at its radius,
// the last no more than a quarter wider (a dropped fillet doubles a step).
// A sharper corner, which needs more than cornerMaxPasses such steps, gets
// cornerMaxPasses falling radii that still end there.
func TestCornerRadii(t *testing.T) {
	p := spiralParams{r: 4, phi: bandedPhiOf(0.075), phiMax: bandedPhiOf(0.11)}
	theta := math.Pi / 2
	radii := cornerRadii(4, 0.5, theta, p)
	if len(radii) < 3 || len(radii) > cornerMaxPasses {
		t.Fatalf("radii %v", radii)
	}
	if last := radii[len(radii)-1]; math.Abs(last-0.5) > 1e-9 {
		t.Errorf("fan ends at %.3f, want 0.5", last)
	}
	phi := fanPhi(p)
	prev := 4.0
	for _, rho := range radii[:len(radii)-1] {
		step := (prev - rho) * (math.Sqrt2 - 1)
		if want := spiralStep(p.r, phi, rho, true); math.Abs(step-want) > 1e-6 {
			t.Errorf("fillet %.3f after %.3f: bisector step %.4f, want %.4f", rho, prev, step, want)
		}
		prev = rho
	}
	p3 := spiralParams{r: 3, phi: p.phi, phiMax: p.phiMax}
	prev = cornerRoundRadius(p3)
	for _, rho := range cornerRadii(prev, 0.06, theta, p3) {
		most := spiralStep(p3.r, phi, rho, true)
		if rho == 0.06 {
			// cornerRadii snaps a step that comes within a quarter
			// of the last radius onto it.
			most = 1.25 * spiralStep(p3.r, phi, rho, true)
		}
		if step := (prev - rho) * (math.Sqrt2 - 1); step > most+1e-6 {
			t.Errorf("6 mm tool: fillet %.3f after %.3f: bisector step %.4f, wider than the convex step %.4f", rho, prev, step, most)
		}
		prev = rho
	}
	if math.Abs(prev-0.06) > 1e-9 {
		t.Errorf("6 mm tool: fan ends at %.3f, want 0.06", prev)
	}
	sharp := cornerRadii(4, 0.08, 150*math.Pi/180, p)
	if len(sharp) != cornerMaxPasses || math.Abs(sharp[len(sharp)-1]-0.08) > 1e-9 {
		t.Errorf("150° turn: radii %v, want %d ending at 0.08", sharp, cornerMaxPasses)
	}
	for i := 1; i < len(sharp); i++ {
		if sharp[i] >= sharp[i-1] {
			t.Errorf("150° turn: radii %v do not fall", sharp)
		}
	}
	// The fillet is tangent to both legs at ρ·tan(θ/2) from the corner.
	// Down the y axis, then right turn onto −x: the fillet lies in the
	// quadrant x < 0, y > 0, about (−2, 2).
	f := cornerFillet(geom.Pt(0, 10), geom.Pt(0, 0), geom.Pt(-10, 0), theta, 2)
	if a, b := f[0], f[len(f)-1]; a.Dist(geom.Pt(0, 2)) > 1e-9 || b.Dist(geom.Pt(-2, 0)) > 1e-9 {
		t.Errorf("tangent points %v %v, want (0,2) and (-2,0)", a, b)
	}
	for _, q := range f {
		if d := q.Dist(geom.Pt(-2, 2)); math.Abs(d-2) > 1e-9 {
			t.Errorf("fillet point %v at %.6f from (-2,2), want 2", q, d)
		}
	}
}

// TestCornerLegShare checks how much of its legs a corner's fillets may
// take: 0.45 of a leg shared with another corner, 0.9 of one whose far end
// turns away from the domain. On the L below, walked clockwise, the corner
// at (13, 10) has a 3 mm leg from the re-entrant vertex (10, 10) and a
// 10 mm leg to the corner (13, 0): its first fillet, at a right angle,
// takes 0.9·3 = 2.7 mm of each leg (radius 2.7, under cornerRoundRadius).
func TestCornerLegShare(t *testing.T) {
	p := spiralParams{r: 3, phi: bandedPhiOf(0.075), phiMax: bandedPhiOf(0.11), h: 0.1}
	ring := []geom.Point{{X: 0, Y: 15}, {X: 0, Y: 30}, {X: 10, Y: 30}, {X: 10, Y: 10}, {X: 13, Y: 10}, {X: 13, Y: 0}, {X: 0, Y: 0}, {X: 0, Y: 15}}
	c := geom.Shape{{Outer: geom.Ring(ring[:len(ring)-1]).Reversed()}}
	if c.Area() <= 0 {
		t.Fatalf("domain area %.1f", c.Area())
	}
	pieces := spiralCorners(&bandedGrid{}, c, ring, p)
	want := geom.Pt(13-2.7, 10)
	found := false
	for _, pc := range pieces {
		if pc.kind != pieceBoundary {
			continue
		}
		for _, q := range pc.pts {
			if q.Dist(want) < 1e-6 {
				found = true
			}
		}
	}
	if !found {
		t.Errorf("no fillet of the corner (13, 10) starts at %v", want)
	}
}

// TestCornerCaps checks the caps the fronts leave to the fans in the
// corners of a rectangular domain (60 × 40, 8 mm tool, band 5–10 %): one
// per corner, its arc about the centre of the corner's first fillet,
// which lies ρ0 from both walls (a fillet tangent to both, elementary
// geometry), at the radius rc that holds the first fillet at the fan's
// engagement φ on the strip between them, by the convex relation of
// constant-engagement offsetting, (rc + r)² = ρ0² + r² + 2ρ0·r·cos φ (Int
// J Adv Manuf Technol (2019), doi:10.1007/s00170-019-03834-8), and its
// ends on the lines w inside the walls where the fronts stop.
func TestCornerCaps(t *testing.T) {
	const r = 4.0
	p := spiralParams{r: r, phi: bandedPhiOf(0.075), phiMax: bandedPhiOf(0.11), h: 0.1}
	w := r * (1 - math.Cos(p.phi))
	c := geom.Shape{{Outer: geom.RectRing(20, 15, 80, 55)}}
	caps := cornerCaps(c, w, p, func(geom.Point) bool { return true })
	if len(caps) != 4 {
		t.Fatalf("%d caps, want 4", len(caps))
	}
	rho0 := cornerRoundRadius(p)
	phi := fanPhi(p)
	wall := func(q geom.Point) float64 { // distance to the nearest wall line
		return math.Min(math.Min(q.X-20, 80-q.X), math.Min(q.Y-15, 55-q.Y))
	}
	for _, k := range caps {
		if dx, dy := math.Min(k.o.X-20, 80-k.o.X), math.Min(k.o.Y-15, 55-k.o.Y); math.Abs(dx-rho0) > 1e-6 || math.Abs(dy-rho0) > 1e-6 {
			t.Errorf("cap at %v: centre %v is %.4f and %.4f from the walls, want ρ0 = %.4f", k.v, k.o, dx, dy, rho0)
		}
		if lhs, rhs := (k.rc+r)*(k.rc+r), rho0*rho0+r*r+2*rho0*r*math.Cos(phi); math.Abs(lhs-rhs) > 1e-3*rhs {
			t.Errorf("cap at %v: radius %.4f: (rc + r)² = %.4f, the convex relation gives %.4f", k.v, k.rc, lhs, rhs)
		}
		if k.rc >= rho0 || k.rc <= rho0-w {
			t.Errorf("cap at %v: radius %.4f outside (ρ0 − w, ρ0) = (%.4f, %.4f)", k.v, k.rc, rho0-w, rho0)
		}
		for _, q := range []geom.Point{k.x1, k.x2} {
			if d := q.Dist(k.o); math.Abs(d-k.rc) > 1e-6 {
				t.Errorf("cap at %v: arc end %v at %.4f from the centre, want %.4f", k.v, q, d, k.rc)
			}
			if d := wall(q); math.Abs(d-w) > 1e-6 {
				t.Errorf("cap at %v: arc end %v at %.4f from the walls, want w = %.4f", k.v, q, d, w)
			}
		}
		for _, q := range k.arc() {
			if d := q.Dist(k.o); math.Abs(d-k.rc) > 1e-6 || wall(q) < w-1e-6 {
				t.Errorf("cap at %v: arc point %v at %.4f from the centre and %.4f from the walls", k.v, q, d, wall(q))
			}
		}
		if a := k.region().Area(); !(a > 0) {
			t.Errorf("cap at %v: region of area %g", k.v, a)
		}
	}
	// A corner whose legs are too short for the full first fillet gets
	// none: a domain 2ρ0 wide.
	narrow := geom.Shape{{Outer: geom.RectRing(0, 0, 60, 1.5*rho0)}}
	if got := cornerCaps(narrow, w, p, func(geom.Point) bool { return true }); len(got) != 0 {
		t.Errorf("narrow domain: %d caps, want 0", len(got))
	}
}
