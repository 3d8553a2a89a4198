package waves

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"

	"github.com/telegrapher/telegrapher/freqscan"
	"github.com/telegrapher/telegrapher/propagation"
)

// The test line: L = 0.95 mH/km, C = 12 nF/km (Zc = 281.366 ohm, v = 296,177 km/s),
// 300 km, travel time 1.012917 ms; r in ohm/km.
const (
	testL      = 0.95e-6
	testC      = 12e-12
	testLength = 300e3
	testOmega  = 2 * math.Pi * 50
)

var (
	testZc  = math.Sqrt(testL / testC)
	testTau = testLength * math.Sqrt(testL*testC)
)

func testNetwork(rPerKm, rs, ls float64, shunts ...freqscan.Shunt) freqscan.Network {
	return freqscan.Network{
		Source: freqscan.Source{R: rs, L: ls},
		Line:   propagation.Cascade{{Length: testLength, Constants: propagation.RLGC{R: rPerKm / 1e3, L: testL, C: testC}}},
		Shunts: shunts,
	}.Energising()
}

func stepSettings(duration, dt float64) Energisation {
	return Energisation{Excitation: Step, Omega: testOmega, Duration: duration, TimeStep: dt}
}

// at returns v at time t by linear interpolation of a waveform with step dt.
func at(v []float64, dt, t float64) float64 {
	x := t / dt
	i := int(x)
	if i >= len(v)-1 {
		return v[len(v)-1]
	}
	f := x - float64(i)
	return v[i]*(1-f) + v[i+1]*f
}

// nearFront reports whether t is within w of a multiple of the travel time tau.
func nearFront(t, tau, w float64) bool {
	k := math.Round(t / tau)
	return math.Abs(t-k*tau) < w
}

type refWave struct{ t, vs, vr []float64 }

// readRef reads a t_s,v_sending,v_receiving table.
func readRef(t *testing.T, path string) refWave {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var r refWave
	sc := bufio.NewScanner(f)
	sc.Scan() // header
	for sc.Scan() {
		p := strings.Split(sc.Text(), ",")
		var x [3]float64
		for i := range x {
			if x[i], err = strconv.ParseFloat(p[i], 64); err != nil {
				t.Fatal(err)
			}
		}
		r.t, r.vs, r.vr = append(r.t, x[0]), append(r.vs, x[1]), append(r.vr, x[2])
	}
	return r
}

// threeMethods runs the lattice, Bergeron and Laplace methods on the same network and
// settings, each with its default options, failing the test on any error.
func threeMethods(t *testing.T, n freqscan.Network, e Energisation) (lat, ber, lap *Waveform, d *LatticeDiagram) {
	t.Helper()
	lat, d, err := Lattice(n, e, LatticeOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if ber, err = Bergeron(n, e, BergeronOptions{}); err != nil {
		t.Fatal(err)
	}
	if lap, err = Laplace(n, e, LaplaceOptions{}); err != nil {
		t.Fatal(err)
	}
	return lat, ber, lap, d
}
