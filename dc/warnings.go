package dc

import (
	"fmt"
	"math"

	"tangent/cases"
	"tangent/devices"
)

// Extra-low voltage limits of IEC 61140 (protection against electric
// shock): 50 V AC (r.m.s.) and 120 V ripple-free DC.
const (
	ELVLimitAC = 50.0  // V
	ELVLimitDC = 120.0 // V
)

// Warning kinds.
const (
	WarnSaturationInPath = "saturation_in_signal_path" // bjt saturated in a signal path
	WarnTriodeInPath     = "triode_in_signal_path"     // mosfet in triode in a signal path
	WarnCutoffInPath     = "cutoff_in_signal_path"     // mosfet cut off in a signal path
	WarnOverMaxPower     = "over_max_power"            // device dissipates more than its model's max_power
	WarnAboveELV         = "above_extra_low_voltage"   // a supply or the circuit exceeds the ELV limits
)

// Warning is something about an operating point an engineer should look
// at. Part names the part concerned ("" for the circuit as a whole).
type Warning struct {
	Kind    string
	Part    string
	Message string
}

// elvCaution ends every extra-low-voltage warning.
const elvCaution = "These results come from models: follow local codes and licensed practice before building, powering or touching such a circuit."

// Warnings returns the warnings of the operating point, in this order:
// devices in a wrong region in a signal path (see SignalPath; the pairs
// of ports are those of the file's transfers, or every pair of ports when
// there are none), devices above their model's max_power, and voltages
// above the extra-low-voltage limits of IEC 61140.
func (op *OperatingPoint) Warnings() []Warning {
	var ws []Warning
	ws = append(ws, op.pathWarnings()...)
	for _, p := range op.Parts {
		if p.Device == nil || math.IsInf(p.Device.MaxPower, 1) || p.Device.MaxPower <= 0 {
			continue
		}
		if p.Power > p.Device.MaxPower {
			ws = append(ws, Warning{WarnOverMaxPower, p.Name, fmt.Sprintf(
				"%s dissipates %.3g W, above its model's max_power of %.3g W", p.Name, p.Power, p.Device.MaxPower)})
		}
	}
	return append(ws, op.elvWarnings()...)
}

func (op *OperatingPoint) pathWarnings() []Warning {
	c := op.Circuit
	ports := map[string]*cases.Port{}
	for _, p := range c.Ports {
		ports[p.Name] = p
	}
	type pair struct{ from, to *cases.Port }
	var pairs []pair
	for _, t := range c.Transfers {
		f, g := ports[t.From], ports[t.To]
		if f != nil && g != nil && f != g {
			pairs = append(pairs, pair{f, g})
		}
	}
	if len(c.Transfers) == 0 {
		for i, f := range c.Ports {
			for _, g := range c.Ports[i+1:] {
				pairs = append(pairs, pair{f, g})
			}
		}
	}
	warned := map[string]bool{}
	var ws []Warning
	for _, pr := range pairs {
		for _, name := range SignalPath(c, pr.from, pr.to) {
			p := op.Part(name)
			if p == nil || p.Device == nil || warned[name] {
				continue
			}
			where := fmt.Sprintf("in the signal path from port %s to port %s", pr.from.Name, pr.to.Name)
			switch {
			case p.Kind == cases.BJT && p.Device.Region == devices.RegionSaturation:
				ws = append(ws, Warning{WarnSaturationInPath, name, fmt.Sprintf(
					"%s is saturated %s: its small-signal gain there is far below the forward-active one", name, where)})
			case p.Kind == cases.MOSFET && p.Device.Region == devices.RegionTriode:
				ws = append(ws, Warning{WarnTriodeInPath, name, fmt.Sprintf(
					"%s is in triode %s: it acts as a resistor, not as an amplifier", name, where)})
			case p.Kind == cases.MOSFET && p.Device.Region == devices.RegionCutoff:
				ws = append(ws, Warning{WarnCutoffInPath, name, fmt.Sprintf(
					"%s is cut off %s: no signal passes through its channel", name, where)})
			default:
				continue
			}
			warned[name] = true
		}
	}
	return ws
}

func (op *OperatingPoint) elvWarnings() []Warning {
	var ws []Warning
	for _, p := range op.Circuit.Parts {
		if p.Kind != cases.VoltageSource {
			continue
		}
		if v := math.Abs(p.DC); v > ELVLimitDC {
			ws = append(ws, Warning{WarnAboveELV, p.Name, fmt.Sprintf(
				"%s supplies %.4g V DC, above the %g V ripple-free DC limit of extra-low voltage (IEC 61140). %s",
				p.Name, v, ELVLimitDC, elvCaution)})
		}
		// The AC value is taken as r.m.s.: if it is meant as a peak
		// value the check errs on the safe side.
		if p.AC > ELVLimitAC {
			ws = append(ws, Warning{WarnAboveELV, p.Name, fmt.Sprintf(
				"%s has an AC value of %.4g V, above the %g V AC limit of extra-low voltage (IEC 61140). %s",
				p.Name, p.AC, ELVLimitAC, elvCaution)})
		}
	}
	if len(ws) > 0 {
		return ws
	}
	// No supply above the limit; the circuit may still make one (current
	// sources, controlled sources, supplies of both signs).
	hi, lo := 0.0, 0.0
	var hiNode, loNode string = cases.Ground, cases.Ground
	for _, n := range op.Nodes {
		if n.Voltage > hi {
			hi, hiNode = n.Voltage, n.Name
		}
		if n.Voltage < lo {
			lo, loNode = n.Voltage, n.Name
		}
	}
	if hi-lo > ELVLimitDC {
		ws = append(ws, Warning{WarnAboveELV, "", fmt.Sprintf(
			"%.4g V lies between nodes %s and %s, above the %g V ripple-free DC limit of extra-low voltage (IEC 61140). %s",
			hi-lo, hiNode, loNode, ELVLimitDC, elvCaution)})
	}
	return ws
}
