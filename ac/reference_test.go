package ac

import (
	"math/big"
	"math/cmplx"
	"testing"
)

// directErr returns the relative error of got against H(s) by a direct
// solve of (G + s·C)·x = B: first evalProblem (Gaussian elimination with
// partial pivoting in float64); where that differs from got by more than
// tol, the same elimination in 128-bit math/big arithmetic (exactSolve)
// decides. Far in the stop band of a long network, the float64
// elimination of the unscaled matrix loses digits itself (up to 1e-5 on a
// 60-node RLC network, checked against a 200-bit solve), which is no
// fault of got.
func directErr(t *testing.T, p *Problem, s, got complex128, tol float64) float64 {
	t.Helper()
	if e := relErr(got, evalProblem(t, p, s)); e <= tol {
		return e
	}
	return relErr(got, exactSolve(p, s, 128))
}

// bigComplex is a complex number with math/big parts.
type bigComplex struct{ re, im *big.Float }

// exactSolve returns Out·x for (G + s·C)·x = B solved by Gaussian
// elimination with partial pivoting in prec-bit binary floating point
// (math/big), forming G + s·C in that precision too; zero entries are
// skipped. A test-only reference independent of the pencil code.
func exactSolve(p *Problem, s complex128, prec uint) complex128 {
	n, _ := p.G.Dims()
	nf := func(x float64) *big.Float { return new(big.Float).SetPrec(prec).SetFloat64(x) }
	zero := func(a bigComplex) bool { return a.re.Sign() == 0 && a.im.Sign() == 0 }
	mul := func(a, b bigComplex) bigComplex {
		r := new(big.Float).SetPrec(prec).Mul(a.re, b.re)
		r.Sub(r, new(big.Float).SetPrec(prec).Mul(a.im, b.im))
		i := new(big.Float).SetPrec(prec).Mul(a.re, b.im)
		i.Add(i, new(big.Float).SetPrec(prec).Mul(a.im, b.re))
		return bigComplex{r, i}
	}
	sub := func(a, b bigComplex) bigComplex {
		return bigComplex{new(big.Float).SetPrec(prec).Sub(a.re, b.re), new(big.Float).SetPrec(prec).Sub(a.im, b.im)}
	}
	abs2 := func(a bigComplex) *big.Float {
		r := new(big.Float).SetPrec(prec).Mul(a.re, a.re)
		return r.Add(r, new(big.Float).SetPrec(prec).Mul(a.im, a.im))
	}
	inv := func(a bigComplex) bigComplex {
		d := abs2(a)
		return bigComplex{new(big.Float).SetPrec(prec).Quo(a.re, d), new(big.Float).SetPrec(prec).Quo(new(big.Float).SetPrec(prec).Neg(a.im), d)}
	}
	a := make([][]bigComplex, n)
	for i := range a {
		a[i] = make([]bigComplex, n+1)
		for j := 0; j < n; j++ {
			re := new(big.Float).SetPrec(prec).Mul(nf(real(s)), nf(p.C.At(i, j)))
			re.Add(re, nf(p.G.At(i, j)))
			im := new(big.Float).SetPrec(prec).Mul(nf(imag(s)), nf(p.C.At(i, j)))
			a[i][j] = bigComplex{re, im}
		}
		a[i][n] = bigComplex{nf(p.B[i]), nf(0)}
	}
	for k := 0; k < n; k++ {
		piv := k
		for i := k + 1; i < n; i++ {
			if abs2(a[i][k]).Cmp(abs2(a[piv][k])) > 0 {
				piv = i
			}
		}
		a[k], a[piv] = a[piv], a[k]
		if zero(a[k][k]) {
			return cmplx.NaN()
		}
		ik := inv(a[k][k])
		for i := k + 1; i < n; i++ {
			if zero(a[i][k]) {
				continue
			}
			f := mul(a[i][k], ik)
			for j := k; j <= n; j++ {
				if !zero(a[k][j]) {
					a[i][j] = sub(a[i][j], mul(f, a[k][j]))
				}
			}
		}
	}
	x := make([]bigComplex, n)
	for i := n - 1; i >= 0; i-- {
		sum := a[i][n]
		for j := i + 1; j < n; j++ {
			if !zero(a[i][j]) {
				sum = sub(sum, mul(a[i][j], x[j]))
			}
		}
		x[i] = mul(sum, inv(a[i][i]))
	}
	yr, yi := nf(0), nf(0)
	for i, o := range p.Out {
		if o != 0 {
			yr.Add(yr, new(big.Float).SetPrec(prec).Mul(nf(o), x[i].re))
			yi.Add(yi, new(big.Float).SetPrec(prec).Mul(nf(o), x[i].im))
		}
	}
	r, _ := yr.Float64()
	im, _ := yi.Float64()
	return complex(r, im)
}
