package timing

import (
	"context"
	"math"
	"strings"
	"testing"
)

// testMachine has round numbers so that hand calculations stay short:
// feed cap 100 mm/s, rapid cap 200 mm/s, acceleration 1000 mm/s² on every
// axis, corner tolerance 0.01 mm.
func testMachine() Machine {
	return Machine{
		Name:            "test",
		MaxFeed:         Axes{6000, 6000, 6000},
		Rapid:           Axes{12000, 12000, 12000},
		Accel:           Axes{1000, 1000, 1000},
		CornerTolerance: 0.01,
	}
}

func estimate(t *testing.T, prog string, m Machine, opt Options) Report {
	t.Helper()
	r, err := EstimateProgram(context.Background(), strings.NewReader(prog), m, opt)
	if err != nil {
		t.Fatalf("EstimateProgram: %v", err)
	}
	return r
}

func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.Abs(got-want) > tol {
		t.Errorf("%s = %.9g, want %.9g (±%g)", what, got, want, tol)
	}
}

func TestLongLine(t *testing.T) {
	// trapezoidal kinematics, worked by hand: a move from rest to rest that
	// cruises at v takes t = L/v + v/a. L = 100 mm, v = 3000 mm/min =
	// 50 mm/s, a = 1000 mm/s²: t = 2 + 0.05 = 2.05 s.
	r := estimate(t, "G1 X100 F3000\n", testMachine(), Options{})
	near(t, "total", r.TotalS, 2.05, 1e-12)
	near(t, "feed", r.FeedS, 2.05, 1e-12)
	// the naive sum is L/F = 2 s, so 0.05 s are lost to acceleration
	near(t, "naive", r.NaiveS, 2.0, 1e-12)
	near(t, "accel loss", r.AccelLossS, 0.05, 1e-12)
	if r.Blocks != 1 {
		t.Errorf("blocks = %d, want 1", r.Blocks)
	}
}

func TestShortLineNeverCruises(t *testing.T) {
	// trapezoidal kinematics, worked by hand: reaching 100 mm/s needs
	// v²/a = 10 mm of accelerating and braking, more than L = 1 mm, so the
	// profile is a triangle: t = 2·sqrt(L/a) = 2·sqrt(0.001) s.
	r := estimate(t, "G1 X1 F6000\n", testMachine(), Options{})
	near(t, "total", r.TotalS, 2*math.Sqrt(1.0/1000), 1e-12)
}

func TestAxisFeedCap(t *testing.T) {
	// design notes §6: the feed cap is max_feed_i/|u_i|; F 9000 mm/min is
	// over the 6000 mm/min cap, so the move runs at 100 mm/s:
	// t = L/v + v/a = 200/100 + 100/1000 = 2.1 s (worked by hand).
	r := estimate(t, "G1 X200 F9000\n", testMachine(), Options{})
	near(t, "total", r.TotalS, 2.1, 1e-12)
}

func TestSquareCorners(t *testing.T) {
	// A 50 mm square at 50 mm/s with three interior 90° corners; the
	// program starts and ends at rest. Junction rule of design notes §6,
	// worked by hand: s = cos(α/2), R_b = tol·s/(1−s), v_j = sqrt(a·R_b).
	const (
		L   = 50.0
		v   = 50.0
		a   = 1000.0
		tol = 0.01
	)
	s := math.Cos(math.Pi / 4)
	rb := tol * s / (1 - s)
	vj := math.Sqrt(a * rb) // about 4.91 mm/s, below the 50 mm/s cap
	// trapezoidal kinematics, worked by hand: a segment entered at v0 and
	// left at v1 that cruises at v takes L/v + ((v−v0)² + (v−v1)²)/(2·a·v).
	seg := func(v0, v1 float64) float64 { return L/v + ((v-v0)*(v-v0)+(v-v1)*(v-v1))/(2*a*v) }
	want := seg(0, vj) + seg(vj, vj) + seg(vj, vj) + seg(vj, 0)
	prog := "G1 X50 F3000\nY50\nX0\nY0\n"
	var blocks []BlockTime
	r := estimate(t, prog, testMachine(), Options{OnBlock: func(b BlockTime) { blocks = append(blocks, b) }})
	near(t, "total", r.TotalS, want, 1e-9)
	if len(blocks) != 4 {
		t.Fatalf("got %d block times, want 4", len(blocks))
	}
	for i, b := range blocks[:3] {
		near(t, "corner speed", b.Exit, vj, 1e-9)
		if b.Line != i+1 {
			t.Errorf("block %d on line %d, want %d", i, b.Line, i+1)
		}
	}
}

func TestStraightJunctionKeepsSpeed(t *testing.T) {
	// design notes §6: straight on, the junction speed is the smaller cap.
	// Two collinear 50 mm moves at 50 mm/s time like one 100 mm move:
	// t = L/v + v/a = 2.05 s (trapezoidal kinematics, worked by hand).
	r := estimate(t, "G1 X50 F3000\nX100\n", testMachine(), Options{})
	near(t, "total", r.TotalS, 2.05, 1e-12)
}

