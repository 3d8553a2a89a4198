package main

// The loading command: the line with both ends held at 1 pu from no load to twice the
// surge-impedance loading (angle, reactive power at each end, losses, voltage along
// the line), the open receiving end (Ferranti rise, charging, the reactor that brings
// the rise to a target) and the loadability against length.
//
// For reuse (the report command):
//
//	computeLoading(st, targetPU) (loadingResult, error)  analysis.Loading in display units
//	loadingPlots(r) []*plot.Plot                          the three panels, built by
//	                                                      report.LoadingProfilePlot,
//	                                                      report.LoadingReactivePlot,
//	                                                      report.LoadabilityPlot

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
)

var loadingCommand = func() *command {
	return &command{
		name:  "loading",
		args:  "STUDY [--json] [--plot F] [--target-pu X]",
		short: "angle, reactive power and voltage profile with both ends at 1 pu; open-end rise; loadability",
		long: `
Holds both ends of the line at 1 pu (voltage_kv) and lets it deliver active power into
the receiving bus from 0 to twice the surge-impedance loading (SIL), or to the largest
power it can deliver, whichever is less. For each loading it gives the angle of the
sending-end voltage ahead of the receiving end, the reactive power the sending bus
delivers into the line (Qs) and the line delivers into the receiving bus (Qr), the
losses, and the voltage along the line (mid-line, highest and lowest, and where). The
exact long-line equations of every section are used at frequency_hz, losses included.
Qs_net and Qr_net add the study's shunts in service at 1 pu.

With the receiving end open it gives the no-load (Ferranti) rise and the charging
reactive power, for the line alone and with the study's line-connected shunts, and the
receiving-end reactor rating (Mvar at voltage_kv) that brings the open-end voltage to
--target-pu.

Last, the loadability against length by the analytical method of Dunlop, Gutman and
Marchenko (1979), after St. Clair (1953): the smaller of a 5 % voltage-drop limit (unity
power factor at the receiving end) and a 30 % steady-state stability margin (ends at
1.0 and 0.95 pu, terminal systems from [source] and [receiving] short_circuit_mva and
x_over_r, 50 kA where absent as in the paper). A thermal limit, sqrt(3)·V·I, joins the
curve only when [loading] thermal_rating_a is given; without it none is applied. The
line under study is placed on the curve (lines of its make, scaled in length).

--plot F writes one figure (PNG or SVG by extension) with three panels: voltage
profiles for a few loadings, reactive power against loading, and the loadability curve.`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			asJSON := fs.Bool("json", false, "write the results as one JSON document")
			plotPath := fs.String("plot", "", "write the figure to `F` (.png or .svg)")
			target := fs.Float64("target-pu", 1.0, "open-end voltage `X` (pu of the sending end) the receiving-end reactor should give")
			return func(ctx context.Context, args []string) error {
				if !(*target > 0) || *target > 2 || math.IsNaN(*target) {
					return usagef("telegrapher loading: --target-pu: must be > 0 and <= 2, got %g", *target)
				}
				st, err := studyArg("loading", args, stderr, [2]string{"plot", *plotPath})
				if err != nil {
					return err
				}
				r, err := computeLoading(st, *target)
				if err != nil {
					return err // an *analysis.InputError: exit 2
				}
				if *plotPath != "" {
					if err := report.SaveStacked(loadingPlots(r), 8*vg.Inch, 4*vg.Inch, *plotPath); err != nil {
						return fmt.Errorf("--plot %s: %v", *plotPath, err)
					}
				}
				if *asJSON {
					return writeJSON(stdout, r)
				}
				printLoading(stdout, r)
				return nil
			}
		},
	}
}()

