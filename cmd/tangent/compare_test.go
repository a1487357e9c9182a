package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"tangent/devices"
)

var (
	ceDirect  = filepath.Join("..", "..", "testdata", "compare", "ce_direct.toml")
	diodeTemp = filepath.Join("..", "..", "testdata", "compare", "diode_temperature.toml")
)

// compareDoc is the part of compare --json the tests read.
type compareDoc struct {
	Variants []struct {
		Name      string                     `json:"name"`
		Bias      json.RawMessage            `json:"bias"`
		Devices   map[string]json.RawMessage `json:"devices"`
		Transfers []json.RawMessage          `json:"transfers"`
		Error     string                     `json:"error"`
	} `json:"variants"`
	Rows []struct {
		Section  string     `json:"section"`
		Quantity string     `json:"quantity"`
		Values   []any      `json:"values"`
		Change   []*float64 `json:"change_percent"`
		Marked   bool       `json:"marked"`
	} `json:"rows"`
}

func runCompareJSON(t *testing.T, args ...string) compareDoc {
	t.Helper()
	code, out, errs := runArgs(append([]string{"compare", "--json"}, args...)...)
	if code != exitOK {
		t.Fatalf("compare %v: exit %d: %s", args, code, errs)
	}
	var d compareDoc
	if err := json.Unmarshal([]byte(out), &d); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	return d
}

