package engage

import (
	"context"
	"slices"
	"testing"

	"github.com/chipband/chipband/geom"
)

// TestSaveRestore: a cut inside a saved patch, undone by Restore, leaves
// the material as it was, and the cut simulated again reads the same.
func TestSaveRestore(t *testing.T) {
	stock := geom.Shape{{Outer: geom.Ring{{X: 0, Y: 0}, {X: 60, Y: 0}, {X: 60, Y: 40}, {X: 0, Y: 40}}}}
	m, err := NewMaterial(stock, 0, MaterialOptions{})
	if err != nil {
		t.Fatal(err)
	}
	tool := Tool{Diameter: 6, FluteLength: 20, Flutes: 3}
	ctx := context.Background()
	// Material cut before the patch is saved stays cut.
	first := &geom.Toolpath{Start: geom.Point3{X: -5, Y: 10, Z: -2}, Moves: []geom.Move{{Kind: geom.Feed, To: geom.Point3{X: 65, Y: 10, Z: -2}, Feed: 1000}}}
	if _, err := Simulate(ctx, m, tool, first, SimOptions{SummaryOnly: true}); err != nil {
		t.Fatal(err)
	}
	was := slices.Clone(m.c)
	trial := &geom.Toolpath{Start: geom.Point3{X: 20, Y: 14, Z: -2}, Moves: []geom.Move{
		{Kind: geom.Feed, To: geom.Point3{X: 35, Y: 14, Z: -2}, Feed: 1000},
		{Kind: geom.Feed, To: geom.Point3{X: 35, Y: 20, Z: -2}, Arc: true, Center: geom.Point{X: 35, Y: 17}, Feed: 1000},
	}}
	bounds := geom.Rect{Min: geom.Point{X: 20, Y: 14}, Max: geom.Point{X: 38, Y: 20}}
	pad := tool.Diameter/2 + m.BandWidth() + m.CellSize()
	p := m.Save(bounds, pad)
	// The bounds grown by pad, in whole cells of 0.2 mm, 16 bytes each.
	if got, want := p.Bytes(), m.SaveBytes(bounds, pad); got != want || got < int((18+2*pad)*(6+2*pad)/0.04)*16 {
		t.Errorf("patch holds %d bytes, SaveBytes says %d, the grown bounds need at least %d", got, want, int((18+2*pad)*(6+2*pad)/0.04)*16)
	}
	a, err := Simulate(ctx, m, tool, trial, SimOptions{SummaryOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	if a.Summary.Volume <= 0 {
		t.Fatal("the trial cut nothing: the test shows nothing")
	}
	m.Restore(p)
	if !slices.Equal(m.c, was) {
		t.Fatal("Restore did not put the material back")
	}
	b, err := Simulate(ctx, m, tool, trial, SimOptions{SummaryOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	if a.Summary.Volume != b.Summary.Volume {
		t.Errorf("the trial again removes %.6f mm³, first %.6f", b.Summary.Volume, a.Summary.Volume)
	}
}
