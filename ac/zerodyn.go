package ac

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/lapack"
)

// relativeDegree returns the structural relative degree of H(t) =
// o·(t·I − A)⁻¹·b (d = e = 0): the least k ≥ 1 for which the Markov
// parameter o·A^(k−1)·b is structurally nonzero, that is for which a walk
// of k−1 steps along nonzero entries of A leads from an entry of b to an
// entry of o. It returns 0 when there is none within m steps, in which
// case H ≡ 0 (Cayley-Hamilton).
//
// The zero pattern is the exact one of the computed A, b and o: entries
// that are structurally zero in the circuit stay exactly zero through the
// eliminations and the LU solves that produce them (no rounding turns an
// exact zero into a nonzero). Deciding the relative degree on structure
// rather than on the size of computed Markov parameters is what keeps the
// zeros at infinity exact: a numerically decided one would either miss
// some of them (they then reappear as a ring of large spurious zeros of
// radius ~ε^(1/k) around infinity) or swallow genuine large zeros.
func (ss *stateSpace) relativeDegree() int {
	m := ss.m
	adj := make([][]int32, m)
	for i := 0; i < m; i++ {
		for j, v := range ss.a[i*m : (i+1)*m] {
			if v != 0 {
				adj[i] = append(adj[i], int32(j))
			}
		}
	}
	v := make([]bool, m)
	nv := make([]bool, m)
	live := false
	for i, x := range ss.b {
		v[i] = x != 0
		live = live || v[i]
	}
	for k := 1; k <= m && live; k++ {
		for i, x := range ss.o {
			if x != 0 && v[i] {
				return k
			}
		}
		live = false
		for i := range nv {
			nv[i] = false
			for _, j := range adj[i] {
				if v[j] {
					nv[i] = true
					live = true
					break
				}
			}
		}
		v, nv = nv, v
	}
	return 0
}

// zeroDynamics returns a matrix Z of order k whose eigenvalues are the
// finite zeros of ss (balanced units), with the decoupling zeros (modes
// that H does not see, which cancel against poles):
//
//   - e ≠ 0 (H grows like t): det[[t·I − A, −b], [o, d + e·t]] = 0 gives
//     Z = [[A, b], [−o/e, −d/e]], k = m + 1;
//   - e = 0, d ≠ 0: Z = A − b·o/d, k = m;
//   - e = d = 0: the zeros at infinity are removed first, r of them for a
//     relative degree r (see relativeDegree), by the reduction of
//     Emami-Naeini and Van Dooren (Computation of zeros of linear
//     multivariable systems, Automatica 18, 1982) in its single-input,
//     single-output form, after which Z = A_r − b_r·o_r/d_r, k = m − r.
//
// Each step of that reduction takes one state out. On the output side, a
// change of state that makes y = o·x itself a state x_q, with q the
// largest entry of o, lets a zero output force x_q ≡ 0 and
// ẋ_q = (o·A)·x + (o·b)·u = 0: the new output is o·A with x_q eliminated,
// the new feedthrough o·b, and A loses row and column q after
// A_jk ← A_jk − A_jq·o_k/o_q. The input side is the same step on the
// transposed system. The original reduction uses orthogonal (Householder)
// changes of state; here they are Gaussian, with the largest entry as
// pivot, because an orthogonal step smears every entry over the whole
// state and the rounding errors it leaves, relative to ‖A‖, swamp the
// Markov parameters of a high relative degree, which are products of
// entries along the network's paths and tiny relative to ‖A‖^r: zeros of a
// 60-node bridged RC network came out wrong in their leading digit that
// way. A Gaussian step only combines states that the network couples, so
// zeros stay where the structure puts them and rounding stays relative to
// the entries involved. Output-side and input-side steps alternate, so
// that the two elimination fronts meet in the middle of the network, each
// half as long (measured: five to a hundred times smaller errors than
// one-sided on 60- and 200-node networks).
//
// The error wraps ErrZeroTransfer when H ≡ 0.
func (ss *stateSpace) zeroDynamics() ([]float64, int, error) {
	m := ss.m
	switch {
	case ss.e != 0:
		k := m + 1
		z := make([]float64, k*k)
		for i := 0; i < m; i++ {
			copy(z[i*k:i*k+m], ss.a[i*m:(i+1)*m])
			z[i*k+m] = ss.b[i]
			z[m*k+i] = -ss.o[i] / ss.e
		}
		z[m*k+m] = -ss.d / ss.e
		return z, k, nil
	case ss.d != 0:
		z := append([]float64(nil), ss.a...)
		if m > 0 {
			bl.Dger(m, m, -1/ss.d, ss.b, 1, ss.o, 1, z, m)
		}
		return z, m, nil
	}
	r := ss.relativeDegree()
	if r == 0 {
		return nil, 0, ErrZeroTransfer
	}
	a := append([]float64(nil), ss.a...)
	b := append([]float64(nil), ss.b...)
	o := append([]float64(nil), ss.o...)
	alive := make([]bool, m)
	for i := range alive {
		alive[i] = true
	}
	tmp := make([]float64, m)
	supp := make([]int, 0, m)
	var d float64
	for step := 0; step < r; step++ {
		d = 0
		for i := 0; i < m; i++ {
			if alive[i] {
				d += o[i] * b[i]
			}
		}
		if step%2 == 0 {
			supp = outputStep(a, o, m, alive, tmp, supp)
		} else {
			supp = inputStep(a, b, m, alive, tmp, supp)
		}
		if step < r-1 {
			d = 0 // structurally zero (and computed as such)
			// The last step's new o or b must keep the scale of the d
			// computed before it.
			normalizePow2(o)
			normalizePow2(b)
		}
	}
	if d == 0 {
		return nil, 0, fmt.Errorf("ac: zeros: the Markov parameter of order %d is zero", r)
	}
	var idx []int
	for i := range alive {
		if alive[i] {
			idx = append(idx, i)
		}
	}
	k := len(idx)
	z := make([]float64, k*k)
	for x, i := range idx {
		for y, j := range idx {
			z[x*k+y] = a[i*m+j] - b[i]*o[j]/d
		}
	}
	return z, k, nil
}

