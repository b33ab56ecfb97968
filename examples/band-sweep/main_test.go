package main

import (
	"bytes"
	"context"
	"strings"
	"testing"
)

func TestBandSweep(t *testing.T) {
	pts, err := sweep(context.Background(), []float64{0.06, 0.12})
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := pts[0].res, pts[1].res
	// A wider radial engagement is measured as a wider one.
	if hi.MeanAeD <= lo.MeanAeD {
		t.Errorf("mean ae/D at target 0.12: %.3f, at 0.06: %.3f", hi.MeanAeD, lo.MeanAeD)
	}
	// With chip thinning the feed is vf ∝ 1/sin φ, so ae·vf grows with ae
	// (Altintas 2012, ch. 2, from memory): the pocket clears sooner.
	if hi.CycleS >= lo.CycleS {
		t.Errorf("cycle at target 0.12: %.1f s, at 0.06: %.1f s", hi.CycleS, lo.CycleS)
	}
	var b bytes.Buffer
	if err := run(context.Background(), &b, []float64{0.08}); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(b.String(), "8%") || !strings.Contains(b.String(), "Caution") {
		t.Errorf("table:\n%s", b.String())
	}
}
