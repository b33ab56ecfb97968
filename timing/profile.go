package timing

import "math"

// Speed profiles of one segment. v0 and v1 are the entry and exit speeds,
// vmax the cruise cap, a the acceleration and j the jerk; lengths in mm,
// speeds in mm/s.

// reachR1 is the highest speed reachable from v over length l at constant
// acceleration a: sqrt(v² + 2·a·l).
func reachR1(v, a, l float64) float64 { return math.Sqrt(v*v + 2*a*l) }

// timeR1 is the time of a trapezoid (or, when the segment is too short to
// cruise, triangle) speed profile, and its peak speed.
func timeR1(l, v0, v1, vmax, a float64) (t, peak float64) {
	vp2 := a*l + (v0*v0+v1*v1)/2
	if vp2 <= vmax*vmax {
		vp := math.Sqrt(vp2)
		vp = max(vp, max(v0, v1))
		return (2*vp - v0 - v1) / a, vp
	}
	dacc := (vmax*vmax - v0*v0) / (2 * a)
	ddec := (vmax*vmax - v1*v1) / (2 * a)
	return (vmax-v0)/a + (vmax-v1)/a + (l-dacc-ddec)/vmax, vmax
}

// sTime is the duration of a jerk-limited change of speed by dv >= 0:
// jerk up, constant acceleration a (if reached), jerk down. When dv is too
// small to reach a, the acceleration peaks at sqrt(dv·j).
// Erkorkmaz & Altintas 2001 (from memory).
func sTime(dv, a, j float64) float64 {
	if dv <= 0 {
		return 0
	}
	if dv >= a*a/j {
		return dv/a + a/j
	}
	return 2 * math.Sqrt(dv/j)
}

// sDist is the distance covered by a jerk-limited speed change between va
// and vb. The acceleration profile is symmetric in time, so the mean speed
// is (va+vb)/2.
func sDist(va, vb, a, j float64) float64 {
	return (va + vb) / 2 * sTime(math.Abs(vb-va), a, j)
}

// reachJerk is the highest speed reachable from v over length l with
// acceleration a and jerk j: the v1 with sDist(v, v1) = l, solved in closed
// form. When the acceleration reaches a (Δ = v1−v >= a²/j) the distance
// (v + Δ/2)(Δ/a + a/j) = l is a quadratic in Δ; below that, with s = √Δ,
// (v + s²/2)·2s/√j = l is the cubic s³ + 2·v·s − l·√j = 0, solved by
// Newton's method from above (the cubic is convex and increasing for s > 0).
func reachJerk(v, a, j, l float64) float64 {
	if l <= 0 {
		return v
	}
	dfull := a * a / j
	// quadratic: Δ²/(2a) + Δ·(v/a + a/(2j)) + (v·a/j − l) = 0
	qa, qb, qc := 1/(2*a), v/a+a/(2*j), v*a/j-l
	if disc := qb*qb - 4*qa*qc; disc >= 0 {
		d := (-qb + math.Sqrt(disc)) / (2 * qa)
		if qc < 0 {
			d = 2 * (-qc) / (qb + math.Sqrt(disc)) // same root, no cancellation
		}
		if d >= dfull {
			return v + d
		}
	}
	q := l * math.Sqrt(j)
	x := min(math.Cbrt(q), q/(2*v)) // both bound the root from above
	for range 50 {
		f := x*x*x + 2*v*x - q
		nx := x - f/(3*x*x+2*v)
		if nx >= x || x-nx <= 1e-15*x {
			x = min(x, nx)
			break
		}
		x = nx
	}
	return v + x*x
}

// timeJerk is the time of a seven-phase jerk-limited profile: S-curve
// acceleration from v0 to a peak, cruise, S-curve deceleration to v1.
func timeJerk(l, v0, v1, vmax, a, j float64) (t, peak float64) {
	dacc := sDist(v0, vmax, a, j)
	ddec := sDist(v1, vmax, a, j)
	if dacc+ddec <= l {
		return sTime(vmax-v0, a, j) + sTime(vmax-v1, a, j) + (l-dacc-ddec)/vmax, vmax
	}
	lo, hi := max(v0, v1), vmax
	if sDist(v0, lo, a, j)+sDist(v1, lo, a, j) > l {
		// only reachable by rounding: the passes keep v0 and v1 feasible
		return sTime(math.Abs(v1-v0), a, j), lo
	}
	for range 100 {
		mid := (lo + hi) / 2
		if mid <= lo || mid >= hi {
			break
		}
		if sDist(v0, mid, a, j)+sDist(v1, mid, a, j) <= l {
			lo = mid
		} else {
			hi = mid
		}
	}
	vp := lo
	rest := l - sDist(v0, vp, a, j) - sDist(v1, vp, a, j)
	t = sTime(vp-v0, a, j) + sTime(vp-v1, a, j)
	if rest > 0 && vp > 0 {
		t += rest / vp
	}
	return t, vp
}
