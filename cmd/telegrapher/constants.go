package main

// The constants command: propagation constant, surge impedance, velocity, wavelength
// and electrical length at frequency_hz (or --at-hz), SIL and no-load rise (always at
// frequency_hz), and the ABCD of the exact, nominal pi, nominal T and short-line models
// with each lumped model's error against the exact one.
//
//   computeConstants(st, atHz) (constantsResult, error): analysis.Constants in display
//   units, everything above; atHz = 0
//     means frequency_hz. The report command reuses it.
//   printConstants(w, st, res): the readable table.
//
// With --sweep the geometry file's runSweep (sweep.go) adds the constants over
// frequency; a geometry-derived line adds `sequence` (lineSequence, sweep.go).

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"math/cmplx"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/analysis"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/propagation"
)

var constantsCommand = func() *command {
	return &command{
		name:  "constants",
		args:  "STUDY [--at-hz F] [--sweep [--plot F]] [--json]",
		short: "propagation constant, surge impedance, SIL and two-port models of the line",
		long: `Prints the line's propagation constant (attenuation and phase), surge impedance,
velocity, wavelength and electrical length at frequency_hz, or at --at-hz F; the
surge-impedance loading (SIL) and the no-load (Ferranti) rise, always at frequency_hz;
the ABCD constants of the exact hyperbolic model and of the nominal pi, nominal T and
short-line models with each one's error against the exact model; the line's class by
length and by electrical length; and how many nominal-pi sections in cascade keep the
error under 1 %. With several sections each section is listed and the ABCD is that of
the whole cascade. --json writes the same as one JSON document.`,
		flags: func(fs *flag.FlagSet, stdout, stderr io.Writer) func(context.Context, []string) error {
			atHz := fs.Float64("at-hz", 0, "evaluate at this frequency in Hz instead of frequency_hz (SIL and no-load rise stay at frequency_hz)")
			asJSON := fs.Bool("json", false, "write one JSON document to standard output")
			sweep := fs.Bool("sweep", false, "also list the constants over frequency, 1 Hz to 1 MHz")
			plotPath := fs.String("plot", "", "with --sweep: write the sweep plot to `FILE` (.png or .svg)")
			return func(ctx context.Context, args []string) error {
				atGiven := false
				fs.Visit(func(f *flag.Flag) { atGiven = atGiven || f.Name == "at-hz" })
				if atGiven && !(*atHz > 0 && *atHz <= maxAtHz) {
					return usagef("telegrapher constants: --at-hz must be > 0 and at most %g, got %g", maxAtHz, *atHz)
				}
				if *plotPath != "" && !*sweep {
					return usagef("telegrapher constants: --plot needs --sweep")
				}
				st, err := studyArg("constants", args, stderr, [2]string{"plot", *plotPath})
				if err != nil {
					return err
				}
				res, err := computeConstants(st, *atHz)
				if err != nil {
					return err
				}
				if *sweep {
					sw, err := runSweep(st, io.Discard, *plotPath, true)
					if err != nil {
						return err
					}
					res.Sweep = sw
				}
				if *asJSON {
					return writeJSON(stdout, res)
				}
				printConstants(stdout, st, res)
				if res.Sweep != nil {
					fmt.Fprintln(stdout)
					printSweep(stdout, *res.Sweep)
				}
				return nil
			}
		},
	}
}()

// maxAtHz caps --at-hz (10 MHz: beyond, a line model of per-length constants means
// nothing).
const maxAtHz = 1e7

// abcdOut is one two-port as the contract writes it (b in ohm, c in S).
type abcdOut struct {
	A complex128 `json:"a"`
	B complex128 `json:"b"`
	C complex128 `json:"c"`
	D complex128 `json:"d"`
}

// modelsOut is the four two-port models.
type modelsOut struct {
	Exact     abcdOut `json:"exact"`
	NominalPi abcdOut `json:"nominal_pi"`
	NominalT  abcdOut `json:"nominal_t"`
	Short     abcdOut `json:"short"`
}

// modelError is a lumped model's relative error against the exact two-port, in
// percent, per element and the largest.
type modelError struct {
	A   float64 `json:"a_pct"`
	B   float64 `json:"b_pct"`
	C   float64 `json:"c_pct"`
	D   float64 `json:"d_pct"`
	Max float64 `json:"max_pct"`
}

