package smallsignal

import (
	"math"

	"tangent/devices"
)

// ValidityDeparture is the relative departure from the tangent line at
// which Validity says the small-signal model stops describing the device:
// 10 % of the incremental current.
const ValidityDeparture = 0.10

// Validity returns how small "small" is for a device current i(v0 + δ)
// driven by an input-side swing δ: the swings δ− < 0 < δ+ (in V) nearest
// the bias at which the large-signal current departs from its tangent line
// by ValidityDeparture of the incremental current,
//
//	|i(v0 + δ) − i(v0) − g·δ| = 0.1·|g·δ|,   g = di/dv at v0.
//
// f(δ) must return i(v0 + δ). A side on which the departure never reaches
// 10 % within 100 V is +Inf (or −Inf); with g = 0 (a device in cutoff)
// both are NaN: there is no tangent to stay near. For an ideal exponential
// junction the answer is about +0.19·n·VT and −0.21·n·VT; for a square-law
// mosfet in saturation ±0.2·(Vgs − Vt) (both follow from the laws alone).
func Validity(f func(dv float64) float64, g float64) (minus, plus float64) {
	if g == 0 || math.IsNaN(g) {
		return math.NaN(), math.NaN()
	}
	i0 := f(0)
	departs := func(d float64) bool {
		return math.Abs(f(d)-i0-g*d) >= ValidityDeparture*math.Abs(g*d)
	}
	return -edge(departs, -1), edge(departs, 1)
}

// edge finds the smallest |δ| in direction dir at which departs turns
// true: geometric steps from 1 µV to 100 V, then bisection to 1e-12
// relative.
func edge(departs func(float64) bool, dir float64) float64 {
	const first, last, grow = 1e-6, 100.0, 1.25
	lo := 0.0
	hi := first
	for !departs(dir * hi) {
		lo = hi
		hi *= grow
		if hi > last {
			return math.Inf(1)
		}
	}
	for hi-lo > 1e-12*hi {
		mid := (lo + hi) / 2
		if departs(dir * mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return hi
}

// BJTValidity is Validity for the collector current of a bjt driven at
// the base–emitter junction with the collector–emitter voltage held.
func BJTValidity(q *devices.BJT, vbe, vbc float64) (minus, plus float64) {
	s := q.Eval(vbe, vbc)
	return Validity(func(d float64) float64 { return q.Eval(vbe+d, vbc+d).Ic }, s.DIcDVbe+s.DIcDVbc)
}

// MOSValidity is Validity for the drain current of a mosfet driven at the
// gate with drain and body voltages held.
func MOSValidity(m *devices.MOSFET, vgs, vds, vbs float64) (minus, plus float64) {
	s := m.Eval(vgs, vds, vbs)
	return Validity(func(d float64) float64 { return m.Eval(vgs+d, vds, vbs).Id }, s.Gm)
}

// DiodeValidity is Validity for a diode's junction current.
func DiodeValidity(d *devices.Diode, v float64) (minus, plus float64) {
	_, g := d.Current(v)
	return Validity(func(dv float64) float64 { i, _ := d.Current(v + dv); return i }, g)
}
