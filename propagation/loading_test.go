package propagation

import (
	"bufio"
	"math"
	"math/cmplx"
	"os"
	"strconv"
	"strings"
	"testing"
)

const (
	// Closed-form lossless checks: the brief's acceptance tolerances, 0.5 % of SIL in
	// power and 1e-3 pu in voltage (the computation itself is far better).
	losslessPowerTolSIL = 0.005
	losslessVoltTol     = 1e-3
	// Against the numpy/scipy table: both are double-precision evaluations of the same
	// physics by different routes (expm vs cosh, brentq vs arccos, dense grid vs
	// golden section), so they agree to far better than 1e-6 relative.
	numpyRelTol = 1e-6
	// The location of a profile extreme is flat to second order; the table's grid has
	// 20001 points per section (<= 30 m spacing), so locations agree to a grid step
	// plus the flatness: 0.5 km.
	numpyXTolKm = 0.5
)

func losslessLine(lengthKm float64) Cascade {
	// 400 kV line, 0.95 mH/km and 12 nF/km: Zc = 281.4 ohm. Invented scenario data.
	return Cascade{{Length: lengthKm * 1e3, Constants: RLGC{L: 0.95e-6, C: 12e-12}}}
}

func TestBothEndsHeldLosslessClosedForms(t *testing.T) {
	t.Parallel()
	const v = 400e3
	omega := 2 * math.Pi * 50
	for _, lengthKm := range []float64{80, 320, 700} {
		lengthKm := lengthKm
		t.Run(strconv.FormatFloat(lengthKm, 'f', 0, 64)+"km", func(t *testing.T) {
			t.Parallel()
			for _, split := range []bool{false, true} {
				line := losslessLine(lengthKm)
				if split {
					// the same line as three sections in cascade: method agreement
					l := line[0]
					a, b, c := l, l, l
					a.Length, b.Length, c.Length = l.Length*0.2, l.Length*0.5, l.Length*0.3
					line = Cascade{a, b, c}
				}
				zc := math.Sqrt(0.95e-6 / 12e-12)
				bl := omega * math.Sqrt(0.95e-6*12e-12) * lengthKm * 1e3
				sil := v * v / zc
				if got := SurgeImpedanceLoading(line, v, omega); math.Abs(got-sil) > 1e-9*sil {
					t.Fatalf("SIL = %g, want %g", got, sil)
				}
				pmax, _, err := MaxTransfer(line, omega, v)
				if err != nil {
					t.Fatal(err)
				}
				// Stevenson (1982) ch. 5: P = V² sin δ / (Zc sin βl), largest at δ = 90°.
				if want := v * v / (zc * math.Sin(bl)); math.Abs(pmax-want) > losslessPowerTolSIL*sil {
					t.Errorf("pmax = %g, want %g", pmax, want)
				}
				powers := LoadingPowers(sil, pmax)
				pts, err := BothEndsHeld(line, omega, v, powers)
				if err != nil {
					t.Fatal(err)
				}
				for i, pt := range pts {
					// Stevenson (1982) ch. 5, lossless line, both ends at V.
					wantP := v * v * math.Sin(pt.Delta) / (zc * math.Sin(bl))
					wantQr := v * v * (math.Cos(pt.Delta) - math.Cos(bl)) / (zc * math.Sin(bl))
					if got := real(pt.Vr * cmplx.Conj(pt.Ir)); math.Abs(got-powers[i]) > losslessPowerTolSIL*sil || math.Abs(wantP-powers[i]) > losslessPowerTolSIL*sil {
						t.Errorf("P: got %g, closed form %g, asked %g", got, wantP, powers[i])
					}
					if math.Abs(pt.Qr-wantQr) > losslessPowerTolSIL*sil {
						t.Errorf("P = %g: Qr = %g, closed form %g", pt.P, pt.Qr, wantQr)
					}
					// Symmetry: the sending bus absorbs what the receiving bus gets.
					if math.Abs(pt.Qs+pt.Qr) > losslessPowerTolSIL*sil {
						t.Errorf("P = %g: Qs = %g, want -Qr = %g", pt.P, pt.Qs, -pt.Qr)
					}
					if math.Abs(pt.Losses) > losslessPowerTolSIL*sil {
						t.Errorf("lossless line has losses %g W", pt.Losses)
					}
					if pt.VMax < pt.VMid-1e-12 || pt.VMin > pt.VMid+1e-12 || pt.VMax < 1-1e-12 || pt.VMin > 1+1e-12 {
						t.Errorf("P = %g: profile not ordered: min %g mid %g max %g", pt.P, pt.VMin, pt.VMid, pt.VMax)
					}
				}
				// At no load the mid-line voltage is 1/cos(βl/2) (Stevenson ch. 5, symmetric line).
				if want := 1 / math.Cos(bl/2); math.Abs(pts[0].VMid-want) > losslessVoltTol || math.Abs(pts[0].VMax-want) > losslessVoltTol {
					t.Errorf("no load: v_mid %g, v_max %g, want %g", pts[0].VMid, pts[0].VMax, want)
				}
				if math.Abs(pts[0].XVMax-lengthKm*500) > 1e3 {
					t.Errorf("no load: v_max at %g m, want mid-line", pts[0].XVMax)
				}
				// At SIL: flat profile, no reactive power at either end.
				found := false
				for _, pt := range pts {
					if math.Abs(pt.P-sil) > 1e-6*sil {
						continue
					}
					found = true
					if pt.VMax-pt.VMin > losslessVoltTol || math.Abs(pt.VMid-1) > losslessVoltTol {
						t.Errorf("at SIL profile not flat: %g..%g", pt.VMin, pt.VMax)
					}
					if math.Abs(pt.Qs) > losslessPowerTolSIL*sil || math.Abs(pt.Qr) > losslessPowerTolSIL*sil {
						t.Errorf("at SIL Qs = %g, Qr = %g, want 0", pt.Qs, pt.Qr)
					}
					if math.Abs(pt.Delta-bl) > 1e-6 {
						t.Errorf("at SIL δ = %g, want βl = %g", pt.Delta, bl)
					}
				}
				if !found {
					t.Errorf("SIL is not among the loading powers %v", powers)
				}
			}
		})
	}
}

