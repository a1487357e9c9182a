package ac_test

import (
	"fmt"
	"testing"

	"tangent/ac"
	"tangent/cases"
	"tangent/dc"
	"tangent/smallsignal"
)

// The common-emitter example couples its input and output through series
// capacitors (CIN, COUT): its voltage gain has exactly two zeros at the
// origin and a DC gain of exactly 0 at every temperature (circuit theory:
// a series capacitor is an open at DC, and each contributes one factor s).
// A test on the computed H(0) once missed them at 70 °C, where rounding
// split the double zero into ±6e-7 rad/s.
func TestSeriesCapacitorZerosAtOrigin(t *testing.T) {
	for _, temp := range []string{"-40 °C", "0 °C", "27 °C", "70 °C", "85 °C", "125 °C"} {
		t.Run(temp, func(t *testing.T) {
			c, err := cases.Example("ce_amplifier")
			if err != nil {
				t.Fatal(err)
			}
			c, err = c.WithOverrides([]cases.Override{{Path: []string{"temperature"}, Value: temp}})
			if err != nil {
				t.Fatal(err)
			}
			op, err := dc.Solve(c)
			if err != nil {
				t.Fatal(err)
			}
			eq, err := smallsignal.Linearize(op)
			if err != nil {
				t.Fatal(err)
			}
			res, err := ac.Analyse(eq.Circuit, &cases.Transfer{From: "in", To: "out", Kind: cases.VoltageGain}, nil)
			if err != nil {
				t.Fatal(err)
			}
			r := res.Rational
			if k := r.OriginPower(); k != 2 {
				t.Errorf("s^%d at the origin, want s^2; zeros %v", k, r.Zeros)
			}
			if g, ok := r.DCGain(); !ok || g != 0 {
				t.Errorf("DC gain %g (ok %v), want exactly 0", g, ok)
			}
			if res.Bandwidth.HighHz == nil || res.Bandwidth.LowHz == nil {
				t.Errorf("band edges missing: %s", fmt.Sprint(res.Bandwidth))
			}
		})
	}
}