// sectionOut is one section of a sectioned line.
type sectionOut struct {
	Name                string       `json:"name"`
	LengthKm            float64      `json:"length_km"`
	ZcOhm               complex128   `json:"zc_ohm"`
	GammaPerKm          complex128   `json:"gamma_per_km"`
	AlphaNpPerKm        float64      `json:"alpha_np_per_km"`
	BetaRadPerKm        float64      `json:"beta_rad_per_km"`
	ZcLosslessOhm       float64      `json:"zc_lossless_ohm"`
	VelocityKmPerS      float64      `json:"velocity_km_per_s"`
	ElectricalLengthDeg float64      `json:"electrical_length_deg"`
	Sequence            *sequenceOut `json:"sequence,omitempty"`
}

// constantsResult is the constants command's result (JSON fields per the contract,
// extras after).
type constantsResult struct {
	FrequencyHz         float64    `json:"frequency_hz"`
	LengthKm            float64    `json:"length_km"`
	GammaPerKm          complex128 `json:"gamma_per_km"`
	AlphaNpPerKm        float64    `json:"alpha_np_per_km"`
	BetaRadPerKm        float64    `json:"beta_rad_per_km"`
	ZcOhm               complex128 `json:"zc_ohm"`
	ZcLosslessOhm       float64    `json:"zc_lossless_ohm"`
	VelocityKmPerS      float64    `json:"velocity_km_per_s"`
	WavelengthKm        float64    `json:"wavelength_km"`
	ElectricalLengthDeg float64    `json:"electrical_length_deg"`
	SILMW               float64    `json:"sil_mw"`
	NoLoadRisePU        float64    `json:"no_load_rise_pu"`
	ABCD                modelsOut  `json:"abcd"`

	SystemFrequencyHz   float64               `json:"system_frequency_hz"`
	AlphaDBPer100Km     float64               `json:"alpha_db_per_100km"`
	BetaDegPerKm        float64               `json:"beta_deg_per_km"`
	ZcAbsOhm            float64               `json:"zc_abs_ohm"`
	ZcAngleDeg          float64               `json:"zc_angle_deg"`
	VelocityFractionOfC float64               `json:"velocity_fraction_of_c"`
	ClassByLength       string                `json:"class_by_length"`
	ClassByElectrical   string                `json:"class_by_electrical_length"`
	ModelErrorPct       map[string]modelError `json:"model_error"`
	PiSectionsFor1Pct   int                   `json:"pi_sections_for_1pct"` // 0: more than analysis.MaxPiSections
	Sections            []sectionOut          `json:"sections,omitempty"`
	Sequence            *sequenceOut          `json:"sequence,omitempty"`
	Sweep               *sweepResult          `json:"sweep,omitempty"`
}

// Classes by length (common practice, no single source: short < 80 km, medium 80 to
// 250 km, long > 250 km), and the same bounds as electrical lengths at 50 Hz, where the
// wavelength is about 6000 km: 80 km = 4.8 deg, 250 km = 15 deg.
const (
	shortKm, mediumKm   = 80.0, 250.0
	shortDeg, mediumDeg = 4.8, 15.0
)

