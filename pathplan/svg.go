package pathplan

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/chipband/chipband/geom"
)

// SVGOptions tune the SVG picture. The zero value draws moves coloured by
// kind.
type SVGOptions struct {
	// Width is the picture width in pixels; zero means 900.
	Width float64
	// Engagement, when it has one value per move, colours cutting moves by
	// radial engagement ae/D on a perceptual scale (viridis) from 0 to
	// EngagementMax instead of by kind.
	Engagement    []float64
	EngagementMax float64
}

// kindColour is chipband's own colour for each kind of move.
func kindColour(k geom.MoveKind) string {
	switch k {
	case geom.Rapid:
		return "#9a9a9a"
	case geom.Entry:
		return "#d9480f"
	case geom.Link:
		return "#2b8a3e"
	case geom.Lift:
		return "#862e9c"
	case geom.Finish:
		return "#c2255c"
	}
	return "#1c4f8c"
}

// viridis returns the colour of t in [0, 1] on the viridis scale (the
// perceptually uniform scale of matplotlib, from control points sampled at
// 0, 0.25, 0.5, 0.75 and 1).
func viridis(t float64) string {
	viridisStops := [5][3]float64{
		{68, 1, 84}, {59, 82, 139}, {33, 145, 140}, {94, 201, 98}, {253, 231, 37},
	}
	t = math.Max(0, math.Min(1, t))
	x := t * 4
	i := int(x)
	if i >= 4 {
		i = 3
	}
	f := x - float64(i)
	a, b := viridisStops[i], viridisStops[i+1]
	return fmt.Sprintf("#%02x%02x%02x", int(a[0]+(b[0]-a[0])*f+0.5), int(a[1]+(b[1]-a[1])*f+0.5), int(a[2]+(b[2]-a[2])*f+0.5))
}

