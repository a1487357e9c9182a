package devices

import "math"

// bodyClampFraction sets where the body-effect square root leaves √a for
// its tangent line: at a = 2φF − Vbs = bodyClampFraction·2φF, i.e. at a
// forward body bias Vbs = 0.9·2φF (0.63 V at the default 2φF = 0.7 V). A real
// device's body-source junction conducts heavily before that, so the
// continuation only keeps the threshold finite and differentiable for any
// Vbs a Newton iteration may try, where √ of a negative number would be NaN.
const bodyClampFraction = 0.1

// fallbackDimension is the channel width and length used when neither the
// part nor the model gives one (package cases rejects that): 1 µm.
const fallbackDimension = 1e-6

// MOSFET is a square-law MOSFET scaled to one temperature and geometry. In
// the device's own sense (nmos; a pmos mirrors every voltage and current,
// and its threshold, given negative for enhancement, becomes positive) with
// Vds ≥ 0, the drain current is (DESIGN.md)
//
//	Vt = Vt0 + γ·(√(2φF − Vbs) − √(2φF))
//	cutoff     Vgs ≤ Vt:         Id = 0
//	triode     Vds < Vgs − Vt:   Id = β·((Vgs − Vt)·Vds − Vds²/2)·(1 + λ·Vds)
//	saturation Vds ≥ Vgs − Vt:   Id = (β/2)·(Vgs − Vt)²·(1 + λ·Vds)
//
// with β = Beta. Id and its first derivatives are continuous across the
// region borders. When Vds < 0 source and drain swap roles: the equations
// are evaluated at Vgd, Vsd, Vbd and the current reversed. Past a forward
// body bias of 0.9·2φF the square root continues along its tangent (see
// bodyClampFraction). Gate and body currents are zero.
//
// Build a MOSFET with NewMOSFET; the zero value is not usable.
type MOSFET struct {
	Polarity                float64 // +1 nmos, −1 pmos
	ThresholdVoltage        float64 // Vt0(T), signed as in the file
	Beta                    float64 // k′(T)·W/L·multiplier, A/V²
	Width, Length           float64
	Multiplier              float64
	ChannelLengthModulation float64
	BodyEffect              float64
	SurfacePotential        float64 // 2φF
	OxideCapacitance        float64
	OverlapCapacitance      float64
	MaxPower                float64
}

// NewMOSFET builds a mosfet from model keys (device "nmos" or "pmos"; anything
// else reads as nmos), the part's width, length (0: take the model's) and
// multiplier (0: 1), and the temperature in kelvin. Vt0 is shifted by
// threshold_temperature_coefficient·(T − T0) and k′ scaled by
// (T/T0)^mobility_temperature_exponent.
//
// Invalid values do not panic: a width or length that neither the part nor
// the model gives reads as the other dimension, or 1 µm when both are
// missing; an absent threshold voltage or process transconductance reads as
// 0 (the latter gives a device that never conducts).
func NewMOSFET(device string, params map[string]float64, width, length, multiplier, temperature float64) MOSFET {
	get := func(key string) float64 { return lookup(KindNMOS, params, key) }
	def := func(key string) float64 { return lookup(KindNMOS, nil, key) }
	polarity := 1.0
	if device == KindPMOS {
		polarity = -1
	}
	t, t0 := modelTemperatures(KindNMOS, params, temperature)
	w := positiveOr(width, get("width"))
	l := positiveOr(length, get("length"))
	switch {
	case !(w > 0) && !(l > 0):
		w, l = fallbackDimension, fallbackDimension
	case !(w > 0):
		w = l
	case !(l > 0):
		l = w
	}
	mult := positiveOr(multiplier, 1)
	kp := scaleByTemperatureRatio(math.Max(get("process_transconductance"), 0), t, t0, get("mobility_temperature_exponent"))
	return MOSFET{
		Polarity:                polarity,
		ThresholdVoltage:        get("threshold_voltage") + get("threshold_temperature_coefficient")*(t-t0),
		Beta:                    kp * w / l * mult,
		Width:                   w,
		Length:                  l,
		Multiplier:              mult,
		ChannelLengthModulation: math.Max(get("channel_length_modulation"), 0),
		BodyEffect:              math.Max(get("body_effect"), 0),
		SurfacePotential:        positiveOr(get("surface_potential"), def("surface_potential")),
		OxideCapacitance:        math.Max(get("oxide_capacitance"), 0),
		OverlapCapacitance:      math.Max(get("overlap_capacitance"), 0),
		MaxPower:                positiveOrInf(get("max_power")),
	}
}

// MOSState is the mosfet evaluated at one bias: the drain current Id (into
// the drain; the source current is −Id, gate and body currents are zero) and
// its exact partial derivatives with respect to the real Vgs, Vds, Vbs.
type MOSState struct {
	Id           float64
	Gm, Gds, Gmb float64 // ∂Id/∂Vgs, ∂Id/∂Vds, ∂Id/∂Vbs
	Region       string
	Reversed     bool // source and drain swapped (Vds < 0 in the device's own sense)
}

// Eval evaluates the square law (see MOSFET) at the real terminal voltages
// in volts. For a pmos the current is negated along with the voltages, so
// the derivatives have the same sign as an nmos's. When reversed,
// Id(Vgs, Vds, Vbs) = −f(Vgs − Vds, −Vds, Vbs − Vds) with f the forward
// law, and the chain rule gives Gm = −f₁, Gds = f₁ + f₂ + f₃, Gmb = −f₃.
func (m *MOSFET) Eval(vgs, vds, vbs float64) MOSState {
	p := m.Polarity
	ugs, uds, ubs := p*vgs, p*vds, p*vbs
	if uds >= 0 {
		id, gm, gds, gmb, region := m.forward(ugs, uds, ubs)
		return MOSState{Id: p * id, Gm: gm, Gds: gds, Gmb: gmb, Region: region}
	}
	id, f1, f2, f3, region := m.forward(ugs-uds, -uds, ubs-uds)
	return MOSState{Id: -p * id, Gm: -f1, Gds: f1 + f2 + f3, Gmb: -f3, Region: region, Reversed: true}
}

