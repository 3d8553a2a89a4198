package main

// The scan command: voltage magnification and driving-point impedances over frequency,
// resonance peaks, harmonic screening and the source-strength map.
//
//	computeScan(ctx, st) (scanResult, error) -> analysis.Scan shaped for display (the
//	                                        report command reuses it); scanResult is
//	                                        also the --json document
//	scanPlotData(st, res)                -> report.ScanPlotData for report.ScanPlot
//	scanMapData(st, res)                 -> report.ScanMapData for report.ScanMapPlot
//	scanTable(res)                       -> the --csv table (units in column names)
//	printScan(w, st, res)                -> the terminal summary

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot/vg"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

var scanCommand = func() *command {
	return &command{
		name:  "scan",
		args:  "STUDY [--json] [--csv F] [--plot F] [--map F]",
		short: "harmonic scan: voltage magnification, resonances, harmonic screening",
		long: `Scans the network of the study (source, shunts, line, load, and the receiving-end
system of [receiving] short_circuit_mva unless scan.far_system = false; the output lists
what is in) over the frequency grid of [scan]: the gain |Vr/E| of the receiving-end voltage
over the source EMF, |Vr/Vs| and the driving-point impedances. It reports every resonance
peak (frequency refined between grid points, harmonic order, gain, -3 dB bandwidth and Q),
the parallel and series resonances of the driving-point impedances, and screens every
integer harmonic: watched harmonics (scan.watch_harmonics) are flagged when the gain
within +-scan.watch_band_pct of them exceeds scan.gain_limit, and each harmonic's
receiving-end level (background x gain) is set against its planning level (default:
IEC TR 61000-3-6 indicative HV-EHV levels). Harmonics that are multiples of 3 are zero
sequence in a balanced system: they are screened on the zero-sequence network when the
study gives zero-sequence data, and marked "positive-sequence only" otherwise; the
zero-sequence network has the neutral reactors of [switching] (3 Xn under that end's
line-connected reactors) and the receiving-end system times [receiving] x0_over_x1.

The receiving-end system is passive for the harmonic transfer: its EMF is shorted and
its impedance (from short_circuit_mva and x_over_r at voltage_kv) is in parallel at the
receiving bus. energise and switching keep the far end open, without it.

--map writes a heat map of the gain over frequency and source short-circuit level
(scan.short_circuit_mva_range, X/R kept; default 0.25 to 4 times the study's level).

The model: the source resistance is constant with frequency, inductances and
capacitances keep their values; per-length constants given directly are constant with
frequency. An exactly lossless network has unbounded resonances: they are reported as
"unbounded" (JSON null, listed in "overflow").`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			asJSON := fs.Bool("json", false, "write the results as one JSON document")
			csvPath := fs.String("csv", "", "write the scan points to this CSV file")
			plotPath := fs.String("plot", "", "write the gain plot (PNG or SVG by extension)")
			mapPath := fs.String("map", "", "write the source-strength heat map (PNG or SVG)")
			return func(ctx context.Context, args []string) error {
				st, err := studyArg("scan", args, stderr, [2]string{"plot", *plotPath}, [2]string{"map", *mapPath})
				if err != nil {
					return err
				}
				return runScan(ctx, st, stdout, *asJSON, *csvPath, *plotPath, *mapPath)
			}
		},
	}
}()

func runScan(ctx context.Context, st *study.Study, stdout io.Writer, asJSON bool, csvPath, plotPath, mapPath string) error {
	res, err := computeScan(ctx, st)
	if err != nil {
		return err
	}
	if mapPath != "" && res.SourceStrength == nil {
		m, err := analysis.SourceStrength(ctx, st)
		if err != nil {
			return err
		}
		res.SourceStrength = strengthResult(st, &res, m)
	}
	if csvPath != "" {
		t, err := scanTable(res)
		if err != nil {
			return err
		}
		if err := report.WriteFileAtomic(csvPath, t.CSV()); err != nil {
			return fmt.Errorf("--csv %s: %v", csvPath, err)
		}
	}
	if plotPath != "" {
		p, err := report.ScanPlot(scanPlotData(st, res))
		if err != nil {
			return err
		}
		if err := report.SavePlot(p, 26*vg.Centimeter, 15*vg.Centimeter, plotPath); err != nil {
			return fmt.Errorf("--plot %s: %v", plotPath, err)
		}
	}
	if mapPath != "" {
		p, err := report.ScanMapPlot(scanMapData(st, res))
		if err != nil {
			return err
		}
		if err := report.SavePlot(p, 26*vg.Centimeter, 16*vg.Centimeter, mapPath); err != nil {
			return fmt.Errorf("--map %s: %v", mapPath, err)
		}
	}
	if asJSON {
		return writeJSON(stdout, res)
	}
	printScan(stdout, st, res)
	return nil
}

