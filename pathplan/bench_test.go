package pathplan

import (
	"context"
	"testing"
)

// BenchmarkPlanLayeredDemo measures the planning time of the demo job.
func BenchmarkPlanLayeredDemo(b *testing.B) {
	j := DemoJob()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := PlanLayered(context.Background(), j, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