// normalizePow2 scales v by the power of two that brings its largest
// entry into [1, 2): o and b grow like ‖A‖ per step and would overflow
// over a few hundred steps, and the zeros do not depend on their scale
// (d = o·b is formed from the scaled vectors, before the last step).
func normalizePow2(v []float64) {
	var vmax float64
	for _, x := range v {
		vmax = math.Max(vmax, math.Abs(x))
	}
	if vmax == 0 || math.IsInf(vmax, 0) || math.IsNaN(vmax) {
		return
	}
	_, e := math.Frexp(vmax)
	f := math.Ldexp(1, 1-e)
	for i := range v {
		v[i] *= f
	}
}

// outputStep is one output-side step of zeroDynamics on the live states
// of a (m×m, row-major), o: it makes o ← o·A with the pivot state
// eliminated, updates A and kills the pivot.
func outputStep(a, o []float64, m int, alive []bool, oa []float64, supp []int) []int {
	supp = supp[:0]
	q, best := -1, 0.0
	for j := 0; j < m; j++ {
		if alive[j] && o[j] != 0 {
			supp = append(supp, j)
			if v := math.Abs(o[j]); v > best {
				q, best = j, v
			}
		}
	}
	for j := range oa {
		oa[j] = 0
	}
	for _, i := range supp {
		oi := o[i]
		row := a[i*m : (i+1)*m]
		for j, v := range row {
			if v != 0 && alive[j] {
				oa[j] += oi * v
			}
		}
	}
	oq := o[q]
	for i := 0; i < m; i++ {
		if !alive[i] || i == q || a[i*m+q] == 0 {
			continue
		}
		f := a[i*m+q] / oq
		for _, j := range supp {
			if j != q {
				a[i*m+j] -= f * o[j]
			}
		}
	}
	f := oa[q] / oq
	for j := 0; j < m; j++ {
		if !alive[j] || j == q {
			continue
		}
		v := oa[j]
		if o[j] != 0 {
			v -= f * o[j]
		}
		o[j] = v
	}
	o[q] = 0
	alive[q] = false
	return supp
}

// inputStep is outputStep on the transposed system: b ← A·b with the
// pivot state eliminated.
func inputStep(a, b []float64, m int, alive []bool, ab []float64, supp []int) []int {
	supp = supp[:0]
	q, best := -1, 0.0
	for j := 0; j < m; j++ {
		if alive[j] && b[j] != 0 {
			supp = append(supp, j)
			if v := math.Abs(b[j]); v > best {
				q, best = j, v
			}
		}
	}
	for i := 0; i < m; i++ {
		ab[i] = 0
		if !alive[i] {
			continue
		}
		var s float64
		for _, j := range supp {
			s += a[i*m+j] * b[j]
		}
		ab[i] = s
	}
	bq := b[q]
	rowq := a[q*m : (q+1)*m]
	for _, i := range supp {
		if i == q {
			continue
		}
		f := b[i] / bq
		row := a[i*m : (i+1)*m]
		for j, v := range rowq {
			if v != 0 && j != q && alive[j] {
				row[j] -= f * v
			}
		}
	}
	f := ab[q] / bq
	for i := 0; i < m; i++ {
		if !alive[i] || i == q {
			continue
		}
		v := ab[i]
		if b[i] != 0 {
			v -= f * b[i]
		}
		b[i] = v
	}
	b[q] = 0
	alive[q] = false
	return supp
}

// eigenvalues returns the eigenvalues of the k×k matrix z (overwritten),
// each complex pair as both members (lapack Dgeev, no vectors).
func eigenvalues(z []float64, k int) ([]complex128, error) {
	if k == 0 {
		return nil, nil
	}
	wr := make([]float64, k)
	wi := make([]float64, k)
	work := make([]float64, 1)
	lp.Dgeev(lapack.LeftEVNone, lapack.RightEVNone, k, z, k, wr, wi, nil, 1, nil, 1, work, -1)
	work = make([]float64, int(work[0]))
	if first := lp.Dgeev(lapack.LeftEVNone, lapack.RightEVNone, k, z, k, wr, wi, nil, 1, nil, 1, work, len(work)); first > 0 {
		return nil, fmt.Errorf("ac: the QR algorithm did not converge (%d of %d eigenvalues)", k-first, k)
	}
	out := make([]complex128, k)
	for i := range out {
		out[i] = complex(wr[i], wi[i])
	}
	return out, nil
}
