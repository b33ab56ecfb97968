package pathplan

import (
	"math"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// Sizes of the downsampled traces of a Detail.
const (
	detailBuckets = 1200   // engagement and speed buckets
	detailAeDBin  = 0.0025 // ae/D bin width that splits top-view runs
	detailMinStep = 0.05   // smallest XY step kept in a run, mm
)

// newDetail builds the report traces of one feature's path tp from its
// simulated profile and the per-move figures info (info[i] is tp.Moves[i]).
func newDetail(tp *geom.Toolpath, prof []engage.Sample, info []moveInfo, wear []engage.WearBand, tool engage.Tool) *Detail {
	d := &Detail{Wear: wear}
	d.Runs = topRuns(tp, info)
	if n := len(prof); n > 0 {
		d.PathLength = prof[n-1].S
	}
	d.Engagement = engagementBuckets(prof, d.PathLength, tool.Diameter)
	for _, mi := range info {
		d.Time += mi.seconds
	}
	d.Speed = speedBuckets(tp, info, d.Time)
	return d
}

// topRuns splits the path into polylines of one class and ae/D bin.
func topRuns(tp *geom.Toolpath, info []moveInfo) []Run {
	var runs []Run
	from := tp.Start
	for i, mv := range tp.Moves {
		mi := info[i]
		cls, aed := RunAir, 0.0
		switch {
		case mv.Kind == geom.Rapid:
			cls = RunRapid
		case mi.hasCut && mi.simLen > 0 && mi.cutLen >= 0.5*mi.simLen:
			cls, aed = RunCut, mi.maxAeD
		}
		bin := math.Floor(aed / detailAeDBin)
		if n := len(runs); n == 0 || runs[n-1].Class != cls || (cls == RunCut && math.Floor(runs[n-1].AeD/detailAeDBin) != bin) {
			runs = append(runs, Run{Class: cls, AeD: aed, Pts: []geom.Point{from.XY()}})
		} else if cls == RunCut && aed > runs[n-1].AeD {
			runs[n-1].AeD = aed
		}
		r := &runs[len(runs)-1]
		for _, p := range movePoints(from, mv) {
			if last := r.Pts[len(r.Pts)-1]; last.Dist(p) < detailMinStep {
				continue
			}
			r.Pts = append(r.Pts, p)
		}
		if last := r.Pts[len(r.Pts)-1]; last != mv.To.XY() {
			r.Pts = append(r.Pts, mv.To.XY())
		}
		from = mv.To
	}
	// Drop runs that do not move in XY (plunges, lifts).
	out := runs[:0]
	for _, r := range runs {
		if len(r.Pts) >= 2 {
			out = append(out, r)
		}
	}
	return out
}

// movePoints returns points along mv in XY after from, ending at mv.To;
// arcs get a point every 10° or less.
func movePoints(from geom.Point3, mv geom.Move) []geom.Point {
	if !mv.Arc {
		return []geom.Point{mv.To.XY()}
	}
	a := from.XY()
	sweep := geom.ArcSweep(a, mv.To.XY(), mv.Center, mv.CW)
	n := int(math.Ceil(sweep / (10 * math.Pi / 180)))
	n = max(n, 1)
	r := a.Dist(mv.Center)
	a0 := math.Atan2(a.Y-mv.Center.Y, a.X-mv.Center.X)
	sign := 1.0
	if mv.CW {
		sign = -1
	}
	pts := make([]geom.Point, 0, n)
	for k := 1; k < n; k++ {
		t := a0 + sign*sweep*float64(k)/float64(n)
		pts = append(pts, geom.Point{X: mv.Center.X + r*math.Cos(t), Y: mv.Center.Y + r*math.Sin(t)})
	}
	return append(pts, mv.To.XY())
}

// engagementBuckets returns the largest and mean ae/D of the cutting
// samples per stretch of path length.
func engagementBuckets(prof []engage.Sample, length, d float64) []EngagementBucket {
	if length <= 0 || len(prof) == 0 {
		return nil
	}
	n := detailBuckets
	out := make([]EngagementBucket, n)
	w := make([]float64, n)
	for i := range out {
		out[i].S0 = length * float64(i) / float64(n)
		out[i].S1 = length * float64(i+1) / float64(n)
	}
	for _, s := range prof {
		if s.Class != engage.Cut {
			continue
		}
		k := min(n-1, max(0, int(s.S/length*float64(n))))
		a := s.AE / d
		out[k].Max = math.Max(out[k].Max, a)
		out[k].Mean += a * s.Step
		w[k] += s.Step
	}
	for k := range out {
		if w[k] > 0 {
			out[k].Mean /= w[k]
		}
	}
	return out
}

// speedBuckets returns the lowest and highest planned speed per stretch of
// time, from the per-move block times.
func speedBuckets(tp *geom.Toolpath, info []moveInfo, total float64) []SpeedBucket {
	if total <= 0 {
		return nil
	}
	n := detailBuckets
	out := make([]SpeedBucket, n)
	rapid := make([]float64, n)
	seen := make([]bool, n)
	for i := range out {
		out[i].T0 = total * float64(i) / float64(n)
		out[i].T1 = total * float64(i+1) / float64(n)
	}
	t := 0.0
	for i, mi := range info {
		if mi.seconds <= 0 {
			continue
		}
		k0 := min(n-1, int(t/total*float64(n)))
		k1 := min(n-1, int((t+mi.seconds)/total*float64(n)))
		lo := math.Min(mi.entryV, mi.exitV)
		hi := mi.peakV
		for k := k0; k <= k1; k++ {
			if !seen[k] {
				out[k].Min, out[k].Max, seen[k] = lo, hi, true
			} else {
				out[k].Min = math.Min(out[k].Min, lo)
				out[k].Max = math.Max(out[k].Max, hi)
			}
			if tp.Moves[i].Kind == geom.Rapid {
				a := math.Max(t, out[k].T0)
				b := math.Min(t+mi.seconds, out[k].T1)
				rapid[k] += math.Max(0, b-a)
			}
		}
		t += mi.seconds
	}
	for k := range out {
		out[k].Rapid = rapid[k] > 0.5*(out[k].T1-out[k].T0)
	}
	return out
}
