package devices

import "math"

// Unit names used in the parameter tables. They are the canonical units a
// case file may write after a value (package cases checks them).
const (
	UnitNone           = "" // dimensionless
	UnitAmpere         = "A"
	UnitVolt           = "V"
	UnitOhm            = "Ω"
	UnitFarad          = "F"
	UnitSecond         = "s"
	UnitKelvin         = "K" // also written in °C
	UnitElectronVolt   = "eV"
	UnitWatt           = "W"
	UnitMetre          = "m"
	UnitVoltPerKelvin  = "V/K"
	UnitAmperePerVolt2 = "A/V²"  // process transconductance k′
	UnitPerVolt        = "1/V"   // channel-length modulation λ
	UnitSqrtVolt       = "V^0.5" // body-effect coefficient γ
	UnitFaradPerMetre2 = "F/m²"  // oxide capacitance per area
	UnitFaradPerMetre  = "F/m"   // overlap capacitance per width
)

// Param describes one model key of a case file: its name, unit, default,
// and which values are allowed.
type Param struct {
	Key      string
	Unit     string
	Default  float64
	AllowInf bool // "inf" accepted (Early and breakdown voltages)
	Signed   bool // negative values meaningful (threshold voltage, temperature exponents)
	Positive bool // zero is singular and rejected
	Required bool // no default: the model must give it (nothing is guessed)
}

// Device kinds as written in a model's device key.
const (
	KindDiode = "diode"
	KindNPN   = "npn"
	KindPNP   = "pnp"
	KindNMOS  = "nmos"
	KindPMOS  = "pmos"
)

// NominalTemperature is the default temperature at which model parameters
// are given: 27 °C.
const NominalTemperature = 300.15

var inf = math.Inf(1)

// common keys of every model
var commonParams = []Param{
	{Key: "nominal_temperature", Unit: UnitKelvin, Default: NominalTemperature, Positive: true},
	{Key: "max_power", Unit: UnitWatt, Default: inf, AllowInf: true, Positive: true},
}

var junctionTemperatureParams = []Param{
	{Key: "bandgap_energy", Unit: UnitElectronVolt, Default: 1.11, Positive: true},
	{Key: "saturation_current_temperature_exponent", Unit: UnitNone, Default: 3, Signed: true},
}

var diodeParams = concat(commonParams, junctionTemperatureParams, []Param{
	{Key: "saturation_current", Unit: UnitAmpere, Positive: true, Required: true},
	{Key: "emission_coefficient", Unit: UnitNone, Default: 1, Positive: true},
	{Key: "series_resistance", Unit: UnitOhm, Default: 0},
	{Key: "breakdown_voltage", Unit: UnitVolt, Default: inf, AllowInf: true, Positive: true},
	{Key: "breakdown_current", Unit: UnitAmpere, Default: 1e-3, Positive: true},
	{Key: "junction_capacitance", Unit: UnitFarad, Default: 0},
	{Key: "junction_potential", Unit: UnitVolt, Default: 0.75, Positive: true},
	{Key: "grading_coefficient", Unit: UnitNone, Default: 0.5},
	{Key: "transit_time", Unit: UnitSecond, Default: 0},
})

var bjtParams = concat(commonParams, junctionTemperatureParams, []Param{
	{Key: "saturation_current", Unit: UnitAmpere, Positive: true, Required: true},
	{Key: "forward_beta", Unit: UnitNone, Default: 100, Positive: true},
	{Key: "reverse_beta", Unit: UnitNone, Default: 1, Positive: true},
	{Key: "forward_early_voltage", Unit: UnitVolt, Default: inf, AllowInf: true, Positive: true},
	{Key: "reverse_early_voltage", Unit: UnitVolt, Default: inf, AllowInf: true, Positive: true},
	{Key: "base_resistance", Unit: UnitOhm, Default: 0},
	{Key: "collector_resistance", Unit: UnitOhm, Default: 0},
	{Key: "emitter_resistance", Unit: UnitOhm, Default: 0},
	{Key: "be_capacitance", Unit: UnitFarad, Default: 0},
	{Key: "bc_capacitance", Unit: UnitFarad, Default: 0},
	{Key: "be_potential", Unit: UnitVolt, Default: 0.75, Positive: true},
	{Key: "bc_potential", Unit: UnitVolt, Default: 0.75, Positive: true},
	{Key: "be_grading", Unit: UnitNone, Default: 0.33},
	{Key: "bc_grading", Unit: UnitNone, Default: 0.33},
	{Key: "forward_transit_time", Unit: UnitSecond, Default: 0},
	{Key: "reverse_transit_time", Unit: UnitSecond, Default: 0},
	{Key: "beta_temperature_exponent", Unit: UnitNone, Default: 0, Signed: true},
})

var mosParams = concat(commonParams, []Param{
	{Key: "threshold_voltage", Unit: UnitVolt, Signed: true, Required: true},
	{Key: "process_transconductance", Unit: UnitAmperePerVolt2, Positive: true, Required: true},
	// width and length may be given on the model or on the part; one of
	// them must give each (checked by package cases).
	{Key: "width", Unit: UnitMetre, Positive: true},
	{Key: "length", Unit: UnitMetre, Positive: true},
	{Key: "channel_length_modulation", Unit: UnitPerVolt, Default: 0},
	{Key: "body_effect", Unit: UnitSqrtVolt, Default: 0},
	{Key: "surface_potential", Unit: UnitVolt, Default: 0.7, Positive: true},
	{Key: "oxide_capacitance", Unit: UnitFaradPerMetre2, Default: 0},
	{Key: "overlap_capacitance", Unit: UnitFaradPerMetre, Default: 0},
	{Key: "threshold_temperature_coefficient", Unit: UnitVoltPerKelvin, Default: 0, Signed: true},
	{Key: "mobility_temperature_exponent", Unit: UnitNone, Default: -1.5, Signed: true},
})

// Params returns the model keys accepted for a device kind, or nil for an
// unknown kind. The slice must not be modified.
func Params(kind string) []Param {
	switch kind {
	case KindDiode:
		return diodeParams
	case KindNPN, KindPNP:
		return bjtParams
	case KindNMOS, KindPMOS:
		return mosParams
	}
	return nil
}

// defaults holds each table's defaults by key, built once from the tables
// above and never modified: lookup costs one map access instead of a scan
// of the table per key.
var (
	diodeDefaults = defaultsOf(diodeParams)
	bjtDefaults   = defaultsOf(bjtParams)
	mosDefaults   = defaultsOf(mosParams)
)

func defaultsOf(table []Param) map[string]float64 {
	m := make(map[string]float64, len(table))
	for _, p := range table {
		m[p.Key] = p.Default
	}
	return m
}

// lookup returns params[key] or the table default for that key.
func lookup(kind string, params map[string]float64, key string) float64 {
	if v, ok := params[key]; ok {
		return v
	}
	var defs map[string]float64
	switch kind {
	case KindDiode:
		defs = diodeDefaults
	case KindNPN, KindPNP:
		defs = bjtDefaults
	case KindNMOS, KindPMOS:
		defs = mosDefaults
	}
	if v, ok := defs[key]; ok {
		return v
	}
	panic("devices: unknown parameter " + key)
}

func concat(lists ...[]Param) []Param {
	var out []Param
	for _, l := range lists {
		out = append(out, l...)
	}
	return out
}
