package report

import (
	"fmt"
	"image/color"
	"math"
	"strconv"
	"strings"

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

// minShownSection is the smallest width, as a fraction of the drawing, a section gets:
// shorter sections (a cable crossing on an overhead line) are widened so their
// wavefronts and labels can be read, and the distance axis is then marked at the ends
// and junctions only.
const minShownSection = 0.2

// latticeScale maps a distance along the line (m) to the drawing's abscissa (km):
// to scale when every section is at least minShownSection of the line, otherwise
// each section stretched or shrunk linearly to its shown width.
type latticeScale struct {
	at     []float64 // m, the ends and junctions
	shown  []float64 // km on the drawing, the same points
	scaled bool      // true: not to scale
}

func newLatticeScale(g *waves.LatticeDiagram) latticeScale {
	sc := latticeScale{at: g.Junctions, shown: make([]float64, len(g.Junctions))}
	lengthKm := g.Length / 1e3
	var sum float64
	widths := make([]float64, len(g.Junctions)-1)
	for i := range widths {
		frac := (g.Junctions[i+1] - g.Junctions[i]) / g.Length
		if frac < minShownSection {
			sc.scaled = true
			frac = minShownSection
		}
		widths[i] = frac
		sum += frac
	}
	for i := range widths {
		if sc.scaled {
			sc.shown[i+1] = sc.shown[i] + widths[i]/sum*lengthKm
		} else {
			sc.shown[i+1] = g.Junctions[i+1] / 1e3
		}
	}
	return sc
}

// x returns the abscissa of the distance x (m) in section sec.
func (sc latticeScale) x(sec int, x float64) float64 {
	if !sc.scaled {
		return x / 1e3
	}
	a, b := sc.at[sec], sc.at[sec+1]
	return sc.shown[sec] + (x-a)/(b-a)*(sc.shown[sec+1]-sc.shown[sec])
}

// junctionTicks marks the ends and junctions with their true distances.
type junctionTicks struct{ sc latticeScale }

func (t junctionTicks) Ticks(lo, hi float64) []plot.Tick {
	var ticks []plot.Tick
	for i, x := range t.sc.shown {
		ticks = append(ticks, plot.Tick{Value: x, Label: strconv.FormatFloat(t.sc.at[i]/1e3, 'g', 5, 64)})
	}
	return ticks
}

// LatticePlot draws a Bewley lattice diagram: distance along the line (km) across,
// time (ms) downwards; each wavefront a line from where and when it leaves to where
// and when it arrives, coloured by the sign of its amplitude and labelled with it;
// the source, the open end and each junction of sections as vertical lines, each
// junction headed by its transmission and reflection coefficients for waves arriving
// from either side,
//
//	transmitted 2·Z2/(Z1 + Z2),  reflected (Z2 − Z1)/(Z1 + Z2)
//
// (Bewley 1951, ch. 3). Sections shorter than a fifth of the line are widened so
// their wavefronts can be read; the distance axis then says so and is marked at the
// ends and junctions with their true distances.
func LatticePlot(d LatticePlotData) (*plot.Plot, error) {
	g := d.Diagram
	if g == nil || len(g.Wavefronts) == 0 || len(g.Junctions) != len(g.Surge)+1 {
		return nil, fmt.Errorf("lattice plot: no wavefronts")
	}
	maxF := d.MaxFronts
	if maxF <= 0 {
		maxF = 40
		if len(g.Surge) > 1 {
			maxF = 60
		}
	}
	fronts := g.Wavefronts
	if len(fronts) > maxF {
		fronts = fronts[:maxF]
	}
	tEnd := 0.0
	for _, f := range fronts {
		tEnd = math.Max(tEnd, f.T1*1e3)
	}
	sc := newLatticeScale(g)
	ns := len(g.Surge)
	p := plot.New()
	p.Title.Text = d.Title
	p.X.Label.Text = "distance from the sending end (km)"
	if sc.scaled {
		p.X.Label.Text = fmt.Sprintf("distance from the sending end (km, marked at the ends and junctions; sections under %.0f %% of the line widened, not to scale)", minShownSection*100)
		p.X.Tick.Marker = junctionTicks{sc}
	} else {
		p.X.Tick.Marker = enTicks{n: 10}
	}
	p.Y.Label.Text = "time after closing (ms), downwards"
	p.Y.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
	lengthKm := g.Length / 1e3
	top := 0.04
	if ns > 1 {
		top = 0.16 // room for the junction coefficients
	}
	p.X.Min, p.X.Max = -0.12*lengthKm, 1.12*lengthKm
	p.Y.Min, p.Y.Max = -top*tEnd, tEnd*1.09
	p.Y.Tick.Marker = enTicks{n: 10}
	// Ends and junctions.
	for i, x := range sc.shown {
		l, err := plotter.NewLine(plotter.XYs{{X: x, Y: 0}, {X: x, Y: tEnd}})
		if err != nil {
			return nil, err
		}
		l.Color = color.Gray{Y: 0x30}
		l.Width = vg.Points(1.5)
		if i > 0 && i < len(sc.shown)-1 {
			l.Width = vg.Points(0.8)
			l.Dashes = []vg.Length{vg.Points(3), vg.Points(2)}
		}
		p.Add(l)
	}
	// The ends and junctions above the diagram, each section's name and surge
	// impedance below it.
	headXY := []plotter.XY{{X: 0, Y: p.Y.Min}, {X: sc.shown[ns], Y: p.Y.Min}}
	headTxt := []string{"source", "open end"}
	for j := 1; j < ns; j++ {
		z1, z2 := g.Surge[j-1], g.Surge[j]
		headXY = append(headXY, plotter.XY{X: sc.shown[j], Y: p.Y.Min})
		headTxt = append(headTxt, fmt.Sprintf("junction %d, %.4g km\nwave from the left:\nt %.3f  r %+.3f\nwave from the right:\nt %.3f  r %+.3f",
			j, g.Junctions[j]/1e3, 2*z2/(z1+z2), (z2-z1)/(z1+z2), 2*z1/(z1+z2), (z1-z2)/(z1+z2)))
	}
	heads, err := plotter.NewLabels(plotter.XYLabels{XYs: headXY, Labels: headTxt})
	if err != nil {
		return nil, err
	}
	for i := range heads.TextStyle {
		heads.TextStyle[i].XAlign = draw.XCenter
		heads.TextStyle[i].YAlign = draw.YBottom
		if i >= 2 {
			heads.TextStyle[i].Font.Size = vg.Points(8)
		}
	}
	p.Add(heads)
	var names []string
	var where []plotter.XY
	for i := range g.Surge {
		name := fmt.Sprintf("Zc %.0f Ω, %.4g km", g.Surge[i], (g.Junctions[i+1]-g.Junctions[i])/1e3)
		if i < len(d.Sections) && d.Sections[i] != "" {
			name = d.Sections[i] + "\n" + name
		}
		names = append(names, name)
		where = append(where, plotter.XY{X: (sc.shown[i] + sc.shown[i+1]) / 2, Y: p.Y.Max})
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
	var ltxt []string
	hidden := 0 // labels left out where they would overlap
	for _, f := range fronts {
		x0, x1 := sc.x(f.Section, f.X0), sc.x(f.Section, f.X1)
		l, err := plotter.NewLine(plotter.XYs{{X: x0, Y: f.T0 * 1e3}, {X: x1, Y: f.T1 * 1e3}})
		if err != nil {
			return nil, err
		}
		l.Width = vg.Points(1.2)
		l.Color = enBlue
		if f.Amplitude < 0 {
			l.Color = enRed
		}
		p.Add(l)
		// label a third of the way along, so labels of crossing fronts do not
		// collide, and not where an earlier label sits already
		at := plotter.XY{X: (2*x0 + x1) / 3, Y: (2*f.T0 + f.T1) / 3 * 1e3}
		free := true
		for _, q := range lxy {
			if math.Abs(q.X-at.X) < 0.07*lengthKm && math.Abs(q.Y-at.Y) < 0.028*tEnd {
				free = false
				break
			}
		}
		if !free {
			hidden++
			continue
		}
		lxy = append(lxy, at)
		ltxt = append(ltxt, fmt.Sprintf("%+.3f", f.Amplitude))
	}
	labels, err := plotter.NewLabels(plotter.XYLabels{XYs: lxy, Labels: ltxt})
	if err != nil {
		return nil, err
	}
	for i := range labels.TextStyle {
		labels.TextStyle[i].Font.Size = vg.Points(7)
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
	var more []string
	if ns > 1 {
		more = append(more, "t, r: transmission and reflection coefficients")
	}
	if len(g.Wavefronts) > len(fronts) {
		more = append(more, fmt.Sprintf("first %d of %d wavefronts", len(fronts), len(g.Wavefronts)))
	}
	if hidden > 0 {
		more = append(more, fmt.Sprintf("%d crowded labels left out", hidden))
	}
	if len(more) > 0 {
		p.Title.Text += "\n" + strings.Join(more, "; ")
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
