package engage

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"math"
	"sort"
	"strings"
	"testing"

	"github.com/chipband/chipband/geom"
)

// frontArc measures, independently of the package, the part of the front
// half (immersion ψ ∈ [0, π]) of a tool circle of radius r centred at c,
// feeding along +X, for which inMat holds. crit are the boundary angles of
// inMat found by exact intersections; the arcs between them are classified
// by their midpoints. In continuous motion only the front half meets uncut
// material, the rear half runs in what the tool has just cut.
func frontArc(r float64, c geom.Point, crit []float64, inMat func(geom.Point) bool) float64 {
	at := func(psi float64) geom.Point { // tooth at c + r(sin ψ·u + cos ψ·n), u = +X, n = +Y
		return geom.Pt(c.X+r*math.Sin(psi), c.Y+r*math.Cos(psi))
	}
	angles := []float64{0, math.Pi}
	for _, a := range crit {
		if a > 0 && a < math.Pi {
			angles = append(angles, a)
		}
	}
	sort.Float64s(angles)
	var phi float64
	for i := 0; i+1 < len(angles); i++ {
		if inMat(at((angles[i] + angles[i+1]) / 2)) {
			phi += angles[i+1] - angles[i]
		}
	}
	return phi
}

// lineCrossings returns the immersion angles where the circle of radius r
// about c crosses the line y = y0 (horizontal) or x = x0 (vertical),
// feeding along +X: a tooth sits at (c.X + r sin ψ, c.Y + r cos ψ).
func lineCrossings(r float64, c geom.Point, y0, x0 float64, horizontal bool) []float64 {
	if horizontal { // r cos ψ = y0 − c.Y
		q := (y0 - c.Y) / r
		if math.Abs(q) > 1 {
			return nil
		}
		return []float64{math.Acos(q)}
	}
	q := (x0 - c.X) / r // r sin ψ = x0 − c.X
	if math.Abs(q) > 1 {
		return nil
	}
	return []float64{math.Asin(q), math.Pi - math.Asin(q)}
}

// TestInsideCornerRise checks the engagement of a contour-parallel pass
// that turns a 90° inside corner of a pocket cut before: the pass runs
// along the top wall at radial width ae, then turns down along the right
// wall. At the corner the tool meets both walls.
func TestInsideCornerRise(t *testing.T) {
	r := tool10.Radius()
	for _, aeD := range []float64{0.075, 0.10} {
		ae := aeD * tool10.Diameter
		m, err := NewMaterial(rectShape(-30, -30, 130, 130), 0, MaterialOptions{})
		noErr(t, err)
		noErr(t, m.Remove(rectShape(0, 0, 100, 100), -10))
		off := 100 - (r - ae) // tool-centre offset line of both walls
		tp := &geom.Toolpath{Start: geom.Point3{X: 40, Y: off, Z: -5}, Moves: []geom.Move{
			line(geom.Feed, off, off, -5, 1000),
			line(geom.Feed, off, 40, -5, 1000),
		}}
		res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
		noErr(t, err)
		// Exact value by circle-line intersection (geometry): material is
		// y > 100 or x > 100, tool at the corner of its path.
		c := geom.Pt(off, off)
		crit := append(lineCrossings(r, c, 100, 0, true), lineCrossings(r, c, 0, 100, false)...)
		want := frontArc(r, c, crit, func(p geom.Point) bool { return p.Y > 100 || p.X > 100 })
		steadyWant := math.Acos(1 - ae/r) // straight wall, Altintas 2012, ch. 2 (from memory)
		var peak float64
		for _, s := range res.Profile {
			peak = math.Max(peak, s.Phi)
		}
		near(t, "corner φ°", peak*180/math.Pi, want*180/math.Pi, 0.5)
		if want < 2.5*steadyWant {
			t.Errorf("the exact corner value %.2f° should be well above the straight-wall value %.2f°", want*180/math.Pi, steadyWant*180/math.Pi)
		}
		for _, s := range steady(res.Profile, 0, 45, 80) {
			near(t, "wall φ° before the corner", s.PhiDeg(), steadyWant*180/math.Pi, 0.5)
		}
	}
}