// loadingResult is everything the loading command computes. Its JSON form is the
// contract's `loading` document (sil_mw, p_max_mw, points) with extras.
type loadingResult struct {
	Title          string               `json:"title,omitempty"`
	FrequencyHz    float64              `json:"frequency_hz"`
	VoltageKV      float64              `json:"voltage_kv"`
	LengthKm       float64              `json:"length_km"`
	SILMW          float64              `json:"sil_mw"`
	PMaxMW         float64              `json:"p_max_mw"`
	DeltaAtPMaxDeg float64              `json:"delta_at_p_max_deg"`
	Points         []loadingPointJSON   `json:"points"`
	Profiles       []loadingProfile     `json:"profiles"`
	OpenEnd        openEndJSON          `json:"open_end"`
	Loadability    loadabilityJSON      `json:"loadability"`
	Notes          []string             `json:"notes"`
	shuntsSend     float64              // var absorbed by the sending-end shunts at 1 pu
	shuntsRecv     float64              // var absorbed by the receiving-end shunts at 1 pu
	curve          []loadabilityCurvePt // for the plot
}

type loadingPointJSON struct {
	PMW      float64 `json:"p_mw"`
	PSIL     float64 `json:"p_sil"`
	DeltaDeg float64 `json:"delta_deg"`
	QsMvar   float64 `json:"qs_mvar"`
	QrMvar   float64 `json:"qr_mvar"`
	VMidPU   float64 `json:"v_mid_pu"`
	VMaxPU   float64 `json:"v_max_pu"`
	VMinPU   float64 `json:"v_min_pu"`
	XVMaxKm  float64 `json:"x_v_max_km"`
	XVMinKm  float64 `json:"x_v_min_km"`
	LossesMW float64 `json:"losses_mw"`
	// With the study's shunts (line- and bus-connected) in service at 1 pu: what the
	// sending system must supply, and what the receiving system receives.
	QsNetMvar float64 `json:"qs_net_mvar"`
	QrNetMvar float64 `json:"qr_net_mvar"`
}

type loadingProfile struct {
	PSIL float64   `json:"p_sil"`
	XKm  []float64 `json:"x_km"`
	VPU  []float64 `json:"v_pu"`
}

type openEndJSON struct {
	RisePU             float64 `json:"rise_pu"`             // |Vr/Vs|, line alone
	ChargingMvar       float64 `json:"charging_mvar"`       // generated by the line alone, into the sending bus
	RiseWithShuntsPU   float64 `json:"rise_with_shunts_pu"` // with the line-connected shunts
	ChargingShuntsMvar float64 `json:"charging_with_shunts_mvar"`
	RiseFromEMFPU      float64 `json:"rise_from_emf_pu"` // |Vr/E| with the source and sending shunts
	TargetPU           float64 `json:"target_pu"`
	ReactorMvar        float64 `json:"reactor_mvar"`       // on the bare line, for the target
	ReactorAddedMvar   float64 `json:"reactor_added_mvar"` // beyond the study's receiving line-connected shunts
}

type loadabilityJSON struct {
	Method             string               `json:"method"`
	VoltageDropPct     float64              `json:"voltage_drop_pct"`
	StabilityMarginPct float64              `json:"stability_margin_pct"`
	SendingSystem      string               `json:"sending_system"`
	ReceivingSystem    string               `json:"receiving_system"`
	Thermal            string               `json:"thermal"`
	ThermalSIL         float64              `json:"thermal_limit_sil,omitempty"`
	SIL                float64              `json:"loadability_sil"`
	MW                 float64              `json:"loadability_mw"`
	VoltageDropSIL     float64              `json:"voltage_drop_limit_sil"`
	StabilitySIL       float64              `json:"stability_limit_sil"`
	LineAngleDeg       float64              `json:"line_angle_at_limit_deg"`
	SystemAngleDeg     float64              `json:"system_angle_at_limit_deg"`
	Governs            string               `json:"governs"`
	Curve              []loadabilityCurvePt `json:"curve"`
}

type loadabilityCurvePt struct {
	LengthKm       float64 `json:"length_km"`
	VoltageDropSIL float64 `json:"voltage_drop_sil"`
	StabilitySIL   float64 `json:"stability_sil"`
	ThermalSIL     float64 `json:"thermal_sil,omitempty"`
	LoadabilitySIL float64 `json:"loadability_sil"`
}

