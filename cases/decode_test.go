package cases

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

func mustParse(t *testing.T, src string) *Circuit {
	t.Helper()
	c, err := Parse("t.toml", []byte(src))
	if err != nil {
		t.Fatalf("Parse: %v", err)
	}
	return c
}

func TestExamplesValid(t *testing.T) {
	names := Examples()
	if len(names) < 4 || !slices.IsSorted(names) || !slices.Contains(names, DefaultExample) {
		t.Fatalf("Examples() = %v: want ≥ 4 sorted names including %s", names, DefaultExample)
	}
	kinds := map[Kind]bool{}
	variants := 0
	for _, n := range names {
		c, err := Example(n)
		if err != nil {
			t.Fatalf("%s: %v", n, err)
		}
		if len(c.Warnings) > 0 {
			t.Errorf("%s: warnings %v", n, c.Warnings)
		}
		if c.File != "example:"+n || c.Title == "" || len(c.Ports) < 2 || len(c.Transfers) < 1 {
			t.Errorf("%s: file %q title %q, %d ports, %d transfers", n, c.File, c.Title, len(c.Ports), len(c.Transfers))
		}
		for _, tr := range c.Transfers {
			if tr.Sweep == nil {
				t.Errorf("%s: transfer %s→%s has no sweep", n, tr.From, tr.To)
			}
		}
		for _, p := range c.Parts {
			kinds[p.Kind] = true
		}
		for _, v := range c.Variants {
			variants++
			vc, err := c.ApplyVariant(v.Name)
			if err != nil || vc.Variant != v.Name {
				t.Errorf("%s: variant %s: %v", n, v.Name, err)
			}
		}
	}
	// The four circuits the issue asks for.
	for _, k := range []Kind{BJT, MOSFET, Diode, VCVS} {
		if !kinds[k] {
			t.Errorf("no example uses a %s", k)
		}
	}
	if variants < 2 {
		t.Errorf("%d variants in the examples, want at least 2", variants)
	}
}

func TestDefaultExample(t *testing.T) {
	c, err := Example(DefaultExample)
	if err != nil {
		t.Fatal(err)
	}
	if want := []string{"vcc", "sig", "in", "base", "col", "emit", "out"}; !slices.Equal(c.Nodes, want) {
		t.Errorf("Nodes = %v, want %v", c.Nodes, want)
	}
	var names []string
	for _, p := range c.Parts {
		names = append(names, p.Name)
	}
	// File order, not alphabetical.
	if want := []string{"VCC", "VIN", "RS", "CIN", "RB1", "RB2", "RC", "RE", "CE", "Q1", "COUT", "RL"}; !slices.Equal(names, want) {
		t.Errorf("parts = %v, want %v", names, want)
	}
	if c.Temperature != 300.15 {
		t.Errorf("Temperature = %v", c.Temperature)
	}
	q := c.Parts[9]
	if q.Kind != BJT || q.Model != "bw_npn" || q.Node("base") != "base" || q.Area != 1 || q.Line != 89 {
		t.Errorf("Q1 = %+v", q)
	}
	if rc := c.Parts[6]; rc.Value != 5600 || rc.Tolerance != 0.01 {
		t.Errorf("RC = %+v", rc)
	}
	m := c.Models["bw_npn"]
	if m.Device != DeviceNPN || m.Params["saturation_current"] != 5e-15 || m.Param("reverse_early_voltage", 7) != 7 {
		t.Errorf("model = %+v", m)
	}
	v, err := c.ApplyVariant("no_early")
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsInf(v.Models["bw_npn"].Params["forward_early_voltage"], 1) || c.Models["bw_npn"].Params["forward_early_voltage"] != 90 {
		t.Error("no_early: Early voltage not +Inf in the variant, or the base changed")
	}
	if len(c.Transfers) != 3 || c.Transfers[0].Sweep.PointsPerDecade != 20 || c.Transfers[2].Kind != OutputImpedance {
		t.Errorf("transfers = %+v", c.Transfers)
	}
}

const smallCase = `title = "divider"
[parts.V1]
kind = "voltage_source"
plus = "in"
minus = "gnd"
dc = "5 V"
ac = 1
ac_phase = "90 °"

[parts.R1]
kind = "resistor"
a = "in"
b = "out"
value = "4k7"

[parts.R2]
kind = "resistor"
a = "out"
b = "gnd"
value = 1000

[ports.in]
source = "V1"
[ports.out]
plus = "out"

[[transfer]]
from = "in"
to = "out"
kind = "voltage"

[[transfer]]
from = "in"
to = "in"
kind = "input_impedance"
sweep = { start = "1 Hz", stop = "1 MHz", points_per_decade = 5 }

[variants.big]
parts.R2.value = "10k"
parts.R2.tolerance = "1 %"
[variants.hot]
temperature = "85 °C"
solver.max_iterations = 500
`

