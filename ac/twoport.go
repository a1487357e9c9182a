package ac

import (
	"fmt"
	"math"
	"math/cmplx"
)

// ParamKind names a two-port parameter set. With V1, I1 at port 1 and
// V2, I2 at port 2, both currents flowing into the two-port at the plus
// terminal:
//
//	Z:    [V1 V2]ᵀ = Z·[I1 I2]ᵀ      (impedance, Ω)
//	Y:    [I1 I2]ᵀ = Y·[V1 V2]ᵀ      (admittance, S)
//	H:    [V1 I2]ᵀ = H·[I1 V2]ᵀ      (hybrid)
//	G:    [I1 V2]ᵀ = G·[V1 I2]ᵀ      (inverse hybrid)
//	ABCD: [V1 I1]ᵀ = T·[V2 −I2]ᵀ     (chain, transmission)
type ParamKind int

// Two-port parameter kinds.
const (
	ZParams ParamKind = iota
	YParams
	HParams
	GParams
	ABCDParams
)

func (k ParamKind) String() string {
	switch k {
	case ZParams:
		return "z"
	case YParams:
		return "y"
	case HParams:
		return "h"
	case GParams:
		return "g"
	case ABCDParams:
		return "abcd"
	}
	return fmt.Sprintf("ParamKind(%d)", int(k))
}

// TwoPort is a 2×2 complex parameter matrix of one kind at one frequency:
// M[0][0] is z11 (or y11, h11, g11, A), M[0][1] z12 (… B), M[1][0] z21
// (… C), M[1][1] z22 (… D).
type TwoPort struct {
	Kind ParamKind
	M    [2][2]complex128
}

// To converts t to another parameter set by the standard conversion
// formulas (any circuit-theory text's two-port table; from memory), each
// a direct formula in the entries of t and its determinant Δ. It returns
// an error, and no parameters, where the target set does not exist: the
// divisor of the formula (a parameter or Δ) is zero, or below 1e-15 times
// the size of the terms it is made of.
func (t TwoPort) To(kind ParamKind) (TwoPort, error) {
	m := t.M
	a, b, c, d := m[0][0], m[0][1], m[1][0], m[1][1]
	det := a*d - b*c
	detScale := cmplx.Abs(a*d) + cmplx.Abs(b*c)
	scale := math.Max(math.Max(cmplx.Abs(a), cmplx.Abs(b)), math.Max(cmplx.Abs(c), cmplx.Abs(d)))
	out := TwoPort{Kind: kind}
	if kind == t.Kind {
		out.M = m
		return out, nil
	}
	fail := func(what string) (TwoPort, error) {
		return TwoPort{}, fmt.Errorf("ac: two-port: no %v parameters: %s%s is zero", kind, t.Kind, what)
	}
	// div checks a divisor against the scale of what it is made of.
	small := func(v complex128, sc float64) bool { return cmplx.Abs(v) <= 1e-15*sc || v == 0 }
	set := func(m00, m01, m10, m11 complex128) (TwoPort, error) {
		out.M = [2][2]complex128{{m00, m01}, {m10, m11}}
		return out, nil
	}
	// Inversion: Z↔Y and H↔G.
	if (t.Kind == ZParams && kind == YParams) || (t.Kind == YParams && kind == ZParams) ||
		(t.Kind == HParams && kind == GParams) || (t.Kind == GParams && kind == HParams) {
		if small(det, detScale) {
			return fail(" determinant")
		}
		return set(d/det, -b/det, -c/det, a/det)
	}
	switch t.Kind {
	case ZParams:
		switch kind {
		case HParams:
			if small(d, scale) {
				return fail("22")
			}
			return set(det/d, b/d, -c/d, 1/d)
		case GParams:
			if small(a, scale) {
				return fail("11")
			}
			return set(1/a, -b/a, c/a, det/a)
		case ABCDParams:
			if small(c, scale) {
				return fail("21")
			}
			return set(a/c, det/c, 1/c, d/c)
		}
	case YParams:
		switch kind {
		case HParams:
			if small(a, scale) {
				return fail("11")
			}
			return set(1/a, -b/a, c/a, det/a)
		case GParams:
			if small(d, scale) {
				return fail("22")
			}
			return set(det/d, b/d, -c/d, 1/d)
		case ABCDParams:
			if small(c, scale) {
				return fail("21")
			}
			return set(-d/c, -1/c, -det/c, -a/c)
		}
	case HParams:
		switch kind {
		case ZParams:
			if small(d, scale) {
				return fail("22")
			}
			return set(det/d, b/d, -c/d, 1/d)
		case YParams:
			if small(a, scale) {
				return fail("11")
			}
			return set(1/a, -b/a, c/a, det/a)
		case ABCDParams:
			if small(c, scale) {
				return fail("21")
			}
			return set(-det/c, -a/c, -d/c, -1/c)
		}
	case GParams:
		switch kind {
		case ZParams:
			if small(a, scale) {
				return fail("11")
			}
			return set(1/a, -b/a, c/a, det/a)
		case YParams:
			if small(d, scale) {
				return fail("22")
			}
			return set(det/d, b/d, -c/d, 1/d)
		case ABCDParams:
			if small(c, scale) {
				return fail("21")
			}
			return set(1/c, d/c, a/c, det/c)
		}
	case ABCDParams:
		switch kind {
		case ZParams:
			if small(c, scale) {
				return fail(" C")
			}
			return set(a/c, det/c, 1/c, d/c)
		case YParams:
			if small(b, scale) {
				return fail(" B")
			}
			return set(d/b, -det/b, -1/b, a/b)
		case HParams:
			if small(d, scale) {
				return fail(" D")
			}
			return set(b/d, det/d, -1/d, c/d)
		case GParams:
			if small(a, scale) {
				return fail(" A")
			}
			return set(c/a, -det/a, 1/a, b/a)
		}
	}
	return TwoPort{}, fmt.Errorf("ac: two-port: unknown parameter kinds %v → %v", t.Kind, kind)
}
