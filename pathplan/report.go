package pathplan

import (
	"bufio"
	"errors"
	"fmt"
	"html"
	"io"
	"math"
	"strings"

	"github.com/chipband/chipband/geom"
)

// WriteReport writes the comparison as one self-contained HTML page: the
// safety caution, the comparison table with the reasons, and per feature
// and strategy a top view of the path coloured by radial engagement, the
// engagement along the path with the band, the planned feed speed over
// time and the flute-wear bars. Everything is inline SVG and CSS: no
// scripts, no fonts or images from the network. The comparison must have
// been made with CompareOptions.Detail for the pictures; without it the
// page holds the tables only. The same comparison gives the same bytes.
func WriteReport(w io.Writer, c *Comparison) error {
	if c == nil {
		return errors.New("report: no comparison")
	}
	bw := bufio.NewWriter(w)
	r := reportWriter{w: bw, c: c}
	r.page()
	return bw.Flush()
}

// reportWriter writes one report.
type reportWriter struct {
	w *bufio.Writer
	c *Comparison
}

func (r *reportWriter) p(format string, args ...any) { fmt.Fprintf(r.w, format, args...) }

func esc(s string) string { return html.EscapeString(s) }

// reportCSS styles the page. System fonts only.
const reportCSS = `
body{font-family:system-ui,-apple-system,"Segoe UI",Roboto,"DejaVu Sans",sans-serif;margin:24px auto;max-width:1320px;padding:0 16px;color:#1d1d1f;background:#fff;line-height:1.4}
h1{font-size:26px;margin:0 0 4px}
h2{font-size:20px;margin:32px 0 6px;border-bottom:1px solid #ccc;padding-bottom:4px}
h3{font-size:16px;margin:12px 0 4px}
.sub{color:#555;margin:0 0 12px}
.caution{border:2px solid #b00020;background:#fff4f4;padding:10px 14px;margin:12px 0 20px;border-radius:6px}
.caution b{color:#b00020}
table{border-collapse:collapse;font-size:13px;margin:8px 0}
th,td{border-bottom:1px solid #ddd;padding:4px 8px;text-align:right;white-space:nowrap}
th{background:#f2f2f2;font-weight:600}
td.l,th.l{text-align:left}
tr.best td{font-weight:600;background:#eef6ee}
tr.first td{border-top:2px solid #999}
.reason{margin:4px 0 10px;max-width:1100px}
.pair{display:grid;grid-template-columns:1fr 1fr;gap:20px}
.col{min-width:0}
.col h3 .tag{font-weight:normal;color:#555;font-size:13px}
.badge{display:inline-block;background:#2b7a3b;color:#fff;border-radius:4px;padding:0 6px;font-size:12px;margin-left:6px}
svg{display:block;max-width:100%;height:auto}
svg text{font-family:system-ui,"DejaVu Sans",sans-serif}
.legend{margin:6px 0 0}
.notes{color:#444;font-size:13px;max-width:1100px}
.warn{color:#8a4b00}
`

func (r *reportWriter) page() {
	c := r.c
	name := c.JobName
	if name == "" {
		name = "job"
	}
	r.p("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n")
	r.p("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n")
	r.p("<title>chipband comparison: %s</title>\n<style>%s</style>\n</head>\n<body>\n", esc(name), reportCSS)
	r.p("<h1>chipband comparison: %s</h1>\n", esc(name))
	if c.Job != nil && c.Job.Description != "" {
		r.p("<p class=\"sub\">%s</p>\n", esc(c.Job.Description))
	}
	mname := c.Machine.Name
	if mname == "" {
		mname = "machine"
	}
	src := map[string]string{"option": "given by the user", "job": "from the job", "default": "built-in default"}[c.MachineSource]
	r.p("<p class=\"sub\">Machine <b>%s</b> (%s): feed up to %s mm/min, acceleration %s mm/s², corner tolerance %s mm. ",
		esc(mname), esc(src), trim(math.Min(c.Machine.MaxFeed.X, c.Machine.MaxFeed.Y)),
		trim(math.Min(c.Machine.Accel.X, c.Machine.Accel.Y)), trim(c.Machine.CornerTolerance))
	if c.Job != nil {
		j := c.Job
		r.p("Tool: flat end mill D%s mm, %d flutes, flute length %s mm; %s rpm, chip load %s mm. ",
			trim(j.Tool.Diameter), j.Tool.Flutes, trim(j.Tool.FluteLength), trim(j.Cut.SpindleRPM), trim(j.Cut.ChipLoad))
	}
	variants := ""
	if v := c.BandedVariants(); len(v) > 0 {
		variants = " Banded: " + esc(strings.Join(v, "; ")) + "."
	}
	r.p("Band %s–%s of D.%s Spindle power for %s. Times from speed model %s; the recommendation follows R1.</p>\n",
		trim(c.Band[0]), trim(c.Band[1]), variants, esc(c.Material), esc(strings.Join(c.Models, " and ")))
	r.p("<div class=\"caution\" id=\"caution\"><b>Caution.</b> %s</div>\n", esc(SafetyCaution))

	r.table()
	r.totals()
	for i, f := range c.Features {
		r.feature(i, f)
	}
	r.notes()
	r.p("</body>\n</html>\n")
}