func TestLoadingPowers(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct{ sil, pmax float64 }{
		{100, 1000}, {100, 150}, {100, 99}, {100, 200}, {100, 101},
	} {
		ps := LoadingPowers(tc.sil, tc.pmax)
		end := math.Min(2*tc.sil, tc.pmax)
		if len(ps) < 21 || ps[0] != 0 || ps[len(ps)-1] != end {
			t.Errorf("%v: %d powers from %g to %g", tc, len(ps), ps[0], ps[len(ps)-1])
		}
		hasSIL := false
		for i, p := range ps {
			if i > 0 && !(p > ps[i-1]) {
				t.Errorf("%v: powers not increasing: %v", tc, ps)
			}
			hasSIL = hasSIL || p == tc.sil
		}
		if tc.sil <= end && !hasSIL {
			t.Errorf("%v: SIL missing from %v", tc, ps)
		}
	}
}

// The same cases as testdata/gen_loading.py.
func numpyCases() map[string]Cascade {
	sec := func(km, r, lmh, cnf, gus float64) Line {
		return Line{Length: km * 1e3, Constants: RLGC{R: r / 1e3, L: lmh * 1e-6, C: cnf * 1e-12, G: gus * 1e-9}}
	}
	return map[string]Cascade{
		"lossy320":  {sec(320, 0.025, 0.95, 12.0, 0)},
		"lossy600g": {sec(600, 0.03, 0.90, 12.5, 0.02)},
		"cascade":   {sec(120, 0.03, 0.95, 12.0, 0), sec(8, 0.02, 0.4, 210, 0), sec(150, 0.03, 0.95, 12.0, 0)},
	}
}

func TestBothEndsHeldLossyAgainstNumpy(t *testing.T) {
	t.Parallel()
	// numpy 1.24.2 / scipy 1.10.1 (Debian python3-numpy, python3-scipy), regenerated by
	// testdata/gen_loading.py.
	f, err := os.Open("../testdata/loading_numpy.txt")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cases := numpyCases()
	const v = 400e3
	omega := 2 * math.Pi * 50
	sc := bufio.NewScanner(f)
	rows := 0
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if line == "" || line[0] == '#' {
			continue
		}
		fs := strings.Fields(line)
		if len(fs) != 11 {
			t.Fatalf("bad row %q", line)
		}
		c, ok := cases[fs[0]]
		if !ok {
			t.Fatalf("unknown case %q", fs[0])
		}
		num := make([]float64, 10)
		for i := range num {
			if num[i], err = strconv.ParseFloat(fs[i+1], 64); err != nil {
				t.Fatal(err)
			}
		}
		rows++
		sil := SurgeImpedanceLoading(c, v, omega)
		pts, err := BothEndsHeld(c, omega, v, []float64{num[0] * 1e6})
		if err != nil {
			t.Fatal(err)
		}
		pt := pts[0]
		silMW := sil / 1e6
		check := func(what string, got, want, scale float64) {
			t.Helper()
			if math.Abs(got-want) > numpyRelTol*scale {
				t.Errorf("%s P=%g MW: %s = %.10g, numpy %.10g", fs[0], num[0], what, got, want)
			}
		}
		check("delta_deg", pt.Delta*180/math.Pi, num[1], 1)
		check("qs_mvar", pt.Qs/1e6, num[2], silMW)
		check("qr_mvar", pt.Qr/1e6, num[3], silMW)
		check("losses_mw", pt.Losses/1e6, num[4], silMW)
		check("v_mid_pu", pt.VMid, num[5], 1)
		check("v_max_pu", pt.VMax, num[6], 1)
		check("v_min_pu", pt.VMin, num[8], 1)
		// Locations only where the extreme is interior and pronounced.
		if num[6] > 1+1e-3 && math.Abs(pt.XVMax/1e3-num[7]) > numpyXTolKm {
			t.Errorf("%s P=%g MW: x_v_max = %g km, numpy %g", fs[0], num[0], pt.XVMax/1e3, num[7])
		}
		if num[8] < 1-1e-3 && math.Abs(pt.XVMin/1e3-num[9]) > numpyXTolKm {
			t.Errorf("%s P=%g MW: x_v_min = %g km, numpy %g", fs[0], num[0], pt.XVMin/1e3, num[9])
		}
	}
	if rows < 15 {
		t.Fatalf("only %d reference rows", rows)
	}
}

