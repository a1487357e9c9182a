package ac

import (
	"math/cmplx"
	"testing"
)

// Every parameter set obtained from z by To satisfies its defining
// equations (the definitions in ParamKind's doc, standard two-port theory)
// for port voltages and currents computed from z.
func TestTwoPortDefinitions(t *testing.T) {
	z := TwoPort{Kind: ZParams, M: [2][2]complex128{{50 + 10i, 12 - 3i}, {-400 + 25i, 2e3 - 150i}}}
	i1, i2 := complex(1e-3, 2e-4), complex(-3e-4, 5e-4)
	v1 := z.M[0][0]*i1 + z.M[0][1]*i2
	v2 := z.M[1][0]*i1 + z.M[1][1]*i2
	check := func(kind ParamKind, in1, in2, out1, out2 complex128) {
		t.Helper()
		p, err := z.To(kind)
		if err != nil {
			t.Fatal(err)
		}
		g1 := p.M[0][0]*in1 + p.M[0][1]*in2
		g2 := p.M[1][0]*in1 + p.M[1][1]*in2
		if relErr(g1, out1) > 1e-12 || relErr(g2, out2) > 1e-12 {
			t.Errorf("%v: got (%v, %v), want (%v, %v)", kind, g1, g2, out1, out2)
		}
	}
	check(YParams, v1, v2, i1, i2)
	check(HParams, i1, v2, v1, i2)
	check(GParams, v1, i2, i1, v2)
	check(ABCDParams, v2, -i2, v1, i1)
}

// z → y → h → abcd → z (and through g) returns z to 1e-12.
func TestTwoPortRoundTrip(t *testing.T) {
	z := TwoPort{Kind: ZParams, M: [2][2]complex128{{1e3 - 20i, 3e2 + 5i}, {2.5e4 - 1e3i, 8e3 + 40i}}}
	cur := z
	for _, k := range []ParamKind{YParams, HParams, ABCDParams, GParams, ZParams, ABCDParams, YParams, GParams, HParams, ZParams} {
		next, err := cur.To(k)
		if err != nil {
			t.Fatalf("%v → %v: %v", cur.Kind, k, err)
		}
		cur = next
	}
	for i := 0; i < 2; i++ {
		for j := 0; j < 2; j++ {
			if e := cmplx.Abs(cur.M[i][j]-z.M[i][j]) / cmplx.Abs(z.M[i][j]); e > 1e-12 {
				t.Errorf("z%d%d = %v after the round trip, want %v", i+1, j+1, cur.M[i][j], z.M[i][j])
			}
		}
	}
}

// A series impedance has y but no z (its z matrix does not exist: the
// y matrix is singular); a shunt admittance has z but no y (standard
// two-port theory, common practice).
func TestTwoPortSingular(t *testing.T) {
	zs := complex(100, 0)
	series := TwoPort{Kind: YParams, M: [2][2]complex128{{1 / zs, -1 / zs}, {-1 / zs, 1 / zs}}}
	if _, err := series.To(ZParams); err == nil {
		t.Error("series element: z parameters returned, want an error")
	}
	if a, err := series.To(ABCDParams); err != nil || relErr(a.M[0][1], zs) > 1e-15 || relErr(a.M[0][0], 1) > 1e-15 {
		t.Errorf("series element ABCD = %v, %v; want A = 1, B = Z", a, err)
	}
	shunt := TwoPort{Kind: ZParams, M: [2][2]complex128{{zs, zs}, {zs, zs}}}
	if _, err := shunt.To(YParams); err == nil {
		t.Error("shunt element: y parameters returned, want an error")
	}
}
