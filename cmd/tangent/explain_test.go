package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// "tangent explain --json" on the default example (the common-emitter
// amplifier): the documented keys, the open-circuit identity Σ τ = b1
// (Gray & Meyer; from memory) and the Miller-multiplied Cμ setting the
// upper corner (textbook result; from memory).
func TestExplainJSON(t *testing.T) {
	code, out, errs := runArgs("explain", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		File         string                       `json:"file"`
		Explanations []map[string]json.RawMessage `json:"explanations"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Explanations) != 3 {
		t.Fatalf("%d explanations, want the file's 3 transfers", len(doc.Explanations))
	}
	x := doc.Explanations[0]
	for _, k := range []string{"from", "to", "kind", "unit", "summary", "elements", "poles", "zeros", "open_circuit",
		"short_circuit", "f_high_estimate", "f_low_estimate", "port_equivalents", "notes"} {
		if _, ok := x[k]; !ok {
			t.Errorf("explanation has no %q", k)
		}
	}
	var summary struct {
		ReferenceAt string   `json:"reference_at"`
		HighPole    *int     `json:"high_pole"`
		Text        []string `json:"text"`
	}
	json.Unmarshal(x["summary"], &summary)
	if summary.ReferenceAt != "mid_band" || summary.HighPole == nil || len(summary.Text) < 3 {
		t.Errorf("summary %+v", summary)
	}
	if !strings.Contains(strings.Join(summary.Text, "\n"), "set by Q1 c_mu") {
		t.Errorf("summary does not name Q1 c_mu:\n%s", strings.Join(summary.Text, "\n"))
	}
	var oc struct {
		Sum float64 `json:"sum_s"`
		B1  float64 `json:"b1_s"`
	}
	json.Unmarshal(x["open_circuit"], &oc)
	if math.Abs(oc.Sum-oc.B1) > 1e-9*oc.B1 || oc.Sum == 0 {
		t.Errorf("open circuit Σ τ = %g, b1 = %g", oc.Sum, oc.B1)
	}
	var high struct {
		Error         float64 `json:"error"`
		TimeConstants []struct {
			Element string   `json:"element"`
			Miller  *float64 `json:"miller"`
		} `json:"time_constants"`
	}
	json.Unmarshal(x["f_high_estimate"], &high)
	if math.Abs(high.Error) > 0.05 || len(high.TimeConstants) == 0 || high.TimeConstants[0].Element != "Q1_c_mu" ||
		high.TimeConstants[0].Miller == nil || *high.TimeConstants[0].Miller < 10 {
		t.Errorf("f_high estimate %+v: want Q1 c_mu first, Miller-multiplied, within 5 %%", high)
	}
	var poles []struct {
		Re            float64 `json:"re"`
		Sensitivities []struct {
			Element      string  `json:"element"`
			Re           float64 `json:"re"`
			StorageShare float64 `json:"storage_share"`
		} `json:"sensitivities"`
	}
	json.Unmarshal(x["poles"], &poles)
	if len(poles) != 5 {
		t.Fatalf("%d poles, want 5", len(poles))
	}
	for _, p := range poles {
		var sum float64
		for _, s := range p.Sensitivities {
			sum += s.StorageShare
		}
		if math.Abs(sum-1) > 1e-9 { // Euler's theorem on C and L scaling (see package explain)
			t.Errorf("pole %g: storage shares sum to %g", p.Re, sum)
		}
	}
	var pes []struct {
		Port     string          `json:"port"`
		Thevenin json.RawMessage `json:"thevenin_impedance"`
		Norton   json.RawMessage `json:"norton_current"`
	}
	json.Unmarshal(x["port_equivalents"], &pes)
	if len(pes) != 1 || pes[0].Port != "out" || len(pes[0].Thevenin) < 10 || len(pes[0].Norton) < 10 {
		t.Errorf("port equivalents %s", x["port_equivalents"])
	}
}

func TestExplainText(t *testing.T) {
	code, out, errs := runArgs("explain", "example:ce_amplifier", "--from", "in", "--to", "out", "--kind", "voltage", "--top", "2")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, k := range []string{"Hand-analysis aids", "in → out, voltage gain", "summary", "mid-band gain",
		"poles: what sets each", "Q1 c_mu", "Miller ×", "open-circuit time constants", "Σ τ =", "short-circuit time constants",
		"f_low estimate", "port out seen from outside", "Thevenin impedance", "Norton current"} {
		if !strings.Contains(out, k) {
			t.Errorf("no %q in\n%s", k, out)
		}
	}
	if strings.Count(out, "\nin → out") != 1 {
		t.Errorf("want the one transfer of the flags:\n%s", out)
	}
}

func TestExplainPorts(t *testing.T) {
	code, out, errs := runArgs("explain", "example:sallen_key", "--json", "--port", "out")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// The filter's output is a vcvs (an ideal voltage source): Zth ≡ 0 and
	// no Norton equivalent (common practice).
	if !strings.Contains(out, `"no_norton"`) || !strings.Contains(out, `"norton_current": null`) {
		t.Errorf("want a port without a Norton equivalent:\n%s", out)
	}
}

func TestExplainExitStatus(t *testing.T) {
	for _, tt := range []struct {
		args   []string
		code   int
		stderr string
	}{
		{[]string{"explain", "--kind", "gain", "--from", "in", "--to", "out"}, exitUsage, "--kind"},
		{[]string{"explain", "--from", "in"}, exitUsage, "go together"},
		{[]string{"explain", "--from", "nope", "--to", "out"}, exitUsage, "no port"},
		{[]string{"explain", "--port", "nope"}, exitUsage, "--port"},
		{[]string{"explain", "--top", "0"}, exitUsage, "--top"},
		{[]string{"explain", "--no-such-flag"}, exitUsage, "unknown flag"},
		{[]string{"explain", "a.toml", "b.toml"}, exitUsage, "one FILE at most"},
		{[]string{"explain", "no-such-file.toml"}, exitUsage, "no-such-file"},
		// A short across an ideal (vcvs) output: the transfer is singular.
		{[]string{"explain", "example:sallen_key", "--from", "in", "--to", "out", "--kind", "transconductance"}, exitAnalysis, "singular"},
	} {
		code, _, errOut := runArgs(tt.args...)
		if code != tt.code || !strings.Contains(errOut, tt.stderr) {
			t.Errorf("%v: exit %d, stderr %q; want exit %d and %q", tt.args, code, errOut, tt.code, tt.stderr)
		}
	}
}