func TestSmallCase(t *testing.T) {
	c := mustParse(t, smallCase)
	if c.Parts[0].ACPhase != math.Pi/2 || c.Parts[0].AC != 1 || c.Parts[0].DC != 5 {
		t.Errorf("V1 = %+v", c.Parts[0])
	}
	if c.Ports[0].Source != "V1" || c.Ports[0].Plus != "in" || c.Ports[0].Minus != "gnd" || c.Ports[1].Minus != Ground {
		t.Errorf("ports = %+v %+v", c.Ports[0], c.Ports[1])
	}
	if tr := c.Transfers[1]; tr.Line != 32 || tr.Sweep == nil || tr.Sweep.Stop != 1e6 {
		t.Errorf("transfer 2 = %+v", tr)
	}
	if v := c.Variants[0]; v.Name != "big" || len(v.Overrides) != 2 || v.Overrides[0].Line != 39 || strings.Join(v.Overrides[1].Path, ".") != "parts.R2.tolerance" {
		t.Errorf("variant big = %+v", v)
	}
	big, err := c.ApplyVariant("big")
	if err != nil {
		t.Fatal(err)
	}
	if big.Parts[2].Value != 1e4 || big.Parts[2].Tolerance != 0.01 || c.Parts[2].Value != 1000 {
		t.Errorf("big: R2 = %+v; base R2 = %+v", big.Parts[2], c.Parts[2])
	}
	hot, err := c.ApplyVariant("hot")
	if err != nil {
		t.Fatal(err)
	}
	if hot.Temperature != 358.15 || hot.Solver.MaxIterations != 500 || c.Solver.MaxIterations != 100 {
		t.Errorf("hot: T = %v, solver %+v", hot.Temperature, hot.Solver)
	}
	if _, err := c.ApplyVariant("cold"); err == nil || !strings.Contains(err.Error(), `no variant named "cold"`) {
		t.Errorf("unknown variant: %v", err)
	}
}

func TestWithOverrides(t *testing.T) {
	c := mustParse(t, smallCase)
	nc, err := c.WithOverrides([]Override{
		{Path: []string{"parts", "R1", "value"}, Value: "2k2"},
		{Path: []string{"parts", "V1", "dc"}, Value: 12},
	})
	if err != nil {
		t.Fatal(err)
	}
	if nc.Parts[1].Value != 2200 || nc.Parts[0].DC != 12 || c.Parts[1].Value != 4700 {
		t.Errorf("overrides not applied or base changed: %v %v %v", nc.Parts[1].Value, nc.Parts[0].DC, c.Parts[1].Value)
	}
	for _, r := range []struct {
		path  []string
		value any
		want  string
	}{
		{[]string{"parts", "R9", "value"}, "1k", `no part named "R9"`},
		{[]string{"parts", "R1", "gain"}, 2, `a resistor has no key "gain"`},
		{[]string{"parts", "R1", "kind"}, "capacitor", "cannot change a part's kind"},
		{[]string{"title"}, "x", "names no key an override can set"},
		{[]string{"solver", "tolerance"}, 1, `[solver] has no key "tolerance"`},
		{[]string{"parts", "R1", "value"}, "-1k", `"-1k" is negative`},
		{[]string{"parts", "R1", "b"}, "nowhere", `node "out" has a single`},
		{nil, 1, "empty override path"},
	} {
		_, err := c.WithOverrides([]Override{{Path: r.path, Value: r.value}})
		if r.want == `node "out" has a single` {
			// Rewiring R1 leaves "out" with one connection: a warning only.
			if err != nil {
				t.Errorf("%v: %v", r.path, err)
			}
			continue
		}
		if err == nil || !strings.Contains(err.Error(), r.want) {
			t.Errorf("override %v = %v: error %v, want %q", r.path, r.value, err, r.want)
		}
	}
	if _, err := (&Circuit{}).WithOverrides(nil); err == nil {
		t.Error("a Circuit built in code has no source: want an error")
	}
}

// TestVariantKeyNotInBase checks that a variant may set a key the base
// file leaves at its default.
func TestVariantKeyNotInBase(t *testing.T) {
	src := strings.Replace(smallCase, "[variants.big]", "[variants.q]\nparts.V1.ac_phase = -45\n[variants.big]", 1)
	c := mustParse(t, strings.Replace(src, "ac_phase = \"90 °\"\n", "", 1))
	v, err := c.ApplyVariant("q")
	if err != nil {
		t.Fatal(err)
	}
	if v.Parts[0].ACPhase != -math.Pi/4 || c.Parts[0].ACPhase != 0 {
		t.Errorf("ac_phase = %v (base %v)", v.Parts[0].ACPhase, c.Parts[0].ACPhase)
	}
}

