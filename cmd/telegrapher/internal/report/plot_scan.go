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

// ScanSeries is one gain curve of a scan: harmonic orders (f / system frequency) and
// the gain |Vr/E| at each.
type ScanSeries struct {
	Name     string // e.g. "positive sequence"
	Harmonic []float64
	Gain     []float64 // may hold +Inf (an exact lossless resonance): drawn at the top
}

// ScanPeak is a labelled resonance peak.
type ScanPeak struct {
	Harmonic  float64
	Gain      float64 // ignored when Unbounded
	Unbounded bool
	Zero      bool // a zero-sequence peak
}

// ScanPlotData is the input of ScanPlot.
type ScanPlotData struct {
	Title     string
	Series    []ScanSeries // positive sequence first, then zero sequence if any
	Peaks     []ScanPeak
	Watch     []int   // watched harmonic orders, marked with their band
	WatchBand float64 // fraction (0.10 = ±10 %)
	GainLimit float64 // drawn as a horizontal line; 0 = none
}

var (
	scanBlue   = color.RGBA{R: 0x1f, G: 0x5a, B: 0xa6, A: 0xff}
	scanRed    = color.RGBA{R: 0xc0, G: 0x39, B: 0x2b, A: 0xff}
	scanOrange = color.RGBA{R: 0xe6, G: 0x7e, B: 0x22, A: 0xff}
	scanBand   = color.RGBA{R: 0xfb, G: 0xf1, B: 0xcc, A: 0xff}
)

