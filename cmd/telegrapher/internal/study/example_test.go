package study_test

import (
	"fmt"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

// Parse a study and read the models it builds, in SI units.
func ExampleParse() {
	st, err := study.Parse("line.toml", []byte(`
frequency_hz = 50
voltage_kv = 400
[line]
length_km = 320
r_ohm_per_km = 0.028
l_mh_per_km = 0.93
c_nf_per_km = 12.4
[source]
short_circuit_mva = 15000
x_over_r = 12
`))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.0f km, source R = %.4f ohm, L = %.3f mH, scan to %g Hz\n",
		st.Line.Length()/1e3, st.Network.Source.R, st.Network.Source.L*1e3, st.Scan.FMax)
	// Output:
	// 320 km, source R = 0.8858 ohm, L = 33.836 mH, scan to 2500 Hz
}

// Errors name the file and the key path, with a did-you-mean hint for typing errors.
func ExampleParse_error() {
	_, err := study.Parse("line.toml", []byte(`
frequency_hz = 50
voltage_kv = 400
[line]
lenght_km = 320
`))
	fmt.Println(err.(*study.Error).Key, study.IsInputError(err))
	// Output:
	// line.lenght_km true
}
