package devices

import "math"

// BJT is a bipolar transistor scaled to one temperature and area. In the
// device's own sense (npn; a pnp mirrors every voltage and current) with
// Vbe = V(base) − V(emitter) and Vbc = V(base) − V(collector), the currents
// into collector and base are the Ebers-Moll transport equations of
// DESIGN.md:
//
//	IT = Is·(e(Vbe/VT) − e(Vbc/VT))·(1 − Vbc/VA − Vbe/VB)
//	Ic = IT − (Is/βR)·(e(Vbc/VT) − 1)
//	Ib = (Is/βF)·(e(Vbe/VT) − 1) + (Is/βR)·(e(Vbc/VT) − 1)
//
// where e is exp bounded for large arguments (see boundedExp), VA and VB are
// the forward and reverse Early voltages (an infinite one drops its term),
// and the emitter current is −Ic − Ib. Terminal resistances are not part of
// Eval: the circuit puts them in as resistors to internal nodes.
//
// Build a BJT with NewBJT; the zero value is not usable.
type BJT struct {
	Polarity            float64 // +1 npn, −1 pnp
	SaturationCurrent   float64 // area·Is(T)
	ForwardBeta         float64 // βF(T)
	ReverseBeta         float64 // βR(T)
	ForwardEarlyVoltage float64 // +Inf when none
	ReverseEarlyVoltage float64 // +Inf when none
	BaseResistance      float64 // divided by area
	CollectorResistance float64
	EmitterResistance   float64
	BECapacitance       float64 // area·Cje0
	BCCapacitance       float64 // area·Cjc0
	BEPotential         float64
	BCPotential         float64
	BEGrading           float64
	BCGrading           float64
	ForwardTransitTime  float64
	ReverseTransitTime  float64
	MaxPower            float64
	VT                  float64

	// CriticalVoltage is the junction voltage (device sense, both
	// junctions) above which LimitStep limits Newton steps,
	// VT·ln(VT/(√2·Is)); a natural first guess for a conducting junction.
	CriticalVoltage float64
}

// NewBJT builds a bjt from model keys (device "npn" or "pnp"; anything else
// reads as npn), area and temperature in kelvin. Is is scaled with n = 1,
// both current gains with beta_temperature_exponent; the area multiplies Is
// and the junction capacitances and divides the terminal resistances.
// Invalid values do not panic; they fall back as in NewDiode.
func NewBJT(device string, params map[string]float64, area, temperature float64) BJT {
	get := func(key string) float64 { return lookup(KindNPN, params, key) }
	def := func(key string) float64 { return lookup(KindNPN, nil, key) }
	polarity := 1.0
	if device == KindPNP {
		polarity = -1
	}
	area = positiveOr(area, 1)
	t, t0 := modelTemperatures(KindNPN, params, temperature)
	is := positiveOr(get("saturation_current"), fallbackSaturationCurrent)
	eg := positiveOr(get("bandgap_energy"), def("bandgap_energy"))
	eta := get("saturation_current_temperature_exponent")
	xb := get("beta_temperature_exponent")
	q := BJT{
		Polarity:            polarity,
		SaturationCurrent:   area * scaleSaturationCurrent(is, 1, eta, eg, t, t0),
		ForwardBeta:         scaleByTemperatureRatio(positiveOr(get("forward_beta"), def("forward_beta")), t, t0, xb),
		ReverseBeta:         scaleByTemperatureRatio(positiveOr(get("reverse_beta"), def("reverse_beta")), t, t0, xb),
		ForwardEarlyVoltage: positiveOrInf(get("forward_early_voltage")),
		ReverseEarlyVoltage: positiveOrInf(get("reverse_early_voltage")),
		BaseResistance:      math.Max(get("base_resistance"), 0) / area,
		CollectorResistance: math.Max(get("collector_resistance"), 0) / area,
		EmitterResistance:   math.Max(get("emitter_resistance"), 0) / area,
		BECapacitance:       area * math.Max(get("be_capacitance"), 0),
		BCCapacitance:       area * math.Max(get("bc_capacitance"), 0),
		BEPotential:         positiveOr(get("be_potential"), def("be_potential")),
		BCPotential:         positiveOr(get("bc_potential"), def("bc_potential")),
		BEGrading:           get("be_grading"),
		BCGrading:           get("bc_grading"),
		ForwardTransitTime:  math.Max(get("forward_transit_time"), 0),
		ReverseTransitTime:  math.Max(get("reverse_transit_time"), 0),
		MaxPower:            positiveOrInf(get("max_power")),
		VT:                  ThermalVoltage(t),
	}
	q.CriticalVoltage = criticalVoltage(q.VT, q.SaturationCurrent)
	return q
}

// BJTState is the intrinsic bjt evaluated at one bias: the currents into
// collector and base (emitter current is −Ic−Ib) and their exact partial
// derivatives with respect to the real terminal voltages Vbe and Vbc.
type BJTState struct {
	Ic, Ib                             float64
	DIcDVbe, DIcDVbc, DIbDVbe, DIbDVbc float64
}