// ScanPlot draws the gain |Vr/E| against harmonic order on a logarithmic gain axis:
// one line per sequence, the watched harmonics shaded over their ±band, the gain limit
// as a dashed line, and each resonance peak labelled with its order and gain
// ("unbounded" for an exact lossless resonance).
func ScanPlot(d ScanPlotData) (*plot.Plot, error) {
	if len(d.Series) == 0 || len(d.Series[0].Harmonic) < 2 {
		return nil, fmt.Errorf("scan plot: need a series of at least two points")
	}
	p := plot.New()
	p.Title.Text = d.Title
	p.X.Label.Text = "harmonic order (f / system frequency)"
	p.Y.Label.Text = "gain |Vr/E|"
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = plot.LogTicks{Prec: -1}
	xMin, xMax := math.Inf(1), math.Inf(-1)
	gMax, gMin := 0.0, math.Inf(1)
	for _, s := range d.Series {
		for i, h := range s.Harmonic {
			xMin, xMax = math.Min(xMin, h), math.Max(xMax, h)
			if g := s.Gain[i]; !math.IsInf(g, 0) && g > 0 {
				gMax, gMin = math.Max(gMax, g), math.Min(gMin, g)
			}
		}
	}
	for _, pk := range d.Peaks {
		if !pk.Unbounded {
			gMax = math.Max(gMax, pk.Gain)
		}
	}
	if d.GainLimit > 0 {
		gMax = math.Max(gMax, d.GainLimit)
	}
	unbounded := false
	for _, pk := range d.Peaks {
		unbounded = unbounded || pk.Unbounded
	}
	yMax := gMax * 4 // room for the peak labels
	if unbounded {
		yMax = gMax * 10
	}
	yMin := math.Max(gMin/2, yMax*1e-6)
	if !(yMin > 0) || math.IsInf(yMin, 0) {
		yMin = 1e-3
	}
	p.X.Min, p.X.Max = xMin, xMax+0.03*(xMax-xMin) // room for a label at the top end
	p.X.Tick.Marker = harmonicTicks{upTo: xMax}
	p.Y.Min, p.Y.Max = yMin, yMax
	clip := func(g float64) float64 { return math.Min(math.Max(g, yMin), yMax) }

	// Watched harmonics: shaded band and a dotted centre line.
	band := math.Max(d.WatchBand, 0)
	for k, h := range d.Watch {
		hf := float64(h)
		if hf < xMin || hf > xMax {
			continue
		}
		lo, hi := math.Max(hf*(1-band), xMin), math.Min(hf*(1+band), xMax)
		poly, err := plotter.NewPolygon(plotter.XYs{{X: lo, Y: yMin}, {X: hi, Y: yMin}, {X: hi, Y: yMax}, {X: lo, Y: yMax}})
		if err != nil {
			return nil, err
		}
		poly.Color = scanBand
		poly.LineStyle.Width = 0
		p.Add(poly)
		if k == 0 {
			p.Legend.Add(fmt.Sprintf("watched harmonic ±%.0f %%", band*100), poly)
		}
		wl, err := plotter.NewLine(plotter.XYs{{X: hf, Y: yMin}, {X: hf, Y: yMax}})
		if err != nil {
			return nil, err
		}
		wl.Color = color.Gray{Y: 0x99}
		wl.Dashes = []vg.Length{vg.Points(1), vg.Points(2)}
		p.Add(wl)
	}
	p.Add(plotter.NewGrid())
	for k, s := range d.Series {
		pts := make(plotter.XYs, 0, len(s.Harmonic))
		for i, h := range s.Harmonic {
			pts = append(pts, plotter.XY{X: h, Y: clip(s.Gain[i])})
		}
		l, err := plotter.NewLine(pts)
		if err != nil {
			return nil, err
		}
		l.Color = scanBlue
		l.Width = vg.Points(1.4)
		if k > 0 {
			l.Color = scanRed
			l.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
		}
		p.Add(l)
		p.Legend.Add("gain, "+s.Name, l)
	}
	if d.GainLimit > 0 {
		lim, err := plotter.NewLine(plotter.XYs{{X: xMin, Y: d.GainLimit}, {X: xMax, Y: d.GainLimit}})
		if err != nil {
			return nil, err
		}
		lim.Color = scanOrange
		lim.Width = vg.Points(1.2)
		lim.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
		p.Add(lim)
		p.Legend.Add(fmt.Sprintf("gain limit %g", d.GainLimit), lim)
	}
	if len(d.Peaks) > 0 {
		var xy plotter.XYs
		var labels []string
		for _, pk := range d.Peaks {
			g, text := pk.Gain, fmt.Sprintf("h %.2f\n%.3g", pk.Harmonic, pk.Gain)
			if pk.Unbounded {
				g, text = yMax/1.6, fmt.Sprintf("h %.2f\nunbounded", pk.Harmonic)
			}
			if pk.Zero {
				text += " (0)"
			}
			xy = append(xy, plotter.XY{X: pk.Harmonic, Y: clip(g)})
			labels = append(labels, text)
		}
		sc, err := plotter.NewScatter(xy)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = draw.GlyphStyle{Color: color.Black, Radius: vg.Points(2.5), Shape: draw.CircleGlyph{}}
		p.Add(sc)
		p.Legend.Add("resonance peak: order, gain; (0) zero sequence", sc)
		lb, err := plotter.NewLabels(plotter.XYLabels{XYs: xy, Labels: labels})
		if err != nil {
			return nil, err
		}
		for i := range lb.TextStyle {
			lb.TextStyle[i].Font.Size = vg.Points(7.5)
			lb.TextStyle[i].XAlign = draw.XCenter
			lb.TextStyle[i].YAlign = draw.YBottom
		}
		lb.Offset = vg.Point{Y: vg.Points(4)}
		p.Add(unpadded{lb})
	}
	p.Legend.Top = true
	p.Legend.Left = false
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	return p, nil
}

// ScanMapData is the input of ScanMapPlot: the gain over harmonic order (columns) and
// source short-circuit level (rows).
type ScanMapData struct {
	Title         string
	Harmonic      []float64   // column centres, increasing
	ShortCircuit  []float64   // row centres, MVA, increasing (geometric spacing)
	Gain          [][]float64 // Gain[row][column]
	FirstHarmonic []float64   // first resonance order at each row; 0 = none
	StudyMVA      float64     // the study's own level, marked; 0 = none
	Watch         []int
}

// gainBins are the colour classes of the map: gain below each edge.
var gainBins = []struct {
	upper float64
	label string
	c     color.Color
}{
	{1, "gain < 1", color.RGBA{R: 0xf7, G: 0xfb, B: 0xff, A: 0xff}},
	{1.5, "1 - 1.5", color.RGBA{R: 0xc6, G: 0xdb, B: 0xef, A: 0xff}},
	{2, "1.5 - 2", color.RGBA{R: 0x6b, G: 0xae, B: 0xd6, A: 0xff}},
	{5, "2 - 5", color.RGBA{R: 0xfe, G: 0xd9, B: 0x76, A: 0xff}},
	{10, "5 - 10", color.RGBA{R: 0xfd, G: 0x8d, B: 0x3c, A: 0xff}},
	{30, "10 - 30", color.RGBA{R: 0xe3, G: 0x1a, B: 0x1c, A: 0xff}},
	{math.Inf(1), "> 30", color.RGBA{R: 0x80, G: 0x00, B: 0x26, A: 0xff}},
}

