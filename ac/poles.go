package ac

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/mat"
)

// ErrZeroTransfer is returned (wrapped) by Zeros when H(s) is zero for
// every s: the output does not see the input at all.
var ErrZeroTransfer = errors.New("ac: the transfer is zero at every frequency")

// cancelTol is the relative distance |p − z| ≤ cancelTol·max(|p|, |z|)
// under which a pole and a zero are one cancelled root. Refined roots are
// good to about 1e-12 relative, roots of a cluster to about 1e-8; distinct
// roots of a practical network are far more than 1e-7 apart.
const cancelTol = 1e-7

// Poles returns the finite poles of p, before cancellation: the roots of
// det(G + s·C) = 0 in rad/s (see PencilRoots for the method and order).
// The error wraps ErrSingularPencil when the circuit's equations are
// singular at every frequency.
func Poles(p *Problem) ([]complex128, error) {
	r, err := problemRoots(p, false)
	if err != nil {
		return nil, err
	}
	return r.poles, nil
}

// Zeros returns the finite zeros of p, before cancellation: the finite
// generalized eigenvalues s of the bordered pencil
//
//	[ G   B ] + s·[ C  0 ]
//	[ Out 0 ]     [ 0  0 ]
//
// in rad/s. Its determinant is −det(G + s·C)·H(s), so its roots are the
// zeros of H together with the modes that H does not see (the latter are
// also poles and cancel). They are computed as the eigenvalues of the
// zero dynamics of the circuit's state-space form (see zeroDynamics) and
// refined against H itself (see refineZeros). The error wraps
// ErrZeroTransfer when H ≡ 0.
func Zeros(p *Problem) ([]complex128, error) {
	r, err := problemRoots(p, true)
	if err != nil {
		return nil, err
	}
	return r.zeros, nil
}

// roots is what problemRoots finds out about a Problem.
type roots struct {
	poles, zeros []complex128
	// h evaluates H(s) at a real s > 0 (rad/s); rho ≤ 1 is the ratio of
	// |H| to the largest term it is summed from (small when H comes out
	// of cancellation); ok is false where the problem is singular.
	h  func(s float64) (h, rho float64, ok bool)
	w0 float64 // the balanced frequency unit, rad/s
}

// problemRoots returns the poles and, with wantZeros set, the zeros of p:
// by systemRoots, or by the general path of PencilRoots where structure
// leaves a singular c.
func problemRoots(p *Problem, wantZeros bool) (*roots, error) {
	bp, err := newBordered(p)
	if err != nil {
		return nil, err
	}
	r := roots{w0: bp.w0}
	var de *descriptor
	r.poles, r.zeros, de, err = systemRoots(bp, wantZeros)
	switch {
	case err != nil:
	case de != nil:
		w0 := bp.w0
		r.h = func(s float64) (float64, float64, bool) { return de.hReal(s / w0) }
	default:
		r.poles, r.zeros, err = generalProblemRoots(p, wantZeros)
		sp, berr := balance(p.G, p.C)
		if berr != nil {
			return nil, berr
		}
		r.h = func(s float64) (float64, float64, bool) { return sp.solveReal(p.B, p.Out, s/sp.w0) }
	}
	if errors.Is(err, ErrSingularPencil) {
		return nil, fmt.Errorf("%w (the circuit has a floating node, a loop of voltage sources or a cut-set of current sources)", err)
	}
	if err != nil {
		return nil, err
	}
	return &r, nil
}

// generalProblemRoots is problemRoots by the general path of PencilRoots
// on G + s·C and on the bordered pencil.
func generalProblemRoots(p *Problem, wantZeros bool) (poles, zeros []complex128, err error) {
	p0, err := balance(p.G, p.C)
	if err != nil {
		return nil, nil, err
	}
	if poles, err = generalRoots(p0); err != nil || !wantZeros {
		return poles, nil, err
	}
	g, c := bordered(p)
	b0, err := balance(g, c)
	if err != nil {
		return nil, nil, err
	}
	zeros, err = generalRoots(b0)
	if errors.Is(err, ErrSingularPencil) {
		return nil, nil, ErrZeroTransfer
	}
	return poles, zeros, err
}

// bordered returns the system pencil of the zeros.
func bordered(p *Problem) (g, c *mat.Dense) {
	n, _ := p.G.Dims()
	g = mat.NewDense(n+1, n+1, nil)
	c = mat.NewDense(n+1, n+1, nil)
	g.Slice(0, n, 0, n).(*mat.Dense).Copy(p.G)
	c.Slice(0, n, 0, n).(*mat.Dense).Copy(p.C)
	for i := 0; i < n; i++ {
		g.Set(i, n, p.B[i])
		g.Set(n, i, p.Out[i])
	}
	return g, c
}

// cancel removes coincident pole-zero pairs (relative distance at most
// cancelTol; two roots at the origin coincide) and returns what is left of
// each list and the cancelled roots (the pole of each pair). Pairs are
// matched nearest first in the order of the sorted poles.
func cancel(poles, zeros []complex128) (p, z, c []complex128) {
	used := make([]bool, len(zeros))
	for _, pp := range poles {
		best, bd := -1, math.Inf(1)
		for j, zz := range zeros {
			if used[j] {
				continue
			}
			d := cmplx.Abs(pp - zz)
			if d <= cancelTol*math.Max(cmplx.Abs(pp), cmplx.Abs(zz)) && d < bd {
				best, bd = j, d
			}
		}
		if best >= 0 {
			used[best] = true
			c = append(c, pp)
			continue
		}
		p = append(p, pp)
	}
	for j, zz := range zeros {
		if !used[j] {
			z = append(z, zz)
		}
	}
	return p, z, c
}
