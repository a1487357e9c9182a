package cases

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"tangent/devices"
)

// A switch turns one physical effect off in every model that has it, or in
// the models listed, so that a variant need not repeat model keys. It is
// written at the top of a [variants.NAME] table, or given to WithOverrides
// (and so to the command line's --set) as a one-element path:
//
//	early_effect = false                                   # every npn and pnp model
//	capacitances = { value = false, models = ["bw_npn"] }  # only these models
//	body_effect = true                                     # no change: the models' own values
//
// Each switch stands for overrides of model keys; false sets them to the
// value at which the effect vanishes, as if the file said so.
type modelSwitch struct {
	name   string
	effect string // in words, for messages
	// keys per device kind, and the value that turns the effect off
	keys  map[string][]string
	value float64
}

var (
	bjtKinds = []string{DeviceNPN, DevicePNP}
	mosKinds = []string{DeviceNMOS, DevicePMOS}
)

// modelSwitches are the switches, in the order messages list them.
var modelSwitches = []modelSwitch{
	// Ebers-Moll with VA = VB = ∞: IT loses its (1 − Vbc/VA − Vbe/VB)
	// factor (DESIGN.md).
	{"early_effect", "an Early effect", perKinds(bjtKinds, "forward_early_voltage", "reverse_early_voltage"), math.Inf(1)},
	{"terminal_resistances", "terminal resistances", merge(
		perKinds([]string{DeviceDiode}, "series_resistance"),
		perKinds(bjtKinds, "base_resistance", "collector_resistance", "emitter_resistance")), 0},
	{"channel_length_modulation", "channel-length modulation", perKinds(mosKinds, "channel_length_modulation"), 0},
	{"body_effect", "a body effect", perKinds(mosKinds, "body_effect"), 0},
	// Every key that sets a charge: depletion capacitances, transit times
	// (diffusion capacitance τ·g) and the gate capacitances of Meyer's
	// model (from Cox and the overlap capacitance).
	{"capacitances", "capacitances", merge(
		perKinds([]string{DeviceDiode}, "junction_capacitance", "transit_time"),
		perKinds(bjtKinds, "be_capacitance", "bc_capacitance", "forward_transit_time", "reverse_transit_time"),
		perKinds(mosKinds, "oxide_capacitance", "overlap_capacitance")), 0},
}

func perKinds(kinds []string, keys ...string) map[string][]string {
	m := map[string][]string{}
	for _, k := range kinds {
		m[k] = keys
	}
	return m
}

func merge(ms ...map[string][]string) map[string][]string {
	out := map[string][]string{}
	for _, m := range ms {
		for k, v := range m {
			out[k] = v
		}
	}
	return out
}

// switchNames lists the switch names.
func switchNames() []string {
	s := make([]string, len(modelSwitches))
	for i, sw := range modelSwitches {
		s[i] = sw.name
	}
	return s
}

// findSwitch returns the switch named name.
func findSwitch(name string) (modelSwitch, bool) {
	for _, sw := range modelSwitches {
		if sw.name == name {
			return sw, true
		}
	}
	return modelSwitch{}, false
}

// isSwitch reports whether an override path names a switch.
func isSwitch(p []string) bool {
	if len(p) != 1 {
		return false
	}
	_, ok := findSwitch(p[0])
	return ok
}

// switchForms says how a switch is written, for messages.
const switchForms = `expected false (the effect off in every model that has it), true (no change) or { value = false, models = ["NAME", ...] }`

// problem is something wrong with an override or a switch: rel is its key
// path (relative to the variant table), line the override's line.
type problem struct {
	rel     path
	line    int
	msg     string
	warning bool
}

// expandSwitches replaces every switch among overrides by the overrides of
// model keys it stands for (each on the switch's line) and checks the
// switches against the case's models in tree. An explicit override of a key
// that a switch in the same list also sets is a conflict. Unknown keys of
// other overrides are not its business (see overridePathError).
func expandSwitches(tree map[string]any, overrides []Override) ([]Override, []problem) {
	var out []Override
	var probs []problem
	setBy := map[string]string{} // path.key() → switch text that sets it
	for _, o := range overrides {
		if !isSwitch(o.Path) {
			continue
		}
		sw, _ := findSwitch(o.Path[0])
		exp, ps := expandSwitch(tree, sw, o)
		probs = append(probs, ps...)
		for _, e := range exp {
			setBy[path(e.Path).key()] = fmt.Sprintf("%s = %s", sw.name, switchText(o.Value))
		}
		out = append(out, exp...)
	}
	var explicit []Override
	for _, o := range overrides {
		if isSwitch(o.Path) {
			continue
		}
		if s, ok := setBy[path(o.Path).key()]; ok {
			probs = append(probs, problem{rel: o.Path, line: o.Line, msg: "conflicts with the switch " + s + ", which sets this key too; keep one of them"})
		}
		explicit = append(explicit, o)
	}
	return append(explicit, out...), probs
}