func TestMosfetDefaults(t *testing.T) {
	c := mustParse(t, `
[models.n]
device = "nmos"
threshold_voltage = "0.5 V"
process_transconductance = "200 µA/V²"
length = "1u"

[parts.VDD]
kind = "voltage_source"
plus = "vdd"
minus = "gnd"
dc = "3.3 V"

[parts.RD]
kind = "resistor"
a = "vdd"
b = "d"
value = "10k"

[parts.M1]
kind = "mosfet"
model = "n"
drain = "d"
gate = "vdd"
source = "gnd"
width = "10u"
`)
	m := c.Parts[2]
	if !slices.Equal(m.Nodes, []string{"d", "vdd", "gnd", "gnd"}) || m.Width != 10e-6 || m.Length != 0 || m.Multiplier != 1 {
		t.Errorf("M1 = %+v", m)
	}
	if len(c.Warnings) != 0 {
		t.Errorf("warnings: %v", c.Warnings)
	}
}

// TestTopology runs small circuits through the graph checks. Expected
// outcomes follow from Kirchhoff's laws: a node set with no DC path to
// the reference has a singular conductance matrix; a loop of ideal
// voltage sources fixes one loop voltage twice (any circuit-theory text,
// e.g. the tableau/MNA solvability conditions; common practice).
func TestTopology(t *testing.T) {
	head := "[parts.V1]\nkind = \"voltage_source\"\nplus = \"a\"\nminus = \"gnd\"\ndc = 1\n"
	r := func(name, a, b string) string {
		return "[parts." + name + "]\nkind = \"resistor\"\na = \"" + a + "\"\nb = \"" + b + "\"\nvalue = \"1k\"\n"
	}
	two := func(name, kind, t1, a, t2, b, extra string) string {
		return "[parts." + name + "]\nkind = \"" + kind + "\"\n" + t1 + " = \"" + a + "\"\n" + t2 + " = \"" + b + "\"\n" + extra + "\n"
	}
	for _, tc := range []struct {
		name, src, err, warn string
	}{
		{"divider", head + r("R1", "a", "b") + r("R2", "b", "gnd"), "", ""},
		{"cap-coupled with bias", head + two("C1", "capacitor", "a", "a", "b", "b", `value = "1u"`) + r("R1", "b", "gnd"), "", ""},
		{"cap-coupled floating", head + two("C1", "capacitor", "a", "a", "b", "b", `value = "1u"`) + two("C2", "capacitor", "a", "b", "b", "gnd", `value = "1u"`), `node "b" has no DC path`, ""},
		{"current source into resistor", two("I1", "current_source", "from", "gnd", "to", "a", "dc = 1e-3") + r("R1", "a", "gnd"), "", ""},
		{"current sources in series", two("I1", "current_source", "from", "gnd", "to", "x", "dc = 1e-3") + two("I2", "current_source", "from", "x", "to", "a", "dc = 1e-3") + r("R1", "a", "gnd"), "cut-set of current sources and capacitors (I1, I2)", ""},
		{"current source and capacitor cut-set", two("I1", "current_source", "from", "gnd", "to", "x", "dc = 1e-3") + two("C1", "capacitor", "a", "x", "b", "gnd", `value = "1n"`), "cut-set of current sources and capacitors (I1, C1)", ""},
		{"vccs output cut-set", head + r("R1", "a", "gnd") + "[parts.G1]\nkind = \"vccs\"\nfrom = \"gnd\"\nto = \"o\"\ncontrol_plus = \"a\"\ncontrol_minus = \"gnd\"\ntransconductance = \"1 mS\"\n" + two("C1", "capacitor", "a", "o", "b", "gnd", `value = "1n"`), "cut-set of current sources and capacitors (G1, C1)", ""},
		{"isolated island", head + r("R1", "a", "gnd") + r("R2", "x", "y") + r("R3", "y", "x"), "not connected to the rest", ""},
		{"voltage sources in parallel", head + two("V2", "voltage_source", "plus", "a", "minus", "gnd", "dc = 2"), "parts V1, V2 form a loop", ""},
		{"inductor across source", head + two("L1", "inductor", "a", "a", "b", "gnd", `value = "1m"`), "parts V1, L1 form a loop", ""},
		{"inductors in parallel", head + r("R1", "a", "b") + two("L1", "inductor", "a", "b", "b", "gnd", `value = "1m"`) + two("L2", "inductor", "a", "b", "b", "gnd", `value = "2m"`), "parts L1, L2 form a loop", ""},
		{"inductor in series", head + two("L1", "inductor", "a", "a", "b", "b", `value = "1m"`) + r("R1", "b", "gnd"), "", ""},
		{"self loop", head + two("V2", "voltage_source", "plus", "b", "minus", "b", "dc = 1") + r("R1", "a", "b") + r("R2", "b", "gnd"), "shorted on itself", ""},
		{"no ground", two("V1", "voltage_source", "plus", "a", "minus", "b", "dc = 1") + r("R1", "a", "b"), "no part connects to gnd", ""},
		{"dangling resistor", head + r("R1", "a", "gnd") + r("R2", "a", "x"), "", `node "x" has a single connection`},
		{"shorted resistor", head + r("R1", "a", "gnd") + r("R2", "a", "a"), "", "it has no effect"},
		{"bjt base through the junction", "[models.q]\ndevice = \"npn\"\nsaturation_current = \"1 fA\"\n" + head + r("RC", "a", "c") + "[parts.Q1]\nkind = \"bjt\"\nmodel = \"q\"\ncollector = \"c\"\nbase = \"b\"\nemitter = \"gnd\"\n" + two("CB", "capacitor", "a", "a", "b", "b", `value = "1u"`), "", ""},
		{"vcvs control input only", head + r("R1", "a", "gnd") + "[parts.E1]\nkind = \"vcvs\"\nplus = \"o\"\nminus = \"gnd\"\ncontrol_plus = \"x\"\ncontrol_minus = \"gnd\"\ngain = 2\n" + r("RO", "o", "gnd") + two("CX", "capacitor", "a", "a", "b", "x", `value = "1n"`), "only through E1 control input, CX", ""},
	} {
		c, err := Parse("t.toml", []byte(tc.src))
		switch {
		case tc.err == "" && err != nil:
			t.Errorf("%s: unexpected error: %v", tc.name, err)
		case tc.err != "" && (err == nil || !strings.Contains(err.Error(), tc.err)):
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.err)
		case tc.err == "" && tc.warn == "" && len(c.Warnings) > 0:
			t.Errorf("%s: unexpected warnings %v", tc.name, c.Warnings)
		case tc.warn != "" && (len(c.Warnings) != 1 || !strings.Contains(c.Warnings[0].Error(), tc.warn) || !c.Warnings[0].Warning):
			t.Errorf("%s: warnings %v, want one containing %q", tc.name, c.Warnings, tc.warn)
		}
	}
}