// threshold returns the device-sense threshold Vt at body bias ubs and
// dVt/dubs, with the square root continued along its tangent below
// a0 = bodyClampFraction·2φF.
func (m *MOSFET) threshold(ubs float64) (vt, dvt float64) {
	vt0 := m.Polarity * m.ThresholdVoltage
	if m.BodyEffect == 0 {
		return vt0, 0
	}
	phi2 := m.SurfacePotential
	a, a0 := phi2-ubs, bodyClampFraction*phi2
	var s, ds float64
	if a >= a0 {
		s = math.Sqrt(a)
		ds = 0.5 / s
	} else {
		s0 := math.Sqrt(a0)
		ds = 0.5 / s0
		s = s0 + (a-a0)*ds
	}
	// ∂a/∂ubs = −1
	return vt0 + m.BodyEffect*(s-math.Sqrt(phi2)), -m.BodyEffect * ds
}

// forward evaluates the square law in the device's own sense for uds ≥ 0:
// the current, its partial derivatives with respect to ugs, uds, ubs, and
// the region.
func (m *MOSFET) forward(ugs, uds, ubs float64) (id, gm, gds, gmb float64, region string) {
	vt, dvt := m.threshold(ubs)
	vov := ugs - vt
	if vov <= 0 {
		return 0, 0, 0, 0, RegionCutoff
	}
	b, lambda := m.Beta, m.ChannelLengthModulation
	clm := 1 + lambda*uds
	var core float64 // Id/(1 + λ·Vds)
	if uds < vov {
		region = RegionTriode
		core = b * (vov*uds - uds*uds/2)
		gm = b * uds * clm
		gds = b*(vov-uds)*clm + core*lambda
	} else {
		region = RegionSaturation
		core = b / 2 * vov * vov
		gm = b * vov * clm
		gds = core * lambda
	}
	// ∂Vov/∂ubs = −dVt/dubs
	return core * clm, gm, gds, -gm * dvt, region
}

// Capacitances returns the gate capacitances after Meyer (DESIGN.md), overlap
// included, times the multiplier, in farads, with C = W·L·Cox and O = W·Cov:
//
//	cutoff:     cgs = O,          cgd = O,          cgb = C
//	triode:     cgs = C/2 + O,    cgd = C/2 + O,    cgb = 0
//	saturation: cgs = 2·C/3 + O,  cgd = O,          cgb = 0
//
// The region is Eval's; when source and drain are swapped so are cgs and cgd.
func (m *MOSFET) Capacitances(vgs, vds, vbs float64) (cgs, cgd, cgb float64) {
	p := m.Polarity
	ugs, uds, ubs := p*vgs, p*vds, p*vbs
	reversed := uds < 0
	if reversed {
		ugs, uds, ubs = ugs-uds, -uds, ubs-uds
	}
	vt, _ := m.threshold(ubs)
	vov := ugs - vt
	wl := m.Width * m.Length * m.OxideCapacitance * m.Multiplier
	ov := m.Width * m.OverlapCapacitance * m.Multiplier
	switch {
	case vov <= 0:
		cgs, cgd, cgb = ov, ov, wl
	case uds < vov:
		cgs, cgd = wl/2+ov, wl/2+ov
	default:
		cgs, cgd = 2*wl/3+ov, ov
	}
	if reversed {
		cgs, cgd = cgd, cgs
	}
	return cgs, cgd, cgb
}

// Step limits for MOSFET.LimitStep, in volts. The square law cannot
// overflow, so these only curb Newton's overshoot at the corners of the
// law: a gate that crosses the threshold lands at most gateCrossing beyond
// it, and a drain step is at most drainStepFloor plus twice the old |Vds|.
const (
	gateCrossing   = 0.5
	drainStepFloor = 1.0
)

// LimitStep limits Newton updates of vgs and vds (real voltages), in the
// device's own sense, with Vt the threshold at zero body bias:
//
//   - a gate that crosses the threshold in one step stops gateCrossing
//     (0.5 V) beyond it: the linearization on one side says nothing about
//     the other (zero gm in cutoff, a wrong curvature above);
//   - above threshold the gate moves at most 2·(Vgs_old − Vt) + gateCrossing,
//     so the overdrive cannot more than triple in one step;
//   - the drain moves at most drainStepFloor (1 V) + 2·|Vds_old|.
//
// It returns the voltages to use and whether either changed.
func (m *MOSFET) LimitStep(vgs, vgsOld, vds, vdsOld float64) (float64, float64, bool) {
	p := m.Polarity
	ugs, ugsOld, uds, udsOld := p*vgs, p*vgsOld, p*vds, p*vdsOld
	vt := p * m.ThresholdVoltage
	changed := false
	switch {
	case ugsOld <= vt && ugs > vt+gateCrossing:
		ugs, changed = vt+gateCrossing, true
	case ugsOld > vt && ugs < vt-gateCrossing:
		ugs, changed = vt-gateCrossing, true
	case ugsOld > vt:
		if most := 2*(ugsOld-vt) + gateCrossing; math.Abs(ugs-ugsOld) > most {
			ugs, changed = ugsOld+math.Copysign(most, ugs-ugsOld), true
		}
	}
	if most := drainStepFloor + 2*math.Abs(udsOld); math.Abs(uds-udsOld) > most {
		uds, changed = udsOld+math.Copysign(most, uds-udsOld), true
	}
	return p * ugs, p * uds, changed
}
