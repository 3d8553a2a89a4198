package report

import (
	"fmt"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/telegrapher/telegrapher/waves"
)

// EnergiseTrace is one voltage waveform of an energisation plot: times in ms and
// voltages in pu of the peak phase-to-earth EMF.
type EnergiseTrace struct {
	Name   string // legend entry, e.g. "receiving end (laplace)"
	TMs    []float64
	V      []float64
	Bold   bool // the main curve
	Dashed bool
}

// EnergisePlotData is the input of EnergisePlot.
type EnergisePlotData struct {
	Title  string
	BaseKV float64 // the per-unit base, peak phase-to-earth EMF in kV (axis label)
	Traces []EnergiseTrace
	// The receiving-end peak, marked and labelled.
	PeakTMs, PeakPU float64
	// Limit, when > 0, is drawn as a pair of dashed lines at ±Limit pu with LimitName.
	Limit     float64
	LimitName string
}

var (
	enBlue   = color.RGBA{R: 0x1f, G: 0x5a, B: 0xa6, A: 0xff}
	enRed    = color.RGBA{R: 0xc0, G: 0x39, B: 0x2b, A: 0xff}
	enGreen  = color.RGBA{R: 0x27, G: 0x8e, B: 0x4f, A: 0xff}
	enGrey   = color.Gray{Y: 0x70}
	enOrange = color.RGBA{R: 0xe6, G: 0x7e, B: 0x22, A: 0xff}
	enPurple = color.RGBA{R: 0x7d, G: 0x3c, B: 0x98, A: 0xff}
)

// maxPlotPoints caps the points drawn per curve; longer waveforms are reduced to the
// minimum and maximum of each bucket, which keeps every peak visible.
const maxPlotPoints = 8000

// EnergisePlot draws energisation waveforms against time: the receiving end bold, the
// other traces thinner, the receiving-end peak marked with its value and time, a zero
// line, and the optional ±limit.
func EnergisePlot(d EnergisePlotData) (*plot.Plot, error) {
	if len(d.Traces) == 0 || len(d.Traces[0].TMs) < 2 {
		return nil, fmt.Errorf("energise plot: need a waveform of at least two samples")
	}
	p := plot.New()
	p.Title.Text = d.Title
	p.X.Label.Text = "time after closing (ms)"
	p.Y.Label.Text = "voltage (pu of the peak phase-to-earth EMF)"
	if d.BaseKV > 0 {
		p.Y.Label.Text = fmt.Sprintf("voltage (pu; 1 pu = %.4g kV peak phase-to-earth)", d.BaseKV)
	}
	p.Add(plotter.NewGrid())
	colours := []color.Color{enBlue, enRed, enGreen, enOrange, enPurple, enGrey}
	lo, hi := 0.0, 0.0
	tMax := 0.0
	for i, tr := range d.Traces {
		if len(tr.TMs) != len(tr.V) {
			return nil, fmt.Errorf("energise plot: trace %q has %d times and %d values", tr.Name, len(tr.TMs), len(tr.V))
		}
		pts := reduceMinMax(tr.TMs, tr.V, maxPlotPoints)
		for _, q := range pts {
			lo, hi = math.Min(lo, q.Y), math.Max(hi, q.Y)
		}
		tMax = math.Max(tMax, tr.TMs[len(tr.TMs)-1])
		l, err := plotter.NewLine(pts)
		if err != nil {
			return nil, err
		}
		l.Color = colours[i%len(colours)]
		l.Width = vg.Points(1)
		if tr.Bold {
			l.Width = vg.Points(1.8)
		}
		if tr.Dashed {
			l.Dashes = []vg.Length{vg.Points(4), vg.Points(2)}
		}
		p.Add(l)
		p.Legend.Add(tr.Name, l)
	}
	if d.Limit > 0 {
		lo, hi = math.Min(lo, -d.Limit), math.Max(hi, d.Limit)
		for _, y := range []float64{d.Limit, -d.Limit} {
			l, err := plotter.NewLine(plotter.XYs{{X: 0, Y: y}, {X: tMax, Y: y}})
			if err != nil {
				return nil, err
			}
			l.Color = enGrey
			l.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
			p.Add(l)
			if y > 0 {
				p.Legend.Add(d.LimitName, l)
			}
		}
	}
	zero, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: tMax, Y: 0}})
	if err != nil {
		return nil, err
	}
	zero.Color = color.Gray{Y: 0x40}
	zero.Width = vg.Points(0.5)
	p.Add(zero)
	// The peak: a marker and its label.
	mk, err := plotter.NewScatter(plotter.XYs{{X: d.PeakTMs, Y: d.PeakPU}})
	if err != nil {
		return nil, err
	}
	mk.Shape = draw.CircleGlyph{}
	mk.Radius = vg.Points(3.5)
	mk.Color = enBlue
	p.Add(mk)
	lbl, err := plotter.NewLabels(plotter.XYLabels{
		XYs:    []plotter.XY{{X: d.PeakTMs, Y: d.PeakPU}},
		Labels: []string{fmt.Sprintf(" peak %+.3f pu at %.3f ms", d.PeakPU, d.PeakTMs)},
	})
	if err != nil {
		return nil, err
	}
	lbl.Offset = vg.Point{X: vg.Points(5), Y: vg.Points(2)}
	if d.PeakPU < 0 {
		lbl.Offset.Y = -vg.Points(12)
	}
	if d.PeakTMs > 0.6*tMax {
		// keep the label inside the plot: put it to the left of the marker
		lbl.TextStyle[0].XAlign = draw.XRight
		lbl.Offset.X = -vg.Points(5)
	}
	p.Add(lbl)
	span := hi - lo
	if span == 0 {
		span = 1
	}
	p.X.Min, p.X.Max = 0, tMax
	// headroom above the curves for the legend, one row per entry
	p.Y.Min, p.Y.Max = lo-0.08*span, hi+(0.1+0.07*float64(len(d.Traces)+1))*span
	p.X.Tick.Marker = enTicks{n: 10}
	p.Y.Tick.Marker = enTicks{n: 8}
	p.Legend.Top = true
	p.Legend.Left = false
	p.Legend.Padding = vg.Points(2)
	return p, nil
}

