package cases

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// switchCase has one model of each family, each with the keys the
// switches clear.
const switchCase = `[models.dx]
device = "diode"
saturation_current = "10 fA"
series_resistance = "3 Ω"
junction_capacitance = "2 pF"
transit_time = "4 ns"

[models.qn]
device = "npn"
saturation_current = "5 fA"
forward_early_voltage = "80 V"
reverse_early_voltage = "12 V"
base_resistance = "100 Ω"
emitter_resistance = "1 Ω"
be_capacitance = "8 pF"
forward_transit_time = "300 ps"

[models.mn]
device = "nmos"
threshold_voltage = "0.5 V"
process_transconductance = "200 µA/V²"
channel_length_modulation = "0.04 1/V"
body_effect = "0.4 V^0.5"
oxide_capacitance = "8.6 fF/µm²"
width = "10u"
length = "1u"

[parts.V1]
kind = "voltage_source"
plus = "vcc"
minus = "gnd"
dc = "5 V"
[parts.R1]
kind = "resistor"
a = "vcc"
b = "a"
value = "10k"
[parts.D1]
kind = "diode"
model = "dx"
anode = "a"
cathode = "gnd"
[parts.R2]
kind = "resistor"
a = "vcc"
b = "c"
value = "2k"
[parts.Q1]
kind = "bjt"
model = "qn"
collector = "c"
base = "a"
emitter = "gnd"
[parts.M1]
kind = "mosfet"
model = "mn"
drain = "c"
gate = "a"
source = "gnd"
`

// lineOf returns the 1-based line of the first occurrence of s in src.
func lineOf(t *testing.T, src, s string) int {
	t.Helper()
	i := strings.Index(src, s)
	if i < 0 {
		t.Fatalf("%q not in source", s)
	}
	return strings.Count(src[:i], "\n") + 1
}

// The switches stand for the model keys listed in the package comment.
func TestSwitchesApply(t *testing.T) {
	src := switchCase + `
[variants.ideal_bjt]
early_effect = false
terminal_resistances = { value = false, models = ["qn"] }

[variants.no_charge]
capacitances = false

[variants.square_law]
channel_length_modulation = false
body_effect = { value = false, models = ["mn"] }
note = "plain square law"

[variants.as_is]
early_effect = true
`
	c, err := Parse("sw.toml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if len(c.Warnings) != 1 || !strings.Contains(c.Warnings[0].Error(), "variants.as_is: warning: the variant changes nothing") {
		t.Errorf("warnings %v", c.Warnings)
	}
	if o := c.Variants[0].Overrides; len(o) != 2 || o[0].Path[0] != "early_effect" || o[0].Line != lineOf(t, src, "early_effect = false") {
		t.Errorf("ideal_bjt overrides %+v", o)
	}
	type want struct {
		model, key string
		value      float64
	}
	inf := math.Inf(1)
	for _, tt := range []struct {
		variant string
		set     []want // keys set by the switches
		kept    []want // keys left as the base has them
	}{
		{"ideal_bjt",
			[]want{{"qn", "forward_early_voltage", inf}, {"qn", "reverse_early_voltage", inf}, {"qn", "base_resistance", 0}, {"qn", "emitter_resistance", 0}, {"qn", "collector_resistance", 0}},
			[]want{{"dx", "series_resistance", 3}, {"qn", "be_capacitance", 8e-12}}},
		{"no_charge",
			[]want{{"dx", "junction_capacitance", 0}, {"dx", "transit_time", 0}, {"qn", "be_capacitance", 0}, {"qn", "bc_capacitance", 0}, {"qn", "forward_transit_time", 0}, {"qn", "reverse_transit_time", 0}, {"mn", "oxide_capacitance", 0}, {"mn", "overlap_capacitance", 0}},
			[]want{{"dx", "series_resistance", 3}, {"qn", "forward_early_voltage", 80}}},
		{"square_law",
			[]want{{"mn", "channel_length_modulation", 0}, {"mn", "body_effect", 0}},
			[]want{{"mn", "oxide_capacitance", 8.6e-3}}},
		{"as_is", nil,
			[]want{{"qn", "forward_early_voltage", 80}, {"qn", "reverse_early_voltage", 12}}},
	} {
		v, err := c.ApplyVariant(tt.variant)
		if err != nil {
			t.Fatalf("%s: %v", tt.variant, err)
		}
		for _, w := range tt.set {
			got, ok := v.Models[w.model].Params[w.key]
			if !ok || got != w.value {
				t.Errorf("%s: %s.%s = %v (set %v), want %v", tt.variant, w.model, w.key, got, ok, w.value)
			}
		}
		for _, w := range tt.kept {
			if got := v.Models[w.model].Params[w.key]; math.Abs(got-w.value) > 1e-12*math.Abs(w.value) {
				t.Errorf("%s: %s.%s = %v, want the base's %v", tt.variant, w.model, w.key, got, w.value)
			}
		}
	}
	// The base is untouched.
	if c.Models["qn"].Params["forward_early_voltage"] != 80 || c.Models["mn"].Params["body_effect"] != 0.4 {
		t.Error("the base case changed")
	}
}