// scanResult is everything the scan command computes; it is also the --json document
// (contract: points, peaks, zero_sequence of the same shape; the rest are extra keys).
type scanResult struct {
	Title       string  `json:"title,omitempty"`
	FrequencyHz float64 `json:"frequency_hz"`
	Model       string  `json:"model"`
	Grid        string  `json:"grid"`
	FMinHz      float64 `json:"f_min_hz"`
	FMaxHz      float64 `json:"f_max_hz"`
	// Elements lists what the positive-sequence network has in service, LeftOut what
	// the study gives that the scan leaves out, and why.
	Elements []string `json:"elements"`
	LeftOut  []string `json:"left_out"`
	// The positive sequence (the contract's points and peaks, at the top level).
	Points              []scanPoint      `json:"points"`
	Peaks               []scanPeak       `json:"peaks"`
	ImpedanceResonances []scanZRes       `json:"impedance_resonances"`
	ZeroSequence        *scanSequence    `json:"zero_sequence,omitempty"`
	Harmonics           []scanHarmonic   `json:"harmonics"`
	GainLimit           float64          `json:"gain_limit"`
	WatchBandPct        float64          `json:"watch_band_pct"`
	WatchHarmonics      []int            `json:"watch_harmonics"`
	PlanningSource      string           `json:"planning_levels"`
	Flags               []string         `json:"flags"`
	SourceStrength      *scanStrengthMap `json:"source_strength,omitempty"`
	Caution             string           `json:"caution"`

	// scanSequence is the positive sequence again, in the shape of ZeroSequence (the
	// report command reads it; the JSON takes the exported fields above).
	scanSequence scanSequence

	pos, zero []freqscan.Point      // the scans, for plots and CSV
	posPeaks  []freqscan.Peak       // library peaks (positive)
	zeroPeaks []freqscan.Peak       // library peaks (zero)
	screen    freqscan.Screening    // the screening
	strength  *freqscan.StrengthMap // the map, when computed
}

// scanSequence is the result of one sequence network.
type scanSequence struct {
	Elements            []string    `json:"elements,omitempty"` // zero sequence: what its network has in service
	Points              []scanPoint `json:"points"`
	Peaks               []scanPeak  `json:"peaks"`
	ImpedanceResonances []scanZRes  `json:"impedance_resonances"`
}

type scanPoint struct {
	FHz         float64    `json:"f_hz"`
	Harmonic    float64    `json:"harmonic"`
	Gain        float64    `json:"gain"`
	GainLine    float64    `json:"gain_line"`
	ZInOhm      complex128 `json:"z_in_ohm"`
	GainSending float64    `json:"gain_sending"`
	ZSendingOhm complex128 `json:"z_sending_ohm"`
	ZRecvOhm    complex128 `json:"z_receiving_ohm"`
}

// firstResonance returns the display peak of the first resonance
// (freqscan.FirstResonance: the lowest peak that magnifies), or nil.
func (r *scanResult) firstResonance() *scanPeak {
	for i, p := range r.posPeaks {
		if p.Magnifies() {
			return &r.Peaks[i]
		}
	}
	return nil
}

type scanPeak struct {
	FHz         float64 `json:"f_hz"`
	Harmonic    float64 `json:"harmonic"`
	Gain        float64 `json:"gain"` // null (overflow) when unbounded
	Unbounded   bool    `json:"unbounded"`
	BandwidthHz float64 `json:"bandwidth_hz,omitempty"`
	FLowHz      float64 `json:"f_low_hz,omitempty"`
	FHighHz     float64 `json:"f_high_hz,omitempty"`
	Q           float64 `json:"q,omitempty"`
}

