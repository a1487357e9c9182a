package devices

import "math"

// fallbackSaturationCurrent stands in for a saturation current that is
// missing or not positive (package cases rejects such a model; the fallback
// only keeps the arithmetic finite): 1e-14 A, a small silicon junction
// (common practice).
const fallbackSaturationCurrent = 1e-14

// Diode is a pn-junction diode scaled to one temperature and area, ready to
// evaluate. The junction current from anode to cathode at junction voltage
// V = V(anode) − V(cathode) is (DESIGN.md, Shockley's law)
//
//	I(V) = Is·(e(V/(n·VT)) − 1) − IBV·e(−(V + BV)/(n·VT))
//
// where e is exp bounded for large arguments (see boundedExp) and the second
// term, the reverse breakdown, is present only when BV is finite (it leaves
// I(0) = −IBV·exp(−BV/(n·VT)), negligible for BV ≫ n·VT). The series
// resistance is not part of Current: the circuit puts it in as a resistor
// to an internal node.
//
// Build a Diode with NewDiode; the zero value is not usable.
type Diode struct {
	// exported, scaled values (SI)
	SaturationCurrent   float64 // area·Is(T)
	EmissionCoefficient float64
	SeriesResistance    float64 // divided by area
	BreakdownVoltage    float64 // +Inf when none
	BreakdownCurrent    float64
	JunctionCapacitance float64 // area·Cj0
	JunctionPotential   float64
	GradingCoefficient  float64
	TransitTime         float64
	MaxPower            float64 // +Inf when none
	VT                  float64 // thermal voltage at T

	// CriticalVoltage is the forward voltage above which LimitStep limits
	// Newton steps, n·VT·ln(n·VT/(√2·Is)) (see criticalVoltage); a natural
	// first guess for a forward-biased junction.
	CriticalVoltage float64

	breakdownCritical float64 // criticalVoltage of the breakdown term, in −(V + BV)
}

// NewDiode builds a diode from a case file's model keys (missing keys take
// the table default of Params("diode")), an area factor and the circuit
// temperature in kelvin. The saturation current is scaled to the temperature
// and multiplied by the area, the junction capacitance is multiplied and the
// series resistance divided by the area.
//
// Values package cases rejects never reach here, but none of them panics: a
// missing or non-positive saturation current reads as 1e-14 A, a
// non-positive area as 1, a non-positive temperature as the nominal one, a
// non-positive breakdown voltage as none, and other non-positive values
// that would be singular as their table defaults.
func NewDiode(params map[string]float64, area, temperature float64) Diode {
	get := func(key string) float64 { return lookup(KindDiode, params, key) }
	def := func(key string) float64 { return lookup(KindDiode, nil, key) }
	area = positiveOr(area, 1)
	t, t0 := modelTemperatures(KindDiode, params, temperature)
	n := positiveOr(get("emission_coefficient"), def("emission_coefficient"))
	is := positiveOr(get("saturation_current"), fallbackSaturationCurrent)
	eg := positiveOr(get("bandgap_energy"), def("bandgap_energy"))
	eta := get("saturation_current_temperature_exponent")
	d := Diode{
		SaturationCurrent:   area * scaleSaturationCurrent(is, n, eta, eg, t, t0),
		EmissionCoefficient: n,
		SeriesResistance:    math.Max(get("series_resistance"), 0) / area,
		BreakdownVoltage:    positiveOrInf(get("breakdown_voltage")),
		BreakdownCurrent:    positiveOr(get("breakdown_current"), def("breakdown_current")),
		JunctionCapacitance: area * math.Max(get("junction_capacitance"), 0),
		JunctionPotential:   positiveOr(get("junction_potential"), def("junction_potential")),
		GradingCoefficient:  get("grading_coefficient"),
		TransitTime:         math.Max(get("transit_time"), 0),
		MaxPower:            positiveOrInf(get("max_power")),
		VT:                  ThermalVoltage(t),
	}
	nvt := n * d.VT
	d.CriticalVoltage = criticalVoltage(nvt, d.SaturationCurrent)
	d.breakdownCritical = criticalVoltage(nvt, d.BreakdownCurrent)
	return d
}

// Current returns the junction current I(V) (anode to cathode through the
// junction) and its exact derivative dI/dV, in amperes and siemens.
func (d *Diode) Current(v float64) (i, g float64) {
	nvt := d.EmissionCoefficient * d.VT
	e, de := boundedExp(v / nvt)
	i = d.SaturationCurrent * (e - 1)
	g = d.SaturationCurrent * de / nvt
	if !math.IsInf(d.BreakdownVoltage, 1) {
		eb, deb := boundedExp(-(v + d.BreakdownVoltage) / nvt)
		i -= d.BreakdownCurrent * eb
		g += d.BreakdownCurrent * deb / nvt
	}
	return i, g
}

// Capacitance returns the depletion capacitance Cj(V) (see
// depletionCapacitance) and the diffusion capacitance transit_time·g at
// junction voltage v, where g = dI/dV is the conductance from Current at
// the same v. Both are in farads.
func (d *Diode) Capacitance(v, g float64) (cj, cd float64) {
	cj = depletionCapacitance(v, d.JunctionCapacitance, d.JunctionPotential, d.GradingCoefficient)
	return cj, d.TransitTime * g
}

// Region classifies the bias at junction voltage v:
//
//   - forward when v > 0;
//   - breakdown when the breakdown term carries more current than the
//     junction's saturation current, IBV·exp(−(V + BV)/(n·VT)) > Is, i.e.
//     V < −BV + n·VT·ln(IBV/Is) (some 0.6–0.8 V above −BV for small
//     junctions): from there on the reverse current is set by breakdown, not
//     by leakage, which is what "a zener conducting" means to an engineer;
//   - reverse otherwise.
func (d *Diode) Region(v float64) string {
	if v > 0 {
		return RegionForward
	}
	if !math.IsInf(d.BreakdownVoltage, 1) {
		nvt := d.EmissionCoefficient * d.VT
		if v < -d.BreakdownVoltage+nvt*math.Log(d.BreakdownCurrent/d.SaturationCurrent) {
			return RegionBreakdown
		}
	}
	return RegionReverse
}

// LimitStep limits a Newton update of the junction voltage from vold to
// vnew so the exponential does not overflow or jump (see
// limitJunctionStep): in the forward direction above CriticalVoltage, and,
// when there is a breakdown voltage, in the reverse direction past −BV, where
// the breakdown term is the same kind of exponential in −(V + BV) with IBV in
// place of Is. It returns the voltage to use and whether it changed the step.
func (d *Diode) LimitStep(vnew, vold float64) (float64, bool) {
	nvt := d.EmissionCoefficient * d.VT
	if v, changed := limitJunctionStep(vnew, vold, nvt, d.CriticalVoltage); changed {
		return v, true
	}
	if math.IsInf(d.BreakdownVoltage, 1) {
		return vnew, false
	}
	bv := d.BreakdownVoltage
	u, changed := limitJunctionStep(-(vnew + bv), -(vold + bv), nvt, d.breakdownCritical)
	if !changed {
		return vnew, false
	}
	return -u - bv, true
}
