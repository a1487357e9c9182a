package ac

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/lapack"
)

// Rational is a transfer function H(s) as a real rational function in
// factored form. With the roots at the origin counted apart,
//
//	H(s) = K0 · s^k · Π(1 − s/z) / Π(1 − s/p)      (DC-gain form)
//	     = K  · Π(s − z) / Π(s − p)                 (pole-zero form)
//
// where the DC-gain form's products run over the nonzero zeros z and poles
// p, k = (zeros at 0) − (poles at 0), and the pole-zero form's over all of
// them. Roots are in rad/s. Zeros and Poles exclude the cancelled pairs;
// both lists are closed under conjugation and sorted by modulus, then
// imaginary part. A transfer that is zero at every frequency has K0 = 0 and
// no roots.
type Rational struct {
	K0        float64
	Zeros     []complex128
	Poles     []complex128
	Cancelled []complex128 // one root per cancelled pole-zero pair
}

// Analyze returns the rational transfer function of p: its poles and zeros
// (see Poles and Zeros, computed together from one reduction), less the
// pole-zero pairs that coincide within a relative 1e-7, which go to
// Cancelled, and the constant K0 matched to H evaluated by a direct real
// solve of (G + s0·C)·x = B at a reference point s0 > 0 away from every
// root (banded elimination of the reduced problem, see descriptor).
func Analyze(p *Problem) (*Rational, error) {
	rs, err := problemRoots(p, true)
	if errors.Is(err, ErrZeroTransfer) {
		return &Rational{}, nil
	}
	if err != nil {
		return nil, err
	}
	r := &Rational{}
	r.Poles, r.Zeros, r.Cancelled = cancel(rs.poles, rs.zeros)
	all := append(append([]complex128(nil), rs.poles...), rs.zeros...)
	if err := r.matchGain(rs.h, rs.w0, all); err != nil {
		return nil, err
	}
	return r, nil
}

// matchGain sets r.K0 from H evaluated by h, a direct real solve of
// (G + s0·C)·x = B, at a reference point s0 > 0 away from every root in
// all (the poles and zeros before cancellation); w0 (rad/s) is where to
// look when no root is nonzero.
func (r *Rational) matchGain(h func(s float64) (float64, float64, bool), w0 float64, all []complex128) error {
	// Reference points: below the smallest nonzero root modulus, at their
	// geometric mean and above the largest, each nudged by powers of two
	// until it is 10 % away from every root. Of these, the point where
	// the output is largest relative to the solution vector is taken: a
	// direct solve there has the least cancellation.
	var lsum float64
	lo, hi, cnt := math.Inf(1), 0.0, 0
	for _, v := range all {
		if a := cmplx.Abs(v); a != 0 {
			lsum += math.Log(a)
			lo, hi = math.Min(lo, a), math.Max(hi, a)
			cnt++
		}
	}
	bases := []float64{w0}
	if cnt > 0 {
		bases = []float64{lo * math.Pow(2, -1.63), math.Exp(lsum/float64(cnt)) * math.Pow(2, 0.37), hi * math.Pow(2, 1.37)}
	}
	bestRho, bestS := -1.0, 0.0
	var bestH float64
	for _, base := range bases {
		for k := 0; k < 21; k++ {
			e := (k + 1) / 2
			if k%2 == 0 {
				e = -e
			}
			s := base * math.Pow(2, float64(e))
			d := math.Inf(1)
			for _, v := range all {
				d = math.Min(d, cmplx.Abs(complex(s, 0)-v)/math.Max(s, cmplx.Abs(v)))
			}
			if d < 0.1 {
				continue
			}
			hs, rho, ok := h(s)
			if ok && hs != 0 && rho > bestRho {
				bestRho, bestS, bestH = rho, s, hs
			}
			break
		}
	}
	if bestRho < 0 {
		return errors.New("ac: no reference point where G + s·C is nonsingular and H(s) ≠ 0")
	}
	f := r.shape(complex(bestS, 0))
	r.K0 = real(complex(bestH, 0) / f.value())
	if math.IsInf(r.K0, 0) || math.IsNaN(r.K0) {
		return fmt.Errorf("ac: gain constant out of range at s = %g rad/s", bestS)
	}
	return nil
}

// solveReal returns y = Out·Dc·x̃ where (g + t·c)·x̃ = Dr·B, that is
// H(w0·t), for a real t; the ratio |y|/(‖Dc·Out‖₁·‖x̃‖_∞) ≤ 1, small when y
// comes out of cancellation; and whether g + t·c is safely nonsingular
// (reciprocal condition estimate above 1e-13).
func (sp *scaledPencil) solveReal(b, out []float64, t float64) (float64, float64, bool) {
	n := sp.n
	f := make([]float64, n*n)
	for i := range f {
		f[i] = sp.g[i] + t*sp.c[i]
	}
	work := make([]float64, 4*n)
	anorm := lp.Dlange(lapack.MaxColumnSum, n, n, f, n, work)
	ipiv := make([]int, n)
	if !lp.Dgetrf(n, n, f, n, ipiv) {
		return 0, 0, false
	}
	if lp.Dgecon(lapack.MaxColumnSum, n, f, n, anorm, work, make([]int, n)) < 1e-13 {
		return 0, 0, false
	}
	x := make([]float64, n)
	for i := range x {
		x[i] = sp.dr[i] * b[i]
	}
	lp.Dgetrs(blas.NoTrans, n, 1, f, n, ipiv, x, 1)
	var y, on, xn float64
	for i := range x {
		y += out[i] * sp.dc[i] * x[i]
		on += math.Abs(out[i] * sp.dc[i])
		xn = math.Max(xn, math.Abs(x[i]))
	}
	if on == 0 || xn == 0 {
		return y, 0, true
	}
	return y, math.Abs(y) / (on * xn), true
}

