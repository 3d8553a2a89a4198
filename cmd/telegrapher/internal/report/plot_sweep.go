package report

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// SweepSequence is one sequence's per-length constants over a frequency sweep, in the
// units of the names (one value per frequency).
type SweepSequence struct {
	Name           string // "positive" or "zero"
	ROhmPerKm      []float64
	LMHPerKm       []float64
	CNFPerKm       []float64
	AlphaNpPerKm   []float64
	VelocityKmPerS []float64
	ZcOhm          []float64 // |Zc|, ohm
}

// SweepData is the input of the constants-sweep plots: frequencies (Hz) and the
// sequences computed at them.
type SweepData struct {
	Title     string
	FreqHz    []float64
	Sequences []SweepSequence
	SystemHz  float64 // marked on every panel; 0 = none
}

// sweepPanel describes one quantity.
type sweepPanel struct {
	title, unit string
	logY        bool
	get         func(SweepSequence) []float64
}

var sweepPanels = []sweepPanel{
	{"Series resistance r", "ohm/km", true, func(s SweepSequence) []float64 { return s.ROhmPerKm }},
	{"Series inductance l", "mH/km", false, func(s SweepSequence) []float64 { return s.LMHPerKm }},
	{"Shunt capacitance c", "nF/km", false, func(s SweepSequence) []float64 { return s.CNFPerKm }},
	{"Attenuation α", "Np/km", true, func(s SweepSequence) []float64 { return s.AlphaNpPerKm }},
	{"Propagation velocity", "km/s", false, func(s SweepSequence) []float64 { return s.VelocityKmPerS }},
	{"Surge impedance |Zc|", "ohm", true, func(s SweepSequence) []float64 { return s.ZcOhm }},
}

var sweepColours = []color.Color{
	color.RGBA{R: 0x1f, G: 0x5a, B: 0xa6, A: 0xff}, // positive: blue
	color.RGBA{R: 0xc0, G: 0x39, B: 0x2b, A: 0xff}, // zero: red
	color.RGBA{R: 0x27, G: 0x8a, B: 0x3b, A: 0xff},
}

// SweepPlots returns one plot per quantity (r, l, c, α, velocity, |Zc|) against
// frequency on a logarithmic axis, one line per sequence, the system frequency marked.
func SweepPlots(d SweepData) ([]*plot.Plot, error) { return sweepPlots(d, true) }

func sweepPlots(d SweepData, legends bool) ([]*plot.Plot, error) {
	if len(d.FreqHz) < 2 || len(d.Sequences) == 0 {
		return nil, fmt.Errorf("sweep plot: need at least two frequencies and one sequence")
	}
	var out []*plot.Plot
	for _, pan := range sweepPanels {
		p := plot.New()
		p.Title.Text = pan.title
		p.X.Label.Text = "frequency (Hz)"
		p.Y.Label.Text = pan.unit
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = plot.LogTicks{Prec: -1}
		yMin, yMax := math.Inf(1), math.Inf(-1)
		for k, sq := range d.Sequences {
			ys := pan.get(sq)
			pts := make(plotter.XYs, 0, len(ys))
			for i, y := range ys {
				if i >= len(d.FreqHz) || math.IsNaN(y) || math.IsInf(y, 0) || (pan.logY && y <= 0) {
					continue
				}
				pts = append(pts, plotter.XY{X: d.FreqHz[i], Y: y})
				yMin, yMax = math.Min(yMin, y), math.Max(yMax, y)
			}
			if len(pts) == 0 {
				continue
			}
			l, err := plotter.NewLine(pts)
			if err != nil {
				return nil, err
			}
			l.Color = sweepColours[k%len(sweepColours)]
			l.Width = vg.Points(1.5)
			if k == 1 {
				l.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
			}
			p.Add(l)
			if legends {
				p.Legend.Add(sq.Name+" sequence", l)
			}
		}
		if math.IsInf(yMin, 0) {
			yMin, yMax = 0, 1
		}
		// A logarithmic axis only where the values span more than a decade or so;
		// below that its ticks would go unlabelled.
		if pan.logY && yMin > 0 && yMax > 20*yMin {
			p.Y.Scale = plot.LogScale{}
			p.Y.Tick.Marker = plot.LogTicks{Prec: -1}
			if yMax <= yMin*1.5 {
				yMin, yMax = yMin/1.5, yMax*1.5
			}
		} else {
			span := yMax - yMin
			if span < 1e-3*math.Abs(yMax) || span == 0 {
				span = math.Max(0.05*math.Abs(yMax), 1e-12)
			}
			yMin, yMax = yMin-0.08*span, yMax+0.08*span
		}
		p.Y.Min, p.Y.Max = yMin, yMax
		if d.SystemHz > 0 {
			mark, err := plotter.NewLine(plotter.XYs{{X: d.SystemHz, Y: yMin}, {X: d.SystemHz, Y: yMax}})
			if err != nil {
				return nil, err
			}
			mark.Color = color.Gray{Y: 0x80}
			mark.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
			p.Add(mark)
			if legends {
				p.Legend.Add(fmt.Sprintf("system %g Hz", d.SystemHz), mark)
			}
		}
		p.Legend.Top = true
		p.Legend.TextStyle.Font.Size = vg.Points(8)
		p.Add(plotter.NewGrid())
		out = append(out, p)
	}
	return out, nil
}

// RenderSweep renders the sweep plots tiled three by two, titled, as "png" or "svg".
func RenderSweep(d SweepData, format string) ([]byte, error) {
	plots, err := sweepPlots(d, false)
	if err != nil {
		return nil, err
	}
	const rows, cols = 3, 2
	w, h := 28*vg.Centimeter, 30*vg.Centimeter
	c, dc, err := whitePage(w, h, format, 110)
	if err != nil {
		return nil, err
	}
	// A title band.
	titleH := vg.Length(0)
	if d.Title != "" {
		ts := plot.New().Title.TextStyle // the default typeface and text handler
		ts.Font.Size = vg.Points(13)
		ts.XAlign, ts.YAlign = draw.XCenter, draw.YTop
		dc.FillText(ts, vg.Point{X: w / 2, Y: h - vg.Points(6)}, d.Title)
		// One legend for all panels, under the title.
		key := "blue, solid: positive sequence"
		if len(d.Sequences) > 1 {
			key += "    red, dashed: zero sequence"
		}
		if d.SystemHz > 0 {
			key += fmt.Sprintf("    grey, dotted: system frequency %g Hz", d.SystemHz)
		}
		ks := ts
		ks.Font.Size = vg.Points(9)
		dc.FillText(ks, vg.Point{X: w / 2, Y: h - vg.Points(24)}, key)
		titleH = vg.Points(40)
	}
	body := draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{Min: vg.Point{}, Max: vg.Point{X: w, Y: h - titleH}}}
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Millimeter * 4, PadY: vg.Millimeter * 4,
		PadTop: vg.Millimeter * 2, PadBottom: vg.Millimeter * 2, PadLeft: vg.Millimeter * 2, PadRight: vg.Millimeter * 2}
	grid := make([][]*plot.Plot, rows)
	for r := range grid {
		grid[r] = make([]*plot.Plot, cols)
		for k := 0; k < cols; k++ {
			grid[r][k] = plots[r*cols+k]
		}
	}
	canvases := plot.Align(grid, tiles, body)
	for r := range grid {
		for k := range grid[r] {
			grid[r][k].Draw(canvases[r][k])
		}
	}
	return canvasBytes(c)
}
