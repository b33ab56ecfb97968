package timing

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
)

// Axes holds one value per linear axis.
type Axes struct {
	X float64 `json:"x"`
	Y float64 `json:"y"`
	Z float64 `json:"z"`
}

func (a Axes) get(i int) float64 {
	switch i {
	case 0:
		return a.X
	case 1:
		return a.Y
	}
	return a.Z
}

// Machine holds the motion limits that decide how long a program takes.
type Machine struct {
	// Name is free text, for reports.
	Name string `json:"name,omitempty"`
	// MaxFeed is the highest programmable feed per axis, mm/min.
	MaxFeed Axes `json:"max_feed"`
	// Rapid is the rapid traverse rate per axis, mm/min.
	Rapid Axes `json:"rapid"`
	// Accel is the acceleration per axis, mm/s².
	Accel Axes `json:"accel"`
	// Jerk is the jerk per axis, mm/s³. It is only needed by ModelJerk;
	// all zero means not given.
	Jerk Axes `json:"jerk,omitzero"`
	// CornerTolerance is the largest distance the controller may leave the
	// programmed corner when it blends two segments, mm.
	CornerTolerance float64 `json:"corner_tolerance"`
	// ToolChangeS is the time of one tool change (M6), s. Zero counts the
	// change as a stop only.
	ToolChangeS float64 `json:"tool_change_s,omitempty"`
	// SpindleStartS is the time the spindle needs to reach speed after M3
	// or M4, s. When it is positive, motion stops for it.
	SpindleStartS float64 `json:"spindle_start_s,omitempty"`
}

// HasJerk reports whether all three jerk limits are given.
func (m Machine) HasJerk() bool { return m.Jerk.X > 0 && m.Jerk.Y > 0 && m.Jerk.Z > 0 }

// Validate checks that every limit is a finite positive number (jerk: all
// three or none; times: zero or positive) and names the first bad key.
func (m Machine) Validate() error {
	pos := func(key string, v float64) error {
		if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
			return fmt.Errorf("machine: %s must be a positive number, got %v", key, v)
		}
		return nil
	}
	for _, g := range []struct {
		key string
		a   Axes
	}{{"max_feed", m.MaxFeed}, {"rapid", m.Rapid}, {"accel", m.Accel}} {
		for i, ax := range [3]string{"x", "y", "z"} {
			if err := pos(g.key+"."+ax, g.a.get(i)); err != nil {
				return err
			}
		}
	}
	if m.Jerk != (Axes{}) {
		for i, ax := range [3]string{"x", "y", "z"} {
			if err := pos("jerk."+ax, m.Jerk.get(i)); err != nil {
				return err
			}
		}
	}
	if err := pos("corner_tolerance", m.CornerTolerance); err != nil {
		return err
	}
	for _, t := range []struct {
		key string
		v   float64
	}{{"tool_change_s", m.ToolChangeS}, {"spindle_start_s", m.SpindleStartS}} {
		if math.IsNaN(t.v) || math.IsInf(t.v, 0) || t.v < 0 {
			return fmt.Errorf("machine: %s must be zero or a positive number of seconds, got %v", t.key, t.v)
		}
	}
	return nil
}

// jsonAxes is the wire form of Axes; pointers tell a missing key from zero.
type jsonAxes struct {
	X *float64 `json:"x"`
	Y *float64 `json:"y"`
	Z *float64 `json:"z"`
}

type jsonMachine struct {
	Name            string    `json:"name"`
	MaxFeed         *jsonAxes `json:"max_feed"`
	Rapid           *jsonAxes `json:"rapid"`
	Accel           *jsonAxes `json:"accel"`
	Jerk            *jsonAxes `json:"jerk"`
	CornerTolerance *float64  `json:"corner_tolerance"`
	ToolChangeS     float64   `json:"tool_change_s"`
	SpindleStartS   float64   `json:"spindle_start_s"`
}

func (j *jsonAxes) axes(key string) (Axes, error) {
	if j == nil {
		return Axes{}, fmt.Errorf("machine: missing key %q", key)
	}
	var a Axes
	for i, p := range [3]*float64{j.X, j.Y, j.Z} {
		name := key + "." + [3]string{"x", "y", "z"}[i]
		if p == nil {
			return Axes{}, fmt.Errorf("machine: missing key %q", name)
		}
		switch i {
		case 0:
			a.X = *p
		case 1:
			a.Y = *p
		default:
			a.Z = *p
		}
	}
	return a, nil
}

// ReadMachine reads a machine file (JSON, design notes §7): optional
// "name"; "max_feed" and "rapid" as {"x","y","z"} in mm/min; "accel" in
// mm/s²; "corner_tolerance" in mm; optional "jerk" in mm/s³,
// "tool_change_s" and "spindle_start_s" in seconds. Unknown keys, missing
// keys and non-positive limits are errors that name the key.
func ReadMachine(r io.Reader) (Machine, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return Machine{}, fmt.Errorf("machine: %w", err)
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var j jsonMachine
	if err := dec.Decode(&j); err != nil {
		if errors.Is(err, io.EOF) {
			return Machine{}, errors.New("machine: empty file")
		}
		return Machine{}, machineJSONError(data, err)
	}
	if _, err := dec.Token(); !errors.Is(err, io.EOF) {
		return Machine{}, errors.New("machine: unexpected data after the JSON object")
	}
	m := Machine{Name: j.Name, ToolChangeS: j.ToolChangeS, SpindleStartS: j.SpindleStartS}
	if m.MaxFeed, err = j.MaxFeed.axes("max_feed"); err != nil {
		return Machine{}, err
	}
	if m.Rapid, err = j.Rapid.axes("rapid"); err != nil {
		return Machine{}, err
	}
	if m.Accel, err = j.Accel.axes("accel"); err != nil {
		return Machine{}, err
	}
	if j.Jerk != nil {
		if m.Jerk, err = j.Jerk.axes("jerk"); err != nil {
			return Machine{}, err
		}
		if m.Jerk == (Axes{}) {
			return Machine{}, errors.New("machine: jerk.x must be a positive number, got 0")
		}
	}
	if j.CornerTolerance == nil {
		return Machine{}, errors.New(`machine: missing key "corner_tolerance"`)
	}
	m.CornerTolerance = *j.CornerTolerance
	if err := m.Validate(); err != nil {
		return Machine{}, err
	}
	return m, nil
}

// machineJSONError names the line of a JSON syntax or type error and the
// key of a type error or unknown key.
func machineJSONError(data []byte, err error) error {
	line := func(off int64) int {
		off = min(max(off, 0), int64(len(data)))
		return 1 + bytes.Count(data[:off], []byte("\n"))
	}
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.As(err, &se):
		return fmt.Errorf("machine: line %d: JSON syntax: %w", line(se.Offset), err)
	case errors.As(err, &te):
		return fmt.Errorf("machine: line %d: key %q: expected %v, got JSON %s", line(te.Offset), te.Field, te.Type, te.Value)
	case errors.Is(err, io.ErrUnexpectedEOF):
		return fmt.Errorf("machine: line %d: JSON ends early: %w", line(int64(len(data))), err)
	}
	return fmt.Errorf("machine: %w", err)
}
