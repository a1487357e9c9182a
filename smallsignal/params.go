// Package smallsignal replaces every nonlinear device of a biased circuit by
// its incremental (small-signal) model at the operating point: the exact
// Jacobian of its terminal currents, drawn as the trade's hybrid-π and
// square-law equivalents, plus its capacitances. The result is a linear
// circuit of resistors, capacitors and voltage-controlled current sources
// that package ac analyses and that Export writes back as a case file.
//
// The incremental model is valid only for signals small enough that the
// device stays near its tangent line; Validity says how small that is.
package smallsignal

import (
	"math"

	"tangent/devices"
)

// OpenConductance is the conductance below which a resistance is reported
// as open (null in JSON, left out of the equivalent): 1e-18 S, a teraohm
// times a million, below any leakage a bench could see (DESIGN.md).
const OpenConductance = 1e-18

// BJTParams are the hybrid-π elements of a bjt at its bias point
// (DESIGN.md): with Ib(Vbe, Vbc) and Ic(Vbe, Vbc) the intrinsic terminal
// currents,
//
//	1/rπ = ∂Ib/∂Vbe,   1/rμ = ∂Ib/∂Vbc,
//	1/ro = −∂Ic/∂Vbc − 1/rμ,   gm = ∂Ic/∂Vbe − 1/ro,
//
// so rπ (B–E), rμ (B–C), ro (C–E) and a current gm·vbe from collector to
// emitter reproduce the full Jacobian. Conductances are in S, capacitances
// in F, f_T in Hz.
type BJTParams struct {
	Gm            float64
	GPi, GMu, GO  float64 // 1/r_pi, 1/r_mu, 1/r_o
	CPi, CMu      float64
	BetaAC        float64 // gm·rπ
	FT            float64 // gm/(2π(Cπ + Cμ)); +Inf when both are zero
	Ic, Ib        float64 // bias currents into collector and base, A
	Vbe, Vbc, Vce float64 // bias, V
}

// HybridPi evaluates a bjt at the intrinsic junction voltages vbe, vbc.
func HybridPi(q *devices.BJT, vbe, vbc float64) BJTParams {
	s := q.Eval(vbe, vbc)
	p := BJTParams{Ic: s.Ic, Ib: s.Ib, Vbe: vbe, Vbc: vbc, Vce: vbe - vbc}
	p.GPi = s.DIbDVbe
	p.GMu = s.DIbDVbc
	p.GO = -s.DIcDVbc - p.GMu
	p.Gm = s.DIcDVbe - p.GO
	p.CPi, p.CMu = q.Capacitances(vbe, vbc, s)
	p.BetaAC = p.Gm / p.GPi
	p.FT = transitFrequency(p.Gm, p.CPi+p.CMu)
	return p
}

// MOSParams are the square-law small-signal elements of a mosfet:
// gm = ∂Id/∂Vgs, gds = ∂Id/∂Vds, gmb = ∂Id/∂Vbs with the other terminal
// voltages held, and the Meyer gate capacitances.
type MOSParams struct {
	Gm, Gds, Gmb  float64
	Cgs, Cgd, Cgb float64
	FT            float64 // gm/(2π(Cgs + Cgd + Cgb)); +Inf when all are zero
	Id            float64
	Vgs, Vds, Vbs float64
	Region        string
	Reversed      bool
}

// SquareLaw evaluates a mosfet at its terminal voltages.
func SquareLaw(m *devices.MOSFET, vgs, vds, vbs float64) MOSParams {
	s := m.Eval(vgs, vds, vbs)
	p := MOSParams{Gm: s.Gm, Gds: s.Gds, Gmb: s.Gmb, Id: s.Id, Vgs: vgs, Vds: vds, Vbs: vbs, Region: s.Region, Reversed: s.Reversed}
	p.Cgs, p.Cgd, p.Cgb = m.Capacitances(vgs, vds, vbs)
	p.FT = transitFrequency(p.Gm, p.Cgs+p.Cgd+p.Cgb)
	return p
}

// DiodeParams are a diode's small-signal elements: gd = dI/dV, the
// depletion capacitance c_j and the diffusion capacitance c_d = τ·gd.
type DiodeParams struct {
	Gd, CJ, CD float64
	Id, Vd     float64
}

// Junction evaluates a diode at its intrinsic junction voltage v.
func Junction(d *devices.Diode, v float64) DiodeParams {
	i, g := d.Current(v)
	cj, cd := d.Capacitance(v, g)
	return DiodeParams{Gd: g, CJ: cj, CD: cd, Id: i, Vd: v}
}

func transitFrequency(gm, c float64) float64 {
	if c == 0 {
		return math.Inf(1)
	}
	return math.Abs(gm) / (2 * math.Pi * c)
}

// Resistance returns 1/g, or +Inf for a conductance below OpenConductance
// in magnitude (an open).
func Resistance(g float64) float64 {
	if math.Abs(g) < OpenConductance {
		return math.Inf(1)
	}
	return 1 / g
}
