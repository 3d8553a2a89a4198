package report

import (
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// The field layout checked here is that of IEEE Std C37.111-2013, clause 7
// (configuration file) and clause 8 (ASCII data file); from the standard's text, from
// memory.

// reconstructSlack allows for rounding of the reconstructed value a·k + b in float64
// on top of the half quantisation step; relative to the channel's span.
const reconstructSlack = 1e-9

var (
	cfgDate = regexp.MustCompile(`^(\d{2})/(\d{2})/(\d{4}),(\d{2}):(\d{2}):(\d{2})\.(\d{6})$`)
	cfgTZ   = regexp.MustCompile(`^[+-]?\d{1,2}(h\d{2})?$|^x$`)
	cfgTmq  = regexp.MustCompile(`^[0-9A-F],[0-3]$`)
)

// parsedChannel is an analog channel read back from a cfg file.
type parsedChannel struct {
	id, unit string
	a, b     float64
	min, max int
}

// parseCOMTRADE checks cfg and dat against the standard's layout and returns the
// analog channels and the reconstructed samples (engineering units).
func parseCOMTRADE(t *testing.T, cfg, dat []byte) ([]parsedChannel, [][]float64, float64) {
	t.Helper()
	text := string(cfg)
	if !strings.HasSuffix(text, "\r\n") {
		t.Fatalf("cfg does not end with CR LF")
	}
	lines := strings.Split(strings.TrimSuffix(text, "\r\n"), "\r\n")
	next := 0
	get := func(what string, fieldCount int) []string {
		t.Helper()
		if next >= len(lines) {
			t.Fatalf("cfg ends before %s", what)
		}
		f := strings.Split(lines[next], ",")
		if len(f) != fieldCount {
			t.Fatalf("cfg line %d (%s): %d fields, want %d: %q", next+1, what, len(f), fieldCount, lines[next])
		}
		next++
		return f
	}
	f := get("station_name,rec_dev_id,rev_year", 3)
	if f[2] != "2013" {
		t.Errorf("rev_year = %q, want 2013", f[2])
	}
	if len(f[0]) > 64 || len(f[1]) > 64 {
		t.Errorf("station or device name longer than 64 characters")
	}
	f = get("TT,##A,##D", 3)
	tt, err := strconv.Atoi(f[0])
	if err != nil || !strings.HasSuffix(f[1], "A") || !strings.HasSuffix(f[2], "D") {
		t.Fatalf("TT,##A,##D = %q", lines[1])
	}
	na, _ := strconv.Atoi(strings.TrimSuffix(f[1], "A"))
	nd, _ := strconv.Atoi(strings.TrimSuffix(f[2], "D"))
	if na+nd != tt || nd != 0 {
		t.Fatalf("TT=%d, ##A=%d, ##D=%d", tt, na, nd)
	}
	chans := make([]parsedChannel, na)
	for i := range chans {
		f = get("analog channel", 13)
		if f[0] != strconv.Itoa(i+1) {
			t.Errorf("analog channel index %q, want %d", f[0], i+1)
		}
		if len(f[1]) > 64 || len(f[2]) > 2 || len(f[3]) > 64 || len(f[4]) > 32 {
			t.Errorf("analog channel %d: a text field is too long: %q", i+1, f)
		}
		var c parsedChannel
		c.id, c.unit = f[1], f[4]
		for _, k := range []int{5, 6, 7, 10, 11} {
			if len(f[k]) > 32 {
				t.Errorf("analog channel %d field %d longer than 32 characters: %q", i+1, k+1, f[k])
			}
		}
		c.a, err = strconv.ParseFloat(f[5], 64)
		if err != nil || c.a == 0 {
			t.Fatalf("channel %d: a = %q", i+1, f[5])
		}
		if c.b, err = strconv.ParseFloat(f[6], 64); err != nil {
			t.Fatalf("channel %d: b = %q", i+1, f[6])
		}
		if _, err := strconv.ParseFloat(f[7], 64); err != nil {
			t.Errorf("channel %d: skew = %q", i+1, f[7])
		}
		c.min, err = strconv.Atoi(f[8])
		if err != nil {
			t.Fatalf("channel %d: min = %q", i+1, f[8])
		}
		c.max, err = strconv.Atoi(f[9])
		if err != nil {
			t.Fatalf("channel %d: max = %q", i+1, f[9])
		}
		if c.min < -99999 || c.max > 99998 || c.min > c.max {
			t.Errorf("channel %d: min,max = %d,%d outside -99999..99998", i+1, c.min, c.max)
		}
		if f[12] != "P" && f[12] != "S" {
			t.Errorf("channel %d: PS = %q", i+1, f[12])
		}
		chans[i] = c
	}
	f = get("line frequency", 1)
	if lf, err := strconv.ParseFloat(f[0], 64); err != nil || lf <= 0 {
		t.Errorf("lf = %q", f[0])
	}
	f = get("nrates", 1)
	nrates, err := strconv.Atoi(f[0])
	if err != nil || nrates != 1 {
		t.Fatalf("nrates = %q, want 1", f[0])
	}
	f = get("samp,endsamp", 2)
	samp, err := strconv.ParseFloat(f[0], 64)
	if err != nil || samp <= 0 {
		t.Fatalf("samp = %q", f[0])
	}
	endsamp, err := strconv.Atoi(f[1])
	if err != nil {
		t.Fatalf("endsamp = %q", f[1])
	}
	for _, what := range []string{"start time", "trigger time"} {
		if next >= len(lines) || !cfgDate.MatchString(lines[next]) {
			t.Fatalf("%s line %q is not dd/mm/yyyy,hh:mm:ss.ssssss", what, lines[min(next, len(lines)-1)])
		}
		m := cfgDate.FindStringSubmatch(lines[next])
		day, _ := strconv.Atoi(m[1])
		month, _ := strconv.Atoi(m[2])
		hour, _ := strconv.Atoi(m[4])
		minute, _ := strconv.Atoi(m[5])
		sec, _ := strconv.Atoi(m[6])
		if day < 1 || day > 31 || month < 1 || month > 12 || hour > 23 || minute > 59 || sec > 59 {
			t.Errorf("%s %q out of range", what, lines[next])
		}
		next++
	}
	if f = get("file type", 1); f[0] != "ASCII" {
		t.Fatalf("file type = %q", f[0])
	}
	f = get("timemult", 1)
	timemult, err := strconv.ParseFloat(f[0], 64)
	if err != nil || timemult <= 0 {
		t.Fatalf("timemult = %q", f[0])
	}
	f = get("time_code,local_code", 2)
	if !cfgTZ.MatchString(f[0]) || !cfgTZ.MatchString(f[1]) {
		t.Errorf("time_code,local_code = %q", lines[next-1])
	}
	if next >= len(lines) || !cfgTmq.MatchString(lines[next]) {
		t.Fatalf("tmq_code,leapsec line missing or malformed")
	}
	next++
	if next != len(lines) {
		t.Errorf("cfg has %d extra lines", len(lines)-next)
	}

	dtext := string(dat)
	if !strings.HasSuffix(dtext, "\r\n") {
		t.Fatalf("dat does not end with CR LF")
	}
	dlines := strings.Split(strings.TrimSuffix(dtext, "\r\n"), "\r\n")
	if len(dlines) != endsamp {
		t.Fatalf("dat has %d samples, endsamp = %d", len(dlines), endsamp)
	}
	values := make([][]float64, na)
	prevTS := int64(-1)
	for k, l := range dlines {
		f := strings.Split(l, ",")
		if len(f) != 2+na {
			t.Fatalf("dat line %d: %d fields, want %d", k+1, len(f), 2+na)
		}
		if f[0] != strconv.Itoa(k+1) {
			t.Fatalf("dat line %d: sample number %q", k+1, f[0])
		}
		if len(f[1]) > 10 {
			t.Fatalf("dat line %d: timestamp %q longer than 10 digits", k+1, f[1])
		}
		ts, err := strconv.ParseInt(f[1], 10, 64)
		if err != nil || ts < prevTS {
			t.Fatalf("dat line %d: timestamp %q not increasing", k+1, f[1])
		}
		prevTS = ts
		wantTS := float64(k) / samp * 1e6 / timemult
		if math.Abs(float64(ts)-wantTS) > 0.5+1e-9*wantTS {
			t.Fatalf("dat line %d: timestamp %d, want %.3f from samp", k+1, ts, wantTS)
		}
		for i := range chans {
			v, err := strconv.Atoi(f[2+i])
			if err != nil {
				t.Fatalf("dat line %d: value %q not an integer", k+1, f[2+i])
			}
			if v < chans[i].min || v > chans[i].max || v == 99999 {
				t.Fatalf("dat line %d channel %d: %d outside cfg min,max %d,%d", k+1, i+1, v, chans[i].min, chans[i].max)
			}
			values[i] = append(values[i], chans[i].a*float64(v)+chans[i].b)
		}
	}
	return chans, values, samp
}

func TestCOMTRADELayout(t *testing.T) {
	t.Parallel()
	const n = 2001
	sine := make([]float64, n)
	neg := make([]float64, n)
	flat := make([]float64, n)
	big := make([]float64, n)
	for k := range sine {
		tt := float64(k) * 5e-6
		sine[k] = 326.6 * math.Sin(2*math.Pi*50*tt+0.3)
		neg[k] = -10 - 3*math.Exp(-tt*200)
		flat[k] = 12.5
		big[k] = 1e7 * math.Cos(2*math.Pi*731*tt)
	}
	tests := []struct {
		name string
		rec  Record
	}{
		{"three channels", Record{
			Station: "telegrapher", Device: "energise", LineFrequency: 50, SampleRate: 200000,
			Start:   time.Date(2000, 1, 2, 3, 4, 5, 678901000, time.UTC),
			Trigger: time.Date(2000, 1, 2, 3, 4, 5, 678901000, time.UTC),
			Channels: []AnalogChannel{
				{ID: "V receiving", Phase: "A", Circuit: "line", Unit: "kV", Values: sine},
				{ID: "V negative", Phase: "B", Circuit: "line", Unit: "kV", Values: neg},
				{ID: "V flat", Phase: "C", Circuit: "bus", Unit: "kV", Values: flat},
			}}},
		{"large values, 60 Hz", Record{
			Station: "s", Device: "d", LineFrequency: 60, SampleRate: 1 / 3e-6,
			Start: time.Unix(0, 0), Trigger: time.Unix(0, 2000),
			Channels: []AnalogChannel{{ID: "I", Phase: "N", Unit: "A", Values: big}},
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			cfg, dat, err := COMTRADE(tc.rec)
			if err != nil {
				t.Fatal(err)
			}
			chans, values, samp := parseCOMTRADE(t, cfg, dat)
			if len(chans) != len(tc.rec.Channels) {
				t.Fatalf("%d channels read back, want %d", len(chans), len(tc.rec.Channels))
			}
			if math.Abs(samp-tc.rec.SampleRate) > 1e-8*tc.rec.SampleRate {
				t.Errorf("samp = %g, want %g", samp, tc.rec.SampleRate)
			}
			for i, ch := range tc.rec.Channels {
				if chans[i].id != ch.ID || chans[i].unit != ch.Unit {
					t.Errorf("channel %d: id,unit = %q,%q", i+1, chans[i].id, chans[i].unit)
				}
				lo, hi := ch.Values[0], ch.Values[0]
				for _, v := range ch.Values {
					lo, hi = math.Min(lo, v), math.Max(hi, v)
				}
				step := chans[i].a
				slack := reconstructSlack * math.Max(hi-lo, math.Abs(hi))
				for k, v := range ch.Values {
					if d := math.Abs(values[i][k] - v); d > step/2+slack {
						t.Fatalf("channel %d sample %d: %g reconstructs as %g, off by %g > step/2 = %g", i+1, k+1, v, values[i][k], d, step/2)
					}
				}
				// The scale uses the integer range well: the resolution is the span over
				// about 2·99998 steps (a constant channel aside).
				if hi > lo && step > (hi-lo)/(2*99998)*(1+1e-6) {
					t.Errorf("channel %d: step %g coarser than span/199996 = %g", i+1, step, (hi-lo)/199996)
				}
			}
		})
	}
}

func TestCOMTRADERefuses(t *testing.T) {
	t.Parallel()
	ok := []float64{1, 2, 3}
	base := func() Record {
		return Record{Station: "s", Device: "d", LineFrequency: 50, SampleRate: 1000,
			Channels: []AnalogChannel{{ID: "a", Unit: "kV", Values: ok}}}
	}
	tests := []struct {
		name   string
		modify func(*Record)
		want   string
	}{
		{"comma in name", func(r *Record) { r.Channels[0].ID = "a,b" }, "comma"},
		{"NaN sample", func(r *Record) { r.Channels[0].Values = []float64{1, math.NaN(), 2} }, "not finite"},
		{"Inf sample", func(r *Record) { r.Channels[0].Values = []float64{1, math.Inf(1), 2} }, "not finite"},
		{"unequal lengths", func(r *Record) {
			r.Channels = append(r.Channels, AnalogChannel{ID: "b", Values: []float64{1}})
		}, "samples"},
		{"no channels", func(r *Record) { r.Channels = nil }, "no channels"},
		{"zero rate", func(r *Record) { r.SampleRate = 0 }, "sample rate"},
		{"long phase", func(r *Record) { r.Channels[0].Phase = "ABC" }, "longer"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			r := base()
			tc.modify(&r)
			_, _, err := COMTRADE(r)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("err = %v, want one containing %q", err, tc.want)
			}
		})
	}
}
