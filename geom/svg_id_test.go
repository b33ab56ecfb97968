package geom

import (
	"math"
	"strings"
	"testing"
)

func TestParseSVGByID(t *testing.T) {
	const doc = `<svg xmlns="http://www.w3.org/2000/svg">
  <rect id="stock" x="0" y="0" width="100" height="60"/>
  <g id="pockets" transform="translate(10 10)">
    <rect id="a" x="0" y="0" width="20" height="10"/>
    <circle id="b" cx="50" cy="20" r="5"/>
  </g>
</svg>`
	area := func(id string) float64 {
		t.Helper()
		s, err := ParseSVGWith(strings.NewReader(doc), SVGOptions{ID: id})
		if err != nil {
			t.Fatalf("id %q: %v", id, err)
		}
		return s.Area()
	}
	// Rectangle and circle areas, elementary geometry; the circle is
	// flattened inside its true outline by at most the tolerance.
	if a := area("stock"); math.Abs(a-6000) > 1e-9 {
		t.Errorf("stock area %g, want 6000", a)
	}
	if a := area("a"); math.Abs(a-200) > 1e-9 {
		t.Errorf("rect a area %g, want 200", a)
	}
	circle := math.Pi * 25
	if a := area("b"); a > circle || a < circle-2*math.Pi*5*DefaultSVGTolerance {
		t.Errorf("circle b area %g, want about %g", a, circle)
	}
	if a := area("pockets"); math.Abs(a-200-circle) > 2*math.Pi*5*DefaultSVGTolerance {
		t.Errorf("group area %g, want about %g", a, 200+circle)
	}
	if _, err := ParseSVGWith(strings.NewReader(doc), SVGOptions{ID: "nope"}); err == nil || !strings.Contains(err.Error(), `no element with id "nope"`) {
		t.Errorf("missing id: err %v", err)
	}
}
