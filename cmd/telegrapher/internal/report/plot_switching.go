package report

// Plot builders of the statistical switching study. Each returns a *plot.Plot the CLI
// and the HTML report both use:
//
//	SwitchingDistributionPlot  cumulative distribution of the absolute phase peaks on a
//	                           normal-probability scale, with u2 and ut marked
//	SwitchingWaveformPlot      the worst shot's three receiving-end voltages

import (
	"fmt"
	"image/color"
	"math"
	"sort"
	"strconv"

	"gonum.org/v1/gonum/stat/distuv"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// SwitchingSample is one set of absolute phase peaks (pu, IEC 60071-1 base) with its
// 2 % and truncation values, for the distribution plot.
type SwitchingSample struct {
	Label  string    // e.g. "without arresters (unprotected)"
	Peaks  []float64 // absolute phase peaks, pu; any order
	U2, Ut float64   // pu
	Mean   float64   // pu, of the normal fit
	Sigma  float64   // pu, of the normal fit
}

var swPalette = []color.Color{
	color.RGBA{R: 31, G: 119, B: 180, A: 255},
	color.RGBA{R: 214, G: 39, B: 40, A: 255},
	color.RGBA{R: 44, G: 160, B: 44, A: 255},
}

// swProbTicks labels a probit axis with cumulative probabilities in per cent.
type swProbTicks struct{}

func (swProbTicks) Ticks(min, max float64) []plot.Tick {
	var out []plot.Tick
	for _, p := range []float64{0.01, 0.1, 1, 2, 5, 10, 20, 30, 50, 70, 80, 90, 95, 98, 99, 99.9, 99.99} {
		z := distuv.UnitNormal.Quantile(p / 100)
		if z < min || z > max {
			continue
		}
		out = append(out, plot.Tick{Value: z, Label: strconv.FormatFloat(p, 'g', -1, 64)})
	}
	return out
}

// swTicks places labelled ticks at a round step giving about eight of them.
type swTicks struct{}

func (swTicks) Ticks(min, max float64) []plot.Tick {
	span := max - min
	if !(span > 0) {
		return nil
	}
	raw := span / 8
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step := mag
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*mag >= raw {
			step = m * mag
			break
		}
	}
	var out []plot.Tick
	for v := math.Ceil(min/step) * step; v <= max+1e-9*span; v += step {
		x := math.Round(v/step) * step
		out = append(out, plot.Tick{Value: x, Label: strconv.FormatFloat(x, 'g', 4, 64)})
		for k := 1; k < 5; k++ {
			if m := x + float64(k)*step/5; m < max {
				out = append(out, plot.Tick{Value: m})
			}
		}
	}
	return out
}

// SwitchingDistributionPlot returns the cumulative distribution of the absolute phase
// peaks of each sample on a normal-probability scale (a normal distribution is a
// straight line): the empirical points at the Hazen plotting positions (i − 0.5)/n,
// the normal fit as a dashed line, and u2 (2 % exceeded, 98 % cumulative) and ut as
// vertical marks.
func SwitchingDistributionPlot(samples []SwitchingSample, title string) *plot.Plot {
	p := plot.New()
	if title == "" {
		title = "Statistical switching: absolute phase peaks at the open end"
	}
	p.Title.Text = title
	p.X.Label.Text = "overvoltage (pu of Us·√2/√3)"
	p.Y.Label.Text = "cumulative probability (%), normal scale"
	p.Add(plotter.NewGrid())
	p.Y.Tick.Marker = swProbTicks{}
	zlo, zhi := -3.0, 3.0
	xlo, xhi := math.Inf(1), math.Inf(-1)
	for i, s := range samples {
		if len(s.Peaks) == 0 {
			continue
		}
		c := swPalette[i%len(swPalette)]
		x := append([]float64(nil), s.Peaks...)
		sort.Float64s(x)
		n := float64(len(x))
		pts := make(plotter.XYs, len(x))
		for k, v := range x {
			z := distuv.UnitNormal.Quantile((float64(k) + 0.5) / n)
			pts[k] = plotter.XY{X: v, Y: z}
			zlo, zhi = math.Min(zlo, z), math.Max(zhi, z)
		}
		xlo, xhi = math.Min(xlo, x[0]), math.Max(xhi, math.Max(x[len(x)-1], s.Ut))
		sc, err := plotter.NewScatter(pts)
		if err != nil {
			panic("report: " + err.Error())
		}
		sc.GlyphStyle.Color = c
		sc.GlyphStyle.Radius = vg.Points(1.5)
		sc.GlyphStyle.Shape = draw.CircleGlyph{}
		p.Add(sc)
		p.Legend.Add(s.Label, sc)
		if s.Sigma > 0 {
			fit := plotter.XYs{{X: s.Mean - 4*s.Sigma, Y: -4}, {X: s.Mean + 4*s.Sigma, Y: 4}}
			l := swLine(fit, c, 1, true)
			p.Add(l)
			p.Legend.Add(fmt.Sprintf("normal fit (mean %.2f, σ %.2f pu)", s.Mean, s.Sigma), l)
		}
		u2 := swLine(plotter.XYs{{X: s.U2, Y: -10}, {X: s.U2, Y: 10}}, c, 1.5, false)
		p.Add(u2)
		p.Legend.Add(fmt.Sprintf("u2 = %.2f pu (2 %% exceeded)", s.U2), u2)
		ut := swLine(plotter.XYs{{X: s.Ut, Y: -10}, {X: s.Ut, Y: 10}}, c, 1.5, true)
		ut.Dashes = []vg.Length{vg.Points(2), vg.Points(2)}
		p.Add(ut)
		p.Legend.Add(fmt.Sprintf("ut = %.2f pu (truncation)", s.Ut), ut)
	}
	z98 := distuv.UnitNormal.Quantile(0.98)
	if !math.IsInf(xlo, 0) {
		span := math.Max(0.1, xhi-xlo)
		p.X.Min, p.X.Max = xlo-0.05*span, xhi+0.05*span
		h := swLine(plotter.XYs{{X: p.X.Min, Y: z98}, {X: p.X.Max, Y: z98}}, color.Gray{Y: 120}, 0.8, true)
		p.Add(h)
	}
	p.Y.Min, p.Y.Max = math.Min(zlo, -2.5)-0.2, math.Max(zhi, z98)+0.3
	p.X.Tick.Marker = swTicks{}
	// The distributions rise from lower left to upper right: the lower right is free.
	p.Legend.Top = false
	p.Legend.Left = false
	p.Legend.XOffs = -vg.Points(6)
	p.Legend.YOffs = vg.Points(6)
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	return p
}

