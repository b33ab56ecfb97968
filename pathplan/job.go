package pathplan

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/chipband/chipband/geom"
	"github.com/chipband/chipband/timing"
)

// Job is everything a strategy needs to plan a path: the stock, the
// features to clear, the tool and the cut data.
type Job struct {
	// Name and Description are free text for headers and reports.
	Name        string
	Description string
	// Stock is the raw material.
	Stock Stock
	// Features are cleared in this order.
	Features []Feature
	// Tool is the flat end mill.
	Tool Tool
	// Cut holds the cutting data.
	Cut Cut
	// Clearance is the height above the stock top at which the tool
	// traverses at rapid rate, mm.
	Clearance float64
	// Machine, when set, gives the motion limits for cycle-time estimates.
	Machine *timing.Machine
}

// Stock is the raw material: an outline and the Z of its top face.
type Stock struct {
	Outline geom.Shape
	Top     float64
}

// Feature is an area to clear down to a floor Depth below the stock top.
// Holes of the region are islands that stay. Where the region extends past
// the stock outline the feature is open there.
type Feature struct {
	Name   string
	Region geom.Shape
	Depth  float64
}

// Tool is a flat end mill.
type Tool struct {
	Diameter    float64 // mm
	FluteLength float64 // usable flute length, mm
	Flutes      int
}

// Radius returns half the diameter.
func (t Tool) Radius() float64 { return t.Diameter / 2 }

// Layered holds the cut data of the layered strategy.
type Layered struct {
	// Stepover is the distance between neighbouring rings as a fraction of
	// the tool diameter.
	Stepover float64
	// Stepdown is the largest axial depth of one level, mm.
	Stepdown float64
}

// Cut holds the cutting data shared by the strategies.
type Cut struct {
	// Band is the [min, max] radial engagement ae/D the banded strategy
	// holds; zero when not given.
	Band [2]float64
	// Allowance is the stock left on the walls by roughing, mm.
	Allowance float64
	// SpindleRPM is the spindle speed, rev/min.
	SpindleRPM float64
	// ChipLoad is the feed per tooth, mm.
	ChipLoad float64
	// Layered is the layered strategy's data; zero when not given.
	Layered Layered
	// RampAngle is the descent angle of ramp and helix entries, degrees.
	RampAngle float64
	// HelixDiameter is the diameter of the circle the tool centre follows
	// in a helix entry, mm.
	HelixDiameter float64
	// MinPathRadius is the smallest corner radius a path may have, mm
	// (zero: no limit). The layered strategy does not use it.
	MinPathRadius float64
	// Finish asks for a finishing pass along the walls at final size.
	Finish bool
}

// Feed returns the cutting feed, mm/min: chip load × flutes × spindle speed.
func (j *Job) Feed() float64 { return j.Cut.ChipLoad * float64(j.Tool.Flutes) * j.Cut.SpindleRPM }

// DefaultRampAngle is the ramp angle used when the job gives none, degrees
// (3° or less is common practice, no source).
const DefaultRampAngle = 3.0

// JobError is a problem with a job: what is wrong and, when it concerns
// one feature, which.
type JobError struct {
	// Feature is the name of the feature concerned, or empty.
	Feature string
	// Msg says what is wrong.
	Msg string
}

// Error returns `feature "NAME": MSG` or MSG.
func (e *JobError) Error() string {
	if e.Feature != "" {
		return fmt.Sprintf("feature %q: %s", e.Feature, e.Msg)
	}
	return e.Msg
}

func jobErrorf(feature, format string, args ...any) error {
	return &JobError{Feature: feature, Msg: fmt.Sprintf(format, args...)}
}

// IsJobError reports whether err is, or wraps, a *JobError: a problem of
// the job itself rather than of the program.
func IsJobError(err error) bool {
	var je *JobError
	return errors.As(err, &je)
}

// wire forms: pointers tell a missing key from zero.
type jobJSON struct {
	Name        string          `json:"name"`
	Description string          `json:"description"`
	Stock       *stockJSON      `json:"stock"`
	Features    []featureJSON   `json:"features"`
	Tool        *toolJSON       `json:"tool"`
	Cut         *cutJSON        `json:"cut"`
	Clearance   *float64        `json:"clearance"`
	Machine     json.RawMessage `json:"machine"`
}

type stockJSON struct {
	Outline *string  `json:"outline"`
	Top     *float64 `json:"top"`
}

type featureJSON struct {
	Name   *string  `json:"name"`
	Region *string  `json:"region"`
	Depth  *float64 `json:"depth"`
}

