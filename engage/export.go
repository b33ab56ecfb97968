package engage

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/chipband/chipband/geom"
)

// csvHeader names the columns of WriteCSV.
const csvHeader = "s,x,y,z,move,class,phi_deg,entry_deg,exit_deg,ae,ap,mrr,h_max,h_mean,feed,violation\n"

// WriteCSV writes a profile as comma-separated values with a header line.
// Lengths have 4 decimals (0.1 µm), angles 3, rates 2 and chip
// thicknesses 6, so the same profile always gives the same bytes.
func WriteCSV(w io.Writer, prof []Sample) error {
	bw := bufio.NewWriter(w)
	bw.WriteString(csvHeader)
	buf := make([]byte, 0, 256)
	deg := 180 / math.Pi
	for _, s := range prof {
		buf = buf[:0]
		buf = fixed(buf, s.S, 4)
		buf = fixed(append(buf, ','), s.X, 4)
		buf = fixed(append(buf, ','), s.Y, 4)
		buf = fixed(append(buf, ','), s.Z, 4)
		buf = strconv.AppendInt(append(buf, ','), int64(s.Move), 10)
		buf = append(append(buf, ','), s.Class.String()...)
		buf = fixed(append(buf, ','), s.Phi*deg, 3)
		buf = fixed(append(buf, ','), s.Entry*deg, 3)
		buf = fixed(append(buf, ','), s.Exit*deg, 3)
		buf = fixed(append(buf, ','), s.AE, 4)
		buf = fixed(append(buf, ','), s.AP, 4)
		buf = fixed(append(buf, ','), s.MRR, 2)
		buf = fixed(append(buf, ','), s.HMax, 6)
		buf = fixed(append(buf, ','), s.HMean, 6)
		buf = fixed(append(buf, ','), s.Feed, 2)
		if s.Violation {
			buf = append(buf, ",1\n"...)
		} else {
			buf = append(buf, ",0\n"...)
		}
		if _, err := bw.Write(buf); err != nil {
			return fmt.Errorf("write profile: %w", err)
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("write profile: %w", err)
	}
	return nil
}

// fixed appends v with d decimals, writing 0 for NaN and infinities and
// never "-0".
func fixed(b []byte, v float64, d int) []byte {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		v = 0
	}
	p := math.Pow(10, float64(d))
	v = math.Round(v*p) / p
	if v == 0 {
		v = 0 // drops the sign of −0
	}
	return strconv.AppendFloat(b, v, 'f', d, 64)
}

// round returns v rounded to d decimals (0 for NaN and infinities).
func round(v float64, d int) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0
	}
	p := math.Pow(10, float64(d))
	v = math.Round(v*p) / p
	if v == 0 {
		return 0
	}
	return v
}

// jsonSample is the JSON form of a Sample.
type jsonSample struct {
	S         float64 `json:"s"`
	X         float64 `json:"x"`
	Y         float64 `json:"y"`
	Z         float64 `json:"z"`
	Move      int     `json:"move"`
	Class     string  `json:"class"`
	Phi       float64 `json:"phi_deg"`
	Entry     float64 `json:"entry_deg"`
	Exit      float64 `json:"exit_deg"`
	AE        float64 `json:"ae"`
	AP        float64 `json:"ap"`
	MRR       float64 `json:"mrr"`
	HMax      float64 `json:"h_max"`
	HMean     float64 `json:"h_mean"`
	Feed      float64 `json:"feed"`
	Violation bool    `json:"violation,omitempty"`
}

// jsonResult is the JSON form of a Result.
type jsonResult struct {
	Summary Summary      `json:"summary"`
	Profile []jsonSample `json:"profile"`
}

// WriteJSON writes the summary and profile of res as JSON, with the same
// rounding as WriteCSV, so the same result always gives the same bytes.
func WriteJSON(w io.Writer, res *Result) error {
	if res == nil {
		return fmt.Errorf("write profile: no result")
	}
	deg := 180 / math.Pi
	out := jsonResult{Summary: roundSummary(res.Summary), Profile: make([]jsonSample, len(res.Profile))}
	for i, s := range res.Profile {
		out.Profile[i] = jsonSample{
			S: round(s.S, 4), X: round(s.X, 4), Y: round(s.Y, 4), Z: round(s.Z, 4),
			Move: s.Move, Class: s.Class.String(),
			Phi: round(s.Phi*deg, 3), Entry: round(s.Entry*deg, 3), Exit: round(s.Exit*deg, 3),
			AE: round(s.AE, 4), AP: round(s.AP, 4), MRR: round(s.MRR, 2),
			HMax: round(s.HMax, 6), HMean: round(s.HMean, 6), Feed: round(s.Feed, 2),
			Violation: s.Violation,
		}
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", " ")
	if err := enc.Encode(out); err != nil {
		return fmt.Errorf("write profile: %w", err)
	}
	return nil
}

// WriteSummaryJSON writes only the summary of res as indented JSON.
func WriteSummaryJSON(w io.Writer, sum Summary) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	if err := enc.Encode(roundSummary(sum)); err != nil {
		return fmt.Errorf("write summary: %w", err)
	}
	return nil
}

// roundSummary rounds the figures of a summary for stable output.
func roundSummary(s Summary) Summary {
	r4 := func(p *float64) { *p = round(*p, 4) }
	for _, p := range []*float64{&s.Length, &s.CutLength, &s.EntryLength, &s.PlungeLength, &s.AirLength, &s.RapidLength,
		&s.MaxAeD, &s.MeanAeD, &s.MaxPhi, &s.MeanPhi, &s.MaxEng, &s.MaxEngFull, &s.InBandFraction, &s.AboveBandFraction, &s.AirFraction,
		&s.MaxAP, &s.BeyondFlute, &s.MaxGouge, &s.GougeAt.X, &s.GougeAt.Y, &s.GougeAt.Z} {
		r4(p)
	}
	s.Volume = round(s.Volume, 1)
	v := make([]Violation, len(s.RapidViolations))
	for i, x := range s.RapidViolations {
		x.At = pt3Round(x.At)
		x.Depth = round(x.Depth, 4)
		v[i] = x
	}
	s.RapidViolations = v
	t := make([]TargetResidual, len(s.Targets))
	for i, x := range s.Targets {
		x.UncutArea, x.MaxAbove, x.FloorGouge = round(x.UncutArea, 3), round(x.MaxAbove, 4), round(x.FloorGouge, 4)
		t[i] = x
	}
	if len(t) > 0 {
		s.Targets = t
	}
	return s
}

func pt3Round(p geom.Point3) geom.Point3 {
	return geom.Point3{X: round(p.X, 4), Y: round(p.Y, 4), Z: round(p.Z, 4)}
}