// table writes the comparison table and the reasons.
func (r *reportWriter) table() {
	c := r.c
	jerk := len(c.Models) > 1
	r.p("<h2>Comparison</h2>\n<table id=\"comparison\">\n<tr><th class=\"l\">feature</th><th class=\"l\">strategy</th><th>levels</th><th>cycle</th>")
	if jerk {
		r.p("<th>jerk model</th>")
	}
	r.p("<th>cutting</th><th>air</th><th>links</th><th>MRR cm³/min</th><th>max ae/D</th><th>mean ae/D</th><th>in band</th><th>flute used</th><th>peak kW</th><th>accel share</th></tr>\n")
	for _, f := range c.Features {
		for i, s := range []FeatureResult{f.Layered, f.Banded} {
			cls := []string{}
			if i == 0 {
				cls = append(cls, "first")
			}
			if s.Strategy == f.Recommended {
				cls = append(cls, "best")
			}
			r.p("<tr class=\"%s\">", strings.Join(cls, " "))
			if i == 0 {
				r.p("<td class=\"l\" rowspan=\"2\">%s</td>", esc(f.Name))
			}
			badge := ""
			if s.Strategy == f.Recommended {
				badge = "<span class=\"badge\">faster</span>"
			}
			r.p("<td class=\"l\">%s%s</td><td>%d</td><td>%s</td>", esc(s.Strategy), badge, s.Levels, esc(FormatSeconds(s.CycleS)))
			if jerk {
				r.p("<td>%s</td>", esc(FormatSeconds(s.JerkS)))
			}
			r.p("<td>%s</td><td>%s</td><td>%s</td><td>%.1f</td><td>%.3f</td><td>%.3f</td><td>%s</td><td>%s</td><td>%.2f</td><td>%s</td></tr>\n",
				esc(FormatSeconds(s.CutS)), esc(FormatSeconds(s.AirS)), esc(FormatSeconds(s.LinkS)),
				s.MRR, s.MaxEngagement, s.MeanAeD, esc(percent(s.InBand)), esc(percent(s.FluteUsage)), s.PeakPowerKW, esc(percent(s.AccelShare)))
		}
	}
	r.p("</table>\n")
	r.p("<ul class=\"reasons\">\n")
	for _, f := range c.Features {
		r.p("<li><b>%s</b>: %s</li>\n", esc(f.Name), esc(f.Reason))
	}
	r.p("</ul>\n")
}

// totals writes the job's totals and warnings.
func (r *reportWriter) totals() {
	t := r.c.Totals
	r.p("<p id=\"totals\"><b>Whole job:</b> layered program %s, banded program %s; each feature with its faster strategy %s.",
		esc(FormatSeconds(t.LayeredS)), esc(FormatSeconds(t.BandedS)), esc(FormatSeconds(t.BestS)))
	if t.LayeredJerkS > 0 {
		r.p(" Jerk-limited model: layered %s, banded %s.", esc(FormatSeconds(t.LayeredJerkS)), esc(FormatSeconds(t.BandedJerkS)))
	}
	r.p("</p>\n")
	for _, w := range r.c.Warnings {
		r.p("<p class=\"warn\">Warning: %s</p>\n", esc(w))
	}
}

