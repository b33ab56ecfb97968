package timing

import (
	"errors"
	"io"
	"math"
	"strconv"
	"strings"
	"testing"
)

// FuzzReader checks that no input makes the reader or the planner panic or
// hang, that every error is a *LineError naming a line of the input, and
// that accepted programs get a finite, non-negative time.
func FuzzReader(f *testing.F) {
	f.Add("G21 G90 G17\nG0 X10 Y10 Z5\nG1 Z-1 F300\nG2 X20 Y20 I10 J0\nG3 X30 Y10 R10\nM30\n")
	f.Add("G20 G91 G1 X1 F10\nG4 P1\n(op: a)\nG0 Z1 ; up\n")
	f.Fuzz(func(t *testing.T, prog string) {
		lines := strings.Count(prog, "\n") + 1
		r := NewReader(strings.NewReader(prog))
		p, err := NewPlanner(testMachine(), Options{Window: 16})
		if err != nil {
			t.Fatal(err)
		}
		for n := 0; ; n++ {
			if n > 8*len(prog)+8 {
				t.Fatalf("more blocks than the input can hold")
			}
			b, err := r.Next()
			if errors.Is(err, io.EOF) {
				break
			}
			if err != nil {
				var le *LineError
				if !errors.As(err, &le) {
					t.Fatalf("error %v is not a *LineError", err)
				}
				if le.Line < 1 || le.Line > lines || !strings.HasPrefix(err.Error(), "line "+strconv.Itoa(le.Line)+": ") {
					t.Fatalf("error %q names line %d of %d", err, le.Line, lines)
				}
				return
			}
			if b.Line < 1 || b.Line > lines {
				t.Fatalf("block on line %d of %d", b.Line, lines)
			}
			if err := p.Add(b); err != nil {
				// only non-finite numbers may reach the planner
				if !strings.Contains(err.Error(), "line ") {
					t.Fatalf("planner error without a line: %v", err)
				}
				return
			}
		}
		rep := p.Finish()
		if math.IsNaN(rep.TotalS) || math.IsInf(rep.TotalS, 0) || rep.TotalS < 0 {
			t.Fatalf("total time %v", rep.TotalS)
		}
	})
}