type scanZRes struct {
	Bus       string  `json:"bus"`  // "in", "sending" or "receiving"
	Kind      string  `json:"kind"` // "parallel" (|Z| maximum) or "series" (|Z| minimum)
	FHz       float64 `json:"f_hz"`
	Harmonic  float64 `json:"harmonic"`
	ZOhm      float64 `json:"z_abs_ohm"` // null (overflow) when unbounded
	Unbounded bool    `json:"unbounded"`
}

type scanHarmonic struct {
	Order                int       `json:"order"`
	FHz                  float64   `json:"f_hz"`
	Sequence             string    `json:"sequence"`
	Gain                 float64   `json:"gain"`
	Watched              bool      `json:"watched"`
	BandGain             float64   `json:"band_gain,omitempty"`
	OverLimit            bool      `json:"over_limit"`
	NearPeaksHz          []float64 `json:"near_peaks_hz,omitempty"`
	PlanningPct          float64   `json:"planning_pct"`
	BackgroundPct        *float64  `json:"background_pct,omitempty"`
	ReceivingPct         *float64  `json:"receiving_pct,omitempty"`
	ExceedsPlanning      bool      `json:"exceeds_planning"`
	AllowedBackgroundPct float64   `json:"allowed_background_pct,omitempty"`
}

type scanStrengthMap struct {
	XOverR          float64             `json:"x_over_r"` // null when purely inductive
	ShortCircuitMVA []float64           `json:"short_circuit_mva"`
	First           []scanStrengthFirst `json:"first_resonance"`
	MapFreqHz       []float64           `json:"map_f_hz"`
	MapGain         [][]float64         `json:"map_gain"`
}

type scanStrengthFirst struct {
	ShortCircuitMVA float64 `json:"short_circuit_mva"`
	FHz             float64 `json:"f_hz,omitempty"`
	Harmonic        float64 `json:"harmonic,omitempty"`
	Gain            float64 `json:"gain,omitempty"`
	Unbounded       bool    `json:"unbounded"`
	None            bool    `json:"none,omitempty"` // no resonance within the band
}

// computeScan scans the study (analysis.Scan) and shapes the result for printing and
// JSON.
func computeScan(ctx context.Context, st *study.Study) (scanResult, error) {
	a, err := analysis.Scan(ctx, st)
	if err != nil {
		return scanResult{}, err
	}
	sc := st.Scan
	grid := "linear"
	if a.Log {
		grid = "log"
	}
	f0 := st.Frequency
	res := scanResult{
		Title: st.Title, FrequencyHz: f0, Model: scanModel(st), Grid: grid,
		FMinHz: sc.FMin, FMaxHz: sc.FMax, Caution: Caution,
		PlanningSource: "IEC TR 61000-3-6 indicative HV-EHV planning levels (from memory) unless scan.planning_pct sets them",
	}
	res.Elements, res.LeftOut = scanElements(st, st.Network, false), scanLeftOut(st)
	res.pos, res.posPeaks = a.Positive.Points, a.Positive.Peaks
	p := sequenceResult(a.Positive, f0)
	res.Points, res.Peaks, res.ImpedanceResonances = p.Points, p.Peaks, p.ImpedanceResonances
	res.scanSequence = p
	if a.Zero != nil {
		res.zero, res.zeroPeaks = a.Zero.Points, a.Zero.Peaks
		z := sequenceResult(*a.Zero, f0)
		z.Elements = scanElements(st, a.Zero.Network, true)
		res.ZeroSequence = &z
	}
	res.screen = a.Screen
	res.GainLimit = res.screen.GainLimit
	res.WatchBandPct = res.screen.WatchBand * 100
	res.WatchHarmonics = res.screen.Watch
	for _, r := range res.screen.Rows {
		h := scanHarmonic{Order: r.Order, FHz: r.F, Sequence: string(r.Sequence), Gain: r.Gain,
			Watched: r.Watched, BandGain: r.BandGain, OverLimit: r.OverLimit, PlanningPct: r.PlanPct,
			ExceedsPlanning: r.Exceeds, AllowedBackgroundPct: r.AllowedBackground}
		for _, p := range r.NearPeaks {
			h.NearPeaksHz = append(h.NearPeaksHz, p.F)
		}
		if r.HasBackground {
			bg, amp := r.Background, r.Amplified
			h.BackgroundPct, h.ReceivingPct = &bg, &amp
		}
		res.Harmonics = append(res.Harmonics, h)
	}
	res.Flags = scanFlags(res.screen, f0)
	if a.Strength != nil {
		res.SourceStrength = strengthResult(st, &res, a.Strength)
	}
	return res, nil
}