// computeLoading computes the loading study of st (analysis.Loading) and shapes it
// for printing and JSON. Errors are problems with the study's data.
func computeLoading(st *study.Study, targetPU float64) (loadingResult, error) {
	var r loadingResult
	a, err := analysis.Loading(st, targetPU)
	if err != nil {
		return r, err
	}
	v := st.Voltage
	r.Title = st.Title
	r.FrequencyHz, r.VoltageKV, r.LengthKm = st.Frequency, v/1e3, st.Line.Length()/1e3
	sil := a.SIL
	r.SILMW, r.PMaxMW, r.DeltaAtPMaxDeg = sil/1e6, a.PMax/1e6, a.DeltaAtPMax*180/math.Pi
	r.shuntsSend, r.shuntsRecv = a.ShuntsSend, a.ShuntsRecv
	for _, pt := range a.Points {
		r.Points = append(r.Points, loadingPointJSON{
			PMW: pt.P / 1e6, PSIL: pt.P / sil, DeltaDeg: pt.Delta * 180 / math.Pi,
			QsMvar: pt.Qs / 1e6, QrMvar: pt.Qr / 1e6,
			VMidPU: pt.VMid, VMaxPU: pt.VMax, VMinPU: pt.VMin,
			XVMaxKm: pt.XVMax / 1e3, XVMinKm: pt.XVMin / 1e3, LossesMW: pt.Losses / 1e6,
			QsNetMvar: (pt.Qs + r.shuntsSend) / 1e6, QrNetMvar: (pt.Qr - r.shuntsRecv) / 1e6,
		})
	}
	for _, p := range a.Profiles {
		lp := loadingProfile{PSIL: p.P / sil, XKm: make([]float64, len(p.X)), VPU: p.V}
		for i, x := range p.X {
			lp.XKm[i] = x / 1e3
		}
		r.Profiles = append(r.Profiles, lp)
	}
	bare, with := a.OpenBare, a.OpenWith
	r.OpenEnd = openEndJSON{
		RisePU: bare.Rise, ChargingMvar: bare.Charging / 1e6,
		RiseWithShuntsPU: with.Rise, ChargingShuntsMvar: with.Charging / 1e6,
		RiseFromEMFPU: a.RiseFromEMF, TargetPU: targetPU,
	}
	r.OpenEnd.ReactorMvar, r.OpenEnd.ReactorAddedMvar = a.Reactor/1e6, a.ReactorAdd/1e6
	if with.Rise < targetPU {
		r.Notes = append(r.Notes, fmt.Sprintf("with the study's shunts the open-end voltage (%.4f pu) is already below the target %.4g pu: no reactor is added", with.Rise, targetPU))
	}

	// Loadability.
	lim := a.Limits
	la := &r.Loadability
	la.Method = "Dunlop, Gutman, Marchenko (1979), after St. Clair (1953)"
	la.VoltageDropPct, la.StabilityMarginPct = lim.VoltageDrop*100, lim.StabilityMargin*100
	la.SendingSystem = "50 kA at voltage_kv, purely reactive (assumed, as in the paper: no [source])"
	if !st.Source.Ideal {
		la.SendingSystem = fmt.Sprintf("[source]: %.4g + j%.4g ohm", real(lim.Zs), imag(lim.Zs))
	}
	la.ReceivingSystem = "50 kA at voltage_kv, purely reactive (assumed, as in the paper: no receiving.short_circuit_mva)"
	if sc := st.Receiving.ShortCircuitVA; sc > 0 {
		xr := "purely reactive"
		if st.Receiving.XOverR > 0 {
			xr = fmt.Sprintf("X/R %g", st.Receiving.XOverR)
		}
		la.ReceivingSystem = fmt.Sprintf("[receiving]: %.0f MVA, %s", sc/1e6, xr)
	}
	la.Thermal = "not applied (no loading.thermal_rating_a in the study)"
	if a := st.Loading.ThermalRating; a > 0 {
		la.Thermal = fmt.Sprintf("loading.thermal_rating_a %g A: %.0f MW at voltage_kv and unity power factor", a, lim.Thermal/1e6)
		la.ThermalSIL = lim.Thermal / sil
	}
	this := a.Loadability
	la.SIL, la.MW = this.Loadability/sil, this.Loadability/1e6
	la.VoltageDropSIL, la.StabilitySIL = this.VoltageDrop/sil, this.Stability/sil
	la.LineAngleDeg, la.SystemAngleDeg = this.LineAngle*180/math.Pi, this.SystemAngle*180/math.Pi
	la.Governs = this.Governs
	for _, c := range a.Curve {
		la.Curve = append(la.Curve, loadabilityCurvePt{
			LengthKm: c.Length / 1e3, VoltageDropSIL: c.VoltageDrop / c.SIL,
			StabilitySIL: c.Stability / c.SIL, ThermalSIL: c.Thermal / c.SIL, LoadabilitySIL: c.Loadability / c.SIL,
		})
	}
	r.curve = la.Curve
	if len(st.Line) > 1 {
		r.Notes = append(r.Notes, "SIL of the sections in cascade uses sqrt(total L / total C); the loadability curve scales every section in proportion")
	}
	return r, nil
}