// feature writes the pictures of one feature, the strategies side by side.
func (r *reportWriter) feature(i int, f FeatureComparison) {
	kind := "closed"
	if f.Open {
		kind = "open"
	}
	r.p("<h2 id=\"feature-%d\">%s</h2>\n", i+1, esc(f.Name))
	r.p("<p class=\"reason\">%s, %s mm deep (%.1f × D), %s of the tool-centre area in narrow channels. %s</p>\n",
		kind, trim(f.Depth), f.DepthPerD, esc(percent(f.ChannelShare)), esc(f.Reason))
	l, b := f.Layered.Detail, f.Banded.Detail
	if l == nil || b == nil {
		r.p("<p class=\"notes\">No pictures: the comparison was made without detail.</p>\n")
		return
	}
	view := r.viewBounds(i, l, b)
	cmax := engagementScaleMax(r.c.Band)
	maxT := math.Max(l.Time, b.Time)
	maxV := 0.0
	for _, d := range []*Detail{l, b} {
		for _, s := range d.Speed {
			maxV = math.Max(maxV, s.Max)
		}
	}
	r.p("<div class=\"pair\">\n")
	for _, s := range []FeatureResult{f.Layered, f.Banded} {
		badge := ""
		if s.Strategy == f.Recommended {
			badge = "<span class=\"badge\">faster</span>"
		}
		r.p("<div class=\"col\" data-strategy=\"%s\">\n<h3>%s%s <span class=\"tag\">%s, %s</span></h3>\n",
			esc(s.Strategy), esc(s.Strategy), badge, esc(FormatSeconds(s.CycleS)), esc(plural(s.Levels, "level")))
		r.topView(i, s, view, cmax)
		r.engagementPlot(s, s.Detail.PathLength)
		r.speedPlot(s, maxT, maxV)
		r.wearPlot(s)
		r.p("</div>\n")
	}
	r.p("</div>\n")
	r.legend(cmax)
}

// engagementScaleMax is the top of the colour scale: two and a half times
// the band maximum, at least 0.25; higher engagement shows in the top
// colour.
func engagementScaleMax(band [2]float64) float64 {
	return math.Max(0.25, 2.5*band[1])
}

// viewBounds returns the area of the top views of feature i: the feature's
// region inside the stock grown by a tool diameter, and the paths.
func (r *reportWriter) viewBounds(i int, ds ...*Detail) geom.Rect {
	b := geom.EmptyRect()
	if j := r.c.Job; j != nil && i < len(j.Features) {
		in, err := geom.Intersection(j.Features[i].Region, j.Stock.Outline)
		if err == nil {
			b = in.Bounds()
		}
		if !b.Empty() {
			d := j.Tool.Diameter
			b = b.Extend(geom.Point{X: b.Min.X - d, Y: b.Min.Y - d}).Extend(geom.Point{X: b.Max.X + d, Y: b.Max.Y + d})
		}
	}
	if b.Empty() {
		for _, d := range ds {
			for _, run := range d.Runs {
				if run.Class == RunRapid {
					continue
				}
				for _, p := range run.Pts {
					b = b.Extend(p)
				}
			}
		}
	}
	if b.Empty() {
		b = geom.Rect{Max: geom.Point{X: 1, Y: 1}}
	}
	return b
}

// frame maps data coordinates into an SVG plot area.
type frame struct {
	x0, y0, w, h           float64 // plot area in pixels
	xmin, xmax, ymin, ymax float64 // data range
}

func (f frame) X(v float64) float64 {
	if f.xmax <= f.xmin {
		return f.x0
	}
	return f.x0 + (v-f.xmin)/(f.xmax-f.xmin)*f.w
}

func (f frame) Y(v float64) float64 {
	if f.ymax <= f.ymin {
		return f.y0 + f.h
	}
	return f.y0 + f.h - (v-f.ymin)/(f.ymax-f.ymin)*f.h
}

// n formats a pixel coordinate.
func n(v float64) string {
	s := fmt.Sprintf("%.1f", v)
	if s == "-0.0" {
		s = "0.0"
	}
	return strings.TrimSuffix(s, ".0")
}