// scanModel states the model the scan assumes.
func scanModel(st *study.Study) string {
	direct := true
	for _, l := range st.Line {
		if _, ok := l.Constants.(propagation.RLGC); !ok {
			direct = false
		}
	}
	line := "per-length line constants constant with frequency (given directly)"
	if !direct {
		line = "per-length line constants from the geometry, frequency dependent (skin effect, earth return)"
	}
	src := "source resistance constant with frequency, source inductance fixed"
	if st.Network.Source.Ideal() {
		src = "ideal source (zero impedance)"
	}
	return src + "; shunt and load inductances and capacitances fixed (reactances scale with frequency); " +
		line + "; exact long-line two-port; the elements listed in service"
}

// scanElements lists what the network n (the study's positive-sequence network, or its
// zero-sequence one when zero is set) has in service, in words for the output.
func scanElements(st *study.Study, n freqscan.Network, zero bool) []string {
	f0, v := st.Frequency, st.Voltage
	w := 2 * math.Pi * f0
	var out []string
	switch {
	case n.Source.Ideal():
		out = append(out, "source: ideal (zero impedance)")
	case zero:
		out = append(out, fmt.Sprintf("source: R %.4g ohm, X %.4g ohm at %g Hz (x0_over_x1 %g)", n.Source.R, w*n.Source.L, f0, st.Source.X0OverX1))
	case st.Source.ShortCircuitVA > 0:
		out = append(out, fmt.Sprintf("source: %g MVA, X/R %g (R %.4g ohm, X %.4g ohm)", st.Source.ShortCircuitVA/1e6, st.Source.XOverR, n.Source.R, w*n.Source.L))
	default:
		out = append(out, fmt.Sprintf("source: R %.4g ohm, X %.4g ohm at %g Hz", n.Source.R, w*n.Source.L, f0))
	}
	length := 0.0
	for _, l := range n.Line {
		length += l.Length
	}
	line := fmt.Sprintf("line: %g km", length/1e3)
	if len(n.Line) > 1 {
		line += fmt.Sprintf(" in %d sections", len(n.Line))
	}
	if zero {
		line += ", zero-sequence constants"
	}
	out = append(out, line)
	for _, sh := range n.Shunts {
		kind := "capacitor"
		q := v * v * w * sh.C
		if sh.L > 0 {
			kind, q = "reactor", v*v/(w*sh.L)
		}
		conn := "bus"
		if sh.OnLine {
			conn = "line"
		}
		e := fmt.Sprintf("%s-connected %.4g Mvar %s at the %s end", conn, q/1e6, kind, sh.End)
		if sh.Name != "" {
			e = sh.Name + ": " + e
		}
		if zero && sh.OnLine && sh.L > 0 && n.ReactorNeutral[sh.End] > 0 {
			e += fmt.Sprintf(", star point through the %s-end neutral reactor (3 Xn = %.4g ohm)", sh.End, w*n.ReactorNeutral[sh.End])
		} else if zero {
			e += ", solidly earthed"
		}
		out = append(out, e)
	}
	if !zero && (st.Receiving.LoadW > 0 || st.Receiving.LoadVar != 0) {
		out = append(out, fmt.Sprintf("load: %g MW, %g Mvar at the receiving bus (constant impedance)", st.Receiving.LoadW/1e6, st.Receiving.LoadVar/1e6))
	}
	if !n.Far.Ideal() {
		e := fmt.Sprintf("receiving-end system: %g MVA, X/R %g, passive (EMF shorted) at the receiving bus: R %.4g ohm, X %.4g ohm",
			st.Receiving.ShortCircuitVA/1e6, st.Receiving.XOverR, n.Far.R, w*n.Far.L)
		if zero {
			e = fmt.Sprintf("receiving-end system, passive (EMF shorted): R %.4g ohm, X %.4g ohm (x0_over_x1 %g)", n.Far.R, w*n.Far.L, st.Receiving.X0OverX1)
		}
		out = append(out, e)
	}
	return out
}