// loadingPlots returns the three panels of the loading figure.
func loadingPlots(r loadingResult) []*plot.Plot {
	profiles := make([]report.LoadingProfile, len(r.Profiles))
	for i, p := range r.Profiles {
		profiles[i] = report.LoadingProfile{PSIL: p.PSIL, XKm: p.XKm, VPU: p.VPU}
	}
	var q report.LoadingReactive
	for _, p := range r.Points {
		q.PSIL = append(q.PSIL, p.PSIL)
		q.QsMvar = append(q.QsMvar, p.QsMvar)
		q.QrMvar = append(q.QrMvar, p.QrMvar)
		q.DeltaDeg = append(q.DeltaDeg, p.DeltaDeg)
	}
	var d report.LoadabilityData
	for _, c := range r.Loadability.Curve {
		d.LengthKm = append(d.LengthKm, c.LengthKm)
		d.VoltageDropSIL = append(d.VoltageDropSIL, c.VoltageDropSIL)
		d.StabilitySIL = append(d.StabilitySIL, c.StabilitySIL)
		if c.ThermalSIL > 0 {
			d.ThermalSIL = append(d.ThermalSIL, c.ThermalSIL)
		}
		d.LoadabilitySIL = append(d.LoadabilitySIL, c.LoadabilitySIL)
	}
	d.ThisKm, d.ThisSIL = r.LengthKm, r.Loadability.SIL
	thermal := "no thermal limit"
	if r.Loadability.ThermalSIL > 0 {
		thermal = fmt.Sprintf("thermal limit %.2f SIL", r.Loadability.ThermalSIL)
	}
	d.Note = fmt.Sprintf("%.0f kV, %g Hz; 5 %% drop, 30 %% margin; %s", r.VoltageKV, r.FrequencyHz, thermal)
	return []*plot.Plot{
		report.LoadingProfilePlot(profiles, r.LengthKm),
		report.LoadingReactivePlot(q),
		report.LoadabilityPlot(d),
	}
}

