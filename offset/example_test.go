package offset_test

import (
	"fmt"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
)

// A 40 × 20 mm pocket with a 10 × 4 mm island, offset inward by a 3 mm
// tool radius: the outer wall moves in to 34 × 14 mm and the island grows
// by 3 mm with rounded corners.
func ExampleOffset() {
	pocket := geom.Shape{{
		Outer: geom.RectRing(0, 0, 40, 20),
		Holes: []geom.Ring{geom.RectRing(15, 8, 25, 12)},
	}}
	centre, err := offset.Offset(pocket, -3, offset.DefaultTolerance)
	if err != nil {
		fmt.Println(err)
		return
	}
	b := centre.Bounds()
	fmt.Printf("%d region, %d island, bounds %.0f×%.0f mm\n", len(centre), len(centre[0].Holes), b.Width(), b.Height())
	// Output: 1 region, 1 island, bounds 34×14 mm
}