// scanLeftOut lists what the study gives that the scan leaves out.
func scanLeftOut(st *study.Study) []string {
	out := []string{}
	if st.Receiving.ShortCircuitVA > 0 && !st.Scan.FarSystem {
		out = append(out, "receiving-end system ([receiving] short_circuit_mva): left out by scan.far_system = false")
	}
	if st.ZeroNetwork != nil && (st.Receiving.LoadW > 0 || st.Receiving.LoadVar != 0) {
		out = append(out, "load: not in the zero-sequence network (no earthed star point)")
	}
	if st.ZeroNetwork == nil {
		if l := st.SwitchingOptions().NeutralReactorL; l[0] > 0 || l[1] > 0 {
			out = append(out, "neutral reactors of [switching]: no zero-sequence data, so no zero-sequence network to put them in")
		}
	}
	return out
}

func sequenceResult(a analysis.Sequence, f0 float64) scanSequence {
	var s scanSequence
	s.Points = make([]scanPoint, len(a.Points))
	for i, p := range a.Points {
		s.Points[i] = scanPoint{FHz: p.F, Harmonic: p.F / f0, Gain: p.Gain, GainLine: p.GainLine, ZInOhm: p.ZIn,
			GainSending: p.GainSending, ZSendingOhm: p.ZSending, ZRecvOhm: p.ZReceiving}
	}
	s.Peaks = []scanPeak{}
	for _, p := range a.Peaks {
		s.Peaks = append(s.Peaks, scanPeak{FHz: p.F, Harmonic: p.F / f0, Gain: p.Gain, Unbounded: p.Unbounded,
			BandwidthHz: p.Bandwidth, FLowHz: p.FLow, FHighHz: p.FHigh, Q: p.Q})
	}
	s.ImpedanceResonances = []scanZRes{}
	for _, r := range a.ZRes {
		kind := "series"
		if r.Parallel {
			kind = "parallel"
		}
		s.ImpedanceResonances = append(s.ImpedanceResonances, scanZRes{Bus: r.Bus, Kind: kind, FHz: r.F,
			Harmonic: r.F / f0, ZOhm: r.Ohm, Unbounded: r.Unbounded})
	}
	return s
}

// fmtGain writes a gain, "unbounded" for +Inf.
func fmtGain(g float64) string {
	if math.IsInf(g, 1) {
		return "unbounded"
	}
	return fmt.Sprintf("%.3g", g)
}

// fmtAbove writes g, known to exceed limit, to three significant figures or as many
// more as it takes (up to eight) to read above the limit: "2.004 > limit 2", never
// "2 > limit 2".
func fmtAbove(g, limit float64) string {
	if math.IsInf(g, 1) {
		return "unbounded"
	}
	for d := 3; d < 8; d++ {
		s := strconv.FormatFloat(g, 'g', d, 64)
		if v, err := strconv.ParseFloat(s, 64); err == nil && v > limit {
			return s
		}
	}
	return strconv.FormatFloat(g, 'g', 8, 64)
}

// scanFlags words the screening's flags.
func scanFlags(sc freqscan.Screening, f0 float64) []string {
	flags := []string{}
	for _, r := range sc.Flags {
		seq := ""
		switch r.Sequence {
		case freqscan.Zero:
			seq = " (zero sequence)"
		case freqscan.PositiveOnly:
			seq = " (positive-sequence only: no zero-sequence data)"
		}
		if r.OverLimit {
			var near []string
			for _, p := range r.NearPeaks {
				near = append(near, fmt.Sprintf("%.4g Hz (h %.2f, gain %s)", p.F, p.F/f0, fmtGain(p.Gain)))
			}
			what := "no peak inside the band, the flank of a resonance"
			if len(near) > 0 {
				what = "resonance at " + strings.Join(near, ", ")
			}
			flags = append(flags, fmt.Sprintf("h%d%s: gain within ±%.0f %% reaches %s > limit %g; %s",
				r.Order, seq, sc.WatchBand*100, fmtAbove(r.BandGain, sc.GainLimit), sc.GainLimit, what))
		}
		if r.Exceeds {
			flags = append(flags, fmt.Sprintf("h%d%s: receiving-end level %s %% (background %.3g %% x gain %s) exceeds the planning level %.3g %%",
				r.Order, seq, fmtGain(r.Amplified), r.Background, fmtGain(r.Gain), r.PlanPct))
		}
	}
	return flags
}