// scaled is a complex number m·2^e kept apart so that long products of
// root factors neither overflow nor underflow.
type scaled struct {
	m complex128
	e int
}

func (a *scaled) mul(z complex128) {
	a.m *= z
	if a.m == 0 || !isFinite(a.m) {
		return
	}
	_, e := math.Frexp(cmplx.Abs(a.m))
	a.m *= complex(math.Ldexp(1, -e), 0)
	a.e += e
}

func (a *scaled) div(z complex128) { a.mul(1 / z) }

func (a scaled) value() complex128 {
	if a.e > 2000 {
		return cmplx.Inf()
	}
	if a.e < -2000 {
		return 0
	}
	return a.m * complex(math.Ldexp(1, a.e), 0)
}

// shape returns s^k·Π(1 − s/z)/Π(1 − s/p) over the nonzero roots.
func (r *Rational) shape(s complex128) scaled {
	f := scaled{m: 1}
	for _, z := range r.Zeros {
		if z == 0 {
			f.mul(s)
		} else {
			f.mul(1 - s/z)
		}
	}
	for _, p := range r.Poles {
		if p == 0 {
			f.div(s)
		} else {
			f.div(1 - s/p)
		}
	}
	return f
}

// Eval returns H(s) from the factored form.
func (r *Rational) Eval(s complex128) complex128 {
	f := r.shape(s)
	f.m *= complex(r.K0, 0)
	return f.value()
}

// originOrder returns k = (zeros at 0) − (poles at 0).
func (r *Rational) originOrder() int {
	k := 0
	for _, z := range r.Zeros {
		if z == 0 {
			k++
		}
	}
	for _, p := range r.Poles {
		if p == 0 {
			k--
		}
	}
	return k
}

// DCGain returns H(0): K0 when there is no root at the origin, 0 for a zero
// there; ok is false for a pole at the origin, where H(0) is infinite.
func (r *Rational) DCGain() (h float64, ok bool) {
	switch k := r.originOrder(); {
	case k < 0:
		return math.Inf(1), false
	case k > 0:
		return 0, true
	}
	return r.K0, true
}

// Gain returns K of the pole-zero form, K0·Π(−p)/Π(−z) over the nonzero
// roots. It may overflow to ±Inf for a high order with roots far from
// 1 rad/s, where the DC-gain form stays representable.
func (r *Rational) Gain() float64 {
	f := scaled{m: complex(r.K0, 0)}
	for _, p := range r.Poles {
		if p != 0 {
			f.mul(-p)
		}
	}
	for _, z := range r.Zeros {
		if z != 0 {
			f.div(-z)
		}
	}
	return real(f.value())
}

// Order returns the highest power of s in the numerator or the
// denominator: the larger of the numbers of zeros and poles.
func (r *Rational) Order() int { return max(len(r.Zeros), len(r.Poles)) }

// Numerator returns the coefficients, in ascending powers of s, of
// N(s) = K0·s^kz·Π(1 − s/z) (nonzero z; kz zeros at the origin), expanded
// in real arithmetic with each conjugate pair multiplied out to
// 1 − (2·Re z/|z|²)·s + s²/|z|².
func (r *Rational) Numerator() []float64 {
	c := expand(r.Zeros)
	for i := range c {
		c[i] *= r.K0
	}
	return c
}

// Denominator returns the coefficients, in ascending powers of s, of
// D(s) = s^kp·Π(1 − s/p), so that H = N/D. Its lowest nonzero coefficient
// is 1.
func (r *Rational) Denominator() []float64 { return expand(r.Poles) }

// expand multiplies out s^k·Π(1 − s/v) for roots v (k of them zero),
// which must be closed under conjugation.
func expand(roots []complex128) []float64 {
	c := []float64{1}
	mul := func(f []float64) {
		out := make([]float64, len(c)+len(f)-1)
		for i, a := range c {
			for j, b := range f {
				out[i+j] += a * b
			}
		}
		c = out
	}
	for _, v := range roots {
		switch {
		case v == 0:
			mul([]float64{0, 1})
		case imag(v) == 0:
			mul([]float64{1, -1 / real(v)})
		case imag(v) > 0:
			a := 1 / cmplx.Abs(v)
			mul([]float64{1, -2 * real(v) * a * a, a * a})
		}
	}
	return c
}

// Pair describes a complex pole pair p, p̄ as a resonance:
// W0 = |p| (rad/s) and Q = |p|/(−2·Re p) (negative for a growing
// oscillation, +Inf on the imaginary axis).
type Pair struct {
	Pole  complex128 // the member with positive imaginary part
	W0, Q float64
}

// Pairs returns the complex pole pairs of r in the order of Poles.
func (r *Rational) Pairs() []Pair {
	var out []Pair
	for _, p := range r.Poles {
		if imag(p) > 0 {
			w0 := cmplx.Abs(p)
			out = append(out, Pair{Pole: p, W0: w0, Q: w0 / (-2 * real(p))})
		}
	}
	return out
}