// reduceMinMax returns the points of (x, y), reduced to at most about limit points by
// keeping each bucket's minimum and maximum in time order.
func reduceMinMax(x, y []float64, limit int) plotter.XYs {
	if len(x) <= limit {
		pts := make(plotter.XYs, len(x))
		for i := range x {
			pts[i] = plotter.XY{X: x[i], Y: y[i]}
		}
		return pts
	}
	per := (len(x) + limit/2 - 1) / (limit / 2)
	pts := make(plotter.XYs, 0, limit+2)
	for lo := 0; lo < len(x); lo += per {
		hi := min(len(x), lo+per)
		iMin, iMax := lo, lo
		for i := lo; i < hi; i++ {
			if y[i] < y[iMin] {
				iMin = i
			}
			if y[i] > y[iMax] {
				iMax = i
			}
		}
		a, b := min(iMin, iMax), max(iMin, iMax)
		pts = append(pts, plotter.XY{X: x[a], Y: y[a]})
		if b != a {
			pts = append(pts, plotter.XY{X: x[b], Y: y[b]})
		}
	}
	return pts
}

// LatticePlotData is the input of LatticePlot.
type LatticePlotData struct {
	Title    string
	Diagram  *waves.LatticeDiagram
	Sections []string // names of the sections (optional)
	// MaxFronts caps the wavefronts drawn (default 40); the first ones in time are kept.
	MaxFronts int
	// Sine: the wavefront amplitudes are relative to the launched wave (EMF following
	// a sine), not a step's voltage jumps; the legend says so.
	Sine bool
}

// minLabelledSection is the smallest section, as a fraction of the line, whose
// wavefronts get amplitude labels (shorter ones cannot hold them legibly).
const minLabelledSection = 0.08