func TestReversalStops(t *testing.T) {
	// design notes §6: α = 180° gives s = 0, R_b = 0, v_j = 0; two
	// rest-to-rest moves, each L/v + v/a = 1 + 0.05 s (worked by hand).
	r := estimate(t, "G1 X50 F3000\nX0\n", testMachine(), Options{})
	near(t, "total", r.TotalS, 2.1, 1e-12)
}

func TestFullCircleArcCap(t *testing.T) {
	// design notes §6: arcs obey v <= sqrt(a_xy·R). R = 4 mm, a = 1000
	// mm/s²: cap sqrt(4000) = 63.25 mm/s, below F = 100 mm/s. A full
	// circle (end = start, I J form) from rest to rest: L = 2π·4 mm,
	// t = L/v + v/a (trapezoidal kinematics, worked by hand).
	prog := "G0 X4\nG2 X4 Y0 I-4 J0 F6000\n"
	var circle BlockTime
	estimate(t, prog, testMachine(), Options{OnBlock: func(b BlockTime) {
		if b.Kind == KindArc {
			circle = b
		}
	}})
	v := math.Sqrt(1000 * 4.0)
	L := 2 * math.Pi * 4
	near(t, "circle length", circle.Length, L, 1e-9)
	near(t, "circle peak", circle.Peak, v, 1e-9)
	near(t, "circle time", circle.Seconds, L/v+v/1000, 1e-9)
}

func TestHelixAccel(t *testing.T) {
	// design notes §6: a helical arc accelerates at min(a_xy,
	// accel_z·L/|dz|). One turn of R = 4 mm dropping 2 mm with accel_z =
	// 50 mm/s²: a = min(1000, 50·L/2). Speed cap sqrt(a_xy·R). Rest to
	// rest, trapezoidal kinematics worked by hand: t = L/v + v/a.
	m := testMachine()
	m.Accel.Z = 50
	prog := "G0 X4\nG3 X4 Y0 Z-2 I-4 F6000\n"
	var helix BlockTime
	estimate(t, prog, m, Options{OnBlock: func(b BlockTime) {
		if b.Kind == KindArc {
			helix = b
		}
	}})
	L := math.Hypot(2*math.Pi*4, 2)
	a := math.Min(1000, 50*L/2)
	v := math.Sqrt(1000 * 4.0)
	near(t, "helix time", helix.Seconds, L/v+v/a, 1e-9)
}

func TestRapidToFeedStops(t *testing.T) {
	// design notes §6: the change from rapid to feed is a stop. Rapid:
	// L = 100 mm at 200 mm/s, t = 0.5 + 0.2 s; feed: 100 mm at 50 mm/s,
	// t = 2 + 0.05 s (trapezoidal kinematics, worked by hand).
	r := estimate(t, "G0 X100\nG1 X200 F3000\n", testMachine(), Options{})
	near(t, "rapid", r.RapidS, 0.7, 1e-12)
	near(t, "feed", r.FeedS, 2.05, 1e-12)
	near(t, "total", r.TotalS, 2.75, 1e-12)
}

func TestDwell(t *testing.T) {
	// design notes §6: G4 stops the motion and adds P seconds. Two
	// rest-to-rest moves of 2.05 s (L/v + v/a, worked by hand) and 1.5 s.
	r := estimate(t, "G1 X100 F3000\nG4 P1.5\nG1 X200\n", testMachine(), Options{})
	near(t, "dwell", r.DwellS, 1.5, 0)
	near(t, "total", r.TotalS, 2.05+1.5+2.05, 1e-12)
}

func TestStopsAtM0M1M6(t *testing.T) {
	// design notes §6: M0, M1 and M6 are stops; each collinear 50 mm move
	// then runs rest to rest, 1 + 0.05 s (worked by hand), plus the 8 s
	// tool change.
	m := testMachine()
	m.ToolChangeS = 8
	r := estimate(t, "G1 X50 F3000\nM0\nX100\nM1\nX150\nT2 M6\nX200\n", m, Options{})
	near(t, "total", r.TotalS, 4*1.05+8, 1e-12)
	near(t, "tool change", r.ToolChangeS, 8, 0)
}

func TestInchUnits(t *testing.T) {
	// G20: 1 inch = 25.4 mm (ISO 6983-1 / NIST RS274NGC). X1 at F60 in/min
	// is L = 25.4 mm at 25.4 mm/s: t = L/v + v/a = 1 + 0.0254 s
	// (trapezoidal kinematics, worked by hand).
	r := estimate(t, "G20 G1 X1 F60\n", testMachine(), Options{})
	near(t, "total", r.TotalS, 1.0254, 1e-12)
	near(t, "length", r.FeedLength, 25.4, 1e-12)
}

