package offset

import (
	"encoding/binary"
	"errors"
	"math"
	"testing"

	"github.com/chipband/chipband/geom"
)

// decodeFuzz turns bytes into a small polygon, an optional hole (when the
// first byte is odd) and a distance. Coordinates are int16 steps of 0.01 mm
// so that degenerate inputs (repeated points, collinear runs, spikes) come
// up often.
func decodeFuzz(data []byte) (geom.Shape, float64) {
	if len(data) < 3 {
		return nil, 0
	}
	hole := data[0]&1 == 1
	d := float64(int8(data[1])) / 8 // −16 … +15.875 mm
	data = data[2:]
	var pts []geom.Point
	for len(data) >= 4 && len(pts) < 24 {
		x := int16(binary.LittleEndian.Uint16(data))
		y := int16(binary.LittleEndian.Uint16(data[2:]))
		pts = append(pts, geom.Pt(float64(x)/100, float64(y)/100))
		data = data[4:]
	}
	if len(pts) < 3 {
		return nil, d
	}
	g := geom.Region{Outer: geom.Ring(pts)}
	if hole && len(pts) >= 6 {
		h := len(pts) / 2
		g = geom.Region{Outer: geom.Ring(pts[:h]), Holes: []geom.Ring{geom.Ring(pts[h:])}}
	}
	return geom.Shape{g}, d
}

// FuzzOffset: any input gives a valid result or a clean error, never a
// panic or a hang. The input need not be valid; the result must be.
func FuzzOffset(f *testing.F) {
	f.Add([]byte{0, 16, 0, 0, 0, 0, 0x10, 0x27, 0, 0, 0x10, 0x27, 0x10, 0x27, 0, 0, 0x10, 0x27})
	f.Add([]byte{1, 0xf0, 0, 0, 0, 0, 0x10, 0x27, 0, 0, 0x10, 0x27, 0x10, 0x27, 0xe8, 3, 0xe8, 3, 0xd0, 7, 0xe8, 3, 0xd0, 7, 0xd0, 7})
	f.Fuzz(func(t *testing.T, data []byte) {
		s, d := decodeFuzz(data)
		if s == nil {
			return
		}
		got, err := Offset(s, d, 0.01)
		if err != nil {
			if !errors.Is(err, ErrInvalidInput) && !errors.Is(err, ErrTooComplex) {
				t.Fatalf("unexpected error kind: %v", err)
			}
			return
		}
		if d == 0 {
			return // a copy of the (possibly invalid) input
		}
		if err := checkValid(got); err != nil {
			t.Fatalf("Offset(%v, %g): invalid result: %v", s, d, err)
		}
		if a := got.Area(); math.IsNaN(a) {
			t.Fatal("NaN area")
		}
	})
}
