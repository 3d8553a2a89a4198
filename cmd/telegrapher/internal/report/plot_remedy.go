package report

// Plot builders of the remedy search (trade-offs between a lever and a target):
//
//	RemedyResonancePlot  first resonance (harmonic order) against the added reactor
//	                     rating, the watched harmonics and their bands marked
//	RemedyGainPlot       largest watched-harmonic gain against the added reactor
//	                     rating, the target marked
//	RemedyResistorPlot   switching u2 against the pre-insertion resistor, the target
//	                     and the proposed value marked

import (
	"fmt"
	"image/color"
	"math"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// RemedyResonanceData is the first resonance against a reactor rating.
type RemedyResonanceData struct {
	Mvar          []float64 // added rating at End, Mvar
	FirstHarmonic []float64 // first resonance, harmonic order; 0 = none within the scan
	Watched       []float64 // watched harmonic orders
	Band          float64   // watch band, fraction (0.1 = ±10 %)
	ChosenMvar    float64   // the proposed rating (0 = none)
	End           string    // "sending" or "receiving"
	Gain          []float64 // largest gain within the band of a watched harmonic (RemedyGainPlot)
	TargetGain    float64   // max_gain_watched (0 = none)
}

var (
	rmBlue  = color.RGBA{R: 31, G: 88, B: 165, A: 255}
	rmRed   = color.RGBA{R: 200, G: 40, B: 40, A: 255}
	rmGreen = color.RGBA{R: 20, G: 130, B: 60, A: 255}
	rmBand  = color.NRGBA{R: 240, G: 170, B: 60, A: 90}
)

// RemedyResonancePlot plots the first resonance of the gain |Vr/E| (harmonic order)
// against the reactor added at one end, with each watched harmonic as a line and its
// ±Band as a shaded band, and the proposed rating as a vertical line.
func RemedyResonancePlot(d RemedyResonanceData) *plot.Plot {
	p := plot.New()
	p.Title.Text = fmt.Sprintf("First resonance against the reactor added at the %s end", d.End)
	p.X.Label.Text = "added line-connected reactor (Mvar)"
	p.Y.Label.Text = "first resonance (harmonic order)"
	p.Add(plotter.NewGrid())
	var pts plotter.XYs
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for i, q := range d.Mvar {
		h := d.FirstHarmonic[i]
		if h > 0 {
			pts = append(pts, plotter.XY{X: q, Y: h})
			ymin, ymax = math.Min(ymin, h), math.Max(ymax, h)
		}
	}
	if len(pts) == 0 {
		ymin, ymax = 1, 25
	}
	lo, hi := math.Floor(ymin)-1, math.Ceil(ymax)+1
	xmax := 1.0
	if len(d.Mvar) > 0 {
		xmax = math.Max(d.Mvar[len(d.Mvar)-1], 1)
	}
	first := true
	for _, h := range d.Watched {
		if h < lo || h > hi {
			continue
		}
		band := &plotter.Polygon{XYs: []plotter.XYs{{{X: 0, Y: h * (1 - d.Band)}, {X: xmax, Y: h * (1 - d.Band)}, {X: xmax, Y: h * (1 + d.Band)}, {X: 0, Y: h * (1 + d.Band)}}}}
		band.Color = rmBand
		band.LineStyle.Width = 0
		line, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: h}, {X: xmax, Y: h}})
		line.Color = rmRed
		line.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
		p.Add(band, line)
		if first {
			p.Legend.Add(fmt.Sprintf("watched harmonic ±%.0f %%", d.Band*100), band, line)
			first = false
		}
		lbl, _ := plotter.NewLabels(plotter.XYLabels{XYs: []plotter.XY{{X: xmax, Y: h}}, Labels: []string{fmt.Sprintf("h%.0f", h)}})
		lbl.Offset = vg.Point{X: vg.Points(-16), Y: vg.Points(2)}
		p.Add(lbl)
	}
	if len(pts) > 0 {
		l, s, _ := plotter.NewLinePoints(pts)
		l.Color, l.Width = rmBlue, vg.Points(1.8)
		s.Color, s.Shape, s.Radius = rmBlue, draw.CircleGlyph{}, vg.Points(1.8)
		p.Add(l, s)
		p.Legend.Add("first resonance", l, s)
	}
	if d.ChosenMvar > 0 {
		v, _ := plotter.NewLine(plotter.XYs{{X: d.ChosenMvar, Y: lo}, {X: d.ChosenMvar, Y: hi}})
		v.Color, v.Width = rmGreen, vg.Points(1.5)
		p.Add(v)
		p.Legend.Add(fmt.Sprintf("proposed: %.1f Mvar", d.ChosenMvar), v)
	}
	p.X.Min, p.X.Max = 0, xmax
	p.Y.Min, p.Y.Max = math.Max(lo, 0), hi+0.12*(hi-lo)+0.6 // headroom for the legend
	p.Legend.Top = true
	return p
}

// RemedyResistorData is switching u2 against the pre-insertion resistor.
type RemedyResistorData struct {
	Ohm       []float64 // resistor values, ohm (any order)
	U2        []float64 // u2 at each, pu (IEC 60071-1 base)
	ChosenOhm float64   // the proposed value (0 = none)
	TargetU2  float64   // the target (0 = none)
}