type toolJSON struct {
	Diameter    *float64 `json:"diameter"`
	FluteLength *float64 `json:"flute_length"`
	Flutes      *float64 `json:"flutes"`
}

type layeredJSON struct {
	Stepover *float64 `json:"stepover"`
	Stepdown *float64 `json:"stepdown"`
}

type cutJSON struct {
	Band          []float64    `json:"band"`
	Allowance     *float64     `json:"allowance"`
	SpindleRPM    *float64     `json:"spindle_rpm"`
	ChipLoad      *float64     `json:"chip_load"`
	Layered       *layeredJSON `json:"layered"`
	RampAngle     *float64     `json:"ramp_angle"`
	HelixDiameter *float64     `json:"helix_diameter"`
	MinPathRadius *float64     `json:"min_path_radius"`
	Finish        bool         `json:"finish"`
}

// ReadJob reads a job file (JSON, millimetres; design notes §7):
//
//	{"name": "...", "description": "...",
//	 "stock": {"outline": "POLYGON ((...))", "top": 0},
//	 "features": [{"name": "...", "region": "POLYGON (...)", "depth": 5}],
//	 "tool": {"diameter": 6, "flute_length": 20, "flutes": 3},
//	 "cut": {"band": [0.05, 0.1], "allowance": 0, "spindle_rpm": 18000,
//	         "chip_load": 0.04, "layered": {"stepover": 0.5, "stepdown": 1},
//	         "ramp_angle": 3, "helix_diameter": 3, "min_path_radius": 0,
//	         "finish": false},
//	 "clearance": 5,
//	 "machine": {...}}
//
// The stock outline and feature regions are WKT, or references to an SVG
// drawing such as "svg:plate.svg#pocket" (see SVGPrefix).
//
// name, description, cut.band, cut.allowance (0), cut.layered, ramp_angle
// (DefaultRampAngle), helix_diameter (half the tool diameter),
// min_path_radius (0), finish (false) and machine (the machine file of the
// timing package) are optional; every other key is required. Unknown keys
// are errors. The job is validated with Job.Validate. Errors name the key or
// feature; the caller adds the file name.
func ReadJob(r io.Reader) (*Job, error) { return readJob(r, "") }

// readJob is ReadJob with the directory that "svg:" references are
// relative to ("" for the working directory).
func readJob(r io.Reader, dir string) (*Job, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("reading job: %w", err)
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var w jobJSON
	if err := dec.Decode(&w); err != nil {
		return nil, jsonError(data, err, dec.InputOffset())
	}
	if _, err := dec.Token(); !errors.Is(err, io.EOF) {
		return nil, jobErrorf("", "unexpected data after the JSON object")
	}
	j, err := w.job(dir)
	if err != nil {
		return nil, err
	}
	if err := j.Validate(); err != nil {
		return nil, err
	}
	return j, nil
}

// LoadJob reads the job file at path (see ReadJob); errors start with the
// path.
func LoadJob(path string) (*Job, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	j, err := readJob(f, filepath.Dir(path))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return j, nil
}

// jsonError turns a decoding error into a JobError with a line number; at
// is the decoder's offset when it stopped, used where the error has none.
func jsonError(data []byte, err error, at int64) error {
	line := func(off int64) int {
		if off > int64(len(data)) {
			off = int64(len(data))
		}
		return 1 + bytes.Count(data[:off], []byte("\n"))
	}
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.Is(err, io.EOF):
		return jobErrorf("", "empty job file")
	case errors.As(err, &se):
		return jobErrorf("", "line %d: JSON syntax: %v", line(se.Offset), se)
	case errors.As(err, &te):
		return jobErrorf("", "line %d: key %q: expected %v, got JSON %s", line(te.Offset), te.Field, te.Type, te.Value)
	case strings.HasPrefix(err.Error(), "json: unknown field "):
		return jobErrorf("", "line %d: unknown key %s", line(at), strings.TrimPrefix(err.Error(), "json: unknown field "))
	}
	return jobErrorf("", "JSON: %v", err)
}

func missing(key string) error { return jobErrorf("", "missing key %q", key) }

// SVGPrefix starts a shape reference to an SVG drawing in a job file:
// "svg:FILE" reads every closed outline of FILE and "svg:FILE#ID" only the
// element with that id (with its children, for a group), through
// geom.ParseSVGWith. FILE is relative to the job file's directory.
const SVGPrefix = "svg:"