// topView draws the path of one strategy over the feature.
func (r *reportWriter) topView(fi int, s FeatureResult, view geom.Rect, cmax float64) {
	const width = 620.0
	pad := 8.0
	scale := (width - 2*pad) / math.Max(view.Width(), 1e-9)
	height := math.Min(520, view.Height()*scale+2*pad)
	if view.Height()*scale+2*pad > 520 {
		scale = (520 - 2*pad) / view.Height()
	}
	height = math.Max(height, 60)
	ox := pad + ((width-2*pad)-view.Width()*scale)/2
	oy := pad + ((height-2*pad)-view.Height()*scale)/2
	X := func(p geom.Point) string { return n(ox + (p.X-view.Min.X)*scale) }
	Y := func(p geom.Point) string { return n(oy + (view.Max.Y-p.Y)*scale) }
	r.p("<svg class=\"top\" role=\"img\" aria-label=\"top view of the %s path\" viewBox=\"0 0 %s %s\" width=\"%s\" height=\"%s\">\n",
		esc(s.Strategy), n(width), n(height), n(width), n(height))
	r.p("<title>Top view of the %s path, coloured by radial engagement</title>\n", esc(s.Strategy))
	r.p("<defs><clipPath id=\"clip-%d-%s\"><rect x=\"0\" y=\"0\" width=\"%s\" height=\"%s\"/></clipPath></defs>\n", fi, s.Strategy, n(width), n(height))
	r.p("<rect x=\"0\" y=\"0\" width=\"%s\" height=\"%s\" fill=\"#fafafa\" stroke=\"#ccc\"/>\n", n(width), n(height))
	r.p("<g clip-path=\"url(#clip-%d-%s)\">\n", fi, s.Strategy)
	ring := func(rg geom.Ring) string {
		var b strings.Builder
		for k, p := range rg {
			if k == 0 {
				b.WriteString("M")
			} else {
				b.WriteString(" L")
			}
			b.WriteString(X(p) + " " + Y(p))
		}
		b.WriteString(" Z")
		return b.String()
	}
	shape := func(sh geom.Shape) string {
		var b strings.Builder
		for _, reg := range sh {
			b.WriteString(ring(reg.Outer))
			for _, h := range reg.Holes {
				b.WriteString(" " + ring(h))
			}
		}
		return b.String()
	}
	if j := r.c.Job; j != nil {
		r.p("<path d=\"%s\" fill=\"#e6e2da\" stroke=\"#8a8478\" stroke-width=\"1\" fill-rule=\"evenodd\"/>\n", shape(j.Stock.Outline))
		if fi < len(j.Features) {
			if in, err := geom.Intersection(j.Features[fi].Region, j.Stock.Outline); err == nil {
				r.p("<path d=\"%s\" fill=\"#ffffff\" stroke=\"#555\" stroke-width=\"1\" stroke-dasharray=\"4 3\" fill-rule=\"evenodd\"/>\n", shape(in))
			}
		}
	}
	d := s.Detail
	sw := math.Max(0.6, math.Min(2.2, scale*0.12))
	poly := func(pts []geom.Point) string {
		var b strings.Builder
		for k, p := range pts {
			if k > 0 {
				b.WriteByte(' ')
			}
			b.WriteString(X(p) + "," + Y(p))
		}
		return b.String()
	}
	// Air moves first, then cuts, rapids on top, thin and grey.
	for _, run := range d.Runs {
		if run.Class == RunAir {
			r.p("<polyline points=\"%s\" fill=\"none\" stroke=\"#b9c3cc\" stroke-width=\"%s\"/>\n", poly(run.Pts), n(sw*0.7))
		}
	}
	for _, run := range d.Runs {
		if run.Class == RunCut {
			r.p("<polyline points=\"%s\" fill=\"none\" stroke=\"%s\" stroke-width=\"%s\" stroke-linejoin=\"round\"/>\n",
				poly(run.Pts), reportViridis(run.AeD/cmax), n(sw))
		}
	}
	for _, run := range d.Runs {
		if run.Class == RunRapid {
			r.p("<polyline points=\"%s\" fill=\"none\" stroke=\"#8c8c8c\" stroke-width=\"0.6\" stroke-dasharray=\"3 2\"/>\n", poly(run.Pts))
		}
	}
	r.p("</g>\n")
	// Scale bar.
	bar := niceStep(view.Width() / 5)
	bx, by := 12.0, height-12
	r.p("<g font-size=\"11\" fill=\"#333\"><rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"4\" fill=\"#333\"/><text x=\"%s\" y=\"%s\">%s mm</text></g>\n",
		n(bx), n(by-4), n(bar*scale), n(bx+bar*scale+6), n(by), trim(bar))
	r.p("</svg>\n")
}