// TestArcPassEngagement checks a second circular pass outside a first one:
// the material boundary is the outer edge of the first pass (a circle of
// radius R1 + r), and the exact engaged arc follows from circle-circle
// intersection (geometry).
func TestArcPassEngagement(t *testing.T) {
	r := tool10.Radius()
	o := geom.Pt(60, 60)
	const r1, z = 20.0, -5.0
	for _, aeD := range []float64{0.05, 0.10, 0.25} {
		ae := aeD * tool10.Diameter
		r2 := r1 + ae
		m, err := NewMaterial(rectShape(0, 0, 120, 120), 0, MaterialOptions{})
		noErr(t, err)
		start1 := geom.Point3{X: o.X + r1, Y: o.Y, Z: z}
		tp := &geom.Toolpath{Start: start1, Moves: []geom.Move{
			{Kind: geom.Feed, To: start1, Arc: true, Center: o, Feed: 1000}, // full circle CCW
			line(geom.Feed, o.X+r2, o.Y, z, 1000),
			{Kind: geom.Feed, To: geom.Point3{X: o.X, Y: o.Y + r2, Z: z}, Arc: true, Center: o, Feed: 1000},
		}}
		res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
		noErr(t, err)
		// Circle-circle intersection at the tool position angle 45°. On a
		// counter-clockwise arc the feed is u = (−sin a, cos a) and the left
		// normal n = (−cos a, −sin a) points to the centre O, so in the tool
		// frame (tool at the origin feeding +X, left normal +Y) O sits at
		// (0, r2).
		ang := math.Pi / 4
		oT := geom.Pt(0, r2)
		R := r1 + r // material where |p − O| > R
		// |(r sin ψ, r cos ψ) − (0, r2)|² = R² → r² + r2² − 2 r r2 cos ψ = R².
		q := (r*r + r2*r2 - R*R) / (2 * r * r2)
		crit := []float64{}
		if math.Abs(q) <= 1 {
			crit = append(crit, math.Acos(q))
		}
		want := frontArc(r, geom.Pt(0, 0), crit, func(p geom.Point) bool { return p.Dist(oT) > R })
		var got []float64
		for _, s := range res.Profile {
			if s.Move == 2 {
				a := math.Atan2(s.Y-o.Y, s.X-o.X)
				if math.Abs(a-ang) < 0.3 {
					got = append(got, s.PhiDeg())
				}
			}
		}
		if len(got) == 0 {
			t.Fatal("no samples near 45°")
		}
		for _, g := range got {
			near(t, "arc pass φ°", g, want*180/math.Pi, 0.5)
		}
	}
}

// TestChipThinning: at ae = 0.075·D the feed factor is
// 1/sin(arccos 0.85) = 1.898 (standard relation h_max = fz·sin φ).
func TestChipThinning(t *testing.T) {
	k, err := ChipThinningFactor(0.75, 10)
	noErr(t, err)
	near(t, "factor", k, 1.898, 0.001)
	k, err = ChipThinningFactor(5, 10) // ae = r: no thinning
	noErr(t, err)
	near(t, "factor at ae = r", k, 1, 1e-12)
	// vf = fz·k·z·n, capped by the machine (standard relation).
	vf, err := Feed(tool10, CutData{SpindleRPM: 10000, ChipLoad: 0.05}, 0.75)
	noErr(t, err)
	rel(t, "feed", vf, 0.05*1.898*3*10000, 0.001)
	vf, err = Feed(tool10, CutData{SpindleRPM: 10000, ChipLoad: 0.05, MaxFeed: 2000}, 0.75)
	noErr(t, err)
	near(t, "capped feed", vf, 2000, 1e-9)
}

// TestSpindleSpeed: n = 1000·vc/(π·D) (handbook relation).
func TestSpindleSpeed(t *testing.T) {
	n, err := SpindleSpeed(200, 10)
	noErr(t, err)
	near(t, "rpm", n, 6366.2, 0.1)
}

