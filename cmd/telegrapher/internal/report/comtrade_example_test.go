package report_test

import (
	"fmt"
	"strings"
	"time"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
)

// A two-sample record of one channel: the configuration names the channel, its
// scaling (a, b) and the sampling; each data line is n, timestamp (µs) and the integer.
func ExampleCOMTRADE() {
	cfg, dat, err := report.COMTRADE(report.Record{
		Station: "example", Device: "telegrapher", LineFrequency: 50, SampleRate: 100000,
		Start:    time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC),
		Trigger:  time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC),
		Channels: []report.AnalogChannel{{ID: "V receiving", Phase: "A", Circuit: "line", Unit: "kV", Values: []float64{0, 326.6}}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Print(strings.ReplaceAll(string(cfg), "\r\n", "\n"))
	fmt.Print(strings.ReplaceAll(string(dat), "\r\n", "\n"))
	// Output:
	// example,telegrapher,2013
	// 1,1A,0D
	// 1,V receiving,A,line,kV,0.00163303266,163.3,0,-99998,99998,1,1,P
	// 50
	// 1
	// 100000,2
	// 01/01/2000,00:00:00.000000
	// 01/01/2000,00:00:00.000000
	// ASCII
	// 1
	// 0,0
	// F,0
	// 1,0,-99998
	// 2,10,99998
}

func ExampleTable_CSV() {
	t := report.NewTable("f_hz", "gain")
	_ = t.Add(250.0, 3.5)
	_ = t.Add(350.0, 1.25)
	fmt.Print(string(t.CSV()))
	// Output:
	// f_hz,gain
	// 250,3.5
	// 350,1.25
}
