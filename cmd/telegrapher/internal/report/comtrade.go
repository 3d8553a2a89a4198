package report

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"
)

// COMTRADE limits of the ASCII data file (IEEE Std C37.111-2013, clause 8): analog
// values are integers in -99999..99998 (99999 marks a missing value).
const (
	comtradeMinInt = -99999
	comtradeMaxInt = 99998
	// comtradeSpan is the largest magnitude used when scaling, symmetric about the
	// channel's offset b so both signs get the same resolution.
	comtradeSpan = 99998
)

// AnalogChannel is one analog channel of a COMTRADE record, with its samples in
// engineering units (Unit), primary values.
type AnalogChannel struct {
	ID      string    // channel name, at most 64 characters (ch_id)
	Phase   string    // phase identification, at most 2 characters (ph), e.g. "A"
	Circuit string    // circuit component being monitored, at most 64 characters (ccbm)
	Unit    string    // channel units, at most 32 characters (uu), e.g. "kV"
	Values  []float64 // samples, one per time step; all finite
}

// Record is a set of evenly sampled analog channels to be written as a COMTRADE record
// in the ASCII form of IEEE Std C37.111-2013.
type Record struct {
	Station       string    // station_name, at most 64 characters
	Device        string    // rec_dev_id, at most 64 characters
	LineFrequency float64   // nominal line frequency, Hz (> 0)
	SampleRate    float64   // samples per second (> 0)
	Start         time.Time // time of the first sample
	Trigger       time.Time // time of the trigger point (here: the breaker closing)
	Channels      []AnalogChannel
}