// strengthResult shapes the source-strength map for printing and JSON (and keeps the
// library map in res for the plot).
func strengthResult(st *study.Study, res *scanResult, m *analysis.StrengthMap) *scanStrengthMap {
	f0 := st.Frequency
	out := &scanStrengthMap{XOverR: m.XOverR, MapFreqHz: m.Freqs, MapGain: m.Map.Gain}
	for i, sc := range m.Map.ShortCircuitVA {
		first := scanStrengthFirst{ShortCircuitMVA: sc / 1e6, None: true}
		if m.Found[i] {
			pk := m.Map.First[i]
			first = scanStrengthFirst{ShortCircuitMVA: sc / 1e6, FHz: pk.F, Harmonic: pk.F / f0,
				Gain: pk.Gain, Unbounded: pk.Unbounded}
		}
		out.ShortCircuitMVA = append(out.ShortCircuitMVA, sc/1e6)
		out.First = append(out.First, first)
	}
	res.strength = &m.Map
	return out
}

// scanTable is the --csv table: one row per frequency, units in the column names, the
// zero-sequence columns when the study has zero-sequence data. An unbounded value (a
// lossless network evaluated exactly at a resonance) is an empty cell.
func scanTable(res scanResult) (*report.Table, error) {
	cols := []string{"f_hz", "harmonic", "gain", "gain_line", "gain_sending", "z_in_re_ohm", "z_in_im_ohm",
		"z_sending_re_ohm", "z_sending_im_ohm", "z_receiving_re_ohm", "z_receiving_im_ohm"}
	if res.zero != nil {
		cols = append(cols, "gain_zero", "gain_line_zero", "z_in_zero_re_ohm", "z_in_zero_im_ohm")
	}
	t := report.NewTable(cols...)
	cell := func(x float64) any {
		if math.IsInf(x, 0) || math.IsNaN(x) {
			return ""
		}
		return x
	}
	for i, p := range res.pos {
		row := []any{p.F, p.F / res.FrequencyHz, cell(p.Gain), cell(p.GainLine), cell(p.GainSending),
			cell(real(p.ZIn)), cell(imag(p.ZIn)), cell(real(p.ZSending)), cell(imag(p.ZSending)),
			cell(real(p.ZReceiving)), cell(imag(p.ZReceiving))}
		if res.zero != nil {
			z := res.zero[i]
			row = append(row, cell(z.Gain), cell(z.GainLine), cell(real(z.ZIn)), cell(imag(z.ZIn)))
		}
		if err := t.Add(row...); err != nil {
			return nil, err
		}
	}
	return t, nil
}

// scanPlotData prepares the gain plot.
func scanPlotData(st *study.Study, res scanResult) report.ScanPlotData {
	f0 := st.Frequency
	title := "Harmonic scan: gain |Vr/E|"
	if st.Title != "" {
		title = st.Title + ": gain |Vr/E|"
	}
	d := report.ScanPlotData{Title: title, Watch: res.screen.Watch, WatchBand: res.screen.WatchBand, GainLimit: res.screen.GainLimit}
	series := func(name string, pts []freqscan.Point) report.ScanSeries {
		s := report.ScanSeries{Name: name}
		for _, p := range pts {
			s.Harmonic = append(s.Harmonic, p.F/f0)
			s.Gain = append(s.Gain, p.Gain)
		}
		return s
	}
	d.Series = append(d.Series, series("positive sequence", res.pos))
	for _, p := range res.posPeaks {
		d.Peaks = append(d.Peaks, report.ScanPeak{Harmonic: p.F / f0, Gain: p.Gain, Unbounded: p.Unbounded})
	}
	if res.zero != nil {
		d.Series = append(d.Series, series("zero sequence", res.zero))
		for _, p := range res.zeroPeaks {
			d.Peaks = append(d.Peaks, report.ScanPeak{Harmonic: p.F / f0, Gain: p.Gain, Unbounded: p.Unbounded, Zero: true})
		}
	}
	return d
}

