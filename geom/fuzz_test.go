package geom

import (
	"bytes"
	"strings"
	"testing"
)

// The readers must never panic or hang; whatever they accept must be a
// valid Shape (Shape.Validate), and the writers' output must read back.

func FuzzParseWKT(f *testing.F) {
	f.Add("POLYGON ((0 0, 10 0, 10 10, 0 10, 0 0), (2 2, 4 2, 4 4, 2 4, 2 2))")
	f.Fuzz(func(t *testing.T, s string) {
		sh, err := ParseWKT(s)
		if err != nil {
			return
		}
		if err := sh.Validate(); err != nil {
			t.Fatalf("accepted an invalid shape: %v", err)
		}
		_ = sh.WKT()
	})
}

func FuzzParseGeoJSON(f *testing.F) {
	f.Add([]byte(rfc7946Polygon))
	f.Fuzz(func(t *testing.T, b []byte) {
		sh, err := ParseGeoJSON(b)
		if err != nil {
			return
		}
		if err := sh.Validate(); err != nil {
			t.Fatalf("accepted an invalid shape: %v", err)
		}
		_ = sh.GeoJSON()
	})
}

func FuzzParseSVG(f *testing.F) {
	f.Add([]byte(`<svg viewBox="0 0 10 10" width="10mm"><path d="M1 1h8v8h-8z m2 2 v4 h4 v-4z"/></svg>`))
	f.Fuzz(func(t *testing.T, b []byte) {
		// A coarse tolerance keeps each run short.
		sh, err := ParseSVGWith(bytes.NewReader(b), SVGOptions{Tolerance: 0.1})
		if err != nil {
			if strings.Contains(err.Error(), "panic") {
				t.Fatal(err)
			}
			return
		}
		if err := sh.Validate(); err != nil {
			t.Fatalf("accepted an invalid shape: %v", err)
		}
	})
}
