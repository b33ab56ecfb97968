package engage_test

import (
	"context"
	"fmt"
	"os"

	"github.com/chipband/chipband/engage"
	"github.com/chipband/chipband/geom"
)

// A 10 mm end mill takes a 0.75 mm (7.5 %) cut along the edge of a block.
func ExampleMaterial_Engage() {
	stock := geom.Shape{{Outer: geom.RectRing(0, 0, 100, 50)}}
	m, err := engage.NewMaterial(stock, 0, engage.MaterialOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	tool := engage.Tool{Diameter: 10, FluteLength: 25, Flutes: 3}
	// Tool centre 4.25 mm outside the edge y = 50, 12 mm deep, feeding +X:
	// the block is on the right, a down (climb) cut.
	e := m.Engage(tool, geom.Point3{X: 50, Y: 54.25, Z: -12}, geom.Pt(1, 0))
	fmt.Printf("φ = %.1f°, ae = %.2f mm, ap = %.1f mm\n", e.PhiDeg(), e.AE, e.AP)
	// Output: φ = 31.8°, ae = 0.75 mm, ap = 12.0 mm
}

// Simulate a pass along a block edge and read the summary.
func ExampleSimulate() {
	stock := geom.Shape{{Outer: geom.RectRing(0, 0, 100, 50)}}
	m, err := engage.NewMaterial(stock, 0, engage.MaterialOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	tool := engage.Tool{Diameter: 10, FluteLength: 25, Flutes: 3}
	tp := &geom.Toolpath{Start: geom.Point3{X: -10, Y: 54.25, Z: 5}, Moves: []geom.Move{
		{Kind: geom.Rapid, To: geom.Point3{X: -10, Y: 54.25, Z: -12}},
		{Kind: geom.Feed, To: geom.Point3{X: 110, Y: 54.25, Z: -12}, Feed: 1800},
	}}
	res, err := engage.Simulate(context.Background(), m, tool, tp, engage.SimOptions{Band: [2]float64{0.05, 0.10}, SpindleRPM: 8000})
	if err != nil {
		fmt.Println(err)
		return
	}
	s := res.Summary
	fmt.Printf("max engagement %.3f of D, %.0f %% of the cut in band, %d rapid violations\n",
		s.MaxEng, 100*s.InBandFraction, len(s.RapidViolations))
	// Output: max engagement 0.075 of D, 96 % of the cut in band, 0 rapid violations
}

// Raise the chip load for radial chip thinning at a 7.5 % stepover.
func ExampleFeed() {
	tool := engage.Tool{Diameter: 10, FluteLength: 25, Flutes: 3}
	n, _ := engage.SpindleSpeed(150, tool.Diameter) // 150 m/min
	vf, err := engage.Feed(tool, engage.CutData{SpindleRPM: n, ChipLoad: 0.04, MaxFeed: 6000}, 0.75)
	if err != nil {
		fmt.Println(err)
		return
	}
	k, _ := engage.ChipThinningFactor(0.75, tool.Diameter)
	fmt.Printf("n = %.0f rpm, factor %.3f, vf = %.0f mm/min\n", n, k, vf)
	// Output: n = 4775 rpm, factor 1.898, vf = 1088 mm/min
}

// Kienzle's specific cutting force for a typical steel.
func ExampleKienzle_Kc() {
	k, err := engage.LookupKienzle("steel")
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("kc(0.05 mm) = %.0f N/mm²\n", k.Kc(0.05))
	// Output: kc(0.05 mm) = 3807 N/mm²
}

// Write a short profile as CSV.
func ExampleWriteCSV() {
	prof := []engage.Sample{{S: 0.1, X: 1, Y: 2, Z: -3, Class: engage.Cut, AE: 0.75, AP: 3, Feed: 1000, MRR: 2250}}
	if err := engage.WriteCSV(os.Stdout, prof); err != nil {
		fmt.Println(err)
	}
	// Output:
	// s,x,y,z,move,class,phi_deg,entry_deg,exit_deg,ae,ap,mrr,h_max,h_mean,feed,violation
	// 0.1000,1.0000,2.0000,-3.0000,0,cut,0.000,0.000,0.000,0.7500,3.0000,2250.00,0.000000,0.000000,1000.00,0
}