// SwitchingWaveformPlot returns the three receiving-end voltages (pu of the EMF base)
// of one shot against time (ms from the first pole's contact), with each pole's
// closing instant and, when lastContactMs >= 0, the last contact (the pre-insertion
// resistor bypassed) marked.
func SwitchingWaveformPlot(tMs []float64, phases [3][]float64, closeMs [3]float64, lastContactMs float64, title string) *plot.Plot {
	p := plot.New()
	if title == "" {
		title = "Worst shot: receiving-end voltages"
	}
	p.Title.Text = title
	p.X.Label.Text = "time from the first pole's contact (ms)"
	p.Y.Label.Text = "voltage (pu of peak phase-to-earth EMF)"
	p.Add(plotter.NewGrid())
	lo, hi := -1.0, 1.0
	names := [3]string{"phase a", "phase b", "phase c"}
	for k := 0; k < 3; k++ {
		n := min(len(tMs), len(phases[k]))
		pts := make(plotter.XYs, 0, n)
		for i := 0; i < n; i++ {
			v := phases[k][i]
			if math.IsNaN(v) || math.IsInf(v, 0) {
				continue
			}
			pts = append(pts, plotter.XY{X: tMs[i], Y: v})
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		l := swLine(pts, swPalette[k], 1.2, false)
		p.Add(l)
		p.Legend.Add(names[k], l)
	}
	span := hi - lo
	p.Y.Min, p.Y.Max = lo-0.05*span, hi+0.3*span
	for k := 0; k < 3; k++ {
		m := swLine(plotter.XYs{{X: closeMs[k], Y: p.Y.Min}, {X: closeMs[k], Y: p.Y.Max}}, swPalette[k], 0.8, true)
		p.Add(m)
		if k == 0 {
			p.Legend.Add("pole closings", m)
		}
	}
	if lastContactMs >= 0 {
		m := swLine(plotter.XYs{{X: lastContactMs, Y: p.Y.Min}, {X: lastContactMs, Y: p.Y.Max}}, color.Gray{Y: 90}, 0.8, true)
		p.Add(m)
		p.Legend.Add("last contact (resistor bypassed)", m)
	}
	if len(tMs) > 0 {
		p.X.Min, p.X.Max = tMs[0], tMs[len(tMs)-1]
	}
	p.X.Tick.Marker, p.Y.Tick.Marker = swTicks{}, swTicks{}
	p.Legend.Top = true
	p.Legend.XOffs = -vg.Points(4)
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	return p
}

func swLine(pts plotter.XYs, c color.Color, width float64, dashed bool) *plotter.Line {
	l, err := plotter.NewLine(pts)
	if err != nil {
		panic("report: " + err.Error())
	}
	l.Color = c
	l.Width = vg.Points(width)
	if dashed {
		l.Dashes = []vg.Length{vg.Points(6), vg.Points(3)}
	}
	return l
}
