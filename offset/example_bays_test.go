package offset_test

import (
	"context"
	"fmt"
	"math"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
)

func ExampleDeepestPoint() {
	// An L-shaped pocket floor: a 20×6 arm along X and a 4×20 arm along Y.
	l := geom.Region{Outer: geom.Ring{
		geom.Pt(0, 0), geom.Pt(20, 0), geom.Pt(20, 6),
		geom.Pt(4, 6), geom.Pt(4, 20), geom.Pt(0, 20),
	}}
	p, r, err := offset.DeepestPoint(l, 1e-4)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("centre (%.2f, %.2f), radius %.3f\n", p.X, p.Y, r)
	// Output: centre (3.07, 3.07), radius 3.072
}

func ExampleSplit() {
	// Two 40 mm squares joined by a 6 mm bar, 30 mm long; the tool centre
	// may go anywhere inside. A disk of radius 5 rolls in the squares but
	// not in the bar.
	c := geom.Shape{{Outer: geom.Ring{
		geom.Pt(-40, -20), geom.Pt(0, -20), geom.Pt(0, -3), geom.Pt(30, -3),
		geom.Pt(30, -20), geom.Pt(70, -20), geom.Pt(70, 20), geom.Pt(30, 20),
		geom.Pt(30, 3), geom.Pt(0, 3), geom.Pt(0, 20), geom.Pt(-40, 20),
	}}}
	z, err := offset.Split(context.Background(), c, 5, 0, offset.SplitOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, b := range z.Bays {
		fmt.Printf("bay %d: area %.0f mm², deepest radius %.1f\n", i, b.Region.Area(), b.Radius)
	}
	for i, ch := range z.Channels {
		a, b := ch.Spine[0], ch.Spine[len(ch.Spine)-1]
		fmt.Printf("channel %d: width %.2f, spine (%.2f, %.2f) to (%.2f, %.2f), bays %d and %d\n",
			i, ch.Width, r2(a.X), r2(a.Y), r2(b.X), r2(b.Y), ch.Ends[0].Bay, ch.Ends[1].Bay)
	}
	fmt.Println("slivers:", len(z.Slivers))
	// Output:
	// bay 0: area 1583 mm², deepest radius 20.0
	// bay 1: area 1583 mm², deepest radius 20.0
	// channel 0: width 6.00, spine (1.00, 0.00) to (29.00, 0.00), bays 0 and 1
	// slivers: 8
}

// r2 rounds to two decimals and turns −0 into 0 for printing.
func r2(v float64) float64 { return math.Round(v*100)/100 + 0 }