// TestAllErrorsReported checks that one file's independent problems are
// all reported, in line order.
func TestAllErrorsReported(t *testing.T) {
	_, err := Parse("multi.toml", []byte(`temperature = 300
[parts.R1]
kind = "resistor"
a = "x"
b = "gnd"
value = "1 kV"
colour = "brown"
[parts.C1]
kind = "capacitor"
a = "x"
b = "gnd"
[[transfer]]
from = "in"
to = "out"
kind = "voltage"
`))
	var errs Errors
	if !errors.As(err, &errs) {
		t.Fatalf("err = %v", err)
	}
	var got []string
	for _, d := range errs {
		got = append(got, d.Key)
	}
	want := []string{"temperature", "parts.R1.value", "parts.R1.colour", "parts.C1.value", "transfer[1].from", "transfer[1].to"}
	if !slices.Equal(got, want) {
		t.Errorf("keys = %v, want %v\n%v", got, want, err)
	}
	for i := 1; i < len(errs); i++ {
		if errs[i].Line < errs[i-1].Line {
			t.Errorf("not in line order: %v", err)
		}
	}
	if first := errs[0].Error(); !strings.HasPrefix(first, "multi.toml:1: temperature: ") {
		t.Errorf("first = %q", first)
	}
}

func TestDiagnosticFormat(t *testing.T) {
	for _, r := range []struct {
		d    Diagnostic
		want string
	}{
		{Diagnostic{File: "a.toml", Line: 3, Key: "parts.R1.value", Message: "bad"}, "a.toml:3: parts.R1.value: bad"},
		{Diagnostic{File: "a.toml", Line: 3, Message: "bad"}, "a.toml:3: bad"},
		{Diagnostic{File: "--set", Key: "parts.R1.value", Message: "bad"}, "--set: parts.R1.value: bad"},
		{Diagnostic{File: "a.toml", Line: 9, Key: "parts.R2.b", Message: "lonely", Warning: true}, "a.toml:9: parts.R2.b: warning: lonely"},
	} {
		if got := r.d.Error(); got != r.want || r.d.String() != r.want {
			t.Errorf("got %q, want %q", got, r.want)
		}
	}
	errs := Errors{{File: "f", Line: 1, Message: "x"}, {File: "f", Line: 2, Message: "y"}}
	if errs.Error() != "f:1: x\nf:2: y" {
		t.Errorf("Errors.Error() = %q", errs.Error())
	}
}

func TestLoad(t *testing.T) {
	if _, err := Load("no/such/file.toml"); err == nil || !strings.HasPrefix(err.Error(), "cases: ") {
		t.Errorf("Load of a missing file: %v", err)
	}
	if _, err := ExampleSource("nope"); err == nil {
		t.Error("ExampleSource of an unknown name: want an error")
	}
}
