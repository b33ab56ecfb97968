package geom

import "testing"

// TestRectGrowIntersectOverlaps checks the rectangle operations on boxes
// whose answers can be read off a sketch.
func TestRectGrowIntersectOverlaps(t *testing.T) {
	a := Rect{Pt(0, 0), Pt(10, 5)}
	if g := a.Grow(1); g != (Rect{Pt(-1, -1), Pt(11, 6)}) {
		t.Errorf("grow by 1: %v", g)
	}
	if g := a.Grow(-3); !g.Empty() {
		t.Errorf("shrinking a 5 mm high box by 3 mm a side leaves %v, want empty", g)
	}
	if !EmptyRect().Grow(5).Empty() {
		t.Error("an empty box grew into a non-empty one")
	}
	b := Rect{Pt(8, 2), Pt(20, 9)}
	if i := a.Intersect(b); i != (Rect{Pt(8, 2), Pt(10, 5)}) {
		t.Errorf("intersection %v", i)
	}
	for _, c := range []struct {
		s    Rect
		want bool
	}{
		{b, true},
		{Rect{Pt(10, 5), Pt(12, 7)}, true}, // corners touch
		{Rect{Pt(10.01, 0), Pt(12, 5)}, false},
		{EmptyRect(), false},
	} {
		if got := a.Overlaps(c.s); got != c.want || c.s.Overlaps(a) != c.want {
			t.Errorf("%v overlaps %v: %v, want %v", a, c.s, got, c.want)
		}
	}
}