// Eval evaluates the Ebers-Moll transport equations (see BJT) at the real
// (not mirrored) junction voltages vbe and vbc, in volts. For a pnp the
// currents are negated along with the voltages, so the derivatives have the
// same sign as an npn's.
func (q *BJT) Eval(vbe, vbc float64) BJTState {
	p, vt, is := q.Polarity, q.VT, q.SaturationCurrent
	ube, ubc := p*vbe, p*vbc
	ef, def := boundedExp(ube / vt)
	er, der := boundedExp(ubc / vt)
	def /= vt // now d e(Vbe/VT)/dVbe
	der /= vt
	invVA, invVB := inverseVoltage(q.ForwardEarlyVoltage), inverseVoltage(q.ReverseEarlyVoltage)
	early := 1 - ubc*invVA - ube*invVB
	transport := is * (ef - er)
	isF, isR := is/q.ForwardBeta, is/q.ReverseBeta
	return BJTState{
		Ic:      p * (transport*early - isR*(er-1)),
		Ib:      p * (isF*(ef-1) + isR*(er-1)),
		DIcDVbe: is*def*early - transport*invVB,
		DIcDVbc: -is*der*early - transport*invVA - isR*der,
		DIbDVbe: isF * def,
		DIbDVbc: isR * der,
	}
}

// inverseVoltage returns 1/v, and 0 for an infinite (absent) voltage.
func inverseVoltage(v float64) float64 {
	if math.IsInf(v, 0) || v == 0 {
		return 0
	}
	return 1 / v
}

// Capacitances returns the capacitances across the base-emitter and
// base-collector junctions at the bias, in farads:
//
//	cbe = Cje(Vbe) + τF·gmF,  gmF = (Is/VT)·e(Vbe/VT)·max(0, 1 − Vbc/VA − Vbe/VB)
//	cbc = Cjc(Vbc) + τR·gmR,  gmR = (Is/VT)·e(Vbc/VT)·max(0, 1 − Vbc/VA − Vbe/VB)
//
// Cje and Cjc are depletion capacitances (see depletionCapacitance) in the
// device's own sense. gmF is the derivative, with respect to Vbe, of the
// forward part Is·e(Vbe/VT)·(1 − Vbc/VA − Vbe/VB) of the transport current,
// taken at a fixed Early factor; gmR likewise for the reverse part. In
// forward active gmF differs from the hybrid-π gm of DESIGN.md
// (Cπ = Cje + τF·gm) only by terms of relative size VT/VA and
// exp((Vbc − Vbe)/VT); unlike gm it stays positive in saturation and
// reverse active, where the forward diffusion charge is still there. With
// the default τR = 0, cbc is DESIGN.md's Cμ = Cjc(Vbc). The Early factor
// is floored at 0 so no capacitance turns negative at biases where the
// linear Early factor has lost its meaning.
//
// s must be the state Eval returned at the same bias; its junction
// conductances give gmF and gmR without evaluating an exponential again
// (Is·e(Vbe/VT)/VT = βF·∂Ib/∂Vbe, and likewise with βR and Vbc).
func (q *BJT) Capacitances(vbe, vbc float64, s BJTState) (cbe, cbc float64) {
	p := q.Polarity
	ube, ubc := p*vbe, p*vbc
	early := math.Max(0, 1-ubc*inverseVoltage(q.ForwardEarlyVoltage)-ube*inverseVoltage(q.ReverseEarlyVoltage))
	gmF := q.ForwardBeta * s.DIbDVbe * early
	gmR := q.ReverseBeta * s.DIbDVbc * early
	cbe = depletionCapacitance(ube, q.BECapacitance, q.BEPotential, q.BEGrading) + q.ForwardTransitTime*gmF
	cbc = depletionCapacitance(ubc, q.BCCapacitance, q.BCPotential, q.BCGrading) + q.ReverseTransitTime*gmR
	return cbe, cbc
}

// saturationShare is the share of the base current that the collector
// junction must carry for Region to call the transistor saturated: at 1 %
// the ratio Ic/Ib has fallen about 1 % below βF (forced β < βF), the
// engineer's sign of saturation. With βF = 100 and βR = 1 this is
// Vce below VT·ln(100·βF/βR) ≈ 0.24 V.
const saturationShare = 0.01

// Region classifies the bias from the junctions' own currents rather than
// from fixed voltages. In the device's own sense, with
// bF = (e(Vbe/VT) − 1)/βF and bR = (e(Vbc/VT) − 1)/βR the base currents of
// the two junctions in units of Is:
//
//   - cutoff when neither junction is forward biased beyond VT·ln 2 (where
//     its diffusion current equals its saturation current): the transistor
//     carries only leakage-size currents;
//   - forward_active when bR < 1 %·bF: the collector junction takes under 1 %
//     of the base current, so Ic/Ib stays within about 1 % of βF (times the
//     Early factor);
//   - reverse_active when bF < 1 %·bR, the same with the roles swapped;
//   - saturation otherwise: both junctions inject and the current gain has
//     collapsed below its active value.
func (q *BJT) Region(vbe, vbc float64) string {
	p, vt := q.Polarity, q.VT
	ube, ubc := p*vbe, p*vbc
	on := vt * math.Ln2
	if ube <= on && ubc <= on {
		return RegionCutoff
	}
	ef, _ := boundedExp(ube / vt)
	er, _ := boundedExp(ubc / vt)
	bF := (ef - 1) / q.ForwardBeta
	bR := (er - 1) / q.ReverseBeta
	switch {
	case bR < saturationShare*bF:
		return RegionForwardActive
	case bF < saturationShare*bR:
		return RegionReverseActive
	}
	return RegionSaturation
}

// LimitStep limits Newton updates of vbe and vbc (real voltages) like
// Diode.LimitStep, each junction on its own in the device's own sense with
// CriticalVoltage. It returns the voltages to use and whether either changed.
func (q *BJT) LimitStep(vbe, vbeOld, vbc, vbcOld float64) (float64, float64, bool) {
	p := q.Polarity
	ube, c1 := limitJunctionStep(p*vbe, p*vbeOld, q.VT, q.CriticalVoltage)
	ubc, c2 := limitJunctionStep(p*vbc, p*vbcOld, q.VT, q.CriticalVoltage)
	return p * ube, p * ubc, c1 || c2
}
