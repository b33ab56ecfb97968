package pathplan

import (
	"math"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/offset"
)

// bandedRest returns the rest passes of feature fi: runs along the outline
// of the tool-centre domain the feature would have if it took in the
// space of earlier, deeper features (cleared by then, down past this
// floor) within two tool radii of it, where that outline leaves the
// feature's own domain own. A corner of the feature beside such a
// neighbour may be too narrow for the tool from inside the feature and
// still be reachable from the neighbour's space; the runs sweep it. Each
// run starts and ends a node inside own, where the feature's own passes
// have cut, and keeps the radius and allowance from every wall, as the
// outline of a tool-centre domain does. Runs whose tool disk never reaches
// the feature's own material are left out.
func bandedRest(job *Job, fi int, own geom.Shape, st bandedSettings, tol float64) ([][]geom.Point, error) {
	f := job.Features[fi]
	parts, err := neighbourParts(job, f, 2*st.r, tol, func(k int, g Feature) bool {
		return k < fi && g.Depth > f.Depth+1e-9
	})
	if err != nil {
		return nil, err
	}
	var near geom.Shape
	for _, part := range parts {
		if near == nil {
			near = part
		} else if u, err := geom.Union(near, part); err == nil {
			near = u
		}
	}
	if near == nil {
		return nil, nil
	}
	ext, err := geom.Union(f.Region, near)
	if err != nil {
		return nil, err
	}
	cExt, err := offset.Offset(ext, -(st.r + job.Cut.Allowance + tol), tol)
	if err != nil {
		return nil, err
	}
	// The feature's own material: its region less the deeper neighbours.
	mine, err := geom.Difference(f.Region, near)
	if err != nil {
		return nil, err
	}
	mine, err = geom.Intersection(mine, job.Stock.Outline)
	if err != nil {
		return nil, err
	}
	outside := func(q geom.Point) bool { return !own.Contains(q) && own.DistanceToBoundary(q) > st.h }
	reaches := func(q geom.Point) bool {
		return mine.Contains(q) || mine.DistanceToBoundary(q) < st.r-0.01
	}
	var runs [][]geom.Point
	for _, ring := range cExt.Rings() {
		// Every vertex of the ring is kept (a resampled ring would cut
		// the corners of its arcs toward the walls); long edges get
		// points a node apart.
		var pts []geom.Point
		for i, a := range ring {
			b := ring[(i+1)%len(ring)]
			m := max(1, int(math.Ceil(a.Dist(b)/st.h)))
			for k := 0; k < m; k++ {
				pts = append(pts, a.Lerp(b, float64(k)/float64(m)))
			}
		}
		pts = append(pts, pts[0])
		n := len(pts) - 1 // closed: the last point repeats the first
		if n < 3 {
			continue
		}
		// Start the walk at a point inside own, so that no run wraps.
		s0 := -1
		for i := 0; i < n; i++ {
			if !outside(pts[i]) {
				s0 = i
				break
			}
		}
		if s0 < 0 {
			continue // the whole ring lies outside the feature's domain
		}
		var cur []geom.Point
		useful := false
		for k := 1; k <= n; k++ {
			q := pts[(s0+k)%n]
			if outside(q) {
				if cur == nil {
					cur = []geom.Point{pts[(s0+k-1)%n]}
				}
				cur = append(cur, q)
				useful = useful || reaches(q)
				continue
			}
			if cur != nil {
				cur = append(cur, q)
				if useful {
					runs = append(runs, cur)
				}
				cur, useful = nil, false
			}
		}
	}
	return runs, nil
}

// bandedEmitRest cuts the rest runs of a level at z: for each the tool is
// fed up to the clearance height, rapids over the run's start to above the
// level's top and is fed down there, where the feature's own passes have
// cut.
func bandedEmitRest(b *builder, runs [][]geom.Point, z, levelTop, clear float64, st bandedSettings, sum *FeatureSummary) {
	for _, run := range runs {
		// Fed up, as at the end of a feature: the tool may stand beside a
		// wall or a scrap of the level.
		b.feed(geom.Lift, p3(b.pos.XY(), clear), st.feed)
		b.rapid(p3(run[0], clear))
		b.rapid(p3(run[0], levelTop+st.safe))
		b.feed(geom.Link, p3(run[0], z), st.entry)
		for _, q := range run[1:] {
			b.feed(geom.Feed, p3(q, z), st.feed)
		}
		sum.Lifts++
		sum.Rings++
	}
}
