package offset

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// dumbbell returns two side×side squares joined along y = 0 by a bar of the
// given width and length, running from x = 0 to x = length.
func dumbbell(side, width, length float64) geom.Shape {
	h, w := side/2, width/2
	return geom.Shape{{Outer: ringXY(
		-side, -h, 0, -h, 0, -w, length, -w, length, -h, length+side, -h,
		length+side, h, length, h, length, w, 0, w, 0, h, -side, h,
	)}}
}

func TestSplitDumbbell(t *testing.T) {
	const (
		rho, tol            = 5.0, 1e-3
		side, width, length = 40.0, 6.0, 30.0
	)
	z, err := Split(context.Background(), dumbbell(side, width, length), rho, tol, SplitOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(z.Bays) != 2 || len(z.Channels) != 1 {
		t.Fatalf("got %d bays and %d channels, want 2 and 1", len(z.Bays), len(z.Channels))
	}
	// Worked by hand (elementary geometry). A disk of radius ρ inside a
	// square reaches everything but the cusps of its four corners, and at
	// the bar's mouth it pokes into the bar as far as a disk through the two
	// mouth corners (0, ±w/2) allows: a cap of depth
	// h = ρ − √(ρ² − (w/2)²) = 5 − 4 = 1 mm and area ρ²(α − sin α cos α)
	// with sin α = (w/2)/ρ = 0.6.
	capDepth := rho - math.Sqrt(rho*rho-width*width/4)
	alpha := math.Asin(width / 2 / rho)
	capArea := rho * rho * (alpha - math.Sin(alpha)*math.Cos(alpha))
	cusp := (1 - math.Pi/4) * rho * rho // corner cusp of a right angle
	wantBay := side*side - 4*cusp + capArea
	for i, b := range z.Bays {
		// Bays are grown by 2·tol for the difference only; the tolerance
		// here is the chord error of the arcs (≤ tol along ~4·2πρ/4 + cap).
		if a := b.Region.Area(); math.Abs(a-wantBay) > 0.05 {
			t.Errorf("bay %d: area %.4f, want %.4f", i, a, wantBay)
		}
		// The deepest point of a square bay is its centre, radius side/2.
		if math.Abs(b.Radius-side/2) > tol {
			t.Errorf("bay %d: radius %.4f, want %g", i, b.Radius, side/2)
		}
	}
	// The deepest circle of a square bay has radius side/2, centred on
	// y = 0; it may slide towards the bar's mouth until it meets the mouth
	// corners (0, ±w/2): |x| ≥ √((side/2)² − (w/2)²) from the mouth side.
	slide := math.Sqrt(side*side/4 - width*width/4)
	if c := z.Bays[0].Deepest; math.Abs(c.Y) > 2*tol || c.X < -side/2-2*tol || c.X > -slide+2*tol {
		t.Errorf("left bay (equal areas: left first) deepest %v, want y = 0, x in [%g, %.4f]", c, -side/2, -slide)
	}
	if c := z.Bays[1].Deepest; math.Abs(c.Y) > 2*tol || c.X > length+side/2+2*tol || c.X < length+slide-2*tol {
		t.Errorf("right bay deepest %v, want y = 0, x in [%.4f, %g]", c, length+slide, length+side/2)
	}

	ch := z.Channels[0]
	// The bar less the two caps; a 2·tol strip is lost at each mouth.
	wantCh := width*length - 2*capArea
	if a := ch.Region.Area(); math.Abs(a-wantCh) > 0.1 {
		t.Errorf("channel area %.4f, want %.4f", a, wantCh)
	}
	// Width: the bar is w wide and long enough between the caps for the
	// circle of diameter w.
	if math.Abs(ch.Width-width) > 2*tol {
		t.Errorf("channel width %.5f, want %g", ch.Width, width)
	}
	if len(ch.Ends) != 2 || ch.Ends[0].Bay != 0 || ch.Ends[1].Bay != 1 {
		t.Fatalf("ends %+v, want bay 0 then bay 1", ch.Ends)
	}
	// The spine runs along the bar's centre line y = 0 from cap apex to cap
	// apex, (h, 0) to (length − h, 0), each 2·tol further in.
	first, last := ch.Spine[0], ch.Spine[len(ch.Spine)-1]
	if first.Dist(geom.Pt(capDepth, 0)) > 5*tol || last.Dist(geom.Pt(length-capDepth, 0)) > 5*tol {
		t.Errorf("spine from %v to %v, want (%g, 0) to (%g, 0)", first, last, capDepth, length-capDepth)
	}
	for i, p := range ch.Spine {
		if math.Abs(p.Y) > 2*tol || p.X < capDepth-5*tol || p.X > length-capDepth+5*tol {
			t.Errorf("spine point %d at %v is off the centre line", i, p)
		}
		// Clearance on the centre line of a w-wide bar is w/2.
		if math.Abs(ch.Clearance[i]-width/2) > 2*tol {
			t.Errorf("spine point %d: clearance %.5f, want %g", i, ch.Clearance[i], width/2)
		}
	}
	if ch.Ends[0].At.Dist(first) > 1e-9 || ch.Ends[1].At.Dist(last) > 1e-9 {
		t.Errorf("spine does not start and end at the ends %+v", ch.Ends)
	}
	// The eight square corners leave cusps; nothing else is left over.
	if len(z.Slivers) != 8 {
		t.Errorf("%d slivers, want the 8 corner cusps", len(z.Slivers))
	}
	for i, s := range z.Slivers {
		if a := s.Area(); math.Abs(a-cusp) > 0.02 {
			t.Errorf("sliver %d: area %.4f, want the right-angle cusp (1 − π/4)ρ² = %.4f", i, a, cusp)
		}
	}
}

func TestSplitWideRectangleIsOneBay(t *testing.T) {
	const rho = 5.0
	c := geom.Shape{{Outer: geom.RectRing(0, 0, 60, 20)}}
	z, err := Split(context.Background(), c, rho, 0, SplitOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// Elementary geometry: a disk of radius ρ < 10 rolls everywhere in a
	// 60×20 rectangle except the four right-angle corner cusps, each of area
	// (1 − π/4)ρ² and reaching ρ(√2 − 1) < ρ/2 from the bay.
	if len(z.Bays) != 1 || len(z.Channels) != 0 || len(z.Slivers) != 4 {
		t.Fatalf("got %d bays, %d channels, %d slivers; want 1, 0, 4", len(z.Bays), len(z.Channels), len(z.Slivers))
	}
	want := 60*20 - 4*(1-math.Pi/4)*rho*rho
	if a := z.Bays[0].Region.Area(); math.Abs(a-want) > 0.05 {
		t.Errorf("bay area %.4f, want %.4f", a, want)
	}
	if b := z.Bays[0]; math.Abs(b.Radius-10) > DefaultTolerance || math.Abs(b.Deepest.Y-10) > DefaultTolerance {
		t.Errorf("bay deepest %v radius %v, want radius 10 on y = 10", b.Deepest, b.Radius)
	}
}

// narrowCheck asserts that a w-wide rectangle from x = 0 to x = l is one
// channel whose spine runs along y = w/2.
func narrowCheck(t *testing.T, z Zones, w, l, tol float64) {
	t.Helper()
	if len(z.Bays) != 0 || len(z.Channels) != 1 {
		t.Fatalf("got %d bays and %d channels, want 0 and 1", len(z.Bays), len(z.Channels))
	}
	ch := z.Channels[0]
	if math.Abs(ch.Width-w) > 2*tol {
		t.Errorf("width %.5f, want %g", ch.Width, w)
	}
	if len(ch.Ends) != 0 {
		t.Errorf("ends %+v, want none", ch.Ends)
	}
	// Elementary geometry: the inward offsets of a w×l rectangle collapse
	// onto the segment y = w/2, w/2 ≤ x ≤ l − w/2, with branches to the
	// corners; the spine joins the two ends of the channel farthest apart,
	// so it covers that segment and may run on into two opposite corners.
	// Split's documented accuracy: tol between parallel walls, one step
	// (default: a twelfth of the inscribed radius) where branches meet.
	step := w / 2 / 12
	var minX, maxX = math.Inf(1), math.Inf(-1)
	for i, p := range ch.Spine {
		minX, maxX = math.Min(minX, p.X), math.Max(maxX, p.X)
		if p.X < w/2 || p.X > l-w/2 {
			continue
		}
		off := math.Abs(p.Y - w/2)
		nearJunction := p.X < w/2+2*step || p.X > l-w/2-2*step
		if (!nearJunction && off > 2*tol) || off > step {
			t.Errorf("spine point %d at %v is off the centre line y = %g", i, p, w/2)
		}
	}
	if minX > w/2+2*tol || maxX < l-w/2-2*tol {
		t.Errorf("spine covers x in [%.4f, %.4f], want at least [%g, %g]", minX, maxX, w/2, l-w/2)
	}
}

func TestSplitNarrowRegionIsAllChannel(t *testing.T) {
	const rho, tol = 5.0, 1e-3
	c := geom.Shape{{Outer: geom.RectRing(0, 0, 60, 6)}}
	z, err := Split(context.Background(), c, rho, tol, SplitOptions{})
	if err != nil {
		t.Fatal(err)
	}
	narrowCheck(t, z, 6, 60, tol)
	if a := z.Channels[0].Region.Area(); math.Abs(a-360) > 1e-6 {
		t.Errorf("channel area %v, want the whole 60×6 = 360", a)
	}
}

func TestSplitAtTwiceRho(t *testing.T) {
	const rho, tol = 5.0, 1e-3
	// At exactly 2ρ the disk fits only along a line: the opening has no
	// area, so the strip is a channel (definition of the opening; Split's
	// documented convention).
	t.Run("exactly 2ρ", func(t *testing.T) {
		z, err := Split(context.Background(), geom.Shape{{Outer: geom.RectRing(0, 0, 60, 2*rho)}}, rho, tol, SplitOptions{})
		if err != nil {
			t.Fatal(err)
		}
		narrowCheck(t, z, 2*rho, 60, tol)
	})
	t.Run("just under", func(t *testing.T) {
		w := 2*rho - 20*tol
		z, err := Split(context.Background(), geom.Shape{{Outer: geom.RectRing(0, 0, 60, w)}}, rho, tol, SplitOptions{})
		if err != nil {
			t.Fatal(err)
		}
		narrowCheck(t, z, w, 60, tol)
	})
	t.Run("just over", func(t *testing.T) {
		w := 2*rho + 20*tol
		z, err := Split(context.Background(), geom.Shape{{Outer: geom.RectRing(0, 0, 60, w)}}, rho, tol, SplitOptions{})
		if err != nil {
			t.Fatal(err)
		}
		// The disk now rolls along the strip: one bay, and the corner cusps
		// (reach ρ(√2 − 1) plus a little) are slivers.
		if len(z.Bays) != 1 || len(z.Channels) != 0 {
			t.Fatalf("got %d bays and %d channels, want 1 and 0", len(z.Bays), len(z.Channels))
		}
	})
}

func TestSplitDeadEndSlot(t *testing.T) {
	const rho, tol = 5.0, 1e-3
	// A 30×30 square with a 4-wide, 20-long slot leaving its right side
	// at mid-height.
	c := geom.Shape{{Outer: ringXY(0, 0, 30, 0, 30, 13, 50, 13, 50, 17, 30, 17, 30, 30, 0, 30)}}
	z, err := Split(context.Background(), c, rho, tol, SplitOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(z.Bays) != 1 || len(z.Channels) != 1 {
		t.Fatalf("got %d bays and %d channels, want 1 and 1", len(z.Bays), len(z.Channels))
	}
	ch := z.Channels[0]
	if len(ch.Ends) != 1 || ch.Ends[0].Bay != 0 {
		t.Fatalf("ends %+v, want one, into bay 0", ch.Ends)
	}
	// Worked by hand, as for the dumbbell: the cap at the mouth is
	// ρ − √(ρ² − 2²) deep; the inward offsets collapse onto y = 15 up to
	// x = 50 − 2, with corner branches beyond.
	capDepth := rho - math.Sqrt(rho*rho-4)
	if p := ch.Spine[0]; p.Dist(geom.Pt(30+capDepth, 15)) > 5*tol {
		t.Errorf("spine starts at %v, want (%.4f, 15)", p, 30+capDepth)
	}
	if math.Abs(ch.Width-4) > 2*tol {
		t.Errorf("width %.5f, want 4", ch.Width)
	}
	var maxX float64
	for i, p := range ch.Spine {
		maxX = math.Max(maxX, p.X)
		if p.X <= 48 && math.Abs(p.Y-15) > 2*tol {
			t.Errorf("spine point %d at %v is off y = 15", i, p)
		}
	}
	if maxX < 48-2*tol {
		t.Errorf("spine stops at x = %.4f, want at least 48", maxX)
	}
}

func TestSplitCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := Split(ctx, dumbbell(40, 6, 30), 5, 0, SplitOptions{})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
}

func TestSplitBadInput(t *testing.T) {
	c := geom.Shape{{Outer: geom.RectRing(0, 0, 10, 10)}}
	for _, rho := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		if _, err := Split(context.Background(), c, rho, 0, SplitOptions{}); err == nil {
			t.Errorf("rho %v: no error", rho)
		}
	}
	if _, err := Split(context.Background(), c, 1, math.NaN(), SplitOptions{}); err == nil {
		t.Error("NaN tolerance: no error")
	}
	z, err := Split(context.Background(), nil, 1, 0, SplitOptions{})
	if err != nil || len(z.Bays)+len(z.Channels)+len(z.Slivers) != 0 {
		t.Errorf("empty domain: %+v, %v; want nothing and no error", z, err)
	}
}

func TestSplitDeterministic(t *testing.T) {
	c := dumbbell(40, 6, 30)
	a, err := Split(context.Background(), c, 5, 0, SplitOptions{})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Split(context.Background(), c, 5, 0, SplitOptions{})
	if len(a.Channels) != len(b.Channels) || len(a.Channels[0].Spine) != len(b.Channels[0].Spine) {
		t.Fatal("second run differs")
	}
	for i := range a.Channels[0].Spine {
		if a.Channels[0].Spine[i] != b.Channels[0].Spine[i] {
			t.Fatalf("spine point %d differs: %v vs %v", i, a.Channels[0].Spine[i], b.Channels[0].Spine[i])
		}
	}
}