// LatticePlot draws a Bewley lattice diagram: distance along the line (km) across,
// time (ms) downwards; each wavefront a line from where and when it leaves to where
// and when it arrives, coloured by the sign of its amplitude and labelled with it;
// the source, the open end and each junction of sections as vertical lines.
func LatticePlot(d LatticePlotData) (*plot.Plot, error) {
	g := d.Diagram
	if g == nil || len(g.Wavefronts) == 0 {
		return nil, fmt.Errorf("lattice plot: no wavefronts")
	}
	maxF := d.MaxFronts
	if maxF <= 0 {
		maxF = 40
	}
	fronts := g.Wavefronts
	if len(fronts) > maxF {
		fronts = fronts[:maxF]
	}
	tEnd := 0.0
	for _, f := range fronts {
		tEnd = math.Max(tEnd, f.T1*1e3)
	}
	p := plot.New()
	p.Title.Text = d.Title
	p.X.Label.Text = "distance from the sending end (km)"
	p.Y.Label.Text = "time after closing (ms), downwards"
	p.Y.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
	lengthKm := g.Length / 1e3
	p.X.Min, p.X.Max = -0.12*lengthKm, 1.12*lengthKm
	p.Y.Min, p.Y.Max = -0.04*tEnd, tEnd*1.09
	p.Y.Tick.Marker = enTicks{n: 10}
	p.X.Tick.Marker = enTicks{n: 10}
	// Ends and junctions.
	for i, x := range g.Junctions {
		l, err := plotter.NewLine(plotter.XYs{{X: x / 1e3, Y: 0}, {X: x / 1e3, Y: tEnd}})
		if err != nil {
			return nil, err
		}
		l.Color = color.Gray{Y: 0x30}
		l.Width = vg.Points(1.5)
		if i > 0 && i < len(g.Junctions)-1 {
			l.Width = vg.Points(0.8)
			l.Dashes = []vg.Length{vg.Points(3), vg.Points(2)}
		}
		p.Add(l)
	}
	// The ends above the diagram, each section's name and surge impedance below it.
	heads, err := plotter.NewLabels(plotter.XYLabels{
		XYs:    []plotter.XY{{X: 0, Y: p.Y.Min}, {X: lengthKm, Y: p.Y.Min}},
		Labels: []string{"source", "open end"},
	})
	if err != nil {
		return nil, err
	}
	for i := range heads.TextStyle {
		heads.TextStyle[i].XAlign = draw.XCenter
		heads.TextStyle[i].YAlign = draw.YBottom
	}
	p.Add(heads)
	var names []string
	var where []plotter.XY
	for i := range g.Surge {
		name := fmt.Sprintf("Zc %.0f Ω", g.Surge[i])
		if i < len(d.Sections) && d.Sections[i] != "" {
			name = d.Sections[i] + "\n" + name
		}
		names = append(names, name)
		where = append(where, plotter.XY{X: (g.Junctions[i] + g.Junctions[i+1]) / 2e3, Y: p.Y.Max})
	}
	feet, err := plotter.NewLabels(plotter.XYLabels{XYs: where, Labels: names})
	if err != nil {
		return nil, err
	}
	for i := range feet.TextStyle {
		feet.TextStyle[i].XAlign = draw.XCenter
		feet.TextStyle[i].YAlign = draw.YTop
		feet.TextStyle[i].Font.Size = vg.Points(9)
	}
	p.Add(feet)
	// Wavefronts and their amplitudes.
	var lxy []plotter.XY
	unlabelled := false
	var ltxt []string
	for _, f := range fronts {
		l, err := plotter.NewLine(plotter.XYs{{X: f.X0 / 1e3, Y: f.T0 * 1e3}, {X: f.X1 / 1e3, Y: f.T1 * 1e3}})
		if err != nil {
			return nil, err
		}
		l.Width = vg.Points(1.2)
		l.Color = enBlue
		if f.Amplitude < 0 {
			l.Color = enRed
		}
		p.Add(l)
		if g.Junctions[f.Section+1]-g.Junctions[f.Section] < minLabelledSection*g.Length {
			unlabelled = true
			continue // too short a section to hold readable labels
		}
		// label a third of the way along, so labels of crossing fronts do not collide
		lxy = append(lxy, plotter.XY{X: (2*f.X0 + f.X1) / 3e3, Y: (2*f.T0 + f.T1) / 3 * 1e3})
		ltxt = append(ltxt, fmt.Sprintf("%+.3f", f.Amplitude))
	}
	labels, err := plotter.NewLabels(plotter.XYLabels{XYs: lxy, Labels: ltxt})
	if err != nil {
		return nil, err
	}
	for i := range labels.TextStyle {
		labels.TextStyle[i].Font.Size = vg.Points(7.5)
		labels.TextStyle[i].XAlign = draw.XCenter
	}
	labels.Offset = vg.Point{Y: vg.Points(2)}
	p.Add(labels)
	// The key in the title (a legend would cover wavefronts).
	unit := "voltage jump of each wavefront in pu"
	if d.Sine {
		unit = "wavefront amplitude per pu of (EMF − trapped voltage) at its launch"
	}
	p.Title.Text += "\n" + unit + " (blue > 0, red < 0)"
	if len(g.Wavefronts) > len(fronts) {
		p.Title.Text += fmt.Sprintf("; first %d of %d wavefronts", len(fronts), len(g.Wavefronts))
	}
	if unlabelled {
		p.Title.Text += fmt.Sprintf("; sections under %.0f %% of the line unlabelled", minLabelledSection*100)
	}
	return p, nil
}

// enTicks places about n major ticks at a 1, 2 or 5 step, labelled without
// trailing zeros, with minor ticks between.
type enTicks struct{ n int }

func (t enTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) {
		return plot.DefaultTicks{}.Ticks(lo, hi)
	}
	raw := (hi - lo) / float64(t.n)
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag
	for _, m := range []float64{1, 2, 5, 10} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	var ticks []plot.Tick
	decimals := max(0, int(-math.Floor(math.Log10(step)+1e-9)))
	minor := step / 2
	for v := math.Ceil(lo/minor) * minor; v <= hi+1e-9*step; v += minor {
		x := math.Round(v/minor) * minor
		major := math.Abs(math.Remainder(x, step)) < 1e-9*step
		label := ""
		if major {
			label = strconv.FormatFloat(x, 'f', decimals, 64)
			if math.Abs(x) < 1e-12*step {
				label = "0"
			}
		}
		ticks = append(ticks, plot.Tick{Value: x, Label: label})
	}
	return ticks
}
