package timing

import (
	"math"
	"strconv"
)

// pow10 holds the powers of ten that float64 represents exactly. It is a
// read-only table.
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9,
	1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// parseNumber reads an RS-274 real number (optional sign, digits, optional
// decimal point and digits; no exponent) from the start of b. It returns the
// value and the number of bytes used; n == 0 means no number was found.
//
// When the digits fit in 2^53 and there are at most 22 of them after the
// point, the result is one correctly rounded division of two exact float64
// values, equal to strconv.ParseFloat. Otherwise it falls back to strconv.
func parseNumber(b []byte) (v float64, n int, ok bool) {
	i := 0
	neg := false
	if i < len(b) && (b[i] == '+' || b[i] == '-') {
		neg = b[i] == '-'
		i++
	}
	var mant uint64
	digits, frac := 0, 0
	for ; i < len(b); i++ {
		c := b[i] - '0'
		if c > 9 {
			break
		}
		mant = mant*10 + uint64(c) // may wrap past 19 digits; then unused
		digits++
	}
	if i < len(b) && b[i] == '.' {
		i++
		for ; i < len(b); i++ {
			c := b[i] - '0'
			if c > 9 {
				break
			}
			mant = mant*10 + uint64(c)
			digits++
			frac++
		}
	}
	if digits == 0 {
		return 0, i, false
	}
	// up to 19 digits fit in a uint64; the fast path needs mant < 2^53
	if digits > 19 || mant >= 1<<53 || frac >= len(pow10) {
		f, err := strconv.ParseFloat(string(b[:i]), 64)
		if err != nil {
			return 0, i, false
		}
		return f, i, !math.IsInf(f, 0)
	}
	v = float64(mant)
	if frac > 0 {
		v /= pow10[frac]
	}
	if neg {
		v = -v
	}
	return v, i, true
}