// computeConstants evaluates the line of st at atHz (Hz; 0 = frequency_hz) on the jω
// axis. A sectioned line gives the cascade's ABCD; its γ is the length-weighted mean of
// the sections' (total γl over total length), its Zc = sqrt(B/C) of the cascade, its
// lossless Zc = sqrt(ΣLl/ΣCl) and its velocity ω/β, the total length over the total
// phase delay.
func computeConstants(st *study.Study, atHz float64) (constantsResult, error) {
	var r constantsResult
	a, err := analysis.Constants(st, atHz)
	if err != nil {
		return r, err
	}
	f := a.Frequency
	w := 2 * math.Pi * f
	r.FrequencyHz, r.SystemFrequencyHz, r.LengthKm = f, st.Frequency, a.Length/1e3
	for _, sc := range a.Sections {
		l, g := sc.Line, sc.Gamma
		sec := sectionOut{
			Name: l.Name, LengthKm: l.Length / 1e3, ZcOhm: sc.Zc, GammaPerKm: g * 1e3,
			AlphaNpPerKm: real(g) * 1e3, BetaRadPerKm: imag(g) * 1e3, ZcLosslessOhm: sc.ZcLossless,
			ElectricalLengthDeg: imag(g) * l.Length * 180 / math.Pi,
		}
		if imag(g) > 0 {
			sec.VelocityKmPerS = w / imag(g) / 1e3
		}
		sec.Sequence = lineSequence(l, f)
		r.Sections = append(r.Sections, sec)
	}
	gamma := a.Gamma
	r.GammaPerKm = gamma * 1e3
	r.AlphaNpPerKm, r.BetaRadPerKm = real(gamma)*1e3, imag(gamma)*1e3
	r.AlphaDBPer100Km = r.AlphaNpPerKm * 100 * 20 / math.Ln10
	r.BetaDegPerKm = r.BetaRadPerKm * 180 / math.Pi
	r.ElectricalLengthDeg = imag(a.GammaL) * 180 / math.Pi
	if imag(gamma) > 0 {
		r.VelocityKmPerS = w / imag(gamma) / 1e3
		r.WavelengthKm = 2 * math.Pi / imag(gamma) / 1e3
		r.VelocityFractionOfC = r.VelocityKmPerS * 1e3 / propagation.SpeedOfLight
	}
	if a.ZcLossless > 0 {
		r.ZcLosslessOhm = a.ZcLossless
		r.SILMW = a.SIL / 1e6
	}
	r.ZcOhm = a.Zc
	if len(st.Line) == 1 {
		r.Sequence = r.Sections[0].Sequence
		r.Sections = nil
	}
	r.ZcAbsOhm, r.ZcAngleDeg = cmplx.Abs(r.ZcOhm), cmplx.Phase(r.ZcOhm)*180/math.Pi
	r.NoLoadRisePU = a.NoLoadRise
	r.ABCD = modelsOut{Exact: abcdOf(a.Exact), NominalPi: abcdOf(a.Pi), NominalT: abcdOf(a.Tee), Short: abcdOf(a.Short)}
	r.ModelErrorPct = map[string]modelError{}
	for k, e := range a.Errors {
		r.ModelErrorPct[k] = modelError(e)
	}
	r.PiSectionsFor1Pct = a.PiSectionsFor1Pct
	r.ClassByLength = classify(r.LengthKm, shortKm, mediumKm)
	r.ClassByElectrical = classify(r.ElectricalLengthDeg, shortDeg, mediumDeg)
	if !finite(r.AlphaNpPerKm, r.BetaRadPerKm, real(r.ZcOhm), imag(r.ZcOhm), r.NoLoadRisePU) {
		return r, fmt.Errorf("internal error: non-finite line constants at %g Hz (a bug, please report it)", f)
	}
	return r, nil
}

// abcdOf returns the true elements; an element beyond a float64 comes back infinite
// and is written as null with its key in "overflow".
func abcdOf(p propagation.TwoPort) abcdOut {
	a, b, c, d, _ := p.Elements()
	return abcdOut{a, b, c, d}
}

func classify(v, short, medium float64) string {
	switch {
	case v < short:
		return "short"
	case v <= medium:
		return "medium"
	}
	return "long"
}