// RemedyResistorPlot plots u2 against the pre-insertion resistor value, with the
// target as a horizontal line and the proposed value as a vertical line.
func RemedyResistorPlot(d RemedyResistorData) *plot.Plot {
	p := plot.New()
	p.Title.Text = "Statistical switching u2 against the pre-insertion resistor"
	p.X.Label.Text = "pre-insertion resistor (ohm)"
	p.Y.Label.Text = "u2 (pu of Us·√2/√3)"
	p.Add(plotter.NewGrid())
	idx := make([]int, len(d.Ohm))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return d.Ohm[idx[a]] < d.Ohm[idx[b]] })
	var pts plotter.XYs
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for _, i := range idx {
		pts = append(pts, plotter.XY{X: d.Ohm[i], Y: d.U2[i]})
		ymin, ymax = math.Min(ymin, d.U2[i]), math.Max(ymax, d.U2[i])
	}
	if d.TargetU2 > 0 {
		ymin, ymax = math.Min(ymin, d.TargetU2), math.Max(ymax, d.TargetU2)
	}
	if len(pts) > 0 {
		l, s, _ := plotter.NewLinePoints(pts)
		l.Color, l.Width = rmBlue, vg.Points(1.5)
		s.Color, s.Shape, s.Radius = rmBlue, draw.CircleGlyph{}, vg.Points(2)
		p.Add(l, s)
		p.Legend.Add("u2 (seeded shots)", l, s)
	}
	xmin, xmax := 0.0, 1.0
	if len(pts) > 0 {
		xmin, xmax = pts[0].X, pts[len(pts)-1].X
	}
	pad := 0.05 * math.Max(ymax-ymin, 0.05)
	if d.TargetU2 > 0 {
		t, _ := plotter.NewLine(plotter.XYs{{X: xmin, Y: d.TargetU2}, {X: xmax, Y: d.TargetU2}})
		t.Color, t.Width = rmRed, vg.Points(1.5)
		t.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
		p.Add(t)
		p.Legend.Add(fmt.Sprintf("target max_u2_pu = %.3g", d.TargetU2), t)
	}
	if d.ChosenOhm > 0 {
		v, _ := plotter.NewLine(plotter.XYs{{X: d.ChosenOhm, Y: ymin - pad}, {X: d.ChosenOhm, Y: ymax + pad}})
		v.Color, v.Width = rmGreen, vg.Points(1.5)
		p.Add(v)
		p.Legend.Add(fmt.Sprintf("proposed: %.0f ohm", d.ChosenOhm), v)
	}
	p.Y.Min, p.Y.Max = ymin-pad, ymax+6*pad // headroom for the legend
	p.Legend.Top = true
	return p
}

// RemedyGainPlot plots the largest gain |Vr/E| within the band of a watched harmonic
// against the reactor added at one end, with the target as a
// horizontal line and the proposed rating as a vertical line.
func RemedyGainPlot(d RemedyResonanceData) *plot.Plot {
	p := plot.New()
	p.Title.Text = fmt.Sprintf("Largest gain near the watched harmonics against the reactor added at the %s end", d.End)
	p.X.Label.Text = "added line-connected reactor (Mvar)"
	p.Y.Label.Text = "gain |Vr/E| within the watch bands"
	p.Add(plotter.NewGrid())
	var pts plotter.XYs
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for i, q := range d.Mvar {
		g := d.Gain[i]
		if g > 0 && !math.IsInf(g, 0) {
			pts = append(pts, plotter.XY{X: q, Y: g})
			ymin, ymax = math.Min(ymin, g), math.Max(ymax, g)
		}
	}
	if d.TargetGain > 0 {
		ymin, ymax = math.Min(ymin, d.TargetGain), math.Max(ymax, d.TargetGain)
	}
	if !(ymin > 0) || math.IsInf(ymax, 0) {
		ymin, ymax = 1, 10
	}
	xmax := 1.0
	if len(d.Mvar) > 0 {
		xmax = math.Max(d.Mvar[len(d.Mvar)-1], 1)
	}
	pad := 0.05 * math.Max(ymax-ymin, 0.1*ymax)
	lo, hi := math.Max(0, ymin-pad), ymax+6*pad // headroom for the legend
	if len(pts) > 0 {
		l, s, _ := plotter.NewLinePoints(pts)
		l.Color, l.Width = rmBlue, vg.Points(1.8)
		s.Color, s.Shape, s.Radius = rmBlue, draw.CircleGlyph{}, vg.Points(1.8)
		p.Add(l, s)
		p.Legend.Add("largest watched gain", l, s)
	}
	if d.TargetGain > 0 {
		t, _ := plotter.NewLine(plotter.XYs{{X: 0, Y: d.TargetGain}, {X: xmax, Y: d.TargetGain}})
		t.Color, t.Width = rmRed, vg.Points(1.5)
		t.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
		p.Add(t)
		p.Legend.Add(fmt.Sprintf("target max_gain_watched = %.3g", d.TargetGain), t)
	}
	if d.ChosenMvar > 0 {
		v, _ := plotter.NewLine(plotter.XYs{{X: d.ChosenMvar, Y: lo}, {X: d.ChosenMvar, Y: hi}})
		v.Color, v.Width = rmGreen, vg.Points(1.5)
		p.Add(v)
		p.Legend.Add(fmt.Sprintf("proposed: %.1f Mvar", d.ChosenMvar), v)
	}
	p.X.Min, p.X.Max = 0, xmax
	p.Y.Min, p.Y.Max = lo, hi
	p.Legend.Top = true
	return p
}
