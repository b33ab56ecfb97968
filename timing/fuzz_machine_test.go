package timing

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// FuzzReadMachine checks that no machine file makes ReadMachine panic, that
// every error names the machine file's subject, and that every accepted
// machine is valid (finite, positive limits; design notes §7) and survives
// a round trip through its own JSON form unchanged.
func FuzzReadMachine(f *testing.F) {
	f.Add(`{"max_feed":{"x":8000,"y":8000,"z":3000},"rapid":{"x":10000,"y":10000,"z":5000},"accel":{"x":400,"y":400,"z":300},"corner_tolerance":0.02}`)
	f.Add(`{"name":"r","max_feed":{"x":1,"y":1,"z":1},"rapid":{"x":1,"y":1,"z":1},"accel":{"x":1,"y":1,"z":1},"jerk":{"x":1,"y":1,"z":1},"corner_tolerance":1,"tool_change_s":3,"spindle_start_s":2}`)
	f.Add(`{"max_feed":{"x":-1,"y":1,"z":1}}`)
	f.Add(`{}`)
	f.Fuzz(func(t *testing.T, in string) {
		m, err := ReadMachine(strings.NewReader(in))
		if err != nil {
			if !strings.Contains(err.Error(), "machine") {
				t.Fatalf("error %q does not say it concerns the machine file", err)
			}
			return
		}
		if err := m.Validate(); err != nil {
			t.Fatalf("accepted machine does not validate: %v", err)
		}
		for _, a := range []Axes{m.MaxFeed, m.Rapid, m.Accel} {
			for _, v := range []float64{a.X, a.Y, a.Z} {
				if !(v > 0) || math.IsInf(v, 0) {
					t.Fatalf("accepted limit %v in %+v", v, m)
				}
			}
		}
		if !(m.CornerTolerance > 0) || math.IsInf(m.CornerTolerance, 0) {
			t.Fatalf("accepted corner tolerance %v", m.CornerTolerance)
		}
		b, err := json.Marshal(m)
		if err != nil {
			t.Fatalf("marshal %+v: %v", m, err)
		}
		m2, err := ReadMachine(bytes.NewReader(b))
		if err != nil {
			t.Fatalf("own JSON %s rejected: %v", b, err)
		}
		if m2 != m {
			t.Fatalf("round trip changed the machine:\n%+v\n%+v", m, m2)
		}
	})
}