// legend draws the colour scale of the top views once per feature.
func (r *reportWriter) legend(cmax float64) {
	const w, h = 900.0, 58.0
	x0, bw := 180.0, 440.0
	r.p("<svg class=\"legend\" role=\"img\" aria-label=\"legend\" viewBox=\"0 0 %s %s\" width=\"%s\" height=\"%s\">\n", n(w), n(h), n(w), n(h))
	r.p("<text x=\"0\" y=\"22\" font-size=\"12\" fill=\"#333\">radial engagement ae/D</text>\n")
	steps := 64
	for k := 0; k < steps; k++ {
		t := (float64(k) + 0.5) / float64(steps)
		r.p("<rect x=\"%s\" y=\"10\" width=\"%s\" height=\"14\" fill=\"%s\"/>\n", n(x0+bw*float64(k)/float64(steps)), n(bw/float64(steps)+0.3), reportViridis(t))
	}
	// Band bracket.
	b0, b1 := x0+bw*r.c.Band[0]/cmax, x0+bw*math.Min(1, r.c.Band[1]/cmax)
	r.p("<path d=\"M%s 8 V4 H%s V8\" fill=\"none\" stroke=\"#b00020\" stroke-width=\"1.5\"/>\n", n(b0), n(b1))
	for _, v := range ticks(0, cmax, 5) {
		x := x0 + bw*v/cmax
		label := trim(v)
		if v >= cmax*(1-1e-9) {
			label = "≥ " + label
		}
		r.p("<line x1=\"%s\" y1=\"24\" x2=\"%s\" y2=\"28\" stroke=\"#333\"/><text x=\"%s\" y=\"40\" font-size=\"11\" fill=\"#333\" text-anchor=\"middle\">%s</text>\n", n(x), n(x), n(x), label)
	}
	r.p("<text x=\"%s\" y=\"54\" font-size=\"11\" fill=\"#b00020\" text-anchor=\"middle\">band %s–%s</text>\n", n((b0+b1)/2), trim(r.c.Band[0]), trim(r.c.Band[1]))
	lx := x0 + bw + 80
	r.p("<line x1=\"%s\" y1=\"17\" x2=\"%s\" y2=\"17\" stroke=\"#b9c3cc\" stroke-width=\"2\"/><text x=\"%s\" y=\"21\" font-size=\"11\" fill=\"#333\">feed through air</text>\n", n(lx), n(lx+24), n(lx+30))
	r.p("<line x1=\"%s\" y1=\"37\" x2=\"%s\" y2=\"37\" stroke=\"#8c8c8c\" stroke-width=\"0.6\" stroke-dasharray=\"3 2\"/><text x=\"%s\" y=\"41\" font-size=\"11\" fill=\"#333\">rapid</text>\n", n(lx), n(lx+24), n(lx+30))
	r.p("</svg>\n")
}