func TestDiagonalAxisLimits(t *testing.T) {
	// design notes §6: the caps are per axis over |u_i|. A move along
	// (3, 4, 0)/5 on a machine with x limited to 30 mm/s and 300 mm/s²:
	// v = min(100, 30/0.6, 100/0.8) = 50 mm/s, a = min(300/0.6, 1000/0.8)
	// = 500 mm/s². L = 50 mm: t = 1 + 0.1 s (worked by hand).
	m := testMachine()
	m.MaxFeed.X = 1800
	m.Accel.X = 300
	r := estimate(t, "G1 X30 Y40 F6000\n", m, Options{})
	near(t, "total", r.TotalS, 1.1, 1e-12)
}

func TestOperations(t *testing.T) {
	// the comment convention of OpComment; times worked by hand as in
	// TestRapidToFeedStops
	prog := "G0 X100\n" + OpComment("rough") + "\nG1 X200 F3000\n" + OpComment("finish") + "\nG4 P2\n"
	r := estimate(t, prog, testMachine(), Options{})
	if len(r.Operations) != 3 {
		t.Fatalf("operations = %+v", r.Operations)
	}
	names := []string{"", "rough", "finish"}
	totals := []float64{0.7, 2.05, 2}
	for i, o := range r.Operations {
		if o.Name != names[i] {
			t.Errorf("operation %d is %q, want %q", i, o.Name, names[i])
		}
		near(t, "operation "+o.Name, o.TotalS, totals[i], 1e-12)
	}
}

func TestJerkLongLine(t *testing.T) {
	// Jerk-limited acceleration from rest to v with a reached (v >= a²/j):
	// each speed change lasts v/a + a/j at a mean speed v/2, so a long move
	// takes t = L/v + v/a + a/j (Erkorkmaz & Altintas 2001, from memory;
	// worked by hand). v = 50, a = 1000, j = 50000: 2 + 0.05 + 0.02 s.
	m := testMachine()
	m.Jerk = Axes{50000, 50000, 50000}
	r := estimate(t, "G1 X100 F3000\n", m, Options{Model: ModelJerk})
	near(t, "total", r.TotalS, 2.07, 1e-9)
	if r.Model != "jerk" {
		t.Errorf("model = %q", r.Model)
	}
}

// a mixed program: corners, arcs, short moves, rapids
const mixedProgram = `G21 G90 G17
G0 Z5
G0 X10 Y10
G1 Z-1 F300
G1 X40 F2400
G1 X40.5 Y10.2
G1 X41 Y10.8
G2 X51 Y20.8 I0 J10
G1 Y40
G3 X41 Y50 I-10 J0
G1 X10 Y50
G1 X10 Y10
G0 Z5
`

func TestJerkConvergesToR1(t *testing.T) {
	// Erkorkmaz & Altintas 2001 (from memory): as jerk grows the S-curve
	// tends to the constant-acceleration profile; low jerk takes longer.
	m := testMachine()
	r1 := estimate(t, mixedProgram, m, Options{})
	prev := math.Inf(1)
	for _, j := range []float64{200, 2e3, 2e4, 2e5, 2e6, 2e8} {
		m.Jerk = Axes{j, j, j}
		rj := estimate(t, mixedProgram, m, Options{Model: ModelJerk})
		if rj.TotalS < r1.TotalS-1e-9 {
			t.Errorf("jerk %g: %.6f s is faster than R1 %.6f s", j, rj.TotalS, r1.TotalS)
		}
		if rj.TotalS > prev+1e-9 {
			t.Errorf("jerk %g: %.6f s is slower than with lower jerk %.6f s", j, rj.TotalS, prev)
		}
		prev = rj.TotalS
		if j == 200 && rj.TotalS < r1.TotalS+0.1 {
			t.Errorf("jerk 200 mm/s³: %.4f s, expected clearly slower than R1 %.4f s", rj.TotalS, r1.TotalS)
		}
	}
	near(t, "jerk 2e8 vs R1", prev, r1.TotalS, 1e-4*r1.TotalS)
}

func TestJerkNeedsLimits(t *testing.T) {
	_, err := EstimateProgram(context.Background(), strings.NewReader("G1 X1 F100\n"), testMachine(), Options{Model: ModelJerk})
	if err == nil || !strings.Contains(err.Error(), "jerk") {
		t.Errorf("err = %v, want a message about jerk", err)
	}
}

func TestReachJerkSolvesItsEquation(t *testing.T) {
	// definition of the reachable speed: the S-curve from v to reachJerk(v)
	// covers exactly l (Erkorkmaz & Altintas 2001, from memory, for the
	// S-curve distance (v0+v1)/2·T)
	for _, c := range [][4]float64{{0, 1000, 50000, 100}, {0, 1000, 5000, 1}, {30, 1000, 5000, 1},
		{0, 150, 2000, 0.01}, {80, 500, 1e4, 0.05}, {10, 500, 1e9, 3}, {0, 1000, 1e8, 1e-6}} {
		v, a, j, l := c[0], c[1], c[2], c[3]
		v1 := reachJerk(v, a, j, l)
		near(t, "S-curve distance", sDist(v, v1, a, j), l, 1e-9*(1+l))
		if v1 > reachR1(v, a, l)+1e-9 {
			t.Errorf("reachJerk %v above the constant-acceleration reach %v", v1, reachR1(v, a, l))
		}
	}
}