// WriteSVG writes a top view of the plan as SVG: the stock outline, the
// feature regions, and the moves — rapids thin, dashed and grey, every
// other kind in its own colour (or by engagement, see SVGOptions), arcs as
// SVG arcs. Y points up as in the job. The same plan gives the same bytes.
func WriteSVG(w io.Writer, p *Plan, opt SVGOptions) error {
	width := opt.Width
	if width <= 0 {
		width = 900
	}
	j := p.Job
	bb := j.Stock.Outline.Bounds()
	for _, f := range j.Features {
		bb = bb.Union(f.Region.Bounds())
	}
	from := p.Path.Start
	for _, m := range p.Path.Moves {
		if m.Kind != geom.Rapid || m.To.Z < j.Stock.Top {
			bb = bb.Extend(m.To.XY())
		}
	}
	pad := 0.04 * math.Max(bb.Width(), bb.Height())
	bb = geom.Rect{Min: geom.Pt(bb.Min.X-pad, bb.Min.Y-pad), Max: geom.Pt(bb.Max.X+pad, bb.Max.Y+pad)}
	scale := width / math.Max(bb.Width(), 1e-9)
	height := bb.Height() * scale
	X := func(x float64) string { return num(x - bb.Min.X) }
	Y := func(y float64) string { return num(bb.Max.Y - y) }
	bw := bufio.NewWriter(w)
	fmt.Fprintf(bw, "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%s\" height=\"%s\" viewBox=\"0 0 %s %s\">\n",
		num(width), num(height), num(bb.Width()), num(bb.Height()))
	title := j.Name
	if title == "" {
		title = "chipband plan"
	}
	fmt.Fprintf(bw, "<title>%s — %s</title>\n", xmlEscape(title), xmlEscape(p.Strategy))
	lw := bb.Width() / width // one pixel in mm
	ringPath := func(s geom.Shape) string {
		var b strings.Builder
		for _, r := range s.Rings() {
			for i, q := range r {
				if i == 0 {
					b.WriteString("M" + X(q.X) + " " + Y(q.Y))
				} else {
					b.WriteString("L" + X(q.X) + " " + Y(q.Y))
				}
			}
			b.WriteString("Z")
		}
		return b.String()
	}
	fmt.Fprintf(bw, "<path d=\"%s\" fill=\"#f1ede4\" stroke=\"#5c5346\" stroke-width=\"%s\"/>\n", ringPath(j.Stock.Outline), num(2*lw))
	for _, f := range j.Features {
		fmt.Fprintf(bw, "<path d=\"%s\" fill=\"#dfe7ef\" fill-opacity=\"0.6\" fill-rule=\"evenodd\" stroke=\"#7a8b99\" stroke-width=\"%s\"><title>%s, depth %s mm</title></path>\n",
			ringPath(f.Region), num(lw), xmlEscape(f.Name), num(f.Depth))
	}
	useEng := len(opt.Engagement) == len(p.Path.Moves) && len(opt.Engagement) > 0
	emax := opt.EngagementMax
	if emax <= 0 {
		emax = 1
	}
	for i, m := range p.Path.Moves {
		d := "M" + X(from.X) + " " + Y(from.Y)
		if m.Arc {
			rad := from.XY().Dist(m.Center)
			sw := geom.ArcSweep(from.XY(), m.To.XY(), m.Center, m.CW)
			// SVG's sweep flag is for a y-down picture: flipping y turns
			// counter-clockwise into clockwise.
			sweep := "1"
			if m.CW {
				sweep = "0"
			}
			if sw > 2*math.Pi-1e-9 {
				// full turn: two half arcs
				opp := m.Center.Scale(2).Sub(from.XY())
				d += fmt.Sprintf("A%s %s 0 0 %s %s %s", num(rad), num(rad), sweep, X(opp.X), Y(opp.Y))
				d += fmt.Sprintf("A%s %s 0 0 %s %s %s", num(rad), num(rad), sweep, X(m.To.X), Y(m.To.Y))
			} else {
				large := "0"
				if sw > math.Pi {
					large = "1"
				}
				d += fmt.Sprintf("A%s %s 0 %s %s %s %s", num(rad), num(rad), large, sweep, X(m.To.X), Y(m.To.Y))
			}
		} else {
			if m.To.XY().Dist(from.XY()) < 1e-9 {
				from = m.To
				continue
			}
			d += "L" + X(m.To.X) + " " + Y(m.To.Y)
		}
		colour := kindColour(m.Kind)
		sw := 1.5 * lw
		extra := ""
		if m.Kind == geom.Rapid {
			sw = 0.6 * lw
			extra = fmt.Sprintf(" stroke-dasharray=\"%s %s\"", num(4*lw), num(3*lw))
		} else if useEng && (m.Kind == geom.Feed || m.Kind == geom.Finish) {
			colour = viridis(opt.Engagement[i] / emax)
		}
		fmt.Fprintf(bw, "<path d=\"%s\" fill=\"none\" stroke=\"%s\" stroke-width=\"%s\"%s/>\n", d, colour, num(sw), extra)
		from = m.To
	}
	// legend
	ly := 3 * lw * 6
	kinds := []geom.MoveKind{geom.Feed, geom.Entry, geom.Link, geom.Lift, geom.Finish, geom.Rapid}
	for i, k := range kinds {
		x := 6*lw + float64(i)*70*lw
		fmt.Fprintf(bw, "<rect x=\"%s\" y=\"%s\" width=\"%s\" height=\"%s\" fill=\"%s\"/>", num(x), num(ly-6*lw), num(10*lw), num(6*lw), kindColour(k))
		fmt.Fprintf(bw, "<text x=\"%s\" y=\"%s\" font-size=\"%s\" font-family=\"sans-serif\">%s</text>\n", num(x+13*lw), num(ly), num(11*lw), k)
	}
	fmt.Fprintln(bw, "</svg>")
	return bw.Flush()
}

func xmlEscape(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch r {
		case '<':
			b.WriteString("&lt;")
		case '>':
			b.WriteString("&gt;")
		case '&':
			b.WriteString("&amp;")
		case '"':
			b.WriteString("&quot;")
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}