// TestMRRStraightCut: MRR = ae·ap·vf on a straight cut (handbook relation),
// and the Kienzle power P = kc(h_mean)·ae·ap·vf/(60·10⁶) kW (handbook
// relation for the mean cutting power), with h_mean after Altintas 2012,
// ch. 2 (from memory): fz·(cos φst − cos φex)/(φex − φst).
func TestMRRStraightCut(t *testing.T) {
	const ae, ap, vf, rpm = 0.75, 8.0, 1500.0, 8000.0
	m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
	noErr(t, err)
	y := 40 + tool10.Radius() - ae
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: y, Z: -ap}, Moves: []geom.Move{line(geom.Feed, 130, y, -ap, vf)}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{SpindleRPM: rpm})
	noErr(t, err)
	k := Kienzle{Kc11: 1800, Mc: 0.25}
	loads, err := Loads(res.Profile, tool10, rpm, k)
	noErr(t, err)
	fz := vf / (rpm * 3)
	phi := math.Acos(1 - ae/5)
	// Down milling on the right: φst = π − φ, φex = π.
	hMean := fz * (math.Cos(math.Pi-phi) - math.Cos(math.Pi)) / phi
	n := 0
	for i, s := range res.Profile {
		if s.X < 30 || s.X > 90 {
			continue
		}
		n++
		rel(t, "mrr", s.MRR, ae*ap*vf, 0.01)
		rel(t, "h_max", s.HMax, fz*math.Sin(phi), 0.01)
		rel(t, "h_mean", s.HMean, hMean, 0.01)
		rel(t, "power", loads[i].Power, k.Kc(hMean)*ae*ap*vf/60e6, 0.02)
		near(t, "entry angle", s.Entry, math.Pi-phi, 0.01)
		near(t, "exit angle", s.Exit, math.Pi, 0.01)
	}
	if n == 0 {
		t.Fatal("no samples")
	}
	// Removed volume over the pass: ae·ap·(length of the block) (geometry).
	rel(t, "volume", res.Summary.Volume, ae*ap*120, 0.01)
}

// TestKienzle: kc = kc1.1·h^−mc (Kienzle 1952).
func TestKienzle(t *testing.T) {
	k := Kienzle{Kc11: 1800, Mc: 0.25}
	near(t, "kc(1)", k.Kc(1), 1800, 1e-9)
	near(t, "kc(0.1)", k.Kc(0.1), 1800*math.Pow(10, 0.25), 1e-9)
	for _, w := range TypicalKienzle() {
		if err := w.Kienzle.Validate(); err != nil {
			t.Errorf("%s: %v", w.Name, err)
		}
		if !strings.Contains(w.Note, "from memory, verify with the tool maker") {
			t.Errorf("%s: note must carry the caution", w.Name)
		}
	}
	if _, err := LookupKienzle("unobtainium"); err == nil {
		t.Error("unknown material accepted")
	}
}

