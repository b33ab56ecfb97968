package pathplan

import (
	"bytes"
	"context"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/chipband/chipband/timing"
)

// tinyJob is an invented closed pocket small enough for quick tests.
const tinyJob = `{
  "name": "tiny pocket",
  "stock": {"outline": "POLYGON ((0 0, 50 0, 50 40, 0 40, 0 0))", "top": 0},
  "features": [{"name": "pocket", "region": "POLYGON ((10 10, 40 10, 40 30, 10 30, 10 10))", "depth": 3}],
  "tool": {"diameter": 6, "flute_length": 20, "flutes": 3},
  "cut": {"band": [0.05, 0.1], "spindle_rpm": 18000, "chip_load": 0.03,
          "layered": {"stepover": 0.5, "stepdown": 1.5}},
  "clearance": 5
}`

func readTiny(t *testing.T) *Job {
	t.Helper()
	j, err := ReadJob(strings.NewReader(tinyJob))
	if err != nil {
		t.Fatal(err)
	}
	return j
}

func TestDemoMachineIsTheBenchMillFile(t *testing.T) {
	f, err := os.Open("../testdata/machines/bench-mill.json")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	want, err := timing.ReadMachine(f)
	if err != nil {
		t.Fatal(err)
	}
	if got := DemoMachine(); got != want {
		t.Fatalf("DemoMachine() = %+v, the file says %+v", got, want)
	}
}