// plot opens an SVG plot with axes, ticks and labels and returns its frame.
func (r *reportWriter) plot(class, title, xlabel, ylabel string, xmax, ymax float64, yticks []float64, yfmt func(float64) string) frame {
	const w, h = 620.0, 210.0
	f := frame{x0: 56, y0: 24, w: w - 56 - 16, h: h - 24 - 44, xmin: 0, xmax: xmax, ymin: 0, ymax: ymax}
	r.p("<svg class=\"%s\" role=\"img\" aria-label=\"%s\" viewBox=\"0 0 %s %s\" width=\"%s\" height=\"%s\">\n", class, esc(title), n(w), n(h), n(w), n(h))
	r.p("<text x=\"%s\" y=\"15\" font-size=\"13\" font-weight=\"600\" fill=\"#222\">%s</text>\n", n(f.x0), esc(title))
	r.p("<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"#fcfcfc\" stroke=\"#bbb\"/>\n", n(f.x0), n(f.y0), n(f.w), n(f.h))
	r.p("<g font-size=\"11\" fill=\"#333\">\n")
	for _, v := range yticks {
		y := f.Y(v)
		r.p("<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"#e4e4e4\"/>", n(f.x0), n(y), n(f.x0+f.w), n(y))
		r.p("<text x=\"%s\" y=\"%s\" text-anchor=\"end\">%s</text>\n", n(f.x0-5), n(y+4), yfmt(v))
	}
	for _, v := range ticks(0, xmax, 6) {
		x := f.X(v)
		r.p("<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"#888\"/>", n(x), n(f.y0+f.h), n(x), n(f.y0+f.h+4))
		r.p("<text x=\"%s\" y=\"%s\" text-anchor=\"middle\">%s</text>\n", n(x), n(f.y0+f.h+16), trim(v))
	}
	r.p("<text x=\"%s\" y=\"%s\" text-anchor=\"middle\">%s</text>\n", n(f.x0+f.w/2), n(h-6), esc(xlabel))
	r.p("<text transform=\"translate(14 %s) rotate(-90)\" text-anchor=\"middle\">%s</text>\n", n(f.y0+f.h/2), esc(ylabel))
	r.p("</g>\n")
	return f
}

// engagementPlot draws ae/D along the path with the band.
func (r *reportWriter) engagementPlot(s FeatureResult, maxS float64) {
	maxS = math.Max(maxS, 1)
	d := s.Detail
	unit, div := "mm", 1.0
	if maxS > 5000 {
		unit, div = "m", 1000
	}
	f := r.plot("engagement", "Radial engagement along the path", "path length, "+unit, "ae/D",
		maxS/div, 1, []float64{0, 0.1, 0.25, 0.5, 0.75, 1}, trim)
	band := r.c.Band
	r.p("<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"#b00020\" fill-opacity=\"0.18\"/>\n",
		n(f.x0), n(f.Y(band[1])), n(f.w), n(math.Max(1, f.Y(band[0])-f.Y(band[1]))))
	// Largest ae/D per bucket as filled area, mean as a line.
	var area, mean strings.Builder
	area.WriteString("M" + n(f.X(0)) + " " + n(f.Y(0)))
	first := true
	for _, e := range d.Engagement {
		xa, xb := f.X(e.S0/div), f.X(e.S1/div)
		area.WriteString(" L" + n(xa) + " " + n(f.Y(e.Max)) + " L" + n(xb) + " " + n(f.Y(e.Max)))
		if e.Mean > 0 {
			if first {
				mean.WriteString("M")
				first = false
			} else {
				mean.WriteString(" L")
			}
			mean.WriteString(n((xa+xb)/2) + " " + n(f.Y(e.Mean)))
		}
	}
	if k := len(d.Engagement); k > 0 {
		area.WriteString(" L" + n(f.X(d.Engagement[k-1].S1/div)) + " " + n(f.Y(0)) + " Z")
	}
	r.p("<path d=\"%s\" fill=\"%s\" fill-opacity=\"0.55\" stroke=\"none\"/>\n", area.String(), reportViridis(0.25))
	if mean.Len() > 0 {
		r.p("<path d=\"%s\" fill=\"none\" stroke=\"%s\" stroke-width=\"1\"/>\n", mean.String(), reportViridis(0.0))
	}
	r.p("<g font-size=\"11\"><rect x=\"%s\" y=\"6\" width=\"10\" height=\"10\" fill=\"%s\" fill-opacity=\"0.55\"/><text x=\"%s\" y=\"15\" fill=\"#333\">largest</text>",
		n(f.x0+f.w-250), reportViridis(0.25), n(f.x0+f.w-236))
	r.p("<line x1=\"%s\" y1=\"11\" x2=\"%s\" y2=\"11\" stroke=\"%s\"/><text x=\"%s\" y=\"15\" fill=\"#333\">mean</text>",
		n(f.x0+f.w-186), n(f.x0+f.w-172), reportViridis(0), n(f.x0+f.w-168))
	r.p("<rect x=\"%s\" y=\"6\" width=\"10\" height=\"10\" fill=\"#b00020\" fill-opacity=\"0.3\"/><text x=\"%s\" y=\"15\" fill=\"#333\">band %s–%s</text></g>\n",
		n(f.x0+f.w-126), n(f.x0+f.w-112), trim(band[0]), trim(band[1]))
	r.p("</svg>\n")
}

// speedPlot draws the planned path speed over time.
func (r *reportWriter) speedPlot(s FeatureResult, maxT, maxV float64) {
	d := s.Detail
	unit, div := "s", 1.0
	if maxT > 600 {
		unit, div = "min", 60
	}
	ymax := niceCeil(math.Max(maxV, 1))
	f := r.plot("speed", "Planned path speed (R1)", "time, "+unit, "mm/s", maxT/div, ymax, ticks(0, ymax, 4), trim)
	var feed, rapid strings.Builder
	for _, sp := range d.Speed {
		if sp.Max <= 0 && sp.Min <= 0 {
			continue
		}
		x := f.X(sp.T0 / div)
		w := math.Max(0.6, f.X(sp.T1/div)-x)
		y1 := f.Y(sp.Max)
		hgt := math.Max(0.8, f.Y(sp.Min)-y1)
		b := &feed
		if sp.Rapid {
			b = &rapid
		}
		fmt.Fprintf(b, "M%s %sh%sv%sh-%sz", n(x), n(y1), n(w), n(hgt), n(w))
	}
	r.p("<path d=\"%s\" fill=\"%s\"/>\n", feed.String(), reportViridis(0.3))
	if rapid.Len() > 0 {
		r.p("<path d=\"%s\" fill=\"#9a9a9a\"/>\n", rapid.String())
	}
	if j := r.c.Job; j != nil {
		if v := j.Feed() / 60; v > 0 && v < ymax {
			r.p("<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"#b00020\" stroke-dasharray=\"5 3\"/>\n", n(f.x0), n(f.Y(v)), n(f.x0+f.w), n(f.Y(v)))
		}
	}
	r.p("<g font-size=\"11\"><rect x=\"%s\" y=\"6\" width=\"10\" height=\"10\" fill=\"%s\"/><text x=\"%s\" y=\"15\" fill=\"#333\">feed (lowest–highest)</text>",
		n(f.x0+f.w-300), reportViridis(0.3), n(f.x0+f.w-286))
	r.p("<rect x=\"%s\" y=\"6\" width=\"10\" height=\"10\" fill=\"#9a9a9a\"/><text x=\"%s\" y=\"15\" fill=\"#333\">rapid</text>", n(f.x0+f.w-156), n(f.x0+f.w-142))
	r.p("<line x1=\"%s\" y1=\"11\" x2=\"%s\" y2=\"11\" stroke=\"#b00020\" stroke-dasharray=\"5 3\"/><text x=\"%s\" y=\"15\" fill=\"#333\">job feed</text></g>\n",
		n(f.x0+f.w-100), n(f.x0+f.w-80), n(f.x0+f.w-76))
	r.p("</svg>\n")
}

// wearPlot draws the share of the removed volume per flute height band.
func (r *reportWriter) wearPlot(s FeatureResult) {
	d := s.Detail
	const w, h = 620.0, 230.0
	x0, y0, pw, ph := 56.0, 24.0, w-56-16, h-24-44
	total, peak := 0.0, 0.0
	flute := 0.0
	for _, b := range d.Wear {
		total += b.Volume
		flute = math.Max(flute, b.To)
	}
	for _, b := range d.Wear {
		if total > 0 {
			peak = math.Max(peak, b.Volume/total)
		}
	}
	xmax := niceCeil(math.Max(peak, 0.01))
	r.p("<svg class=\"wear\" role=\"img\" aria-label=\"flute wear\" viewBox=\"0 0 %s %s\" width=\"%s\" height=\"%s\">\n", n(w), n(h), n(w), n(h))
	r.p("<text x=\"%s\" y=\"15\" font-size=\"13\" font-weight=\"600\" fill=\"#222\">Flute wear: share of the volume per height (%s of the flute works)</text>\n",
		n(x0), esc(percent(s.FluteUsage)))
	r.p("<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"#fcfcfc\" stroke=\"#bbb\"/>\n", n(x0), n(y0), n(pw), n(ph))
	if flute <= 0 {
		flute = 1
	}
	Y := func(z float64) float64 { return y0 + ph - z/flute*ph }
	X := func(v float64) float64 { return x0 + v/xmax*pw }
	r.p("<g font-size=\"11\" fill=\"#333\">\n")
	for _, v := range ticks(0, flute, 5) {
		r.p("<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"#e4e4e4\"/><text x=\"%s\" y=\"%s\" text-anchor=\"end\">%s</text>\n",
			n(x0), n(Y(v)), n(x0+pw), n(Y(v)), n(x0-5), n(Y(v)+4), trim(v))
	}
	for _, v := range ticks(0, xmax, 5) {
		r.p("<line x1=\"%s\" y1=\"%s\" x2=\"%s\" y2=\"%s\" stroke=\"#888\"/><text x=\"%s\" y=\"%s\" text-anchor=\"middle\">%s</text>\n",
			n(X(v)), n(y0+ph), n(X(v)), n(y0+ph+4), n(X(v)), n(y0+ph+16), esc(percent(v)))
	}
	r.p("<text x=\"%s\" y=\"%s\" text-anchor=\"middle\">share of the removed volume</text>\n", n(x0+pw/2), n(h-6))
	r.p("<text transform=\"translate(14 %s) rotate(-90)\" text-anchor=\"middle\">height above tip, mm</text>\n", n(y0+ph/2))
	r.p("</g>\n")
	for _, b := range d.Wear {
		if total <= 0 || b.Volume <= 0 {
			continue
		}
		v := b.Volume / total
		y1, y2 := Y(b.To), Y(b.From)
		r.p("<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"%s\"/>\n",
			n(x0), n(y1+0.5), n(math.Max(0.8, X(v)-x0)), n(math.Max(0.8, y2-y1-1)), reportViridis(0.15+0.7*v/math.Max(peak, 1e-9)))
	}
	if total <= 0 {
		r.p("<text x=\"%s\" y=\"%s\" font-size=\"12\" fill=\"#555\" text-anchor=\"middle\">no material removed</text>\n", n(x0+pw/2), n(y0+ph/2))
	}
	r.p("</svg>\n")
}

// notes explains the figures.
func (r *reportWriter) notes() {
	r.p("<h2>How to read this report</h2>\n<div class=\"notes\" id=\"notes\">\n")
	r.p("<p>Cycle times come from the acceleration-limited speed model R1 (per-axis feed and rapid caps, a constant acceleration per segment, junction speeds from the corner tolerance, a stop at every change between rapid and feed motion); the jerk-limited model, when the machine gives a jerk, is shown beside it. ")
	r.p("Cutting time is feed motion in material, air time feed motion that cuts nothing, link time links, lifts and rapids. The accel share is the part of the motion time lost to accelerating and braking.</p>\n")
	r.p("<p>Engagement comes from a material-removal simulation: ae/D is the radial width of the cut over the tool diameter, the largest value as a 1 mm moving average. Flute used is the share of the flute length whose height bands are in the cut for at least half as long as the band in the cut the longest. Peak power is the largest cutting power of a sample after Kienzle's specific cutting force with typical constants for the work material; verify force and power figures with the tool maker.</p>\n")
	r.p("<p>The top views show the tool centre seen from above, Y up, at every depth level at once; colours give the largest ae/D of each move on the viridis scale.</p>\n")
	r.p("<p class=\"caution\"><b>Caution.</b> %s</p>\n", esc(SafetyCaution))
	r.p("</div>\n")
}

// reportViridis returns the colour of t in [0, 1] on the viridis scale
// (matplotlib's perceptually uniform scale, nine control points).
func reportViridis(t float64) string {
	stops := [9][3]float64{
		{68, 1, 84}, {71, 44, 122}, {59, 81, 139}, {44, 113, 142}, {33, 144, 141},
		{39, 173, 129}, {92, 200, 99}, {170, 220, 50}, {253, 231, 37},
	}
	if math.IsNaN(t) {
		t = 0
	}
	t = math.Max(0, math.Min(1, t))
	x := t * 8
	i := min(int(x), 7)
	f := x - float64(i)
	a, b := stops[i], stops[i+1]
	return fmt.Sprintf("#%02x%02x%02x", int(a[0]+(b[0]-a[0])*f+0.5), int(a[1]+(b[1]-a[1])*f+0.5), int(a[2]+(b[2]-a[2])*f+0.5))
}

// niceStep returns 1, 2 or 5 times a power of ten near v.
func niceStep(v float64) float64 {
	if !(v > 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(v)))
	switch m := v / p; {
	case m < 1.5:
		return p
	case m < 3.5:
		return 2 * p
	case m < 7.5:
		return 5 * p
	}
	return 10 * p
}

// niceCeil rounds v up to 1, 2, 2.5, 5 or 10 times a power of ten.
func niceCeil(v float64) float64 {
	if !(v > 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if v <= m*p*(1+1e-9) {
			return m * p
		}
	}
	return 10 * p
}

// ticks returns about n round values from lo to hi.
func ticks(lo, hi float64, n int) []float64 {
	if !(hi > lo) || n < 1 {
		return []float64{lo}
	}
	st := niceStep((hi - lo) / float64(n))
	var out []float64
	for k := math.Ceil(lo/st - 1e-9); k*st <= hi*(1+1e-9); k++ {
		v := k * st
		if v == 0 {
			v = 0 // no negative zero
		}
		out = append(out, v)
	}
	return out
}