// Every malformed switch is an error at its own line and key.
func TestSwitchErrors(t *testing.T) {
	for _, tt := range []struct {
		variant string // body of [variants.v]
		at      string // text on the line the error is on
		key     string
		want    string
	}{
		{`early_effect = "off"`, "early_effect", "variants.v.early_effect", "expected a switch, found a string"},
		{`early_effect = { value = false, model = ["qn"] }`, "early_effect", "variants.v.early_effect.model", `unknown key "model" in a switch (did you mean "models"?)`},
		{`early_effect = { models = ["qn"] }`, "early_effect", "variants.v.early_effect.value", "missing key value"},
		{`early_effect = { value = "no", models = ["qn"] }`, "early_effect", "variants.v.early_effect.value", "expected true or false, found a string"},
		{`early_effect = { value = false }`, "early_effect", "variants.v.early_effect.models", "missing key models"},
		{`early_effect = { value = false, models = [] }`, "early_effect", "variants.v.early_effect.models", "non-empty array of model names"},
		{`early_effect = { value = false, models = ["qm"] }`, "early_effect", "variants.v.early_effect.models[1]", `no model named "qm"`},
		{`early_effect = { value = false, models = ["qn", "qn"] }`, "early_effect", "variants.v.early_effect.models[2]", `model "qn" is listed twice`},
		{`body_effect = { value = false, models = ["qn"] }`, "body_effect", "variants.v.body_effect.models[1]", "model qn is an npn model, which has no body effect; body_effect applies to nmos, pmos models"},
		{"early_effect = false\nmodels.qn.forward_early_voltage = \"50 V\"", "models.qn", "variants.v.models.qn.forward_early_voltage", "conflicts with the switch early_effect = false"},
		{`early_effect = [false]`, "early_effect", "variants.v.early_effect", "expected a switch, found an array"},
		{`early_effect = { value = false, models = "qn" }`, "early_effect", "variants.v.early_effect.models", "non-empty array of model names such as [\"dx\"], found a string"},
		{`early_effect = { value = false, models = ["qn", 3] }`, "early_effect", "variants.v.early_effect.models[2]", "expected a model name (a string), found an integer"},
		{`early_efect = false`, "early_efect", "variants.v.early_efect", "names no key an override can set"},
	} {
		src := switchCase + "\n[variants.v]\n" + tt.variant + "\n"
		_, err := Parse("sw.toml", []byte(src))
		var errs Errors
		if !errors.As(err, &errs) || len(errs) != 1 {
			t.Errorf("%s: error %v, want one diagnostic", tt.variant, err)
			continue
		}
		d := errs[0]
		head := len(switchCase)
		if line := lineOf(t, src[head:], tt.at) + strings.Count(src[:head], "\n"); d.Line != line || d.Key != tt.key || !strings.Contains(d.Message, tt.want) {
			t.Errorf("%s:\n got %s\nwant sw.toml:%d: %s: …%s…", tt.variant, d.Error(), line, tt.key, tt.want)
		}
	}
}

// WithOverrides takes the switches as one-element paths (the command
// line's --set), with the same checks.
func TestSwitchOverrides(t *testing.T) {
	c := mustParse(t, switchCase)
	nc, err := c.WithOverrides([]Override{{Path: []string{"early_effect"}, Value: false}})
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsInf(nc.Models["qn"].Params["reverse_early_voltage"], 1) || c.Models["qn"].Params["reverse_early_voltage"] != 12 {
		t.Error("early_effect = false not applied, or the base changed")
	}
	_, err = c.WithOverrides([]Override{
		{Path: []string{"capacitances"}, Value: false},
		{Path: []string{"models", "dx", "transit_time"}, Value: "1 ns"},
	})
	if err == nil || !strings.Contains(err.Error(), "models.dx.transit_time: conflicts with the switch capacitances = false") {
		t.Errorf("conflict: %v", err)
	}
	// No mosfet in smallCase: the switch changes nothing, which is said.
	sc := mustParse(t, smallCase)
	nc, err = sc.WithOverrides([]Override{{Path: []string{"body_effect"}, Value: false}})
	if err != nil || len(nc.Warnings) != 1 || !strings.Contains(nc.Warnings[0].Message, "no model of the case has a body effect") {
		t.Errorf("no mosfet: err %v, warnings %v", err, nc.Warnings)
	}
}