func TestVoltageAlongEnds(t *testing.T) {
	t.Parallel()
	// Identity: the profile meets the two-port's sending-end voltage at x = 0.
	c := numpyCases()["cascade"]
	omega := 2 * math.Pi * 50
	const v = 400e3
	pts, err := BothEndsHeld(c, omega, v, []float64{500e6})
	if err != nil {
		t.Fatal(err)
	}
	pt := pts[0]
	got := VoltageAlong(nil, c, omega, pt.Vr, pt.Ir, []float64{0, c.Length()})
	if cmplx.Abs(got[0]-pt.Vs) > 1e-9*v || cmplx.Abs(got[1]-pt.Vr) > 1e-9*v {
		t.Errorf("profile ends %v %v, want %v %v", got[0], got[1], pt.Vs, pt.Vr)
	}
}

func TestOpenEndLossless(t *testing.T) {
	t.Parallel()
	const v = 400e3
	omega := 2 * math.Pi * 50
	for _, km := range []float64{100, 320, 600} {
		line := losslessLine(km)
		zc := math.Sqrt(0.95e-6 / 12e-12)
		bl := omega * math.Sqrt(0.95e-6*12e-12) * km * 1e3
		r, err := OpenEnd(line, omega, v, 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		// Stevenson (1982) ch. 5: Ferranti rise 1/cos βl, charging V² tan βl / Zc.
		if want := 1 / math.Cos(bl); math.Abs(r.Rise-want) > losslessVoltTol {
			t.Errorf("%g km: rise %g, want %g", km, r.Rise, want)
		}
		sil := v * v / zc
		if want := v * v * math.Tan(bl) / zc; math.Abs(r.Charging-want) > losslessPowerTolSIL*sil {
			t.Errorf("%g km: charging %g, want %g", km, r.Charging, want)
		}
		// T. J. E. Miller (ed.), Reactive Power Control in Electric Systems (1982), ch. 2;
		// from memory: a flat open end |Vr| = |Vs| needs A + B·y = 1, i.e. a reactor of
		// Q = V²(1 - cos βl)/(Zc sin βl) = SIL·tan(βl/2).
		q, err := ReactorForRise(line, omega, v, 0, 1)
		if err != nil {
			t.Fatal(err)
		}
		if want := sil * math.Tan(bl/2); math.Abs(q-want) > losslessPowerTolSIL*sil {
			t.Errorf("%g km: reactor %g var, want %g", km, q, want)
		}
	}
}

func TestReactorForRiseIdentity(t *testing.T) {
	t.Parallel()
	// Identity on lossy lines: the computed reactor, added, gives the target rise.
	const v = 400e3
	omega := 2 * math.Pi * 50
	for name, c := range numpyCases() {
		for _, target := range []float64{1.0, 1.01, 0.98} {
			existing := complex(0, -50e6/(v*v)) // a 50 Mvar reactor already there
			q, err := ReactorForRise(c, omega, v, existing, target)
			if err != nil {
				t.Fatal(err)
			}
			r, err := OpenEnd(c, omega, v, 0, existing+complex(0, -q/(v*v)))
			if err != nil {
				t.Fatal(err)
			}
			base, _ := OpenEnd(c, omega, v, 0, existing)
			want := math.Min(target, base.Rise)
			if math.Abs(r.Rise-want) > 1e-9 {
				t.Errorf("%s target %g: rise with %g Mvar is %g", name, target, q/1e6, r.Rise)
			}
		}
	}
}

// BenchmarkBothEndsHeld41 is one loading study: 41 operating points of a three-section
// cascade, each with its profile extremes.
func BenchmarkBothEndsHeld41(b *testing.B) {
	c := numpyCases()["cascade"]
	omega := 2 * math.Pi * 50
	const v = 400e3
	sil := SurgeImpedanceLoading(c, v, omega)
	pmax, _, err := MaxTransfer(c, omega, v)
	if err != nil {
		b.Fatal(err)
	}
	powers := LoadingPowers(sil, pmax)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := BothEndsHeld(c, omega, v, powers); err != nil {
			b.Fatal(err)
		}
	}
}
