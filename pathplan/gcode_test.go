package pathplan

import (
	"bytes"
	"context"
	"errors"
	"io"
	"math"
	"strings"
	"testing"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/timing"
)

func TestNum(t *testing.T) {
	for v, want := range map[float64]string{
		0: "0", -0.00001: "0", 1.5: "1.5", -2.25: "-2.25", 10: "10", 0.12345: "0.1235", -0.00005: "-0.0001", 123.4: "123.4",
	} {
		if got := num(v); got != want {
			t.Errorf("num(%v) = %q, want %q", v, got, want)
		}
	}
}

// TestGCodeRoundTrip writes each plan and reads it back with timing's
// streaming reader: every move must come back with the same kind (rapid,
// line, arc), end point, centre, direction and feed, within the 1e-4 mm of
// the writer's 4 decimals.
func TestGCodeRoundTrip(t *testing.T) {
	jobs := testJobs(t)
	for _, name := range sortedKeys(jobs) {
		j := jobs[name]
		t.Run(name, func(t *testing.T) {
			p, err := PlanLayered(context.Background(), j, Options{})
			if err != nil {
				t.Fatal(err)
			}
			var buf bytes.Buffer
			if err := WriteGCode(&buf, p); err != nil {
				t.Fatal(err)
			}
			rd := timing.NewReader(bytes.NewReader(buf.Bytes()))
			var blocks []timing.Block
			for {
				b, err := rd.Next()
				if errors.Is(err, io.EOF) {
					break
				}
				if err != nil {
					t.Fatal(err)
				}
				if b.Kind.IsMotion() {
					blocks = append(blocks, b)
				}
			}
			// The two positioning moves to Path.Start come first.
			var want []geom.Move
			for _, m := range p.Path.Moves {
				want = append(want, m)
			}
			got := blocks
			for len(got) > 0 && got[0].Kind == timing.KindRapid && near3(got[0].To, p.Path.Start) {
				got = got[1:]
			}
			// moves that round to no motion are not written
			var kept []geom.Move
			from := p.Path.Start
			for _, m := range want {
				if !m.Arc && math.Abs(m.To.X-from.X) < 5e-5 && math.Abs(m.To.Y-from.Y) < 5e-5 && math.Abs(m.To.Z-from.Z) < 5e-5 {
					from = m.To
					continue
				}
				kept = append(kept, m)
				from = m.To
			}
			if len(got) != len(kept) {
				t.Fatalf("read %d moves, wrote %d", len(got), len(kept))
			}
			ops := map[string]bool{}
			for i, m := range kept {
				b := got[i]
				ops[b.Op] = true
				wantKind := timing.KindLine
				switch {
				case m.Kind == geom.Rapid:
					wantKind = timing.KindRapid
				case m.Arc:
					wantKind = timing.KindArc
				}
				if b.Kind != wantKind {
					t.Fatalf("move %d: read %v, wrote %+v", i, b.Kind, m)
				}
				if !near3(b.To, m.To) {
					t.Fatalf("move %d: read end %v, wrote %v", i, b.To, m.To)
				}
				if m.Arc && (math.Abs(b.Center[0]-m.Center.X) > 2e-4 || math.Abs(b.Center[1]-m.Center.Y) > 2e-4 || b.CW != m.CW) {
					t.Fatalf("move %d: read arc centre %v cw %v, wrote %v cw %v", i, b.Center, b.CW, m.Center, m.CW)
				}
				if m.Kind != geom.Rapid && math.Abs(b.Feed-m.Feed) > 1e-4 {
					t.Fatalf("move %d: read feed %v, wrote %v", i, b.Feed, m.Feed)
				}
			}
			for _, f := range j.Features {
				if !ops[f.Name] {
					t.Errorf("no moves tagged with operation %q", f.Name)
				}
			}
		})
	}
}

func near3(a [3]float64, b geom.Point3) bool {
	// 4 decimals: half a unit of the last digit, plus float slack.
	const tol = 1e-4
	return math.Abs(a[0]-b.X) <= tol && math.Abs(a[1]-b.Y) <= tol && math.Abs(a[2]-b.Z) <= tol
}

func TestGCodeHeaderAndDeterminism(t *testing.T) {
	j := DemoJob()
	p1, err := PlanLayered(context.Background(), j, Options{})
	if err != nil {
		t.Fatal(err)
	}
	p2, err := PlanLayered(context.Background(), DemoJob(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	var a, b bytes.Buffer
	if err := WriteGCode(&a, p1); err != nil {
		t.Fatal(err)
	}
	if err := WriteGCode(&b, p2); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("two plans of the same job give different G-code")
	}
	text := a.String()
	// Required by design notes §7 and §9: units, absolute, XY plane,
	// spindle, end, the job, tool, strategy and the caution.
	for _, want := range []string{"G21 G90 G17", "M3", "M5", "M30", "(job: fixture plate)", "(tool: flat end mill D6 mm",
		"(strategy: layered", "(op: deep step)", "(op: boss pocket)", "(op: comb pocket)", "(Machining can injure."} {
		if !strings.Contains(text, want) {
			t.Errorf("G-code lacks %q", want)
		}
	}
	var flat []string
	for _, l := range strings.Split(text, "\n") {
		if strings.HasPrefix(l, "(") && !strings.HasPrefix(l, "(op:") {
			flat = append(flat, strings.Trim(l, "()"))
		}
	}
	if !strings.Contains(strings.Join(flat, " "), SafetyCaution) {
		t.Error("header does not carry the whole safety caution")
	}
	if strings.Contains(text, "-0 ") || strings.Contains(text, "e-") || strings.Contains(text, "e+") {
		t.Error("number formatting: negative zero or exponent in the program")
	}
}

// TestGCodeCarriesWarnings: the plan's warnings are written into the
// program's header as comments, wrapped, with the characters that would
// end a comment replaced, before the first motion.
func TestGCodeCarriesWarnings(t *testing.T) {
	p, err := PlanLayered(context.Background(), DemoJob(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	w := `feature "boss pocket": the simulation finds full slotting (ae/D 0.9 or more) over 8.4 mm, at axial depths up to 8.0 mm; check chip evacuation`
	p.Warnings = []string{w}
	var buf bytes.Buffer
	if err := WriteGCode(&buf, p); err != nil {
		t.Fatal(err)
	}
	head, _, ok := strings.Cut(buf.String(), "G21 G90 G17")
	if !ok {
		t.Fatal("no G21 G90 G17 line")
	}
	var lines []string
	for _, l := range strings.Split(head, "\n") {
		if strings.HasPrefix(l, "(WARNING: ") || (len(lines) > 0 && strings.HasPrefix(l, "(") && !strings.HasPrefix(l, "(WARNING")) {
			if len(l) > 72 {
				t.Errorf("header line of %d characters: %q", len(l), l)
			}
			lines = append(lines, strings.TrimSuffix(strings.TrimPrefix(l, "("), ")"))
		}
	}
	got := strings.Join(lines, " ")
	want := "WARNING: " + strings.NewReplacer("(", " ", ")", " ", ";", " ").Replace(w)
	if strings.Join(strings.Fields(got), " ") != strings.Join(strings.Fields(want), " ") {
		t.Errorf("header carries %q, want %q", got, want)
	}
}
