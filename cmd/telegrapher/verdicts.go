package main

// The limits each report section and batch row compare their figures with, and where
// each limit comes from: the study's own [targets] when it gives one, otherwise the
// study's own setting or the screening level (common practice), said so in the text.
//
//	switchingVerdict  u2 against targets.max_u2_pu; the margin to the SIWL against
//	                  targets.min_margin_pct (default 0 %)
//	scanTargetCheck   the worst watched band gain against targets.max_gain_watched
//	openEndLimit      targets.max_open_end_pu, else the 1.05 pu screening level
//	energiseLimit     the 2 pu screening level ([targets] has no energisation target),
//	                  compared with the method's stated wavefront accuracy allowed for

import (
	"fmt"
	"math"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/report"
	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
)

// limit is a value a figure is compared with, and where it comes from, as the
// reading says it: "target max_u2_pu = 2 from [targets]".
type limit struct {
	Value float64
	From  string
}

// targetLimit is the [targets] key when the study gives it.
func targetLimit(key string, v float64) limit {
	return limit{Value: v, From: fmt.Sprintf("target %s = %g from [targets]", key, v)}
}

// switchingVerdict compares the switching figures with the study's targets: u2 with
// max_u2_pu, the margin to the SIWL with min_margin_pct (0 % when not given: the
// withstand itself, ks and kcd applied). Without a SIWL and a u2 target there is
// nothing to compare: Info. The text is appended to the section's reading; u2Over
// and marginShort mark the facts.
func switchingVerdict(st *study.Study, r *switchingResult) (v report.Verdict, text string, u2Over, marginShort bool) {
	tg := st.Remedy().Targets
	v = report.Info
	if tg.HasU2 {
		l := targetLimit("max_u2_pu", tg.U2PU)
		v = report.Pass
		if r.U2PU > l.Value {
			v, u2Over = report.Flagged, true
			text += fmt.Sprintf("; u2 above the %s", l.From)
		} else {
			text += fmt.Sprintf("; u2 within the %s", l.From)
		}
	}
	if r.MarginPct != nil {
		m := *r.MarginPct
		l := limit{Value: 0, From: "least margin 0 % (the withstand itself; no min_margin_pct in [targets])"}
		if tg.HasMargin {
			l = targetLimit("min_margin_pct", tg.MarginPct)
		}
		word := "a margin of"
		if m < 0 {
			word = "short of the withstand by"
		}
		text += fmt.Sprintf("; against the SIWL of %.0f kV: %s %.1f %%", r.SIWLKV, word, math.Abs(m))
		if v == report.Info {
			v = report.Pass
		}
		if m < l.Value {
			v, marginShort = report.Flagged, true
			text += ", below the " + l.From
		} else {
			text += ", within the " + l.From
		}
	}
	return v, text, u2Over, marginShort
}

// scanTargetCheck compares the largest gain within the watch band of a watched
// harmonic with targets.max_gain_watched; given is false when the study has none.
func scanTargetCheck(st *study.Study, worstBandGain float64) (over, given bool, text string) {
	tg := st.Remedy().Targets
	if !tg.HasGainWatched {
		return false, false, ""
	}
	l := targetLimit("max_gain_watched", tg.GainWatched)
	if worstBandGain > l.Value {
		return true, true, fmt.Sprintf("; above the %s", l.From)
	}
	return false, true, fmt.Sprintf("; within the %s", l.From)
}

// openEndLimit is the limit of the no-load open-end rise |Vr/Vs| with the
// line-connected shunts: targets.max_open_end_pu, else the screening level.
func openEndLimit(st *study.Study) limit {
	if tg := st.Remedy().Targets; tg.HasOpenEnd {
		return targetLimit("max_open_end_pu", tg.OpenEndPU)
	}
	return limit{Value: openEndRiseScreenPU, From: fmt.Sprintf("%.2f pu screening level (common practice; no max_open_end_pu in [targets])", openEndRiseScreenPU)}
}

// energiseLimit is the limit of the open-end energisation peak: [targets] has no
// energisation target, so the screening level.
func energiseLimit() limit {
	return limit{Value: energisePeakScreenPU, From: fmt.Sprintf("%.1f pu screening level (common practice; [targets] has no energisation target)", energisePeakScreenPU)}
}

// energiseOver reports whether the energisation peak exceeds the limit by more than
// the method's stated accuracy at wavefronts (the numerical Laplace window's
// overshoot bound, waves.Waveform.Overshoot), so that the window cannot decide the
// verdict; text says so in the reading.
func energiseOver(res energiseResult, l limit) (over bool, text string) {
	p := math.Abs(res.PeakPU)
	over = p-res.FrontOvershootPU > l.Value
	word := "within"
	if over {
		word = "above"
	}
	text = fmt.Sprintf("%s the %s", word, l.From)
	if !over && p > l.Value {
		text = fmt.Sprintf("at the limit within the method's accuracy, so not flagged: %s", text)
	}
	if res.FrontOvershootPU > 0 {
		text += fmt.Sprintf(", %s accuracy at wavefronts +%.2g pu allowed for", res.Method, res.FrontOvershootPU)
	}
	return over, text
}
