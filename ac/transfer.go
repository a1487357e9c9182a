package ac

import (
	"fmt"
	"math"
	"math/cmplx"

	"tangent/cases"
)

// Result is one transfer of a linear circuit, analysed: its rational
// function (poles, zeros, the three forms), DC gain, −3 dB band,
// unity-gain frequency and, when frequencies are asked for, the response
// on them.
type Result struct {
	Transfer  *cases.Transfer
	Rational  *Rational
	Bandwidth Bandwidth
	// UnityGainHz is where |H| falls through 1 above the reference of the
	// band (the crossover an amplifier designer means), Hz; nil where
	// there is none. Meaningful for the dimensionless kinds.
	UnityGainHz *float64
	// FHz and Response hold H(j·2π·f) at the asked frequencies, computed
	// from the circuit's equations (not from the factored form).
	FHz      []float64
	Response []complex128
}

// Unit returns the unit of H for a transfer kind: "V/V", "A/A", "S", "Ω".
func Unit(k cases.TransferKind) string {
	switch k {
	case cases.VoltageGain:
		return "V/V"
	case cases.CurrentGain:
		return "A/A"
	case cases.Transconductance:
		return "S"
	}
	return "Ω"
}

// Analyse sets up transfer t on the linear circuit c (see Setup), finds
// its rational function and band, and evaluates the response at fHz
// (none when empty).
func Analyse(c *cases.Circuit, t *cases.Transfer, fHz []float64) (*Result, error) {
	p, err := Setup(c, t)
	if err != nil {
		return nil, err
	}
	r, err := Analyze(p)
	if err != nil {
		return nil, fmt.Errorf("ac: %s → %s (%s): %w", t.From, t.To, t.Kind, err)
	}
	res := &Result{Transfer: t, Rational: r, Bandwidth: r.Bandwidth()}
	if hz, ok := unityAbove(r, res.Bandwidth.RefHz); ok {
		res.UnityGainHz = &hz
	}
	if len(fHz) > 0 {
		sw, err := NewSweeper(p)
		if err != nil {
			return nil, fmt.Errorf("ac: %s → %s (%s): %w", t.From, t.To, t.Kind, err)
		}
		res.FHz = append([]float64(nil), fHz...)
		res.Response = sw.Response(res.FHz, nil)
	}
	return res, nil
}

// OriginPower returns k of the DC-gain form's s^k: the zeros at the origin
// less the poles there.
func (r *Rational) OriginPower() int { return r.originOrder() }

// MagnitudeDB returns 20·log10|h|.
func MagnitudeDB(h complex128) float64 { return 20 * math.Log10(cmplx.Abs(h)) }

// PhaseDeg returns the phase of h in degrees, in (−180, 180].
func PhaseDeg(h complex128) float64 { return cmplx.Phase(h) * 180 / math.Pi }

// TwoPortAt returns the z parameters of the two-port formed by ports p1
// and p2 of the linear circuit c at frequency fHz. Both ports are open
// (a port defined by a source has that source removed) and every other
// independent source is zeroed; zij = Vi/Ij with the test current into
// port j's plus node. It fails where the z parameters do not exist (a
// port shorted by the circuit): convert from another set then.
func TwoPortAt(c *cases.Circuit, p1, p2 string, fHz float64) (TwoPort, error) {
	q := *c
	q.Ports = nil
	q.Parts = nil
	drop := map[string]bool{}
	for _, name := range []string{p1, p2} {
		port, err := findPort(c, name)
		if err != nil {
			return TwoPort{}, err
		}
		pp := *port
		if pp.Source != "" {
			drop[pp.Source] = true
			pp.Source = ""
		}
		q.Ports = append(q.Ports, &pp)
	}
	for _, p := range c.Parts {
		if !drop[p.Name] {
			q.Parts = append(q.Parts, p)
		}
	}
	names := [2]string{p1, p2}
	tp := TwoPort{Kind: ZParams}
	s := complex(0, 2*math.Pi*fHz)
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			p, err := Setup(&q, &cases.Transfer{From: names[j], To: names[i], Kind: cases.Transimpedance})
			if err != nil {
				return TwoPort{}, err
			}
			sw, err := NewSweeper(p)
			if err != nil {
				return TwoPort{}, fmt.Errorf("ac: two-port %s, %s: no z parameters (%v)", p1, p2, err)
			}
			z := sw.At(s)
			if cmplx.IsInf(z) || cmplx.IsNaN(z) {
				return TwoPort{}, fmt.Errorf("ac: two-port %s, %s: no z parameters at %g Hz", p1, p2, fHz)
			}
			tp.M[i][j] = z
		}
	}
	return tp, nil
}

// unityAbove finds the first frequency above refHz (Hz) where |H| falls
// through 1, on the scan grid of Bandwidth (see grid) refined by crossing.
func unityAbove(r *Rational, refHz float64) (float64, bool) {
	if r.K0 == 0 || math.IsInf(refHz, 0) {
		return 0, false
	}
	w := r.grid() // nil when every root is at the origin: |H| is a power of ω
	wref := 2 * math.Pi * refHz
	i := 0
	for i < len(w) && w[i] < wref {
		i++
	}
	for ; i+1 < len(w); i++ {
		if r.logMag(w[i+1]) < 0 && r.logMag(w[i]) >= 0 {
			return r.crossing(w[i], w[i+1], 0) / (2 * math.Pi), true
		}
	}
	return 0, false
}
