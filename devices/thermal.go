package devices

import "math"

// Exact SI values (SI Brochure, 9th edition, 2019).
const (
	Boltzmann        = 1.380649e-23    // J/K
	ElementaryCharge = 1.602176634e-19 // C
)

// ThermalVoltage returns VT = k·T/q in volts at temperature t in kelvin.
func ThermalVoltage(t float64) float64 { return Boltzmann * t / ElementaryCharge }

// scaleSaturationCurrent returns a junction's saturation current at
// temperature t, given its value is at the nominal temperature t0 (DESIGN.md,
// "Models and their equations"):
//
//	Is(T) = Is·(T/T0)^(η/n)·exp((Eg/(n·VT(T)))·(T/T0 − 1))
//
// with n the emission coefficient, η the saturation-current temperature
// exponent and Eg the bandgap energy in eV, so that Eg/VT is a pure number
// when VT is in volts.
func scaleSaturationCurrent(is, n, eta, eg, t, t0 float64) float64 {
	r := t / t0
	return is * math.Pow(r, eta/n) * math.Exp(eg/(n*ThermalVoltage(t))*(r-1))
}

// scaleByTemperatureRatio returns x·(T/T0)^exponent: the scaling law of the
// current gains (βF, βR) and of the process transconductance k′.
func scaleByTemperatureRatio(x, t, t0, exponent float64) float64 {
	return x * math.Pow(t/t0, exponent)
}

// positiveOr returns x when it is positive and finite, else fallback. The
// constructors use it so that a value package cases would have rejected
// (zero, negative, NaN) cannot turn into Inf or NaN inside an equation.
func positiveOr(x, fallback float64) float64 {
	if x > 0 && !math.IsInf(x, 1) {
		return x
	}
	return fallback
}

// positiveOrInf is positiveOr for keys where +Inf means "none" (Early and
// breakdown voltages): a zero or negative value also reads as none.
func positiveOrInf(x float64) float64 {
	if x > 0 {
		return x
	}
	return math.Inf(1)
}

// modelTemperatures returns the nominal temperature T0 of a model and the
// circuit temperature T to scale to; a missing or non-positive circuit
// temperature reads as T0 (no scaling).
func modelTemperatures(kind string, params map[string]float64, temperature float64) (t, t0 float64) {
	t0 = positiveOr(lookup(kind, params, "nominal_temperature"), NominalTemperature)
	return positiveOr(temperature, t0), t0
}
