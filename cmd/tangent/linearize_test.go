package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestLinearizeJSON(t *testing.T) {
	code, out, errs := runArgs("linearize", "--json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Devices map[string]map[string]any `json:"devices"`
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	q, ok := doc.Devices["Q1"]
	if !ok {
		t.Fatalf("no Q1 in %s", out)
	}
	// DESIGN.md's bjt keys; r_mu is null for a junction this far reversed.
	for _, k := range []string{"gm", "r_pi", "r_o", "r_mu", "c_pi", "c_mu", "beta_ac", "f_t"} {
		if _, ok := q[k]; !ok {
			t.Errorf("Q1 has no %q", k)
		}
	}
	if q["r_mu"] != nil {
		t.Errorf("r_mu = %v, want null", q["r_mu"])
	}
	// gm ≈ Ic/VT at about 0.92 mA and 300.15 K (common practice: 35–36 mS).
	if gm := q["gm"].(float64); math.Abs(gm-0.0355) > 0.001 {
		t.Errorf("gm = %g S", gm)
	}
}

func TestLinearizeExport(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"ce_amplifier", "cs_mirror", "diode_thermometer", "sallen_key"} {
		out := filepath.Join(dir, name+"_linear.toml")
		code, _, errs := runArgs("linearize", "example:"+name, "--export", out)
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", name, code, errs)
		}
		data, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		if strings.Contains(string(data), `kind = "bjt"`) || strings.Contains(string(data), `kind = "mosfet"`) {
			t.Errorf("%s: the equivalent still has a device:\n%s", name, data)
		}
		// tangent reads its own export back.
		if code, _, errs := runArgs("check", out); code != exitOK {
			t.Errorf("%s: check of the export: exit %d: %s", name, code, errs)
		}
	}
	// A directory that does not exist: exit 2, no stray file.
	code, _, errs := runArgs("linearize", "--export", filepath.Join(dir, "missing", "x.toml"))
	if code != exitUsage || errs == "" {
		t.Errorf("export to a missing folder: exit %d, stderr %q", code, errs)
	}
}