func compact(t *testing.T, raw []byte) string {
	t.Helper()
	var b bytes.Buffer
	if err := json.Compact(&b, raw); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// Turning the Early effect off makes r_o infinite (null in JSON) and moves
// the gain of a common-emitter stage from −gm·(RC ∥ r_o) to −gm·RC
// (hybrid-π model of the stage with its emitter grounded; textbook result,
// from memory). The fixture has no capacitance and no terminal resistance
// and r_mu is open in forward activity, so the DC gain is exactly that.
func TestCompareEarlyEffect(t *testing.T) {
	d := runCompareJSON(t, ceDirect, "--variant", "no_early")
	if len(d.Variants) != 2 || d.Variants[0].Name != "base" || d.Variants[1].Name != "no_early" {
		t.Fatalf("variants %+v", d.Variants)
	}
	const rc = 2200.0
	var gains [2]float64
	for i, v := range d.Variants {
		var q struct {
			Gm  float64  `json:"gm"`
			RO  *float64 `json:"r_o"`
			RMu *float64 `json:"r_mu"`
		}
		if err := json.Unmarshal(v.Devices["Q1"], &q); err != nil {
			t.Fatal(err)
		}
		var tr struct {
			DCGain float64 `json:"dc_gain"`
		}
		json.Unmarshal(v.Transfers[0], &tr)
		gains[i] = tr.DCGain
		if q.RMu != nil {
			t.Errorf("%s: r_mu = %g, want open in forward activity", v.Name, *q.RMu)
		}
		load := rc
		if i == 0 {
			if q.RO == nil {
				t.Fatal("base: r_o is null")
			}
			load = rc * *q.RO / (rc + *q.RO) // RC ∥ r_o
		} else if q.RO != nil {
			t.Errorf("no_early: r_o = %g, want null (infinite)", *q.RO)
		}
		if want := -q.Gm * load; math.Abs(tr.DCGain-want) > 1e-9*math.Abs(want) {
			t.Errorf("%s: gain %.12g, want −gm·load = %.12g", v.Name, tr.DCGain, want)
		}
	}
	if !(gains[1] < gains[0] && gains[0] < 0) {
		t.Errorf("gains %v: without the Early effect the stage should gain more", gains)
	}
	// The text marks r_o, which becomes infinite.
	_, out, _ := runArgs("compare", ceDirect, "--variant", "no_early")
	if !regexpLine(out, "*", "Q1 r_o", "∞ Ω", "—") {
		t.Errorf("r_o row not marked:\n%s", out)
	}
}

// regexpLine reports whether some line of out starts with mark and holds
// every field, in order.
func regexpLine(out, mark string, fields ...string) bool {
	for _, l := range strings.Split(out, "\n") {
		if !strings.HasPrefix(l, mark) {
			continue
		}
		rest, ok := l, true
		for _, f := range fields {
			i := strings.Index(rest, f)
			if i < 0 {
				ok = false
				break
			}
			rest = rest[i+len(f):]
		}
		if ok {
			return true
		}
	}
	return false
}

// A diode's forward voltage at a fixed current falls by about 2 mV/K near
// room temperature (common practice) and follows DESIGN.md's temperature
// formula exactly: V = n·VT·ln(1 + I/Is(T)) with
// Is(T) = Is·(T/T0)^(η/n)·exp((Eg/(n·VT(T)))·(T/T0 − 1)).
func TestCompareDiodeTemperature(t *testing.T) {
	d := runCompareJSON(t, diodeTemp, "--temperature", "-40,17,37,85 °C")
	names := []string{"base", "T=-40 °C", "T=17 °C", "T=37 °C", "T=85 °C"}
	temps := []float64{300.15, 233.15, 290.15, 310.15, 358.15}
	if len(d.Variants) != len(names) {
		t.Fatalf("%d columns, want %d", len(d.Variants), len(names))
	}
	const (
		is, n, eg, eta, i0, t0 = 20e-15, 1.02, 1.11, 3.0, 100e-6, 300.15
	)
	v := map[string]float64{}
	for k, col := range d.Variants {
		var b struct {
			TemperatureK float64            `json:"temperature_k"`
			Nodes        map[string]float64 `json:"nodes"`
		}
		json.Unmarshal(col.Bias, &b)
		if col.Name != names[k] || math.Abs(b.TemperatureK-temps[k]) > 1e-9 {
			t.Errorf("column %d: %s at %v K, want %s at %v K", k, col.Name, b.TemperatureK, names[k], temps[k])
		}
		tk := b.TemperatureK
		vt := devices.Boltzmann * tk / devices.ElementaryCharge // SI Brochure 9th ed.: exact k and e
		isT := is * math.Pow(tk/t0, eta/n) * math.Exp(eg/(n*vt)*(tk/t0-1))
		want := n * vt * math.Log1p(i0/isT)
		if got := b.Nodes["sense"]; math.Abs(got-want) > 2e-9 {
			t.Errorf("%s: V = %.12f V, formula %.12f V", col.Name, got, want)
		}
		v[col.Name] = b.Nodes["sense"]
	}
	slope := (v["T=37 °C"] - v["T=17 °C"]) / 20
	if slope > -1.8e-3 || slope < -2.2e-3 {
		t.Errorf("dV/dT = %.3f mV/K, want about −2 mV/K", slope*1e3)
	}
}

// A variant whose overrides equal the base's values reproduces the base
// exactly: same bias, small-signal and transfer objects, no change.
func TestCompareSameValues(t *testing.T) {
	d := runCompareJSON(t, ceDirect, "--variant", "same_values")
	b, s := d.Variants[0], d.Variants[1]
	if compact(t, b.Bias) != compact(t, s.Bias) {
		t.Errorf("bias differs:\n%s\n%s", b.Bias, s.Bias)
	}
	if compact(t, b.Devices["Q1"]) != compact(t, s.Devices["Q1"]) || compact(t, b.Transfers[0]) != compact(t, s.Transfers[0]) {
		t.Error("small-signal or transfer differs")
	}
	for _, r := range d.Rows {
		if r.Marked || (r.Change[1] != nil && *r.Change[1] != 0) {
			t.Errorf("row %s: change %v, marked %v", r.Quantity, r.Change, r.Marked)
		}
	}
}

// The JSON contract of DESIGN.md: {"variants": [{"name", "bias": B,
// "transfers": [T]}]}, B exactly bias --json's object and T transfer
// --json's; a variant equals the base with its overrides given by --set.
func TestCompareJSONContract(t *testing.T) {
	d := runCompareJSON(t, "example:ce_amplifier", "--variant", "no_early", "--temperature", "85")
	if len(d.Variants) != 3 || d.Variants[2].Name != "T=85 °C" {
		t.Fatalf("variants: %d", len(d.Variants))
	}
	for i, sets := range [][]string{nil, {"--set", "models.bw_npn.forward_early_voltage=inf"}, {"--set", "temperature=85 °C"}} {
		args := append([]string{"bias", "--json", "example:ce_amplifier"}, sets...)
		code, out, errs := runArgs(args...)
		if code != exitOK {
			t.Fatalf("%v: exit %d %s", args, code, errs)
		}
		if compact(t, d.Variants[i].Bias) != compact(t, []byte(out)) {
			t.Errorf("%s: bias is not bias --json %v", d.Variants[i].Name, sets)
		}
		args[0] = "transfer"
		code, out, errs = runArgs(args...)
		if code != exitOK {
			t.Fatalf("%v: exit %d %s", args, code, errs)
		}
		var tr struct{ Transfers []json.RawMessage }
		json.Unmarshal([]byte(out), &tr)
		if len(tr.Transfers) != len(d.Variants[i].Transfers) {
			t.Fatalf("%s: %d transfers", d.Variants[i].Name, len(d.Variants[i].Transfers))
		}
		for k := range tr.Transfers {
			if compact(t, d.Variants[i].Transfers[k]) != compact(t, tr.Transfers[k]) {
				t.Errorf("%s: transfer %d is not transfer --json's", d.Variants[i].Name, k+1)
			}
		}
	}
	if len(d.Rows) == 0 || d.Rows[0].Section != "bias" || len(d.Rows[0].Values) != 3 {
		t.Errorf("rows %+v", d.Rows)
	}
}

// Columns run concurrently give the bytes they give one at a time (run
// with -race: go test -race ./cmd/tangent/ -run Compare).
func TestCompareConcurrent(t *testing.T) {
	for _, args := range [][]string{
		{"compare", "example:ce_amplifier", "--temperature", "-40,85"},
		{"compare", "--json", "example:cs_mirror"},
		{"compare", ceDirect},
	} {
		_, seq, _ := runArgs(append(args, "--jobs", "1")...)
		_, par, errs := runArgs(append(args, "--jobs", "4")...)
		if seq == "" || seq != par {
			t.Errorf("%v: --jobs 4 differs from --jobs 1 (stderr %s)", args, errs)
		}
	}
}

func TestCompareText(t *testing.T) {
	code, out, errs := runArgs("compare", ceDirect)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"Columns", "no_early", "same_values", "saturated", "Bias point",
		"Small-signal parameters", "in → out, voltage gain (V/V)", "|Z_out| at mid-band", "* some column changes"} {
		if !strings.Contains(out, want) {
			t.Errorf("no %q in\n%s", want, out)
		}
	}
	if !regexpLine(out, "≠", "Q1 region", "forward active", "saturation") {
		t.Errorf("region row not marked ≠:\n%s", out)
	}
	// A 2.49 % change is marked at a 2 % threshold, not at the default 5 %.
	_, out, _ = runArgs("compare", ceDirect, "--variant", "no_early")
	if !regexpLine(out, " ", "DC gain", "+2.49 %") {
		t.Errorf("DC gain marked at 5 %%:\n%s", out)
	}
	_, out, _ = runArgs("compare", ceDirect, "--variant", "no_early", "--threshold", "2%")
	if !regexpLine(out, "*", "DC gain", "+2.49 %") {
		t.Errorf("DC gain not marked at 2 %%:\n%s", out)
	}
}