// scanMapData prepares the source-strength heat map (res.SourceStrength must be set).
func scanMapData(st *study.Study, res scanResult) report.ScanMapData {
	f0 := st.Frequency
	m := res.strength
	title := "Gain |Vr/E| (positive sequence) over frequency and source strength"
	if res.SourceStrength != nil && !math.IsInf(res.SourceStrength.XOverR, 0) {
		title += fmt.Sprintf(" (X/R %.3g)", res.SourceStrength.XOverR)
	}
	d := report.ScanMapData{Title: title, Watch: res.screen.Watch, StudyMVA: st.Source.ShortCircuitVA / 1e6}
	for _, f := range m.Freqs {
		d.Harmonic = append(d.Harmonic, f/f0)
	}
	for i, sc := range m.ShortCircuitVA {
		d.ShortCircuit = append(d.ShortCircuit, sc/1e6)
		d.FirstHarmonic = append(d.FirstHarmonic, m.First[i].F/f0)
	}
	d.Gain = m.Gain
	return d
}

// printScan writes the terminal summary.
func printScan(w io.Writer, st *study.Study, res scanResult) {
	f0 := st.Frequency
	title := st.Title
	if title == "" {
		title = st.File
	}
	fmt.Fprintf(w, "Harmonic scan: %s\n", title)
	fmt.Fprintf(w, "Model: %s.\n", res.Model)
	list := func(head string, items []string) {
		if len(items) == 0 {
			return
		}
		fmt.Fprintln(w, head)
		for _, e := range items {
			fmt.Fprintf(w, "  - %s\n", e)
		}
	}
	list("In service, positive sequence:", res.Elements)
	if res.ZeroSequence != nil {
		list("In service, zero sequence:", res.ZeroSequence.Elements)
	}
	list("Left out:", res.LeftOut)
	fmt.Fprintf(w, "Grid: %d points, %s, %g to %g Hz (harmonic %.3g to %.3g of %g Hz).\n\n",
		len(res.pos), res.Grid, res.FMinHz, res.FMaxHz, res.FMinHz/f0, res.FMaxHz/f0, f0)
	printPeaks := func(name string, s scanSequence) {
		fmt.Fprintf(w, "Resonance peaks of the gain |Vr/E|, %s:\n", name)
		if len(s.Peaks) == 0 {
			fmt.Fprintln(w, "  none inside the band")
		} else {
			fmt.Fprintf(w, "  %10s  %8s  %10s  %6s  %s\n", "f (Hz)", "harmonic", "gain", "Q", "-3 dB band (Hz)")
			for _, p := range s.Peaks {
				q, band := "-", "-"
				if p.Q > 0 {
					q, band = fmt.Sprintf("%.3g", p.Q), fmt.Sprintf("%.5g to %.5g", p.FLowHz, p.FHighHz)
				}
				if p.Unbounded {
					q, band = "-", "lossless network: a pole"
				}
				fmt.Fprintf(w, "  %10.5g  %8.3f  %10s  %6s  %s\n", p.FHz, p.Harmonic, fmtGain(p.Gain), q, band)
			}
		}
		// The terminal lists the driving-point resonances up to just above the highest
		// watched harmonic; --json has them all.
		top := 1.1 * float64(maxInt(res.WatchHarmonics)) * f0
		var shown []scanZRes
		for _, r := range s.ImpedanceResonances {
			if r.FHz <= top {
				shown = append(shown, r)
			}
		}
		if len(shown) > 0 {
			fmt.Fprintf(w, "Driving-point resonances, %s, up to %.4g Hz (|Z| maxima: parallel, minima: series;\n", name, top)
			fmt.Fprintf(w, "%d of %d listed, all in --json):\n", len(shown), len(s.ImpedanceResonances))
			fmt.Fprintf(w, "  %10s  %8s  %-9s  %-8s  %s\n", "f (Hz)", "harmonic", "bus", "kind", "|Z| (ohm)")
			for _, r := range shown {
				z := fmt.Sprintf("%.4g", r.ZOhm)
				if r.Unbounded {
					z = "unbounded"
				}
				bus := r.Bus
				if bus == "in" {
					bus = "into line"
				}
				fmt.Fprintf(w, "  %10.5g  %8.3f  %-9s  %-8s  %s\n", r.FHz, r.Harmonic, bus, r.Kind, z)
			}
		}
		fmt.Fprintln(w)
	}
	printPeaks("positive sequence", res.scanSequence)
	if res.ZeroSequence != nil {
		printPeaks("zero sequence", *res.ZeroSequence)
	}
	fmt.Fprintf(w, "Harmonic screening: gain at each watched order and the largest gain within ±%.0f %% (limit %g);\n",
		res.WatchBandPct, res.GainLimit)
	fmt.Fprintf(w, "planning levels: %s.\n", res.PlanningSource)
	fmt.Fprintf(w, "  %3s  %8s  %-22s  %9s  %9s  %8s  %10s  %9s  %s\n", "h", "f (Hz)", "sequence", "gain", "band gain",
		"plan %", "backgr. %", "recv. %", "verdict")
	for _, h := range res.Harmonics {
		if !h.Watched && h.BackgroundPct == nil && !h.ExceedsPlanning {
			continue
		}
		band := "-"
		if h.Watched {
			band = fmtGain(h.BandGain)
		}
		bg, rv := "-", "-"
		verdict := "ok"
		if h.BackgroundPct != nil {
			bg, rv = fmt.Sprintf("%.3g", *h.BackgroundPct), fmtGain(*h.ReceivingPct)
			if h.ExceedsPlanning {
				verdict = "exceeds planning"
			}
		} else if h.AllowedBackgroundPct > 0 {
			verdict = fmt.Sprintf("ok if background <= %.3g %%", h.AllowedBackgroundPct)
		}
		if h.OverLimit {
			verdict = "GAIN OVER LIMIT; " + verdict
		}
		fmt.Fprintf(w, "  %3d  %8.4g  %-22s  %9s  %9s  %8.3g  %10s  %9s  %s\n", h.Order, h.FHz, h.Sequence,
			fmtGain(h.Gain), band, h.PlanningPct, bg, rv, verdict)
	}
	fmt.Fprintln(w, "  (background: the harmonic voltage at the sending bus before the line is connected, taken as the")
	fmt.Fprintln(w, "   source EMF; receiving-end level = background x gain; all orders are in --json and --csv)")
	fmt.Fprintln(w)
	if len(res.Flags) == 0 {
		fmt.Fprintln(w, "Flags: none.")
	} else {
		fmt.Fprintln(w, "Flags:")
		for _, f := range res.Flags {
			fmt.Fprintf(w, "  - %s\n", f)
		}
	}
	if m := res.SourceStrength; m != nil {
		xr := "purely inductive source"
		if !math.IsInf(m.XOverR, 0) {
			xr = fmt.Sprintf("X/R %.3g kept", m.XOverR)
		}
		fmt.Fprintf(w, "\nFirst resonance against source short-circuit level, positive sequence (%s):\n", xr)
		fmt.Fprintf(w, "  %10s  %10s  %8s  %10s\n", "Ssc (MVA)", "f (Hz)", "harmonic", "gain")
		for _, f := range m.First {
			if f.None {
				fmt.Fprintf(w, "  %10.5g  %10s  %8s  %10s\n", f.ShortCircuitMVA, "-", "-", "none in band")
				continue
			}
			g := fmtGain(f.Gain)
			if f.Unbounded {
				g = "unbounded"
			}
			fmt.Fprintf(w, "  %10.5g  %10.5g  %8.3f  %10s\n", f.ShortCircuitMVA, f.FHz, f.Harmonic, g)
		}
	}
	fmt.Fprintf(w, "\n%s\n", Caution)
}

func maxInt(v []int) int {
	m := 0
	for _, x := range v {
		m = max(m, x)
	}
	return m
}