// switchText shows a switch value in messages.
func switchText(v any) string {
	if b, ok := v.(bool); ok {
		return fmt.Sprint(b)
	}
	return "{ value = false, models = [...] }"
}

// expandSwitch checks one switch and returns its model-key overrides.
func expandSwitch(tree map[string]any, sw modelSwitch, o Override) ([]Override, []problem) {
	models, _ := tree["models"].(map[string]any)
	rel := path{sw.name}
	bad := func(p path, format string, args ...any) []problem {
		return []problem{{rel: p, line: o.Line, msg: fmt.Sprintf(format, args...)}}
	}
	var on bool
	var names []string
	listed := false
	switch v := o.Value.(type) {
	case bool:
		on = v
	case map[string]any:
		for _, k := range mapKeys(v) {
			if k != "value" && k != "models" {
				return nil, bad(rel.add(k), "unknown key %q in a switch%s; %s", k, suggest(k, []string{"value", "models"}), switchForms)
			}
		}
		val, ok := v["value"].(bool)
		if !ok {
			if _, given := v["value"]; !given {
				return nil, bad(rel.add("value"), "missing key value: a switch with a model list needs value = false (or true)")
			}
			return nil, bad(rel.add("value"), "expected true or false, found %s", tomlType(v["value"]))
		}
		on = val
		list, given := v["models"]
		if !given {
			return nil, bad(rel.add("models"), `missing key models: expected models = ["NAME", ...], or write %s = %v for every model`, sw.name, val)
		}
		arr, ok := list.([]any)
		if !ok || len(arr) == 0 {
			return nil, bad(rel.add("models"), `expected a non-empty array of model names such as ["%s"], found %s`, firstModel(models), tomlType(list))
		}
		listed = true
		var probs []problem
		for i, e := range arr {
			name, ok := e.(string)
			p := rel.add("models", idx(i))
			switch {
			case !ok:
				probs = append(probs, problem{rel: p, line: o.Line, msg: "expected a model name (a string), found " + tomlType(e)})
				continue
			case slices.Contains(names, name):
				probs = append(probs, problem{rel: p, line: o.Line, msg: fmt.Sprintf("model %q is listed twice", name)})
				continue
			}
			m, ok := models[name].(map[string]any)
			if !ok {
				probs = append(probs, problem{rel: p, line: o.Line, msg: fmt.Sprintf("no model named %q%s", name, suggest(name, mapKeys(models)))})
				continue
			}
			dev, _ := m["device"].(string)
			if devices.Params(dev) != nil && sw.keys[dev] == nil {
				probs = append(probs, problem{rel: p, line: o.Line, msg: fmt.Sprintf("model %s is %s model, which has no %s; %s applies to %s models", name, an(dev), strings.TrimPrefix(strings.TrimPrefix(sw.effect, "an "), "a "), sw.name, switchDevices(sw))})
				continue
			}
			names = append(names, name)
		}
		if len(probs) > 0 {
			return nil, probs
		}
	default:
		return nil, bad(rel, "expected a switch, found %s; %s", tomlType(o.Value), switchForms)
	}
	if !listed {
		for _, name := range mapKeys(models) {
			m, _ := models[name].(map[string]any)
			dev, _ := m["device"].(string)
			if sw.keys[dev] != nil {
				names = append(names, name)
			}
		}
		if len(names) == 0 && !on {
			return nil, []problem{{rel: rel, line: o.Line, warning: true, msg: fmt.Sprintf("no model of the case has %s (%s models do): the switch changes nothing", sw.effect, switchDevices(sw))}}
		}
	}
	if on {
		return nil, nil // true: the models as they are
	}
	var out []Override
	for _, name := range names {
		m, _ := models[name].(map[string]any)
		dev, _ := m["device"].(string)
		for _, k := range sw.keys[dev] {
			out = append(out, Override{Path: []string{"models", name, k}, Value: sw.value, Line: o.Line})
		}
	}
	return out, nil
}

// switchDevices lists the device kinds a switch applies to.
func switchDevices(sw modelSwitch) string {
	var ds []string
	for _, d := range deviceKinds {
		if sw.keys[d] != nil {
			ds = append(ds, d)
		}
	}
	return strings.Join(ds, ", ")
}

func firstModel(models map[string]any) string {
	if names := mapKeys(models); len(names) > 0 {
		return names[0]
	}
	return "NAME"
}
