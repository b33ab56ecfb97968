package geom_test

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/chipband/chipband/geom"
)

func ExampleParseWKT() {
	s, err := geom.ParseWKT("POLYGON ((0 0, 0 40, 60 40, 60 0, 0 0), (10 10, 20 10, 20 20, 10 20, 10 10))")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(len(s), "region with", len(s[0].Holes), "hole, area", s.Area())
	fmt.Println(s.WKT())
	_, err = geom.ParseWKT("LINESTRING (0 0, 1 1)")
	fmt.Println(err)
	// Output:
	// 1 region with 1 hole, area 2300
	// POLYGON ((0 0, 60 0, 60 40, 0 40, 0 0), (10 10, 10 20, 20 20, 20 10, 10 10))
	// WKT: LINESTRING is not an area; want POLYGON or MULTIPOLYGON
}

func ExampleParseGeoJSON() {
	doc := `{"type":"Feature","id":"slot","properties":{},
	  "geometry":{"type":"Polygon","coordinates":[[[0,0],[30,0],[30,8],[0,8],[0,0]]]}}`
	s, err := geom.ParseGeoJSON([]byte(doc))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(s.Area())
	fmt.Println(string(s.GeoJSON()))
	// Output:
	// 240
	// {"type":"Polygon","coordinates":[[[0,0],[30,0],[30,8],[0,8],[0,0]]]}
}

func ExampleParseSVG() {
	// A 100 × 60 mm plate with two bored holes, drawn in mm.
	doc := `<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="60mm" viewBox="0 0 100 60">
	  <rect width="100" height="60" rx="5"/>
	  <circle cx="25" cy="30" r="10"/>
	  <circle cx="75" cy="30" r="10"/>
	</svg>`
	s, err := geom.ParseSVG(strings.NewReader(doc))
	if err != nil {
		fmt.Println(err)
		return
	}
	b := s.Bounds()
	fmt.Printf("%d region, %d holes, bounds (%g, %g)–(%g, %g)\n",
		len(s), len(s[0].Holes), b.Min.X, b.Min.Y, b.Max.X, b.Max.Y)
	// W3C SVG 1.1, 9.2: rounded corners take (4 − π)·r² off the rectangle;
	// each hole takes π·r². Flattening within 0.01 mm moves the area by
	// less than perimeter × 0.01 mm.
	exact := 100*60 - (4-math.Pi)*5*5 - 2*math.Pi*10*10
	fmt.Println("area within tolerance:", math.Abs(s.Area()-exact) < (320+2*math.Pi*20)*0.01)
	// Output:
	// 1 region, 2 holes, bounds (0, 0)–(100, 60)
	// area within tolerance: true
}

func ExampleShape_Validate() {
	s := geom.Shape{{
		Outer: geom.RectRing(0, 0, 10, 10),
		Holes: []geom.Ring{geom.RectRing(8, 4, 12, 6).Reversed()},
	}}
	err := s.Validate()
	fmt.Println(err)
	fmt.Println(errors.Is(err, geom.ErrHoleOutside))
	// Output:
	// region 0, hole 0: hole not inside its outer ring (its edge 0 meets edge 1 of the outer ring) near (10, 6)
	// true
}

func ExampleUnion() {
	a := geom.Shape{{Outer: geom.RectRing(0, 0, 20, 10)}}
	b := geom.Shape{{Outer: geom.RectRing(10, 0, 30, 10)}}
	u, err := geom.Union(a, b)
	if err != nil {
		fmt.Println(err)
		return
	}
	d, _ := geom.Difference(a, b)
	fmt.Println(len(u), u.Area(), d.Area())
	// Output:
	// 1 300 100
}
