package timing

import (
	"errors"
	"io"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

func readAll(t *testing.T, prog string) ([]Block, error) {
	t.Helper()
	r := NewReader(strings.NewReader(prog))
	var out []Block
	for {
		b, err := r.Next()
		if errors.Is(err, io.EOF) {
			return out, nil
		}
		if err != nil {
			return out, err
		}
		out = append(out, b)
	}
}

func mustRead(t *testing.T, prog string) []Block {
	t.Helper()
	bs, err := readAll(t, prog)
	if err != nil {
		t.Fatalf("read: %v", err)
	}
	return bs
}

func TestReaderModalState(t *testing.T) {
	// NIST RS274NGC v3 (NISTIR 6556): G0/G1 and F are modal, G91 makes
	// axis words incremental, words may be lower case, N is ignored, '%'
	// lines and comments are skipped.
	prog := "%\n(header)\nN10 g21 g90 ; units and mode\nG0 X10 Y5\nG1 Z-1 F200\nX20\nG91 Y5 Z1\n%\n"
	bs := mustRead(t, prog)
	want := []struct {
		k  Kind
		to [3]float64
		f  float64
		ln int
	}{
		{KindRapid, [3]float64{10, 5, 0}, 0, 4},
		{KindLine, [3]float64{10, 5, -1}, 200, 5},
		{KindLine, [3]float64{20, 5, -1}, 200, 6},
		{KindLine, [3]float64{20, 10, 0}, 200, 7},
	}
	if len(bs) != len(want) {
		t.Fatalf("got %d blocks: %+v", len(bs), bs)
	}
	for i, w := range want {
		b := bs[i]
		if b.Kind != w.k || b.To != w.to || b.Feed != w.f || b.Line != w.ln {
			t.Errorf("block %d = %v to %v F%v line %d, want %v to %v F%v line %d", i, b.Kind, b.To, b.Feed, b.Line, w.k, w.to, w.f, w.ln)
		}
	}
	if bs[1].From != bs[0].To {
		t.Errorf("block 1 starts at %v, want %v", bs[1].From, bs[0].To)
	}
}

func TestReaderArcs(t *testing.T) {
	// NIST RS274NGC v3 §2.5.2.1: I J are offsets from the start by default
	// (G91.1) and absolute under G90.1; R > 0 takes the short way, R < 0
	// the long way. Centres worked by hand.
	cases := []struct {
		prog string
		c    [2]float64
		cw   bool
	}{
		{"G0 X10\nG2 X0 Y10 I-10 J0 F100\n", [2]float64{0, 0}, true},
		{"G0 X10\nG90.1 G3 X0 Y10 I0 J0 F100\n", [2]float64{0, 0}, false},
		// chord (0,0)-(20,0), R 10: centre at the midpoint
		{"G3 X20 Y0 R10 F100\n", [2]float64{10, 0}, false},
		// chord (0,0)-(10,10), |R| 10: centres (0,10) and (10,0). Around
		// (0,10) the start is at -90° and the end at 0°: counter-clockwise
		// that is the 90° short way, clockwise the 270° long way.
		{"G3 X10 Y10 R10 F100\n", [2]float64{0, 10}, false},
		{"G3 X10 Y10 R-10 F100\n", [2]float64{10, 0}, false},
		{"G2 X10 Y10 R10 F100\n", [2]float64{10, 0}, true},
		{"G2 X10 Y10 R-10 F100\n", [2]float64{0, 10}, true},
		{"G20 G2 X1 Y1 R1 F10\n", [2]float64{25.4, 0}, true},
	}
	for _, c := range cases {
		bs := mustRead(t, c.prog)
		b := bs[len(bs)-1]
		if b.Kind != KindArc || b.CW != c.cw || math.Abs(b.Center[0]-c.c[0]) > 1e-9 || math.Abs(b.Center[1]-c.c[1]) > 1e-9 {
			t.Errorf("%q: kind %v cw %v centre %v, want arc cw %v centre %v", c.prog, b.Kind, b.CW, b.Center, c.cw, c.c)
		}
	}
}

func TestReaderOrderAndOps(t *testing.T) {
	// NIST RS274NGC v3 Table 8: within a line, M6 and M3 run before dwell
	// and motion, M0/M2/M30 after; lines after M30 are not read.
	prog := OpComment("rough (outer)") + "\nT3 M6 S9000 M3 G1 X5 F100 M0\nM30\nG18\n"
	bs := mustRead(t, prog)
	kinds := []Kind{KindToolChange, KindSpindleStart, KindLine, KindStop, KindEnd}
	if len(bs) != len(kinds) {
		t.Fatalf("got %d blocks, want %d: %+v", len(bs), len(kinds), bs)
	}
	for i, k := range kinds {
		if bs[i].Kind != k {
			t.Errorf("block %d is %v, want %v", i, bs[i].Kind, k)
		}
		if bs[i].Op != "rough _outer_" {
			t.Errorf("block %d op %q", i, bs[i].Op)
		}
	}
	if bs[0].Tool != 3 || bs[1].Spindle != 9000 {
		t.Errorf("tool %d spindle %v", bs[0].Tool, bs[1].Spindle)
	}
}

func TestReaderFullCircleAndDwell(t *testing.T) {
	bs := mustRead(t, "G0 X5\nG2 I-5 F100\nG4 P0.25\n")
	if bs[1].Kind != KindArc || bs[1].To != bs[1].From {
		t.Errorf("full circle: %+v", bs[1])
	}
	if bs[2].Kind != KindDwell || bs[2].Dwell != 0.25 {
		t.Errorf("dwell: %+v", bs[2])
	}
}

func TestReaderErrors(t *testing.T) {
	// each error must name its line (DEVELOPERS.md: bad input gets a clear
	// error naming where)
	cases := []struct {
		prog string
		line int
		msg  string
	}{
		{"G21\nG18 G2 X1 Z1 I1 F10\n", 2, "plane"},
		{"G19\n", 1, "plane"},
		{"G1 X1 F1\nG41 D1\n", 2, "cutter radius compensation"},
		{"G81 X1 Y1 Z-1 R1\n", 1, "canned cycle"},
		{"G93 G1 X1 F1\n", 1, "inverse time"},
		{"G1 X10\n", 1, "feed"},
		{"X10\n", 1, "motion mode"},
		{"(\n", 1, "not closed"},
		{"G1 X1 F10 (a (b) c)\n", 1, "nested"},
		{"\n\nG1 X# F10\n", 3, "needs a number"},
		// a float64 holds at most ±1.8e308 (IEEE 754 binary64)
		{"\nG1 F10 X1" + strings.Repeat("0", 400) + "\n", 2, "out of range"},
		{"G1 X+ F10\n", 1, "needs a number"},
		{"G1 X1 X2 F10\n", 1, "twice"},
		{"G0 A10\n", 1, "axis A"},
		{"G1 X1 F10\nG2 X5 Y5 I1 J0\n", 2, "radius"},
		{"G2 X40 R10 F10\n", 1, "smaller than half"},
		{"G2 X0 Y0 R10 F10\n", 1, "full circle"},
		{"G0 X1 G1 Y1\n", 1, "two motion codes"},
		{"G4\n", 1, "P"},
		{"G1 X1 R2 F10\n", 1, "without G2 or G3"},
		{"G2 X1 Y1 F10\n", 1, "I and J or R"},
		{"G1.5\n", 1, "not supported"},
		{"G28\n", 1, "not supported"},
		{"M98 P100\n", 1, "subprogram"},
		{"G1 X1 F10 $\n", 1, "unexpected character"},
		{"G1 X1 F10\n" + strings.Repeat("(", 1) + strings.Repeat("x", MaxLineBytes+10) + ")\n", 2, "longer than"},
	}
	for _, c := range cases {
		_, err := readAll(t, c.prog)
		var le *LineError
		if !errors.As(err, &le) {
			t.Errorf("%.40q: err = %v, want a *LineError", c.prog, err)
			continue
		}
		if le.Line != c.line || !strings.Contains(err.Error(), c.msg) || !strings.HasPrefix(err.Error(), "line "+strconv.Itoa(c.line)+": ") {
			t.Errorf("%.40q: err = %q, want line %d and %q", c.prog, err, c.line, c.msg)
		}
	}
}

func TestOpComment(t *testing.T) {
	if got := OpComment("bay 1"); got != "(op: bay 1)" {
		t.Errorf("OpComment = %q", got)
	}
	bs := mustRead(t, "(op:  bay 1 )\nG0 X1\n( op: channel )\nG0 X2\n(op2: x)\nG0 X3\n")
	for i, want := range []string{"bay 1", "channel", "channel"} {
		if bs[i].Op != want {
			t.Errorf("block %d op %q, want %q", i, bs[i].Op, want)
		}
	}
}

func TestParseNumberMatchesStrconv(t *testing.T) {
	// strconv.ParseFloat is the reference for correctly rounded decimal
	// conversion (Go standard library).
	fixed := []string{"0", "-0", "1", "+1", "1.", ".5", "-.5", "12.345", "0.1", "0.3",
		"123456789.123456789", "9007199254740993", "0.000000000000000000000001",
		"99999999999999999999.9", "1.7976931348623157", "3.14159265358979323846264",
		"00012.5000", "25.4", "-0.0001"}
	rng := rand.New(rand.NewPCG(1, 2))
	for range 200000 {
		var b []byte
		if rng.IntN(4) == 0 {
			b = append(b, '-')
		}
		for range rng.IntN(8) {
			b = append(b, byte('0'+rng.IntN(10)))
		}
		if rng.IntN(3) > 0 {
			b = append(b, '.')
			for range rng.IntN(12) {
				b = append(b, byte('0'+rng.IntN(10)))
			}
		}
		fixed = append(fixed, string(b))
	}
	for _, s := range fixed {
		got, n, ok := parseNumber([]byte(s + "X"))
		want, err := strconv.ParseFloat(s, 64)
		if err != nil {
			if ok {
				t.Errorf("%q: parsed %v, strconv says %v", s, got, err)
			}
			continue
		}
		if !ok || n != len(s) || math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("%q: got %v (n=%d ok=%v), want %v", s, got, n, ok, want)
		}
	}
}
