package engage

import (
	"math"
	"testing"
)

func noErr(t *testing.T, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

// near fails unless |got − want| ≤ tol. It reports once per test to keep
// the output short.
func near(t *testing.T, what string, got, want, tol float64) bool {
	t.Helper()
	if math.Abs(got-want) <= tol && !math.IsNaN(got) {
		return true
	}
	t.Errorf("%s = %.6g, want %.6g ± %.3g", what, got, want, tol)
	return false
}

// rel fails unless got is within a relative tolerance of want.
func rel(t *testing.T, what string, got, want, tol float64) bool {
	t.Helper()
	if math.Abs(got-want) <= tol*math.Abs(want) && !math.IsNaN(got) {
		return true
	}
	t.Errorf("%s = %.6g, want %.6g within %.2g %%", what, got, want, tol*100)
	return false
}