func finite(xs ...float64) bool {
	for _, x := range xs {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// printConstants writes the readable table.
func printConstants(w io.Writer, st *study.Study, r constantsResult) {
	title := st.Title
	if title == "" {
		title = st.File
	}
	fmt.Fprintf(w, "%s: line constants\n", title)
	fmt.Fprintf(w, "  %.6g km at %g Hz", r.LengthKm, r.FrequencyHz)
	if r.FrequencyHz != r.SystemFrequencyHz {
		fmt.Fprintf(w, " (system frequency %g Hz)", r.SystemFrequencyHz)
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "\npropagation at %g Hz\n", r.FrequencyHz)
	fmt.Fprintf(w, "  gamma               %s per km\n", cfmt(r.GammaPerKm))
	fmt.Fprintf(w, "  attenuation alpha   %.6g Np/km = %.6g dB/100 km\n", r.AlphaNpPerKm, r.AlphaDBPer100Km)
	fmt.Fprintf(w, "  phase beta          %.6g deg/km (%.6g rad/km)\n", r.BetaDegPerKm, r.BetaRadPerKm)
	fmt.Fprintf(w, "  surge impedance Zc  %.6g ohm at %.4g deg (%s ohm)\n", r.ZcAbsOhm, r.ZcAngleDeg, cfmt(r.ZcOhm))
	fmt.Fprintf(w, "  lossless Zc         %.6g ohm (sqrt(L/C) at %g Hz)\n", r.ZcLosslessOhm, r.SystemFrequencyHz)
	fmt.Fprintf(w, "  velocity            %.6g km/s = %.4f c\n", r.VelocityKmPerS, r.VelocityFractionOfC)
	fmt.Fprintf(w, "  wavelength          %.6g km\n", r.WavelengthKm)
	fmt.Fprintf(w, "  electrical length   %.6g deg\n", r.ElectricalLengthDeg)
	fmt.Fprintf(w, "\nat the system frequency %g Hz\n", r.SystemFrequencyHz)
	fmt.Fprintf(w, "  SIL                 %.6g MW at %g kV\n", r.SILMW, st.Voltage/1e3)
	fmt.Fprintf(w, "  no-load rise        %s (|Vr/Vs|, receiving end open, line alone)\n", bounded(r.NoLoadRisePU, "%.6g pu", atResonance))
	fmt.Fprintln(w, "\nclass")
	fmt.Fprintf(w, "  by length           %s (short < %g km, medium to %g km, long beyond)\n", r.ClassByLength, shortKm, mediumKm)
	fmt.Fprintf(w, "  by electrical length %s at %g Hz (short < %g deg, medium to %g deg, long beyond)\n", r.ClassByElectrical, r.FrequencyHz, shortDeg, mediumDeg)
	if r.PiSectionsFor1Pct > 0 {
		fmt.Fprintf(w, "  nominal pi          %d section(s) in cascade keep every ABCD element within 1 %% of exact\n", r.PiSectionsFor1Pct)
	} else {
		fmt.Fprintf(w, "  nominal pi          more than %d sections needed to stay within 1 %% of exact\n", analysis.MaxPiSections)
	}
	if len(r.Sections) > 0 {
		fmt.Fprintf(w, "\nsections (from the sending end)\n")
		fmt.Fprintf(w, "  %-16s %10s %14s %12s %12s %10s\n", "name", "km", "|Zc| ohm", "alpha Np/km", "beta deg/km", "deg")
		for i, s := range r.Sections {
			name := s.Name
			if name == "" {
				name = fmt.Sprintf("section %d", i+1)
			}
			fmt.Fprintf(w, "  %-16s %10.4g %14.6g %12.4g %12.6g %10.4g\n", name, s.LengthKm, cmplx.Abs(s.ZcOhm), s.AlphaNpPerKm, s.BetaRadPerKm*180/math.Pi, s.ElectricalLengthDeg)
		}
	}
	fmt.Fprintf(w, "\nABCD at %g Hz (B in ohm, C in S)\n", r.FrequencyHz)
	row := func(name string, p abcdOut, e *modelError) {
		fmt.Fprintf(w, "  %-11s A = %s\n", name, cfmt(p.A))
		fmt.Fprintf(w, "  %-11s B = %s\n", "", cfmt(p.B))
		fmt.Fprintf(w, "  %-11s C = %s\n", "", cfmt(p.C))
		fmt.Fprintf(w, "  %-11s D = %s\n", "", cfmt(p.D))
		if e != nil {
			fmt.Fprintf(w, "  %-11s error against exact: A %s, B %s, C %s, D %s\n", "", pct(e.A), pct(e.B), pct(e.C), pct(e.D))
		}
	}
	row("exact", r.ABCD.Exact, nil)
	for _, m := range []struct {
		key, name string
		p         abcdOut
	}{{"nominal_pi", "nominal pi", r.ABCD.NominalPi}, {"nominal_t", "nominal T", r.ABCD.NominalT}, {"short", "short", r.ABCD.Short}} {
		e := r.ModelErrorPct[m.key]
		row(m.name, m.p, &e)
	}
}

// cfmt formats a complex number as "re + j im" (or "overflow").
func cfmt(z complex128) string {
	if cmplx.IsInf(z) || cmplx.IsNaN(z) {
		return "beyond float64 range"
	}
	sign := "+"
	im := imag(z)
	if im < 0 {
		sign, im = "-", -im
	}
	return fmt.Sprintf("%.6g %s j%.6g", real(z), sign, im)
}

func pct(v float64) string {
	if math.IsInf(v, 0) {
		return "100 % (missing)"
	}
	return bounded(v, "%.3g %%", exactIsZero)
}