func printLoading(w io.Writer, r loadingResult) {
	title := r.Title
	if title == "" {
		title = "loading"
	}
	fmt.Fprintf(w, "%s: %.0f kV, %g Hz, %.1f km\n", title, r.VoltageKV, r.FrequencyHz, r.LengthKm)
	fmt.Fprintf(w, "SIL %.1f MW; largest power with both ends at 1 pu %.1f MW (%.2f SIL) at %.1f deg\n\n",
		r.SILMW, r.PMaxMW, r.PMaxMW/r.SILMW, r.DeltaAtPMaxDeg)
	fmt.Fprintln(w, "Both ends held at 1 pu (Qs: sending bus into the line; Qr: line into the receiving bus)")
	fmt.Fprintf(w, "%9s %6s %7s %9s %9s %9s %7s %7s %8s %7s %8s %9s %9s\n",
		"P MW", "P/SIL", "delta", "Qs Mvar", "Qr Mvar", "loss MW", "V mid", "V max", "at km", "V min", "at km", "Qs net", "Qr net")
	for _, p := range r.Points {
		fmt.Fprintf(w, "%9.1f %6.2f %7.2f %9.1f %9.1f %9.2f %7.4f %7.4f %8.1f %7.4f %8.1f %9.1f %9.1f\n",
			p.PMW, p.PSIL, p.DeltaDeg, p.QsMvar, p.QrMvar, p.LossesMW, p.VMidPU, p.VMaxPU, p.XVMaxKm, p.VMinPU, p.XVMinKm, p.QsNetMvar, p.QrNetMvar)
	}
	fmt.Fprintf(w, "(delta in degrees, V in pu; net: with the study's shunts at 1 pu, %.1f Mvar absorbed at the sending end, %.1f Mvar at the receiving end)\n\n",
		r.shuntsSend/1e6, r.shuntsRecv/1e6)
	o := r.OpenEnd
	fmt.Fprintln(w, "Receiving end open, sending bus at 1 pu")
	fmt.Fprintf(w, "  line alone:                 rise %s, charging %s\n", bounded(o.RisePU, "%.4f pu", atResonance), bounded(o.ChargingMvar, "%.1f Mvar", atResonance))
	fmt.Fprintf(w, "  with line-connected shunts: rise %s, charging %s (net, into the sending bus)\n", bounded(o.RiseWithShuntsPU, "%.4f pu", atResonance), bounded(o.ChargingShuntsMvar, "%.1f Mvar", atResonance))
	fmt.Fprintf(w, "  from the source EMF:        |Vr/E| %s\n", bounded(o.RiseFromEMFPU, "%.4f pu", atResonance))
	fmt.Fprintf(w, "  receiving-end reactor for %.4g pu: %.1f Mvar on the bare line, %.1f Mvar beyond the study's shunts\n\n",
		o.TargetPU, o.ReactorMvar, o.ReactorAddedMvar)
	la := r.Loadability
	fmt.Fprintf(w, "Loadability (%s)\n", la.Method)
	fmt.Fprintf(w, "  limits: %.0f %% voltage drop, %.0f %% stability margin; thermal %s\n", la.VoltageDropPct, la.StabilityMarginPct, la.Thermal)
	fmt.Fprintf(w, "  sending system: %s\n  receiving system: %s\n", la.SendingSystem, la.ReceivingSystem)
	fmt.Fprintf(w, "  this line: %.2f SIL (%.0f MW), %s governs (voltage drop %.2f SIL, stability %.2f SIL; line angle %.1f deg, system %.1f deg at the stability limit)\n",
		la.SIL, la.MW, la.Governs, la.VoltageDropSIL, la.StabilitySIL, la.LineAngleDeg, la.SystemAngleDeg)
	fmt.Fprintf(w, "  %10s %12s %10s %12s\n", "length km", "voltage drop", "stability", "loadability")
	for i, c := range la.Curve {
		if (i+1)%10 != 0 {
			continue
		}
		fmt.Fprintf(w, "  %10.0f %12.2f %10.2f %12.2f\n", c.LengthKm, c.VoltageDropSIL, c.StabilitySIL, c.LoadabilitySIL)
	}
	for _, n := range r.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
	fmt.Fprintln(w, "\n"+loadingWrap(Caution, 88))
}

func loadingWrap(s string, width int) string {
	var b strings.Builder
	n := 0
	for _, word := range strings.Fields(s) {
		if n > 0 && n+1+len(word) > width {
			b.WriteByte('\n')
			n = 0
		} else if n > 0 {
			b.WriteByte(' ')
			n++
		}
		b.WriteString(word)
		n += len(word)
	}
	return b.String()
}