func TestCompareMachinePrecedence(t *testing.T) {
	ctx := context.Background()
	job := readTiny(t)
	c, err := Compare(ctx, job, CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if c.MachineSource != "default" || c.Machine != DemoMachine() {
		t.Errorf("no machine anywhere: source %q, machine %q; want the default bench mill", c.MachineSource, c.Machine.Name)
	}
	if len(c.Models) != 2 {
		t.Errorf("the bench mill gives a jerk, so both models should be timed; got %v", c.Models)
	}
	router := DemoMachine()
	router.Name, router.Accel, router.Jerk = "weak router", timing.Axes{X: 120, Y: 120, Z: 80}, timing.Axes{}
	job.Machine = &router
	c, err = Compare(ctx, job, CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if c.MachineSource != "job" || c.Machine.Name != "weak router" || len(c.Models) != 1 {
		t.Errorf("job machine: source %q, machine %q, models %v", c.MachineSource, c.Machine.Name, c.Models)
	}
	flag := DemoMachine()
	flag.Name = "from the flag"
	c2, err := Compare(ctx, job, CompareOptions{Machine: &flag})
	if err != nil {
		t.Fatal(err)
	}
	if c2.MachineSource != "option" || c2.Machine.Name != "from the flag" {
		t.Errorf("option machine: source %q, machine %q", c2.MachineSource, c2.Machine.Name)
	}
	// Lower acceleration cannot make a program faster (trapezoidal
	// kinematics: t = L/v + v/a grows as a falls).
	for i := range c.Features {
		if c.Features[i].Banded.CycleS < c2.Features[i].Banded.CycleS {
			t.Errorf("banded on the weak router %.1f s, on the stiffer machine %.1f s", c.Features[i].Banded.CycleS, c2.Features[i].Banded.CycleS)
		}
	}
}

func TestCompareFiguresAddUp(t *testing.T) {
	job := readTiny(t)
	c, err := Compare(context.Background(), job, CompareOptions{})
	if err != nil {
		t.Fatal(err)
	}
	f := c.Features[0]
	// Prism volume: area × depth (the pocket's square corners keep
	// (1 − π/4)·r² each, which the tool cannot reach).
	want := 30*20*3 - 4*(1-math.Pi/4)*9*3
	for _, r := range []FeatureResult{f.Layered, f.Banded} {
		// The time split is a partition of the feature's time.
		if sum := r.CutS + r.AirS + r.LinkS; math.Abs(sum-r.CycleS) > 1e-6*r.CycleS+1e-9 {
			t.Errorf("%s: cut %.3f + air %.3f + link %.3f = %.3f, cycle %.3f", r.Strategy, r.CutS, r.AirS, r.LinkS, sum, r.CycleS)
		}
		if math.Abs(r.Volume-want) > 0.03*want {
			t.Errorf("%s: removed %.0f mm³, the prism holds %.0f", r.Strategy, r.Volume, want)
		}
		// MRR in cm³/min is volume over time.
		if got := r.Volume / 1000 / (r.CycleS / 60); math.Abs(got-r.MRR) > 1e-9 {
			t.Errorf("%s: MRR %.3f, volume/time %.3f", r.Strategy, r.MRR, got)
		}
		if r.FluteUsage <= 0 || r.FluteUsage > 1 || r.PeakPowerKW <= 0 {
			t.Errorf("%s: flute usage %.3f, peak power %.3f kW", r.Strategy, r.FluteUsage, r.PeakPowerKW)
		}
	}
	// Layered at 1.5 mm step-downs works only the tip of a 20 mm flute;
	// banded at 3 mm full depth works 3 mm of it (common practice).
	if f.Layered.FluteUsage > 1.5/20+0.03 || f.Banded.FluteUsage < 2.5/20 {
		t.Errorf("flute usage: layered %.3f (want ≤ %.3f), banded %.3f (want ≥ %.3f)",
			f.Layered.FluteUsage, 1.5/20+0.03, f.Banded.FluteUsage, 2.5/20)
	}
	if c.Totals.LayeredS < f.Layered.CycleS || c.Totals.BandedS < f.Banded.CycleS {
		t.Errorf("totals %+v below the feature's times", c.Totals)
	}
}

func TestCompareBadInput(t *testing.T) {
	job := readTiny(t)
	if _, err := Compare(context.Background(), job, CompareOptions{Material: "unobtainium"}); !IsJobError(err) {
		t.Errorf("unknown material: err %v, want a JobError", err)
	}
	bad := DemoMachine()
	bad.Accel.X = -1
	if _, err := Compare(context.Background(), job, CompareOptions{Machine: &bad}); !IsJobError(err) {
		t.Errorf("negative acceleration: err %v, want a JobError", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Compare(ctx, job, CompareOptions{}); err == nil {
		t.Error("cancelled context: no error")
	}
}

// TestCompareTestdataRecommendations checks the two testdata jobs made for
// the recommendation.
//
// common practice: deep or open features favour full-depth roughing;
// shallow pockets with narrow zones can favour layered, because the machine
// spends its time braking and accelerating.
func TestCompareTestdataRecommendations(t *testing.T) {
	if testing.Short() {
		t.Skip("plans two jobs both ways")
	}
	practice := map[string]string{
		"channel recess": StrategyLayered, // 2 mm deep, 8 mm channels: shallow and narrow
		"shoulder":       StrategyBanded,  // 15 mm (2.5 × D) deep and open on three sides
	}
	for _, path := range []string{"../testdata/jobs/shallow_channels.json", "../testdata/jobs/deep_open.json"} {
		job, err := LoadJob(path)
		if err != nil {
			t.Fatal(err)
		}
		c, err := Compare(context.Background(), job, CompareOptions{})
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		for _, f := range c.Features {
			t.Logf("%s / %s: layered %.1f s, banded %.1f s -> %s", job.Name, f.Name, f.Layered.CycleS, f.Banded.CycleS, f.Recommended)
			faster := StrategyBanded
			if f.Layered.CycleS < f.Banded.CycleS {
				faster = StrategyLayered
			}
			if f.Recommended != faster {
				t.Errorf("%s: recommended %s, but %s has the shorter simulated time", f.Name, f.Recommended, faster)
			}
			if want, ok := practice[f.Name]; ok && f.Recommended != want {
				t.Errorf("%s: recommended %s (layered %.1f s, banded %.1f s); common practice says %s",
					f.Name, f.Recommended, f.Layered.CycleS, f.Banded.CycleS, want)
			}
			if !strings.HasPrefix(f.Reason, f.Recommended+" is faster") {
				t.Errorf("%s: reason %q does not start with the recommendation", f.Name, f.Reason)
			}
		}
	}
}

func TestFormatSeconds(t *testing.T) {
	for _, c := range []struct {
		s    float64
		want string
	}{
		{0.84, "0.8 s"}, {42.3, "42 s"}, {185, "3 min 05 s"}, {3725, "1 h 02 min"}, {-5, "-5.0 s"},
	} {
		if got := FormatSeconds(c.s); got != c.want {
			t.Errorf("FormatSeconds(%v) = %q, want %q", c.s, got, c.want)
		}
	}
}

func TestReportSelfContainedAndDeterministic(t *testing.T) {
	c, err := Compare(context.Background(), readTiny(t), CompareOptions{Detail: true})
	if err != nil {
		t.Fatal(err)
	}
	var a, b bytes.Buffer
	if err := WriteReport(&a, c); err != nil {
		t.Fatal(err)
	}
	if err := WriteReport(&b, c); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("two reports of one comparison differ")
	}
	page := a.String()
	for _, banned := range []string{"<script", "<link", "http://", "https://", "@import", "<img"} {
		if strings.Contains(page, banned) {
			t.Errorf("report contains %q; it must not load anything", banned)
		}
	}
	for _, want := range []string{esc(SafetyCaution), `id="comparison"`, `class="top"`, `class="engagement"`, `class="speed"`, `class="wear"`, `class="legend"`} {
		if !strings.Contains(page, want) {
			t.Errorf("report lacks %q", want)
		}
	}
	if got := strings.Count(page, `<svg class="top"`); got != 2*len(c.Features) {
		t.Errorf("%d top views, want %d", got, 2*len(c.Features))
	}
}

func TestTicksAndViridis(t *testing.T) {
	got := ticks(0, 1, 4)
	want := []float64{0, 0.2, 0.4, 0.6000000000000001, 0.8, 1}
	if len(got) != len(want) || got[0] != 0 || math.Signbit(got[0]) || math.Abs(got[len(got)-1]-1) > 1e-12 {
		t.Errorf("ticks(0, 1, 4) = %v", got)
	}
	// The ends of the viridis scale (matplotlib's published colour map).
	if reportViridis(0) != "#440154" || reportViridis(1) != "#fde725" {
		t.Errorf("viridis ends %s %s, want #440154 #fde725", reportViridis(0), reportViridis(1))
	}
}