// binOf returns the colour class of a gain.
func binOf(g float64) int {
	for i, b := range gainBins {
		if g < b.upper {
			return i
		}
	}
	return len(gainBins) - 1
}

// classMap draws the heat map as vector rectangles, one per run of cells of the same
// colour class along a row (a few hundred rather than one per cell), rows on log10 of
// the short-circuit level. Vector cells fill the data area exactly in every viewer;
// an embedded raster is stretched by some and letterboxed by others.
type classMap struct {
	xe, ye []float64 // cell edges: harmonic order, log10(MVA)
	class  [][]int   // class[row][column]
}

// cellEdges returns the edges of cells centred on c (increasing): midpoints between
// centres, and half a step beyond the first and last.
func cellEdges(c []float64) []float64 {
	e := make([]float64, len(c)+1)
	for i := 1; i < len(c); i++ {
		e[i] = (c[i-1] + c[i]) / 2
	}
	e[0] = c[0] - (c[1]-c[0])/2
	e[len(c)] = c[len(c)-1] + (c[len(c)-1]-c[len(c)-2])/2
	return e
}

func newClassMap(d ScanMapData) classMap {
	ys := make([]float64, len(d.ShortCircuit))
	for i, v := range d.ShortCircuit {
		ys[i] = math.Log10(v)
	}
	m := classMap{xe: cellEdges(d.Harmonic), ye: cellEdges(ys)}
	for _, row := range d.Gain {
		cls := make([]int, len(row))
		for j, g := range row {
			cls[j] = binOf(g)
		}
		m.class = append(m.class, cls)
	}
	return m
}

// seam is how far each rectangle reaches under its right and upper neighbours, so
// that anti-aliased edges leave no hairline gaps between cells.
const seam = vg.Length(0.4)

// Plot implements plot.Plotter.
func (m classMap) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	last := len(m.xe) - 1
	for r, row := range m.class {
		y0, y1 := trY(m.ye[r]), trY(m.ye[r+1])
		if r+1 < len(m.class) {
			y1 += seam
		}
		for j := 0; j < len(row); {
			k := j
			for k+1 < len(row) && row[k+1] == row[j] {
				k++
			}
			x0, x1 := trX(m.xe[j]), trX(m.xe[k+1])
			if k+1 < last {
				x1 += seam
			}
			var pa vg.Path
			pa.Move(vg.Point{X: x0, Y: y0})
			pa.Line(vg.Point{X: x1, Y: y0})
			pa.Line(vg.Point{X: x1, Y: y1})
			pa.Line(vg.Point{X: x0, Y: y1})
			pa.Close()
			c.SetColor(gainBins[row[j]].c)
			c.Fill(pa)
			j = k + 1
		}
	}
}

// DataRange implements plot.DataRanger: the outer cell edges.
func (m classMap) DataRange() (xmin, xmax, ymin, ymax float64) {
	return m.xe[0], m.xe[len(m.xe)-1], m.ye[0], m.ye[len(m.ye)-1]
}

// mvaTicks labels the log10(MVA) axis in MVA.
type mvaTicks struct{}

func (mvaTicks) Ticks(min, max float64) []plot.Tick {
	var t []plot.Tick
	for e := math.Floor(min); e <= math.Ceil(max); e++ {
		for _, m := range []float64{1, 2, 5} {
			v := math.Log10(m) + e
			if v >= min-1e-9 && v <= max+1e-9 {
				t = append(t, plot.Tick{Value: v, Label: fmt.Sprintf("%g", m*math.Pow(10, e))})
			}
		}
	}
	return t
}

