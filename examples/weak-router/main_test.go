package main

import (
	"bytes"
	"context"
	"strings"
	"testing"
)

func TestWeakRouter(t *testing.T) {
	rows, err := compute(context.Background(), []float64{3})
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 2 {
		t.Fatalf("%d rows, want 2", len(rows))
	}
	mill, router := rows[0], rows[1]
	// Lower acceleration and lower feed caps cannot shorten a move
	// (trapezoidal kinematics, t = L/v + v/a for a move that cruises).
	if router.layered < mill.layered || router.banded < mill.banded {
		t.Errorf("the weak router is faster than the stiff mill: %+v %+v", router, mill)
	}
	// On the weak router more of the time goes to speed changes.
	if router.bAccel <= mill.bAccel {
		t.Errorf("banded accel share: router %.3f, mill %.3f", router.bAccel, mill.bAccel)
	}
	var b bytes.Buffer
	printTable(&b, rows)
	for _, want := range []string{"stiff mill", "hobby router", "Caution: Machining can injure"} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("output lacks %q:\n%s", want, b.String())
		}
	}
}