// COMTRADE encodes r as the configuration (.cfg) and data (.dat) files of an ASCII
// COMTRADE record, IEEE Std C37.111-2013, lines ended by CR LF.
//
// The configuration holds, one item per line:
//
//	station_name,rec_dev_id,rev_year          (rev_year = 2013)
//	TT,##A,##D                                 (no digital channels)
//	An,ch_id,ph,ccbm,uu,a,b,skew,min,max,primary,secondary,PS   (one per analog channel)
//	lf                                         (line frequency, Hz)
//	nrates                                     (1)
//	samp,endsamp                               (sampling rate, Hz; last sample number)
//	dd/mm/yyyy,hh:mm:ss.ssssss                 (first sample)
//	dd/mm/yyyy,hh:mm:ss.ssssss                 (trigger point)
//	ASCII
//	timemult                                   (1: timestamps in microseconds)
//	time_code,local_code                       (0,0: UTC)
//	tmq_code,leapsec                           (F,0: time is not from a clock)
//
// and each data line is
//
//	n,timestamp,A1,A2,...
//
// with n counting from 1, the timestamp in microseconds from the first sample, and each
// sample x stored as the integer k with x = a·k + b, |k| <= 99998. Per channel the
// offset b is the middle of the sample range and a = half the range / 99998, so the
// quantisation error is at most a/2. Values are primary values (primary = secondary =
// 1, PS = P). A channel of constant value gets a = 1 and b = that value.
//
// It returns an error when the record is empty, the channels differ in length, a
// sample is not finite, or a field would not fit its place (a comma or a line break in
// a name, a name too long).
//
// References:
//   - IEEE Std C37.111-2013 (IEC 60255-24:2013), Measuring relays and protection
//     equipment, Part 24: Common format for transient data exchange (COMTRADE) for
//     power systems, clauses 7 (configuration file) and 8 (data file).
func COMTRADE(r Record) (cfg, dat []byte, err error) {
	if len(r.Channels) == 0 {
		return nil, nil, fmt.Errorf("comtrade: record has no channels")
	}
	n := len(r.Channels[0].Values)
	if n == 0 {
		return nil, nil, fmt.Errorf("comtrade: record has no samples")
	}
	if !(r.SampleRate > 0) || math.IsInf(r.SampleRate, 0) {
		return nil, nil, fmt.Errorf("comtrade: sample rate must be > 0, got %g", r.SampleRate)
	}
	if !(r.LineFrequency > 0) || math.IsInf(r.LineFrequency, 0) {
		return nil, nil, fmt.Errorf("comtrade: line frequency must be > 0, got %g", r.LineFrequency)
	}
	// The timestamp field holds at most 10 digits (C37.111-2013, 8.4.2).
	if lastUS := float64(n-1) / r.SampleRate * 1e6; lastUS > 9999999999 {
		return nil, nil, fmt.Errorf("comtrade: record of %.0f us is too long for the timestamp field", lastUS)
	}
	fields := []struct {
		what, v string
		max     int
	}{{"station name", r.Station, 64}, {"device id", r.Device, 64}}
	for _, ch := range r.Channels {
		fields = append(fields,
			struct {
				what, v string
				max     int
			}{"channel id", ch.ID, 64},
			struct {
				what, v string
				max     int
			}{"phase", ch.Phase, 2},
			struct {
				what, v string
				max     int
			}{"circuit", ch.Circuit, 64},
			struct {
				what, v string
				max     int
			}{"unit", ch.Unit, 32})
	}
	for _, f := range fields {
		if strings.ContainsAny(f.v, ",\r\n") {
			return nil, nil, fmt.Errorf("comtrade: %s %q must not contain a comma or a line break", f.what, f.v)
		}
		if len(f.v) > f.max {
			return nil, nil, fmt.Errorf("comtrade: %s %q is longer than %d characters", f.what, f.v, f.max)
		}
	}

	type scaled struct {
		a, b     float64
		ints     []int
		min, max int
	}
	sc := make([]scaled, len(r.Channels))
	for i, ch := range r.Channels {
		if len(ch.Values) != n {
			return nil, nil, fmt.Errorf("comtrade: channel %q has %d samples, channel %q has %d", ch.ID, len(ch.Values), r.Channels[0].ID, n)
		}
		lo, hi := math.Inf(1), math.Inf(-1)
		for k, v := range ch.Values {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, nil, fmt.Errorf("comtrade: channel %q sample %d is not finite", ch.ID, k+1)
			}
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		b := (lo + hi) / 2
		a := (hi - lo) / 2 / comtradeSpan
		if a == 0 || math.IsInf(a, 0) {
			a = 1
		}
		// a and b are written with 9 significant digits; scale with the written values
		// so a reader reconstructs exactly what was meant.
		a, _ = strconv.ParseFloat(formatReal(a), 64)
		b, _ = strconv.ParseFloat(formatReal(b), 64)
		s := scaled{a: a, b: b, ints: make([]int, n), min: comtradeMaxInt, max: comtradeMinInt}
		for k, v := range ch.Values {
			q := int(math.Round((v - b) / a))
			q = max(comtradeMinInt, min(comtradeMaxInt, q))
			s.ints[k] = q
			s.min, s.max = min(s.min, q), max(s.max, q)
		}
		sc[i] = s
	}

	var c bytes.Buffer
	line := func(format string, a ...any) {
		fmt.Fprintf(&c, format, a...)
		c.WriteString("\r\n")
	}
	line("%s,%s,2013", r.Station, r.Device)
	line("%d,%dA,0D", len(r.Channels), len(r.Channels))
	for i, ch := range r.Channels {
		line("%d,%s,%s,%s,%s,%s,%s,0,%d,%d,1,1,P", i+1, ch.ID, ch.Phase, ch.Circuit, ch.Unit,
			formatReal(sc[i].a), formatReal(sc[i].b), sc[i].min, sc[i].max)
	}
	line("%s", formatReal(r.LineFrequency))
	line("1")
	line("%s,%d", formatReal(r.SampleRate), n)
	line("%s", comtradeTime(r.Start))
	line("%s", comtradeTime(r.Trigger))
	line("ASCII")
	line("1")
	line("0,0")
	line("F,0")

	var d bytes.Buffer
	d.Grow(n * (12 + 8*len(r.Channels)))
	buf := make([]byte, 0, 32)
	for k := 0; k < n; k++ {
		buf = strconv.AppendInt(buf[:0], int64(k+1), 10)
		buf = append(buf, ',')
		buf = strconv.AppendInt(buf, int64(math.Round(float64(k)/r.SampleRate*1e6)), 10)
		for i := range sc {
			buf = append(buf, ',')
			buf = strconv.AppendInt(buf, int64(sc[i].ints[k]), 10)
		}
		buf = append(buf, '\r', '\n')
		d.Write(buf)
	}
	return c.Bytes(), d.Bytes(), nil
}

// formatReal writes a real number for a COMTRADE field: 9 significant digits, as a
// plain decimal where that fits in 24 characters (fields are at most 32), else with an
// exponent.
func formatReal(v float64) string {
	s := strconv.FormatFloat(v, 'g', 9, 64)
	w, _ := strconv.ParseFloat(s, 64)
	if p := strconv.FormatFloat(w, 'f', -1, 64); len(p) <= 24 {
		return p
	}
	return s
}

// comtradeTime formats t as dd/mm/yyyy,hh:mm:ss.ssssss (C37.111-2013, 7.4.8), UTC.
func comtradeTime(t time.Time) string {
	t = t.UTC()
	return fmt.Sprintf("%02d/%02d/%04d,%02d:%02d:%02d.%06d", t.Day(), int(t.Month()), t.Year(),
		t.Hour(), t.Minute(), t.Second(), t.Nanosecond()/1000)
}