// ScanMapPlot draws the gain as a heat map over harmonic order and source
// short-circuit level (logarithmic), in colour classes with a legend, the first
// resonance order at each level as a line, the study's own level and the watched
// harmonics marked.
func ScanMapPlot(d ScanMapData) (*plot.Plot, error) {
	if len(d.Harmonic) < 2 || len(d.ShortCircuit) < 2 || len(d.Gain) != len(d.ShortCircuit) {
		return nil, fmt.Errorf("scan map: need at least a 2 x 2 grid")
	}
	p := plot.New()
	p.Title.Text = d.Title
	p.X.Label.Text = "harmonic order (f / system frequency)"
	p.Y.Label.Text = "source short-circuit level (MVA, X/R kept)"
	for i, row := range d.Gain {
		if len(row) != len(d.Harmonic) {
			return nil, fmt.Errorf("scan map: row %d has %d gains for %d frequencies", i, len(row), len(d.Harmonic))
		}
	}
	cm := newClassMap(d)
	p.Add(cm)
	for _, b := range gainBins {
		s, err := plotter.NewScatter(plotter.XYs{})
		if err != nil {
			return nil, err
		}
		s.GlyphStyle = draw.GlyphStyle{Color: b.c, Radius: vg.Points(4), Shape: draw.BoxGlyph{}}
		p.Legend.Add(b.label, s)
	}
	var first plotter.XYs
	for i, h := range d.FirstHarmonic {
		if h > 0 {
			first = append(first, plotter.XY{X: h, Y: math.Log10(d.ShortCircuit[i])})
		}
	}
	if len(first) >= 2 {
		l, err := plotter.NewLine(first)
		if err != nil {
			return nil, err
		}
		l.Color = color.Black
		l.Width = vg.Points(1.5)
		p.Add(l)
		p.Legend.Add("first resonance", l)
	}
	y0, y1 := math.Log10(d.ShortCircuit[0]), math.Log10(d.ShortCircuit[len(d.ShortCircuit)-1])
	for _, h := range d.Watch {
		hf := float64(h)
		if hf < d.Harmonic[0] || hf > d.Harmonic[len(d.Harmonic)-1] {
			continue
		}
		wl, err := plotter.NewLine(plotter.XYs{{X: hf, Y: y0}, {X: hf, Y: y1}})
		if err != nil {
			return nil, err
		}
		wl.Color = color.Gray{Y: 0x40}
		wl.Dashes = []vg.Length{vg.Points(1), vg.Points(3)}
		p.Add(wl)
	}
	if d.StudyMVA > 0 {
		y := math.Log10(d.StudyMVA)
		sl, err := plotter.NewLine(plotter.XYs{{X: d.Harmonic[0], Y: y}, {X: d.Harmonic[len(d.Harmonic)-1], Y: y}})
		if err != nil {
			return nil, err
		}
		sl.Color = color.RGBA{R: 0x27, G: 0x8a, B: 0x3b, A: 0xff}
		sl.Width = vg.Points(1.5)
		sl.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
		p.Add(sl)
		p.Legend.Add(fmt.Sprintf("study level %g MVA", d.StudyMVA), sl)
	}
	p.Y.Tick.Marker = mvaTicks{}
	p.X.Tick.Marker = harmonicTicks{upTo: d.Harmonic[len(d.Harmonic)-1]}
	// The map fills the data area from its first cell edge; blank room right of it
	// (a sixth of the width) for the legend.
	x0, x1 := cm.xe[0], cm.xe[len(cm.xe)-1]
	p.X.Min, p.X.Max = x0, x1+0.2*(x1-x0)
	p.Legend.Top = true
	p.Legend.TextStyle.Font.Size = vg.Points(8)
	p.Legend.XOffs = vg.Points(-4)
	return p, nil
}

// harmonicTicks labels a harmonic-order axis: a labelled tick every 1, 5 or 10 orders
// (by the span) and an unlabelled one at every order where they fit.
type harmonicTicks struct{ upTo float64 } // upTo > 0: no ticks beyond it

func (ht harmonicTicks) Ticks(min, max float64) []plot.Tick {
	if ht.upTo > 0 {
		max = math.Min(max, ht.upTo)
	}
	span := max - min
	major := 5.0
	switch {
	case span <= 12:
		major = 1
	case span > 80:
		major = 10
	}
	minor := 1.0
	if span > 80 {
		minor = 5
	}
	var t []plot.Tick
	for v := math.Ceil(min/minor) * minor; v <= max+1e-9; v += minor {
		if v == 0 {
			v = 0 // not -0 (the ceiling of a small negative start), which prints "-0"
		}
		tk := plot.Tick{Value: v}
		if math.Mod(v, major) == 0 {
			tk.Label = fmt.Sprintf("%g", v)
		}
		t = append(t, tk)
	}
	return t
}

// unpadded draws a plotter without reporting its glyph boxes, so peak labels near the
// top of the data area do not shrink it (the axis range leaves them room).
type unpadded struct{ p plot.Plotter }

func (u unpadded) Plot(c draw.Canvas, p *plot.Plot) { u.p.Plot(c, p) }