func TestComparePlot(t *testing.T) {
	svg := filepath.Join(t.TempDir(), "bode.svg")
	code, _, errs := runArgs("compare", "example:ce_amplifier", "--plot", svg, "--plot-transfer", "1")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	data, err := os.ReadFile(svg)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"<svg", "no_early", "hot_enclosure", "small_bypass"} {
		if !bytes.Contains(data, []byte(want)) {
			t.Errorf("plot lacks %q", want)
		}
	}
}

func TestCompareBadFlags(t *testing.T) {
	for _, tt := range []struct {
		args []string
		want string
	}{
		{[]string{"compare", "--variant", "cold"}, `no variant named "cold"`},
		{[]string{"compare", "--variant", "no_early", "--variant", "no_early"}, "named twice"},
		{[]string{"compare", "--temperature", "-40,,85"}, "empty entry"},
		{[]string{"compare", "--temperature", "85 V"}, "--temperature"},
		{[]string{"compare", "--threshold", "lots"}, "--threshold"},
		{[]string{"compare", "--jobs", "0"}, "--jobs"},
		{[]string{"compare", "--plot", "x.svg", "--plot-transfer", "9"}, "--plot-transfer 9"},
		{[]string{"compare", "--set", "parts.RX.value=1k"}, `tangent compare: --set parts.RX.value=1k: no part named "RX"`},
	} {
		code, _, errs := runArgs(tt.args...)
		if code != exitUsage || !strings.Contains(errs, tt.want) {
			t.Errorf("%v: exit %d, stderr %q; want 2 and %q", tt.args, code, errs, tt.want)
		}
	}
}

