package main

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

func TestBiasDefaultExample(t *testing.T) {
	code, out, errOut := runArgs("bias")
	if code != exitOK || errOut != "" {
		t.Fatalf("exit %d, stderr %q", code, errOut)
	}
	for _, want := range []string{
		"Bias point: Soil-moisture probe preamp", "Nodes", "Parts", "Devices", "Power balance", "Warnings",
		"Q1  bjt, model bw_npn: forward active", "Q1.base_resistance", "Q1:base",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	// Same file, same bytes.
	_, again, _ := runArgs("bias")
	if again != out {
		t.Error("two runs gave different reports")
	}
}

// The JSON keys of DESIGN.md's contract, and the physics they must obey:
// the parts' powers sum to zero (Tellegen's theorem) and a bjt's terminal
// currents sum to zero (KCL for the device; common practice).
func TestBiasJSON(t *testing.T) {
	for _, ex := range []string{"example:ce_amplifier", "example:cs_mirror", "example:diode_thermometer", "example:sallen_key"} {
		code, out, errOut := runArgs("bias", "--json", ex)
		if code != exitOK {
			t.Fatalf("%s: exit %d, stderr %s", ex, code, errOut)
		}
		var r struct {
			TemperatureK float64            `json:"temperature_k"`
			Converged    bool               `json:"converged"`
			Iterations   int                `json:"iterations"`
			Nodes        map[string]float64 `json:"nodes"`
			Parts        map[string]struct {
				Current   *float64           `json:"current"`
				Power     *float64           `json:"power"`
				Region    string             `json:"region"`
				Terminals map[string]float64 `json:"terminals"`
				Voltages  map[string]float64 `json:"voltages"`
			} `json:"parts"`
			Warnings []struct{ Kind, Part, Message string } `json:"warnings"`
		}
		if err := json.Unmarshal([]byte(out), &r); err != nil {
			t.Fatalf("%s: %v\n%s", ex, err, out)
		}
		if r.TemperatureK != 300.15 || !r.Converged || r.Iterations < 1 || len(r.Nodes) == 0 {
			t.Errorf("%s: header %+v", ex, r)
		}
		var sum, big float64
		for name, p := range r.Parts {
			if p.Current == nil || p.Power == nil {
				t.Errorf("%s: part %s lacks current or power", ex, name)
				continue
			}
			sum += *p.Power
			big = math.Max(big, math.Abs(*p.Power))
			if p.Region != "" {
				var isum, imax float64
				for _, i := range p.Terminals {
					isum += i
					imax = math.Max(imax, math.Abs(i))
				}
				if math.Abs(isum) > 1e-12*imax || len(p.Voltages) == 0 {
					t.Errorf("%s: device %s: terminals %v, voltages %v", ex, name, p.Terminals, p.Voltages)
				}
			}
		}
		if math.Abs(sum) > 1e-9*big {
			t.Errorf("%s: powers sum to %g W", ex, sum)
		}
	}
	code, out, _ := runArgs("bias", "--json", "example:ce_amplifier")
	if code != exitOK || !strings.Contains(out, `"be": 0.669`) || !strings.Contains(out, `"region": "forward_active"`) {
		t.Errorf("ce_amplifier JSON:\n%s", out)
	}
}

func TestBiasExitStatus(t *testing.T) {
	starved := filepath.Join("..", "..", "testdata", "dc", "starved_solver.toml")
	tests := []struct {
		args   []string
		code   int
		stderr string // a part of the message
	}{
		{[]string{"bias", "--no-such-flag"}, exitUsage, "unknown flag"},
		{[]string{"bias", "a.toml", "b.toml"}, exitUsage, "one FILE at most"},
		{[]string{"bias", filepath.Join("..", "..", "testdata", "no-such-file.toml")}, exitUsage, "no-such-file"},
		{[]string{"bias", starved}, exitAnalysis, "tried conductance_continuation"},
		{[]string{"bias", "--json", starved}, exitAnalysis, "no operating point found"},
	}
	for _, tt := range tests {
		code, out, errOut := runArgs(tt.args...)
		if code != tt.code || !strings.Contains(errOut, tt.stderr) {
			t.Errorf("%v: exit %d, stderr %q; want exit %d and %q", tt.args, code, errOut, tt.code, tt.stderr)
		}
		if tt.args[1] == "--json" && !strings.Contains(out, `"converged": false`) {
			t.Errorf("%v: JSON failure report:\n%s", tt.args, out)
		}
	}
}

// A 230 V supply is above the 120 V ripple-free DC limit of extra-low
// voltage (IEC 61140): the report must say so, with the caution.
func TestBiasELVWarning(t *testing.T) {
	code, out, errOut := runArgs("bias", filepath.Join("..", "..", "testdata", "dc", "mains_dropper.toml"))
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	flat := strings.Join(strings.Fields(out), " ") // the message is wrapped
	for _, want := range []string{"120 V ripple-free DC limit", "IEC 61140", "local codes and licensed practice"} {
		if !strings.Contains(flat, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
}

func TestFormatEng(t *testing.T) {
	// SI prefixes (SI Brochure, 9th edition, table 7).
	tests := []struct {
		v    float64
		unit string
		want string
	}{
		{0, "V", "0 V"},
		{1.23456e-3, "A", "1.235 mA"},
		{-3.1, "V", "−3.100 V"},
		{12, "V", "12.00 V"},
		{999.96, "Ω", "1.000 kΩ"},
		{4.7e3, "Ω", "4.700 kΩ"},
		{2.2e-6, "F", "2.200 µF"},
		{-43e-18, "W", "−43.00 aW"},
		{4.044e-35, "W", "4.044e-35 W"},
		{1, "", "1.000"},
	}
	for _, tt := range tests {
		if got := formatEng(tt.v, tt.unit); got != tt.want {
			t.Errorf("formatEng(%g, %q) = %q, want %q", tt.v, tt.unit, got, tt.want)
		}
	}
}
