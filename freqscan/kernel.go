package freqscan

import (
	"math"

	"github.com/telegrapher/telegrapher/propagation"
)

// kernel is a network prepared for fast evaluation on the jω axis: a single-section
// line, the shunts sorted by where they connect, and direct (per-length constant)
// line constants read without the interface call. Points it cannot evaluate safely
// (a zero or huge denominator, a very short electrical length) go to the general
// path, Network.point.
type kernel struct {
	n                   Network
	ok                  bool // a single-section line: the fast path applies
	length              float64
	rlgc                propagation.RLGC
	direct              bool
	sendLine, sendBus   []Shunt
	recv                []Shunt
	loadG, loadL, loadC float64
	reactors            [2][]Shunt // line-connected reactors behind a neutral inductance
	neutral             [2]float64 // that inductance, H, by End
	far                 Source     // the far system, when connected
}

func newKernel(n Network) kernel {
	k := kernel{n: n, ok: len(n.Line) == 1}
	if !k.ok {
		return k
	}
	k.length = n.Line[0].Length
	k.rlgc, k.direct = n.Line[0].Constants.(propagation.RLGC)
	k.neutral = n.ReactorNeutral
	for _, sh := range n.Shunts {
		switch {
		case sh.OnLine && sh.L > 0 && n.ReactorNeutral[sh.End] > 0:
			k.reactors[sh.End] = append(k.reactors[sh.End], sh)
		case sh.End == Sending && sh.OnLine:
			k.sendLine = append(k.sendLine, sh)
		case sh.End == Sending:
			k.sendBus = append(k.sendBus, sh)
		case sh.OnLine || !n.FarEndOpen:
			k.recv = append(k.recv, sh)
		}
	}
	if !n.FarEndOpen {
		if n.Load.R > 0 {
			k.loadG = 1 / n.Load.R
		}
		k.loadL, k.loadC = n.Load.L, n.Load.C
		k.far = n.Far
	}
	return k
}

// inv is 1/b without the special-value handling of the runtime's complex division;
// bad reports a zero, huge or non-finite |b|², for which the caller takes the safe
// path.
func inv(b complex128, bad *bool) complex128 {
	re, im := real(b), imag(b)
	n2 := re*re + im*im
	if !(n2 > 1e-290 && n2 < 1e290) {
		*bad = true
		return 0
	}
	k := 1 / n2
	return complex(re*k, -im*k)
}

func shuntsAdmittance(shs []Shunt, w float64, bad *bool) complex128 {
	var y complex128
	for _, sh := range shs {
		if sh.L > 0 {
			y += inv(complex(sh.R, w*sh.L), bad)
		} else {
			sc := complex(0, w*sh.C)
			y += sc * inv(1+sc*complex(sh.R, 0), bad)
		}
	}
	return y
}

func norm(c complex128) float64 { return math.Sqrt(real(c)*real(c) + imag(c)*imag(c)) }

// point evaluates the network at f Hz (see Scan for the exponential form).
func (k *kernel) point(f float64) Point {
	var p Point
	k.eval(&p, f)
	return p
}

// eval is point, writing into *p.
func (k *kernel) eval(p *Point, f float64) {
	if !k.ok || !(f > 0) {
		*p = k.n.point(f)
		return
	}
	w := 2 * math.Pi * f
	var z, y complex128
	if k.direct {
		z, y = complex(k.rlgc.R, w*k.rlgc.L), complex(k.rlgc.G, w*k.rlgc.C)
	} else {
		z, y = k.n.Line[0].At(complex(0, w))
	}
	bad := false
	gamma := propagation.PrincipalSqrt(z * y)
	ig := inv(gamma, &bad)
	gl := gamma * complex(k.length, 0)
	if bad || math.Abs(real(gl))+math.Abs(imag(gl)) < smallGammaL {
		*p = k.n.point(f)
		return
	}
	// The line's two-port times 2e^{-γl} (|2e^{-γl}| = 2m), with Zc = z/γ, 1/Zc = y/γ.
	a, b, c, _, m := propagation.ExactExp(gl, z*ig, y*ig)

	ysl := shuntsAdmittance(k.sendLine, w, &bad)
	ysb := shuntsAdmittance(k.sendBus, w, &bad)
	yr := shuntsAdmittance(k.recv, w, &bad)
	for e := range k.reactors {
		if len(k.reactors[e]) == 0 {
			continue
		}
		yb := shuntsAdmittance(k.reactors[e], w, &bad)
		yb *= inv(1+complex(0, w*k.neutral[e])*yb, &bad)
		if End(e) == Sending {
			ysl += yb
		} else {
			yr += yb
		}
	}
	if !k.far.Ideal() {
		yr += inv(complex(k.far.R, w*k.far.L), &bad)
	}
	var ld complex128
	if k.loadG > 0 {
		ld += complex(k.loadG, 0)
	}
	if k.loadL > 0 {
		ld += complex(0, -1/(w*k.loadL))
	}
	if k.loadC > 0 {
		ld += complex(0, w*k.loadC)
	}
	yr += ld
	zsrc := complex(k.n.Source.R, w*k.n.Source.L)

	num := a + b*yr
	den := c + a*yr + ysl*num
	all := num + zsrc*(den+ysb*num)
	iAll, iDen := inv(all, &bad), inv(den, &bad)
	zs := zsrc * inv(1+zsrc*(ysl+ysb), &bad)
	nOut := a*zs + b
	iOut := inv(c*zs+a+yr*nOut, &bad)
	nn := norm(num)
	if bad || !(nn > 1e-145) {
		*p = k.n.point(f)
		return
	}
	na := norm(iAll)
	zin, zsend, zrecv := num*iDen, zsrc*num*iAll, nOut*iOut
	if s := na + real(zin) + imag(zin) + real(zsend) + imag(zsend) + real(zrecv) + imag(zrecv); s-s != 0 {
		*p = k.n.point(f)
		return
	}
	p.F = f
	p.Gain = 2 * m * na
	p.GainLine = 2 * m / nn
	p.GainSending = nn * na
	p.ZIn, p.ZSending, p.ZReceiving = zin, zsend, zrecv
}
