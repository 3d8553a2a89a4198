package analysis

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/telegrapher/telegrapher/cmd/telegrapher/internal/study"
	"github.com/telegrapher/telegrapher/propagation"
)

// PerLength are one sequence's constants at one frequency, per metre.
type PerLength struct {
	R, L, C, G float64    // ohm/m, H/m, F/m, S/m
	Zc         complex128 // ohm
	Gamma      complex128 // 1/m
	Velocity   float64    // m/s, ω/β (0 when β = 0)
}

// ConstantsAt evaluates the per-length constants c at f (Hz) on the jω axis.
func ConstantsAt(c propagation.Constants, f float64) PerLength {
	w := 2 * math.Pi * f
	l := propagation.Line{Length: 1, Constants: c}
	z, y := c.At(complex(0, w))
	gamma, zc := l.GammaZc(complex(0, w))
	v := 0.0
	if imag(gamma) > 0 {
		v = w / imag(gamma)
	}
	return PerLength{R: real(z), L: imag(z) / w, C: imag(y) / w, G: real(y), Zc: zc, Gamma: gamma, Velocity: v}
}

// SweepSequence is one sequence of a section over the sweep.
type SweepSequence struct {
	Name   string // "positive" or "zero"
	Points []PerLength
}

// SweepSection is one line section over the sweep.
type SweepSection struct {
	Name      string
	Geometry  bool // constants from a tower geometry (frequency dependent)
	Sequences []SweepSequence
}

// Sweep evaluates every section's positive- and (where given) zero-sequence
// constants at freqs (Hz).
func Sweep(st *study.Study, freqs []float64) ([]SweepSection, error) {
	if len(st.Line) == 0 {
		return nil, fmt.Errorf("%s: the study has no line", st.File)
	}
	var out []SweepSection
	for i, l := range st.Line {
		sec := SweepSection{Name: l.Name}
		_, sec.Geometry = l.Constants.(propagation.SequenceConstants)
		seqs := []struct {
			name string
			c    propagation.Constants
		}{{"positive", l.Constants}}
		if i < len(st.Zero) {
			seqs = append(seqs, struct {
				name string
				c    propagation.Constants
			}{"zero", st.Zero[i].Constants})
		}
		for _, sq := range seqs {
			s := SweepSequence{Name: sq.name, Points: make([]PerLength, len(freqs))}
			for k, f := range freqs {
				p := ConstantsAt(sq.c, f)
				if cmplx.IsNaN(p.Gamma) || cmplx.IsNaN(p.Zc) || math.IsNaN(p.R) {
					return nil, fmt.Errorf("internal error: non-finite %s-sequence constants at %g Hz", sq.name, f)
				}
				s.Points[k] = p
			}
			sec.Sequences = append(sec.Sequences, s)
		}
		out = append(out, sec)
	}
	return out, nil
}
