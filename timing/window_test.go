package timing

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"
)

// spiralProgram is an invented polyline spiral with n segments of about
// 1 mm, turning 5° per segment, with a rapid retract every 2000 segments.
func spiralProgram(n int) string {
	var b strings.Builder
	b.WriteString("G21 G90\nG1 F3000\n")
	x, y, h := 0.0, 0.0, 0.0
	for i := 1; i <= n; i++ {
		h += 5 * math.Pi / 180 * (1 + 0.3*math.Sin(float64(i)/37))
		step := 0.6 + 0.5*math.Abs(math.Sin(float64(i)/11))
		x += step * math.Cos(h)
		y += step * math.Sin(h)
		fmt.Fprintf(&b, "G1 X%.4f Y%.4f\n", x, y)
		if i%2000 == 0 {
			fmt.Fprintf(&b, "G0 Z5\nG0 Z0\n")
		}
	}
	return b.String()
}

func TestWindowEqualsWholeProgram(t *testing.T) {
	// The backward pass from an assumed stop at the window's end is exact
	// for every segment before a junction whose speed is fixed by its own
	// limit (the speed can only be clipped lower by the junction, whatever
	// follows). Planning in windows of 64 must then equal planning the
	// whole program at once, bit for bit (design notes §6, two passes).
	prog := spiralProgram(20000)
	m := testMachine()
	whole := estimate(t, prog, m, Options{Window: 1 << 20})
	small := estimate(t, prog, m, Options{Window: 64})
	if small.WindowLimited != 0 || whole.WindowLimited != 0 {
		t.Fatalf("window limited: small %d, whole %d", small.WindowLimited, whole.WindowLimited)
	}
	if small.TotalS != whole.TotalS || small.FeedS != whole.FeedS {
		t.Errorf("window 64: %.12f s, whole program: %.12f s", small.TotalS, whole.TotalS)
	}
	// The jerk model brings the acceleration back to zero at every
	// junction, so it gains speed slowly over short segments: from rest to
	// 50 mm/s over 0.6 mm segments takes about 4·v³/(3·j·L²) ≈ 90 of them
	// at j = 5000 mm/s³ (small speed steps, Δv ≈ j·L²/(4·v²), worked by
	// hand). A window of 1024 covers that.
	m.Jerk = Axes{5000, 5000, 5000}
	wj := estimate(t, prog, m, Options{Window: 1 << 20, Model: ModelJerk})
	sj := estimate(t, prog, m, Options{Window: 1024, Model: ModelJerk})
	if sj.TotalS != wj.TotalS || sj.WindowLimited != 0 {
		t.Errorf("jerk, window 1024: %.12f s (%d limited), whole program: %.12f s", sj.TotalS, sj.WindowLimited, wj.TotalS)
	}
}

func TestShortWindowIsConservative(t *testing.T) {
	// 1000 collinear moves of 0.01 mm at 50 mm/s: braking from 50 mm/s
	// needs v²/(2a) = 1.25 mm, longer than a 16-segment window holds, so
	// the window must report conservative blocks and a time no shorter than
	// the exact one, t = L/v + v/a = 0.2 + 0.05 s (worked by hand).
	var b strings.Builder
	b.WriteString("G1 F3000\n")
	for i := 1; i <= 1000; i++ {
		fmt.Fprintf(&b, "X%.2f\n", float64(i)*0.01)
	}
	m := testMachine()
	whole := estimate(t, b.String(), m, Options{Window: 4096})
	near(t, "whole", whole.TotalS, 10.0/50+50.0/1000, 1e-9)
	small := estimate(t, b.String(), m, Options{Window: 16})
	if small.WindowLimited == 0 {
		t.Errorf("window 16 reports no conservative blocks")
	}
	if small.TotalS < whole.TotalS-1e-12 {
		t.Errorf("window 16: %.6f s is faster than the exact %.6f s", small.TotalS, whole.TotalS)
	}
}

func TestEstimateInMemory(t *testing.T) {
	// the in-memory API on the square of TestSquareCorners must agree with
	// the G-code route (same model, same input)
	p := [][3]float64{{0, 0, 0}, {50, 0, 0}, {50, 50, 0}, {0, 50, 0}, {0, 0, 0}}
	var blocks []Block
	for i := 0; i < 4; i++ {
		blocks = append(blocks, Line(p[i], p[i+1], 3000))
	}
	blocks = append(blocks, Dwell(1), Rapid(p[4], [3]float64{0, 0, 5}),
		Arc([3]float64{0, 0, 5}, [3]float64{0, 0, 5}, [2]float64{-4, 0}, true, 6000))
	mem, err := Estimate(context.Background(), blocks, testMachine(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	txt := estimate(t, "G1 X50 F3000\nY50\nX0\nY0\nG4 P1\nG0 Z5\nG2 X0 Y0 I-4 J0 F6000\n", testMachine(), Options{})
	if mem.TotalS != txt.TotalS {
		t.Errorf("in memory %.12f s, from text %.12f s", mem.TotalS, txt.TotalS)
	}
	if _, err := Estimate(context.Background(), []Block{Line(p[0], p[1], 0)}, testMachine(), Options{}); err == nil {
		t.Errorf("a feed move with F = 0 was accepted")
	}
	if _, err := Estimate(context.Background(), []Block{Line(p[0], [3]float64{math.NaN(), 0, 0}, 100)}, testMachine(), Options{}); err == nil {
		t.Errorf("a NaN coordinate was accepted")
	}
}

func TestCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := EstimateProgram(ctx, strings.NewReader(spiralProgram(10)), testMachine(), Options{})
	if err != context.Canceled {
		t.Errorf("err = %v, want context.Canceled", err)
	}
}