// --set changes the case for every subcommand. With RC raised to 4.7 kΩ
// the collector voltage drops, and the resistor's current obeys Ohm's law
// across it (common practice).
func TestSetOnBias(t *testing.T) {
	var base, set struct {
		Nodes map[string]float64
		Parts map[string]struct{ Current float64 }
	}
	_, out, _ := runArgs("bias", "--json", "example:ce_amplifier")
	json.Unmarshal([]byte(out), &base)
	code, out, errs := runArgs("bias", "--json", "example:ce_amplifier", "--set", "parts.RC.value=4k7")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	json.Unmarshal([]byte(out), &set)
	// About Ic·0.9 kΩ ≈ 0.83 V less drop across RC.
	if d := set.Nodes["col"] - base.Nodes["col"]; d < 0.7 || d > 0.95 {
		t.Errorf("V(col) = %g V with RC = 4k7, %g V with 5k6", set.Nodes["col"], base.Nodes["col"])
	}
	if i, v := set.Parts["RC"].Current, set.Nodes["vcc"]-set.Nodes["col"]; math.Abs(i*4700-v) > 1e-9*v {
		t.Errorf("RC: %g A across %g V", i, v)
	}
	for _, sub := range []string{"check", "linearize", "transfer"} {
		if code, _, errs := runArgs(sub, "--set", `temperature="85 °C"`, "--set", "early_effect=false"); code != exitOK {
			t.Errorf("%s --set: exit %d: %s", sub, code, errs)
		}
	}
}

func TestSetErrors(t *testing.T) {
	for _, tt := range []struct {
		set  string
		want string
	}{
		{"parts.RX.value=1k", `tangent bias: --set parts.RX.value=1k: no part named "RX"`},
		{"parts.RC.value=4x7", `tangent bias: --set parts.RC.value=4x7: "4x7"`},
		{"temperature=85", "tangent bias: --set temperature=85: a temperature needs its unit"},
		{"title=x", `tangent bias: --set title=x: "title" names no key an override can set`},
		{"parts.RC.value", `tangent bias: --set "parts.RC.value": want PATH=VALUE`},
		{`early_effect={value=false, models=["bw_npm"]}`, `early_effect.models[1]: no model named "bw_npm" (did you mean "bw_npn"?)`},
		{"parts.RL.b=nowhere", "no DC path to gnd"},
	} {
		code, out, errs := runArgs("bias", "--set", tt.set)
		if code != exitUsage || out != "" || !strings.Contains(errs, tt.want) {
			t.Errorf("--set %s: exit %d, stderr %q; want 2 and %q", tt.set, code, errs, tt.want)
		}
	}
}
