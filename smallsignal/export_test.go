package smallsignal_test

import (
	"bytes"
	"math"
	"testing"

	"tangent/cases"
	"tangent/dc"
	"tangent/mna"
	"tangent/smallsignal"
)

func linearizeCase(t *testing.T, c *cases.Circuit) *smallsignal.Equivalent {
	t.Helper()
	op, err := dc.Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	eq, err := smallsignal.Linearize(op)
	if err != nil {
		t.Fatal(err)
	}
	return eq
}

// dense sums triplets into a map keyed by (row, col).
func dense(ts mna.Triplets) map[[2]int]float64 {
	m := map[[2]int]float64{}
	for _, e := range ts {
		m[[2]int{e.Row, e.Col}] += e.Value
	}
	return m
}

// The exported equivalent, read back by tangent's own decoder and
// linearized again, must give the same G and C matrices (to 1e-12
// relative): the export loses nothing. (Self-consistency check required
// by the design; the matrices themselves are checked against outside
// references in package ac and by the DC-slope test.)
func TestExportRoundTrip(t *testing.T) {
	for _, name := range cases.Examples() {
		t.Run(name, func(t *testing.T) {
			c, err := cases.Example(name)
			if err != nil {
				t.Fatal(err)
			}
			eq := linearizeCase(t, c)
			var buf bytes.Buffer
			if err := smallsignal.Export(&buf, eq.Circuit, "linear equivalent of "+name); err != nil {
				t.Fatal(err)
			}
			back, err := cases.Parse(name+"_linear.toml", buf.Bytes())
			if err != nil {
				t.Fatalf("exported file does not read back: %v\n%s", err, buf.String())
			}
			eq2 := linearizeCase(t, back)
			s1, err := mna.Build(eq.Circuit)
			if err != nil {
				t.Fatal(err)
			}
			s2, err := mna.Build(eq2.Circuit)
			if err != nil {
				t.Fatal(err)
			}
			if len(s1.Layout.Unknowns) != len(s2.Layout.Unknowns) {
				t.Fatalf("%d unknowns, read back %d", len(s1.Layout.Unknowns), len(s2.Layout.Unknowns))
			}
			for i, u := range s1.Layout.Unknowns {
				if s2.Layout.Unknowns[i] != u {
					t.Fatalf("unknown %d: %v, read back %v", i, u, s2.Layout.Unknowns[i])
				}
			}
			for _, m := range []struct {
				name string
				a, b mna.Triplets
			}{{"G", s1.G, s2.G}, {"C", s1.C, s2.C}} {
				a, b := dense(m.a), dense(m.b)
				var scale float64
				for _, v := range a {
					scale = math.Max(scale, math.Abs(v))
				}
				for k, v := range a {
					if math.Abs(v-b[k]) > 1e-12*math.Abs(v) {
						t.Errorf("%s%v = %g, read back %g", m.name, k, v, b[k])
					}
				}
				for k, v := range b {
					if _, ok := a[k]; !ok && math.Abs(v) > 1e-12*scale {
						t.Errorf("%s%v = %g only in the file read back", m.name, k, v)
					}
				}
			}
		})
	}
}