// parseShape reads a stock outline or feature region: WKT text or an SVG
// reference (see SVGPrefix).
func parseShape(s, dir string) (geom.Shape, error) {
	ref, ok := strings.CutPrefix(strings.TrimSpace(s), SVGPrefix)
	if !ok {
		return geom.ParseWKT(s)
	}
	file, id, _ := strings.Cut(ref, "#")
	if file == "" {
		return nil, fmt.Errorf("%q names no SVG file", s)
	}
	if !filepath.IsAbs(file) && dir != "" {
		file = filepath.Join(dir, file)
	}
	f, err := os.Open(file)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	shape, err := geom.ParseSVGWith(f, geom.SVGOptions{ID: id})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", file, err)
	}
	return shape, nil
}

func (w *jobJSON) job(dir string) (*Job, error) {
	j := &Job{Name: w.Name, Description: w.Description}
	if w.Stock == nil {
		return nil, missing("stock")
	}
	if w.Stock.Outline == nil {
		return nil, missing("stock.outline")
	}
	if w.Stock.Top == nil {
		return nil, missing("stock.top")
	}
	outline, err := parseShape(*w.Stock.Outline, dir)
	if err != nil {
		return nil, jobErrorf("", "stock.outline: %v", err)
	}
	j.Stock = Stock{Outline: outline, Top: *w.Stock.Top}
	if w.Features == nil {
		return nil, missing("features")
	}
	for i, f := range w.Features {
		if f.Name == nil {
			return nil, missing(fmt.Sprintf("features[%d].name", i))
		}
		name := *f.Name
		if f.Region == nil {
			return nil, jobErrorf(name, "missing key %q", "region")
		}
		if f.Depth == nil {
			return nil, jobErrorf(name, "missing key %q", "depth")
		}
		region, err := parseShape(*f.Region, dir)
		if err != nil {
			return nil, jobErrorf(name, "region: %v", err)
		}
		j.Features = append(j.Features, Feature{Name: name, Region: region, Depth: *f.Depth})
	}
	if w.Tool == nil {
		return nil, missing("tool")
	}
	for _, k := range []struct {
		key string
		v   *float64
	}{{"tool.diameter", w.Tool.Diameter}, {"tool.flute_length", w.Tool.FluteLength}, {"tool.flutes", w.Tool.Flutes}} {
		if k.v == nil {
			return nil, missing(k.key)
		}
	}
	fl := *w.Tool.Flutes
	if fl != math.Trunc(fl) || fl < 1 || fl > 1000 {
		return nil, jobErrorf("", "tool.flutes must be a whole number of at least 1, got %v", fl)
	}
	j.Tool = Tool{Diameter: *w.Tool.Diameter, FluteLength: *w.Tool.FluteLength, Flutes: int(fl)}
	if w.Cut == nil {
		return nil, missing("cut")
	}
	c := w.Cut
	if c.SpindleRPM == nil {
		return nil, missing("cut.spindle_rpm")
	}
	if c.ChipLoad == nil {
		return nil, missing("cut.chip_load")
	}
	j.Cut = Cut{SpindleRPM: *c.SpindleRPM, ChipLoad: *c.ChipLoad, Finish: c.Finish, RampAngle: DefaultRampAngle,
		HelixDiameter: j.Tool.Diameter / 2}
	if c.Band != nil {
		if len(c.Band) != 2 {
			return nil, jobErrorf("", "cut.band must be [min, max], got %d numbers", len(c.Band))
		}
		j.Cut.Band = [2]float64{c.Band[0], c.Band[1]}
	}
	if c.Allowance != nil {
		j.Cut.Allowance = *c.Allowance
	}
	if c.Layered != nil {
		if c.Layered.Stepover == nil {
			return nil, missing("cut.layered.stepover")
		}
		if c.Layered.Stepdown == nil {
			return nil, missing("cut.layered.stepdown")
		}
		j.Cut.Layered = Layered{Stepover: *c.Layered.Stepover, Stepdown: *c.Layered.Stepdown}
	}
	if c.RampAngle != nil {
		j.Cut.RampAngle = *c.RampAngle
	}
	if c.HelixDiameter != nil {
		j.Cut.HelixDiameter = *c.HelixDiameter
	}
	if c.MinPathRadius != nil {
		j.Cut.MinPathRadius = *c.MinPathRadius
	}
	if w.Clearance == nil {
		return nil, missing("clearance")
	}
	j.Clearance = *w.Clearance
	if len(w.Machine) > 0 && string(w.Machine) != "null" {
		m, err := timing.ReadMachine(bytes.NewReader(w.Machine))
		if err != nil {
			return nil, jobErrorf("", "%v", err)
		}
		j.Machine = &m
	}
	return j, nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Validate checks the job without planning: positive, finite sizes and
// rates; stepover in (0, 0.95] of the diameter and step-down in
// (0, flute length]; band 0 < min ≤ max ≤ 1; ramp angle in (0, 45]°;
// unique, non-empty feature names; positive depths; every feature region
// at least partly inside the stock. The first problem is returned as a
// *JobError naming the key or feature. Problems that need the geometry of
// the tool, such as a feature too narrow for it, are found when planning.
func (j *Job) Validate() error {
	pos := func(key string, v float64) error {
		if !finite(v) || v <= 0 {
			return jobErrorf("", "%s must be a positive number, got %v", key, v)
		}
		return nil
	}
	if err := j.Stock.Outline.Validate(); err != nil || len(j.Stock.Outline) == 0 {
		if err == nil {
			err = errors.New("empty")
		}
		return jobErrorf("", "stock.outline: %v", err)
	}
	if !finite(j.Stock.Top) {
		return jobErrorf("", "stock.top must be a finite number, got %v", j.Stock.Top)
	}
	for _, c := range []struct {
		key string
		v   float64
	}{
		{"tool.diameter", j.Tool.Diameter}, {"tool.flute_length", j.Tool.FluteLength},
		{"cut.spindle_rpm", j.Cut.SpindleRPM}, {"cut.chip_load", j.Cut.ChipLoad},
		{"clearance", j.Clearance}, {"cut.helix_diameter", j.Cut.HelixDiameter},
	} {
		if err := pos(c.key, c.v); err != nil {
			return err
		}
	}
	if j.Tool.Flutes < 1 {
		return jobErrorf("", "tool.flutes must be at least 1, got %d", j.Tool.Flutes)
	}
	if !finite(j.Cut.Allowance) || j.Cut.Allowance < 0 || j.Cut.Allowance >= j.Tool.Diameter {
		return jobErrorf("", "cut.allowance must be zero or positive and less than the tool diameter, got %v", j.Cut.Allowance)
	}
	if !finite(j.Cut.MinPathRadius) || j.Cut.MinPathRadius < 0 {
		return jobErrorf("", "cut.min_path_radius must be zero or positive, got %v", j.Cut.MinPathRadius)
	}
	if a := j.Cut.RampAngle; !finite(a) || a <= 0 || a > 45 {
		return jobErrorf("", "cut.ramp_angle must be in (0, 45] degrees, got %v", a)
	}
	if b := j.Cut.Band; b != [2]float64{} {
		if !finite(b[0]) || !finite(b[1]) || b[0] <= 0 || b[1] > 1 {
			return jobErrorf("", "cut.band must lie in (0, 1] of the tool diameter, got [%v, %v]", b[0], b[1])
		}
		if b[0] > b[1] {
			return jobErrorf("", "cut.band min %v is greater than max %v", b[0], b[1])
		}
	}
	if l := j.Cut.Layered; l != (Layered{}) {
		if !finite(l.Stepover) || l.Stepover <= 0 || l.Stepover > 0.95 {
			return jobErrorf("", "cut.layered.stepover must be in (0, 0.95] of the tool diameter, got %v", l.Stepover)
		}
		if !finite(l.Stepdown) || l.Stepdown <= 0 || l.Stepdown > j.Tool.FluteLength {
			return jobErrorf("", "cut.layered.stepdown must be in (0, %v] mm (the flute length), got %v", j.Tool.FluteLength, l.Stepdown)
		}
	}
	if len(j.Features) == 0 {
		return jobErrorf("", "features: no feature to cut")
	}
	seen := map[string]bool{}
	for _, f := range j.Features {
		if strings.TrimSpace(f.Name) == "" {
			return jobErrorf("", "features: a feature has an empty name")
		}
		if seen[f.Name] {
			return jobErrorf(f.Name, "name used by two features")
		}
		seen[f.Name] = true
		if !finite(f.Depth) || f.Depth <= 0 {
			return jobErrorf(f.Name, "depth must be positive, got %v", f.Depth)
		}
		if err := f.Region.Validate(); err != nil || len(f.Region) == 0 {
			if err == nil {
				err = errors.New("empty")
			}
			return jobErrorf(f.Name, "region: %v", err)
		}
		in, err := geom.Intersection(f.Region, j.Stock.Outline)
		if err != nil {
			return jobErrorf(f.Name, "region against the stock: %v", err)
		}
		if in.Area() <= 1e-9*math.Max(1, f.Region.Area()) {
			return jobErrorf(f.Name, "region lies entirely outside the stock")
		}
	}
	return nil
}