// TestRapidThroughStock: a rapid through stock is a safety violation
// (common practice: rapids only through air).
func TestRapidThroughStock(t *testing.T) {
	m, err := NewMaterial(rectShape(0, 0, 100, 60), 0, MaterialOptions{})
	noErr(t, err)
	tp := &geom.Toolpath{Start: geom.Point3{X: -20, Y: 30, Z: 10}, Moves: []geom.Move{
		line(geom.Rapid, -20, 30, -3, 0),
		line(geom.Rapid, 120, 30, -3, 0), // through the block
		line(geom.Rapid, 120, 30, 10, 0),
		line(geom.Rapid, -20, 30, 10, 0), // above it: fine
	}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
	noErr(t, err)
	v := res.Summary.RapidViolations
	if len(v) != 1 {
		t.Fatalf("got %d violations, want 1: %+v", len(v), v)
	}
	if v[0].Move != 1 {
		t.Errorf("violation in move %d, want 1", v[0].Move)
	}
	near(t, "violation x (tool edge reaches the block)", v[0].At.X, -5, 0.15)
	near(t, "violation depth", v[0].Depth, 3, 0.01)
}

// TestPlungeCounted: a vertical feed into fresh material is a plunge, and
// the whole periphery is in the cut (geometry).
func TestPlungeCounted(t *testing.T) {
	m, err := NewMaterial(rectShape(0, 0, 100, 60), 0, MaterialOptions{})
	noErr(t, err)
	tp := &geom.Toolpath{Start: geom.Point3{X: 50, Y: 30, Z: 5}, Moves: []geom.Move{
		line(geom.Feed, 50, 30, -5, 200),
		line(geom.Feed, 50, 30, 5, 1000),
		line(geom.Feed, 50, 30, -5, 200), // down the same hole: not into material
	}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
	noErr(t, err)
	if res.Summary.Plunges != 1 {
		t.Errorf("plunges = %d, want 1", res.Summary.Plunges)
	}
	for _, s := range res.Profile {
		if s.Move == 0 && s.Z < -0.5 {
			if s.Class != Plunge {
				t.Fatalf("class %v at z %.2f, want plunge", s.Class, s.Z)
			}
			near(t, "plunge φ°", s.PhiDeg(), 360, 0.5)
			// Bottom removal π r²·vz, up to cell quantisation (geometry).
			rel(t, "plunge mrr", s.MRR, math.Pi*25*200, 0.03)
		}
		if s.Move == 2 && s.Class != Air {
			t.Fatalf("second descent: class %v at z %.2f, want air", s.Class, s.Z)
		}
	}
}

// TestHelixIsEntry: a helix down into stock is an entry, not a plunge.
func TestHelixIsEntry(t *testing.T) {
	m, err := NewMaterial(rectShape(0, 0, 100, 60), 0, MaterialOptions{})
	noErr(t, err)
	c := geom.Pt(50, 30)
	tp := &geom.Toolpath{Start: geom.Point3{X: 54, Y: 30, Z: 0.5}}
	for z := -0.5; z >= -6.5; z -= 1 {
		tp.Moves = append(tp.Moves, geom.Move{Kind: geom.Entry, To: geom.Point3{X: 54, Y: 30, Z: z}, Arc: true, Center: c, Feed: 800})
	}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
	noErr(t, err)
	if res.Summary.Plunges != 0 {
		t.Errorf("plunges = %d, want 0", res.Summary.Plunges)
	}
	if res.Summary.EntryLength <= 0 || res.Summary.CutLength != 0 {
		t.Errorf("entry length %.2f, cut length %.2f: a helix is all entry", res.Summary.EntryLength, res.Summary.CutLength)
	}
}

// TestGougeAndUncut: a pass that reaches 0.5 mm into material that must
// remain is a 0.5 mm gouge; the material left in a target is its area less
// the swept slot (geometry).
func TestGougeAndUncut(t *testing.T) {
	m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
	noErr(t, err)
	y := -(20 - 5 + 0.5) // tool edge 0.5 mm into the keep block below y = −20
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: y, Z: -5}, Moves: []geom.Move{line(geom.Feed, 130, y, -5, 1000)}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{
		Keep:    rectShape(0, -40, 120, -20),
		Targets: []Target{{Name: "pocket", Region: rectShape(20, -20, 80, 20), Floor: -5}},
	})
	noErr(t, err)
	near(t, "gouge", res.Summary.MaxGouge, 0.5, 0.005)
	if len(res.Summary.Targets) != 1 {
		t.Fatal("no target residual")
	}
	// The slot clears y ∈ [y−5, y+5] ∩ [−20, 20] = [−20, −10.5] over 60 mm.
	want := 60*40 - 60*9.5
	rel(t, "uncut area", res.Summary.Targets[0].UncutArea, want, 0.02)
	near(t, "max above floor", res.Summary.Targets[0].MaxAbove, 5, 1e-6)
}

// TestInBandFigures: a pass at 7.5 % of D with band [0.05, 0.10] is all in
// band (design.md §7 check contract).
func TestInBandFigures(t *testing.T) {
	m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
	noErr(t, err)
	y := 40 + 5 - 0.75
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: y, Z: -5}, Moves: []geom.Move{line(geom.Feed, 130, y, -5, 1000)}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{Band: [2]float64{0.05, 0.10}})
	noErr(t, err)
	s := res.Summary
	// The engaged arc (down milling, ψ ∈ [π − φ, π]) spans x from the tool
	// centre to r·sin φ ahead of it. It is whole from centre x = 0 to
	// 120 − r·sin φ and partial over r·sin φ at either end; the tool cuts
	// from x = −r·sin φ to 120 (geometry).
	reach := 5 * math.Sin(math.Acos(1-0.75/5))
	cut := 120 + reach
	if s.InBandFraction < (cut-2*reach)/cut-0.002 || s.InBandFraction > 1 {
		t.Errorf("in band %.4f, want between %.4f and 1", s.InBandFraction, (cut-2*reach)/cut)
	}
	near(t, "above band", s.AboveBandFraction, 0, 1e-9)
	near(t, "max engagement", s.MaxEng, 0.075, 0.00075)
	near(t, "air fraction", s.AirFraction, (140-cut)/140, 0.002)
	var buf bytes.Buffer
	noErr(t, WriteSummaryJSON(&buf, s))
	var keys map[string]any
	noErr(t, json.Unmarshal(buf.Bytes(), &keys))
	for _, k := range []string{"max_engagement", "in_band_fraction", "rapid_violations", "plunges"} {
		if _, ok := keys[k]; !ok {
			t.Errorf("summary JSON lacks %q", k)
		}
	}
}

