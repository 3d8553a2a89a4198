package report

// Plot builders of the loading study (both ends held at 1 pu; open end; loadability).
// Each returns a *plot.Plot the CLI and the HTML report both use:
//
//	LoadingProfilePlot   voltage along the line for a few loadings
//	LoadingReactivePlot  reactive power at each end (and angle) against loading
//	LoadabilityPlot      loadability against length, with this line marked

import (
	"fmt"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// LoadingProfile is one voltage profile along the line.
type LoadingProfile struct {
	PSIL float64   // loading, multiples of SIL
	XKm  []float64 // distance from the sending end, km
	VPU  []float64 // voltage, pu of the held end voltage
}

// LoadingReactive is the reactive power balance against loading.
type LoadingReactive struct {
	PSIL     []float64 // loading, multiples of SIL
	QsMvar   []float64 // delivered by the sending bus into the line
	QrMvar   []float64 // delivered by the line into the receiving bus
	DeltaDeg []float64 // angle across the line
}

// LoadabilityData is a loadability curve and the line under study on it.
type LoadabilityData struct {
	LengthKm       []float64
	VoltageDropSIL []float64 // voltage-drop limit, multiples of SIL
	StabilitySIL   []float64 // stability-margin limit, multiples of SIL
	ThermalSIL     []float64 // thermal limit, multiples of SIL; nil = none
	LoadabilitySIL []float64 // the smallest of the limits
	ThisKm         float64   // the line under study
	ThisSIL        float64   // its loadability
	Note           string    // assumptions, one line, for the caption
}

var (
	ldBlue    = color.RGBA{R: 31, G: 119, B: 180, A: 255}
	ldOrange  = color.RGBA{R: 255, G: 127, B: 14, A: 255}
	ldGreen   = color.RGBA{R: 44, G: 160, B: 44, A: 255}
	ldRed     = color.RGBA{R: 214, G: 39, B: 40, A: 255}
	ldPurple  = color.RGBA{R: 148, G: 103, B: 189, A: 255}
	ldGrey    = color.RGBA{R: 120, G: 120, B: 120, A: 255}
	ldPalette = []color.Color{ldBlue, ldGreen, ldOrange, ldRed, ldPurple}
)

func ldXY(x, y []float64) plotter.XYs {
	n := min(len(x), len(y))
	pts := make(plotter.XYs, 0, n)
	for i := 0; i < n; i++ {
		if math.IsNaN(y[i]) || math.IsInf(y[i], 0) || math.IsNaN(x[i]) || math.IsInf(x[i], 0) {
			continue
		}
		pts = append(pts, plotter.XY{X: x[i], Y: y[i]})
	}
	return pts
}

func ldLine(pts plotter.XYs, c color.Color, width vg.Length, dashed bool) *plotter.Line {
	l, err := plotter.NewLine(pts)
	if err != nil {
		panic("report: " + err.Error())
	}
	l.Color = c
	l.Width = width
	if dashed {
		l.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
	}
	return l
}

func ldHLine(p *plot.Plot, y, x0, x1 float64, c color.Color) *plotter.Line {
	l := ldLine(plotter.XYs{{X: x0, Y: y}, {X: x1, Y: y}}, c, vg.Points(1), true)
	p.Add(l)
	return l
}

// LoadingProfilePlot returns the voltage along the line (pu) against the distance from
// the sending end (km) for each profile, with both ends at 1 pu.
func LoadingProfilePlot(profiles []LoadingProfile, lengthKm float64) *plot.Plot {
	p := plot.New()
	p.Title.Text = "Voltage along the line, both ends held at 1 pu"
	p.X.Label.Text = "distance from the sending end (km)"
	p.Y.Label.Text = "voltage (pu)"
	p.Add(plotter.NewGrid())
	ldHLine(p, 1, 0, lengthKm, ldGrey)
	lo, hi := 1.0, 1.0
	for i, pr := range profiles {
		l := ldLine(ldXY(pr.XKm, pr.VPU), ldPalette[i%len(ldPalette)], vg.Points(1.8), false)
		p.Add(l)
		p.Legend.Add(fmt.Sprintf("P = %.2g SIL", pr.PSIL), l)
		for _, v := range pr.VPU {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	span := math.Max(0.01, hi-lo)
	// room above the curves for the legend
	p.Y.Min, p.Y.Max = lo-0.08*span, hi+0.45*span
	p.X.Tick.Marker, p.Y.Tick.Marker = ldTicks{}, ldTicks{}
	p.X.Min, p.X.Max = 0, lengthKm
	p.Legend.Top = true
	p.Legend.Left = true
	p.Legend.XOffs = vg.Points(8)
	return p
}

// LoadingReactivePlot returns the reactive power at both ends (Mvar) against loading
// (multiples of SIL); a marker line at 1 SIL, where a lossless line needs none.
func LoadingReactivePlot(r LoadingReactive) *plot.Plot {
	p := plot.New()
	p.Title.Text = "Reactive power at the line ends, both ends at 1 pu"
	p.X.Label.Text = "active power delivered (multiples of SIL)"
	p.Y.Label.Text = "reactive power (Mvar)"
	p.Add(plotter.NewGrid())
	qs := ldLine(ldXY(r.PSIL, r.QsMvar), ldBlue, vg.Points(1.8), false)
	qr := ldLine(ldXY(r.PSIL, r.QrMvar), ldOrange, vg.Points(1.8), false)
	p.Add(qs, qr)
	p.Legend.Add("Qs, sending bus into the line", qs)
	p.Legend.Add("Qr, line into the receiving bus", qr)
	lo, hi := 0.0, 0.0
	for _, s := range [][]float64{r.QsMvar, r.QrMvar} {
		for _, v := range s {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	xmax := 0.0
	for _, x := range r.PSIL {
		xmax = math.Max(xmax, x)
	}
	ldHLine(p, 0, 0, xmax, ldGrey)
	if xmax >= 1 {
		sil := ldLine(plotter.XYs{{X: 1, Y: lo}, {X: 1, Y: hi}}, ldGrey, vg.Points(1), true)
		p.Add(sil)
		p.Legend.Add("1 SIL", sil)
	}
	p.X.Min, p.X.Max = 0, xmax
	p.X.Tick.Marker, p.Y.Tick.Marker = ldTicks{}, ldTicks{}
	p.Legend.Left = true
	p.Legend.XOffs = vg.Points(8)
	p.Legend.YOffs = vg.Points(6)
	return p
}

// LoadabilityPlot returns the loadability (multiples of SIL) against line length
// (km): both limits and their lower envelope, with the line under study marked.
func LoadabilityPlot(d LoadabilityData) *plot.Plot {
	p := plot.New()
	p.Title.Text = "Loadability against length (Dunlop, Gutman, Marchenko 1979)"
	if d.Note != "" {
		p.Title.Text += "\n" + d.Note
		p.Title.TextStyle.Font.Size = vg.Points(11)
	}
	p.X.Label.Text = "line length (km)"
	p.Y.Label.Text = "loadability (multiples of SIL)"
	p.Add(plotter.NewGrid())
	vd := ldLine(ldXY(d.LengthKm, d.VoltageDropSIL), ldOrange, vg.Points(1.2), true)
	st := ldLine(ldXY(d.LengthKm, d.StabilitySIL), ldGreen, vg.Points(1.2), true)
	env := ldLine(ldXY(d.LengthKm, d.LoadabilitySIL), ldBlue, vg.Points(2.4), false)
	env.Color = color.NRGBA{R: 31, G: 119, B: 180, A: 110}
	env.Width = vg.Points(4)
	p.Add(env, vd, st)
	p.Legend.Add("loadability", env)
	p.Legend.Add("voltage-drop limit (5 %)", vd)
	p.Legend.Add("stability limit (30 % margin)", st)
	if len(d.ThermalSIL) > 0 {
		th := ldLine(ldXY(d.LengthKm, d.ThermalSIL), ldRed, vg.Points(1.2), true)
		p.Add(th)
		p.Legend.Add("thermal limit (rating)", th)
	}
	if d.ThisKm > 0 && d.ThisSIL > 0 {
		sc, err := plotter.NewScatter(plotter.XYs{{X: d.ThisKm, Y: d.ThisSIL}})
		if err != nil {
			panic("report: " + err.Error())
		}
		sc.GlyphStyle.Color = ldRed
		sc.GlyphStyle.Radius = vg.Points(5)
		sc.GlyphStyle.Shape = draw.CircleGlyph{}
		p.Add(sc)
		p.Legend.Add(fmt.Sprintf("this line: %.0f km, %.2f SIL", d.ThisKm, d.ThisSIL), sc)
	}
	hi := 0.0
	for _, v := range d.LoadabilitySIL {
		hi = math.Max(hi, v)
	}
	p.Y.Min, p.Y.Max = 0, math.Min(hi*1.1, 6)
	if len(d.LengthKm) > 0 {
		p.X.Min, p.X.Max = 0, d.LengthKm[len(d.LengthKm)-1]
	}
	p.Legend.Top = true
	p.Legend.XOffs = -vg.Points(14)
	p.X.Tick.Marker, p.Y.Tick.Marker = ldTicks{}, ldTicks{}
	return p
}

// ldTicks places about six evenly spaced ticks with labels of just enough digits.
type ldTicks struct{}

// Ticks implements plot.Ticker.
func (ldTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) {
		return nil
	}
	raw := (hi - lo) / 6
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	digits := max(0, int(-math.Floor(math.Log10(step)+1e-9)))
	if step/math.Pow(10, math.Floor(math.Log10(step))) == 2.5 {
		digits++
	}
	var ticks []plot.Tick
	for v := math.Ceil(lo/step) * step; v <= hi+1e-9*step; v += step {
		ticks = append(ticks, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', digits, 64)})
	}
	return ticks
}
