package engage

import (
	"fmt"
	"math"
)

// Kienzle holds the constants of Kienzle's specific cutting force
// kc = kc1.1 · h^−mc (Kienzle 1952), with h the chip thickness in mm.
type Kienzle struct {
	Kc11 float64 // specific cutting force at h = 1 mm and b = 1 mm, N/mm²
	Mc   float64 // exponent, usually 0.15–0.35
}

// Validate reports whether k can be used.
func (k Kienzle) Validate() error {
	switch {
	case !finite(k.Kc11) || k.Kc11 <= 0:
		return fmt.Errorf("kienzle: kc1.1 must be positive, got %v N/mm²", k.Kc11)
	case !finite(k.Mc) || k.Mc < 0 || k.Mc >= 1:
		return fmt.Errorf("kienzle: mc must be in [0, 1), got %v", k.Mc)
	}
	return nil
}

// Kc returns the specific cutting force in N/mm² at chip thickness h (mm);
// 0 for h ≤ 0.
func (k Kienzle) Kc(h float64) float64 {
	if h <= 0 {
		return 0
	}
	return k.Kc11 * math.Pow(h, -k.Mc)
}

// WorkMaterial is an entry of the table of typical Kienzle constants.
type WorkMaterial struct {
	Name    string
	Kienzle Kienzle
	Note    string
}

// TypicalKienzle returns a small table of typical Kienzle constants. The
// values are rough, from memory; verify them with the tool maker before
// relying on a force or power figure.
func TypicalKienzle() []WorkMaterial {
	return []WorkMaterial{
		// from memory, verify with the tool maker
		{"steel", Kienzle{Kc11: 1800, Mc: 0.25}, "unalloyed structural steel; from memory, verify with the tool maker"},
		// from memory, verify with the tool maker
		{"stainless", Kienzle{Kc11: 2300, Mc: 0.21}, "austenitic stainless steel; from memory, verify with the tool maker"},
		// from memory, verify with the tool maker
		{"aluminium", Kienzle{Kc11: 700, Mc: 0.25}, "wrought aluminium alloy; from memory, verify with the tool maker"},
		// from memory, verify with the tool maker
		{"cast iron", Kienzle{Kc11: 1100, Mc: 0.26}, "grey cast iron; from memory, verify with the tool maker"},
		// from memory, verify with the tool maker
		{"brass", Kienzle{Kc11: 780, Mc: 0.18}, "free-cutting brass; from memory, verify with the tool maker"},
		// from memory, verify with the tool maker
		{"plastic", Kienzle{Kc11: 150, Mc: 0.20}, "rigid engineering plastic; from memory, verify with the tool maker"},
	}
}

// LookupKienzle returns the typical constants of the named work material.
func LookupKienzle(name string) (Kienzle, error) {
	var names []string
	for _, w := range TypicalKienzle() {
		if w.Name == name {
			return w.Kienzle, nil
		}
		names = append(names, w.Name)
	}
	return Kienzle{}, fmt.Errorf("kienzle: unknown work material %q (known: %v)", name, names)
}

// Load is the cutting load at one sample.
type Load struct {
	S      float64 // arc length, mm
	Kc     float64 // specific cutting force at the mean chip thickness, N/mm²
	Force  float64 // mean tangential force on one tooth in the cut, N: kc·ap·h_mean
	Torque float64 // mean spindle torque, N·m
	Power  float64 // mean cutting power, kW
}

// Loads returns the cutting force, torque and power along a profile made
// with a spindle speed (SimOptions.SpindleRPM = rpm). The mean tangential
// force per tooth is kc(h_mean)·ap·h_mean; on average φ·z/(2π) teeth are
// in the cut, which gives the torque; power is torque times angular speed,
// the same as kc·MRR for a straight cut (Altintas 2012, ch. 2, from memory).
func Loads(prof []Sample, t Tool, rpm float64, k Kienzle) ([]Load, error) {
	if err := t.Validate(); err != nil {
		return nil, fmt.Errorf("loads: %w", err)
	}
	if err := k.Validate(); err != nil {
		return nil, fmt.Errorf("loads: %w", err)
	}
	if !finite(rpm) || rpm <= 0 {
		return nil, fmt.Errorf("loads: spindle speed must be positive, got %v rpm", rpm)
	}
	out := make([]Load, len(prof))
	r := t.Radius()
	omega := 2 * math.Pi * rpm / 60
	for i, s := range prof {
		out[i].S = s.S
		if s.Class == Air || s.Class == Rapid || s.HMean <= 0 || s.AP <= 0 {
			continue
		}
		kc := k.Kc(s.HMean)
		var torque float64
		if s.Class == Plunge {
			// End teeth: power from the bottom removal rate.
			p := kc * s.MRR / 60 // N·mm/s
			torque = p / omega / 1000
		} else {
			ft := kc * math.Min(s.AP, t.FluteLength) * s.HMean
			out[i].Force = ft
			teeth := s.Phi * float64(t.Flutes) / (2 * math.Pi)
			torque = ft * teeth * r / 1000
		}
		out[i].Kc = kc
		out[i].Torque = torque
		out[i].Power = torque * omega / 1000
	}
	return out, nil
}