// TestScheduleFeeds: the scheduled feed of a straight pass at 7.5 % equals
// fz·1.898·z·n (standard chip-thinning relation).
func TestScheduleFeeds(t *testing.T) {
	m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
	noErr(t, err)
	y := 40 + 5 - 0.75
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: y, Z: -5}, Moves: []geom.Move{
		line(geom.Feed, 130, y, -5, 1000),
		line(geom.Feed, 130, y+20, -5, 1000), // air
	}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
	noErr(t, err)
	cd := CutData{SpindleRPM: 10000, ChipLoad: 0.04, MaxFeed: 5000, MinFeed: 100}
	feeds, err := ScheduleFeeds(tp, res.Profile, tool10, cd)
	noErr(t, err)
	rel(t, "scheduled feed", feeds[0], 0.04*1.898*3*10000, 0.01)
	near(t, "air move keeps its feed", feeds[1], 1000, 1e-9)
	tp2, err := WithFeeds(tp, feeds)
	noErr(t, err)
	near(t, "applied", tp2.Moves[0].Feed, feeds[0], 1e-9)
}

// TestFluteWear: a straight cut at ap = 5 mm works the first five 1 mm
// bands equally and leaves the rest idle (geometry of a straight cut).
func TestFluteWear(t *testing.T) {
	m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
	noErr(t, err)
	y := 40 + 5 - 1.0
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: y, Z: -5}, Moves: []geom.Move{line(geom.Feed, 130, y, -5, 1000)}}
	res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
	noErr(t, err)
	w, err := FluteWear(res.Profile, tool10, 1)
	noErr(t, err)
	if len(w) != 30 {
		t.Fatalf("%d bands, want 30", len(w))
	}
	for i, b := range w {
		if i < 5 {
			rel(t, "band volume", b.Volume, 1.0*1*120, 0.02)
			rel(t, "band contact", b.Contact, 120, 0.03)
		} else if b.Volume != 0 || b.Contact != 0 {
			t.Errorf("band %d works: %+v", i, b)
		}
	}
}

// TestExportDeterministic: the same profile gives the same bytes.
func TestExportDeterministic(t *testing.T) {
	run := func() (string, string) {
		m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
		noErr(t, err)
		tp := zigzagPath(120, 0.75, -5, 600)
		res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{SpindleRPM: 9000, Band: [2]float64{0.05, 0.1}})
		noErr(t, err)
		var c, j bytes.Buffer
		noErr(t, WriteCSV(&c, res.Profile))
		noErr(t, WriteJSON(&j, res))
		return c.String(), j.String()
	}
	c1, j1 := run()
	c2, j2 := run()
	if c1 != c2 || j1 != j2 {
		t.Error("export differs between identical runs")
	}
	if !strings.HasPrefix(c1, "s,x,y,z,move,class,phi_deg") {
		t.Errorf("CSV header: %q", c1[:40])
	}
	var v map[string]any
	noErr(t, json.Unmarshal([]byte(j1), &v))
}

// TestBadInput: bad input gets a clear error naming what is wrong, never a
// panic (project rule).
func TestBadInput(t *testing.T) {
	stock := rectShape(0, 0, 100, 60)
	okTP := &geom.Toolpath{Start: geom.Point3{X: 0, Y: 0, Z: 5}, Moves: []geom.Move{line(geom.Feed, 10, 0, 5, 100)}}
	cases := []struct {
		name, want string
		run        func() error
	}{
		{"negative diameter", "tool diameter must be positive, got -3", func() error {
			return Tool{Diameter: -3, FluteLength: 10, Flutes: 2}.Validate()
		}},
		{"zero flutes", "tool flutes must be at least 1, got 0", func() error {
			return Tool{Diameter: 6, FluteLength: 10, Flutes: 0}.Validate()
		}},
		{"NaN diameter", "tool diameter must be a finite number", func() error {
			return Tool{Diameter: math.NaN(), FluteLength: 10, Flutes: 2}.Validate()
		}},
		{"negative flute length", "tool flute length must be positive", func() error {
			return Tool{Diameter: 6, FluteLength: -1, Flutes: 2}.Validate()
		}},
		{"negative cell size", "cell size must be positive", func() error {
			_, err := NewMaterial(stock, 0, MaterialOptions{CellSize: -0.1})
			return err
		}},
		{"NaN in stock", "coordinates must be finite", func() error {
			_, err := NewMaterial(geom.Shape{{Outer: geom.Ring{geom.Pt(0, 0), geom.Pt(math.NaN(), 0), geom.Pt(1, 1)}}}, 0, MaterialOptions{})
			return err
		}},
		{"empty stock", "stock shape is empty", func() error {
			_, err := NewMaterial(nil, 0, MaterialOptions{})
			return err
		}},
		{"NaN top", "stock top must be a finite number", func() error {
			_, err := NewMaterial(stock, math.NaN(), MaterialOptions{})
			return err
		}},
		{"NaN in move", "move 0: end point must be finite", func() error {
			m, _ := NewMaterial(stock, 0, MaterialOptions{})
			_, err := Simulate(context.Background(), m, tool10, &geom.Toolpath{Moves: []geom.Move{line(geom.Feed, math.NaN(), 0, 0, 100)}}, SimOptions{})
			return err
		}},
		{"zero feed", "move 0 (feed): feed must be positive", func() error {
			m, _ := NewMaterial(stock, 0, MaterialOptions{})
			_, err := Simulate(context.Background(), m, tool10, &geom.Toolpath{Moves: []geom.Move{line(geom.Feed, 1, 0, 0, 0)}}, SimOptions{})
			return err
		}},
		{"bad arc", "arc end radius", func() error {
			m, _ := NewMaterial(stock, 0, MaterialOptions{})
			_, err := Simulate(context.Background(), m, tool10, &geom.Toolpath{Start: geom.Point3{X: 10}, Moves: []geom.Move{
				{Kind: geom.Feed, To: geom.Point3{X: 0, Y: 20}, Arc: true, Center: geom.Pt(0, 0), Feed: 100}}}, SimOptions{})
			return err
		}},
		{"bad tool in simulate", "tool flutes", func() error {
			m, _ := NewMaterial(stock, 0, MaterialOptions{})
			_, err := Simulate(context.Background(), m, Tool{Diameter: 6, FluteLength: 10}, okTP, SimOptions{})
			return err
		}},
		{"negative step", "sampling step must be positive", func() error {
			m, _ := NewMaterial(stock, 0, MaterialOptions{})
			_, err := Simulate(context.Background(), m, tool10, okTP, SimOptions{Step: -1})
			return err
		}},
		{"tiny step", "use a larger step", func() error {
			m, _ := NewMaterial(stock, 0, MaterialOptions{})
			_, err := Simulate(context.Background(), m, tool10, okTP, SimOptions{Step: 1e-9})
			return err
		}},
		{"bad band", "band must satisfy", func() error {
			m, _ := NewMaterial(stock, 0, MaterialOptions{})
			_, err := Simulate(context.Background(), m, tool10, okTP, SimOptions{Band: [2]float64{0.2, 0.1}})
			return err
		}},
		{"nil toolpath", "material and toolpath are required", func() error {
			m, _ := NewMaterial(stock, 0, MaterialOptions{})
			_, err := Simulate(context.Background(), m, tool10, nil, SimOptions{})
			return err
		}},
		{"bad chip load", "chip load must be positive", func() error {
			_, err := Feed(tool10, CutData{SpindleRPM: 1000, ChipLoad: math.NaN()}, 1)
			return err
		}},
		{"ae above D", "need 0 < ae ≤ D", func() error {
			_, err := ChipThinningFactor(12, 10)
			return err
		}},
		{"bad kienzle", "kc1.1 must be positive", func() error {
			_, err := Loads(nil, tool10, 1000, Kienzle{Kc11: -1, Mc: 0.2})
			return err
		}},
		{"bad wear band", "band height must be positive", func() error {
			_, err := FluteWear(nil, tool10, 0)
			return err
		}},
		{"bad spindle", "cutting speed and diameter must be positive", func() error {
			_, err := SpindleSpeed(-1, 10)
			return err
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.run()
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
}

// TestCellBudget: above the cell budget, a clear error that suggests a
// coarser resolution.
func TestCellBudget(t *testing.T) {
	_, err := NewMaterial(rectShape(0, 0, 3000, 2000), 0, MaterialOptions{CellSize: 0.05, MaxCells: 1_000_000})
	if !errors.Is(err, ErrCellBudget) || !strings.Contains(err.Error(), "coarser resolution") {
		t.Fatalf("error %v", err)
	}
}

// TestCancel: Simulate stops on cancellation.
func TestCancel(t *testing.T) {
	m, err := NewMaterial(rectShape(0, 0, 300, 200), 0, MaterialOptions{})
	noErr(t, err)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = Simulate(ctx, m, tool10, zigzagPath(300, 0.75, -5, 2000), SimOptions{})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
}

// TestMemoryOf300x200Level: the grid of a 300 × 200 mm level at the default
// resolution holds 16 bytes per cell (the model's layout).
func TestMemoryOf300x200Level(t *testing.T) {
	m, err := NewMaterial(rectShape(0, 0, 300, 200), 0, MaterialOptions{})
	noErr(t, err)
	nx, ny := m.Size()
	if m.Bytes() != nx*ny*16 || m.Bytes() > 30<<20 {
		t.Errorf("%d bytes for %d × %d cells", m.Bytes(), nx, ny)
	}
}

// TestSecondLevel: on a second step-down level the wall of the previous
// pass of that level, and the stock edge, bound the cut as on the first
// level: φ = arccos(1 − ae/r) (Altintas 2012, ch. 2, from memory) and ap is
// the step-down (geometry).
func TestSecondLevel(t *testing.T) {
	r := tool10.Radius()
	const ae, step = 0.75, 2.0
	want := math.Acos(1-ae/r) * 180 / math.Pi
	t.Run("beside previous pass", func(t *testing.T) {
		m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
		noErr(t, err)
		tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: 0, Z: 5}}
		for _, z := range []float64{-step, -2 * step} {
			tp.Moves = append(tp.Moves,
				line(geom.Rapid, -10, 0, z, 0), line(geom.Feed, 130, 0, z, 1000),
				line(geom.Rapid, 130, 0, 5, 0), line(geom.Rapid, -10, ae, 5, 0),
				line(geom.Rapid, -10, ae, z, 0), line(geom.Feed, 130, ae, z, 1000),
				line(geom.Rapid, 130, ae, 5, 0), line(geom.Rapid, -10, 0, 5, 0))
		}
		res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
		noErr(t, err)
		if n := len(res.Summary.RapidViolations); n != 0 {
			t.Fatalf("%d rapid violations: %+v", n, res.Summary.RapidViolations)
		}
		ss := steady(res.Profile, 13, 30, 90)
		if len(ss) == 0 {
			t.Fatal("no samples")
		}
		for _, s := range ss {
			near(t, "φ°", s.PhiDeg(), want, 0.5)
			rel(t, "ae", s.AE, ae, 0.01)
			near(t, "ap", s.AP, step, 0.01)
		}
	})
	t.Run("along stock edge", func(t *testing.T) {
		m, err := NewMaterial(rectShape(0, -40, 120, 40), 0, MaterialOptions{})
		noErr(t, err)
		y := 40 + r - ae
		tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: y, Z: -step}, Moves: []geom.Move{
			line(geom.Feed, 130, y, -step, 1000),
			line(geom.Feed, 130, y, -2*step, 1000),
			line(geom.Feed, -10, y, -2*step, 1000), // back the other way: up milling
		}}
		res, err := Simulate(context.Background(), m, tool10, tp, SimOptions{})
		noErr(t, err)
		for _, s := range steady(res.Profile, 2, 30, 90) {
			near(t, "φ°", s.PhiDeg(), want, 0.5)
			rel(t, "ae", s.AE, ae, 0.01)
			near(t, "ap", s.AP, step, 0.01)
		}
	})
}

// The two readings of the 1 mm moving average: MaxEng also counts a cutting
// run shorter than 1 mm after air over its own length, MaxEngFull only full
// 1 mm windows. A 2 mm run at ae/D 0.075, air, then a 0.4 mm run at 0.3
// and air again read 0.3 and 0.075 (the definitions, by arithmetic).
func TestMovingAverageReadings(t *testing.T) {
	s := &simulator{t: tool10}
	feed := func(n int, ae float64, class SampleClass) {
		for range n {
			s.account(&Sample{Class: class, Step: 0.1, AE: ae})
		}
	}
	feed(20, 0.75, Cut)
	feed(3, 0, Air)
	feed(4, 3, Cut)
	feed(3, 0, Air)
	s.finish()
	near(t, "max engagement (runs under 1 mm too)", s.sum.MaxEng, 0.3, 1e-9)
	near(t, "max engagement over full windows", s.sum.MaxEngFull, 0.075, 1e-9)
}
