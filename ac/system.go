package ac

import (
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/lapack"
)

// systemRoots computes the poles and, with wantZeros set, the zeros
// (before cancellation, balanced units) of a bordered pencil: the
// eliminations of borderedPencil.reduce first, then the standard form of
// toStateSpace, whose A has the poles as eigenvalues and whose zero
// dynamics (zeroDynamics) have the zeros. Eigenvalues come from lapack's
// Dgeev without vectors, then:
//
//   - roots at the origin are made exact (see originCount);
//   - poles whose estimated error ε·‖A‖_F/|t| exceeds 1e-12 are refined
//     by Rayleigh-quotient iteration on the reduced pencil, zeros by the
//     Aberth-Newton iteration of refineZeros, both with banded solves and
//     within a work budget (refineBudget);
//   - tidyRoots merges clusters and makes pairs conjugate.
//
// Why A = −c⁻¹·g and not the shift-and-invert form (g + σ·c)⁻¹·c: the
// zeros at infinity are what must be removed exactly, and they are the
// relative degree of o·(t·I − A)⁻¹·b, read off A's structure; in the
// inverted form they become a Jordan block at 0 whose computed
// eigenvalues scatter over a ring of radius ~ε^(1/k). The absolute error
// ε·‖A‖ that small roots then carry is what the refinement removes, on
// the pencil itself.
//
// It also returns the reduced problem's evaluator, and nil for it (and
// no roots) when the reduced pencil's c is singular, so that infinite
// eigenvalues remain that structure did not remove; the caller then uses
// the orthogonal staircase of PencilRoots' general path.
func systemRoots(bp *borderedPencil, wantZeros bool) (poles, zeros []complex128, de *descriptor, err error) {
	rb, ss, err := stateSpaceOf(bp)
	if err != nil || ss == nil {
		return nil, nil, nil, err
	}
	m := ss.m
	de = newDescriptor(rb)
	poles, err = eigenvalues(append([]float64(nil), ss.a...), m)
	if err != nil {
		return nil, nil, nil, err
	}
	n := bp.n
	if m > 0 && mayBeSingular(ss.g, m) {
		// Poles at the origin, counted on the balanced original pencil,
		// whose entries are the circuit's own (the bounds of originCount
		// start from them).
		g, c := make([]float64, n*n), make([]float64, n*n)
		for i := 0; i < n; i++ {
			copy(g[i*n:(i+1)*n], bp.m0[i*(n+1):i*(n+1)+n])
			copy(c[i*n:(i+1)*n], bp.m1[i*(n+1):i*(n+1)+n])
		}
		snapSmallest(poles, originCount(g, c, n))
	}
	refinePoles(de, poles, frob(ss.a))
	if wantZeros {
		z, k, err := ss.zeroDynamics()
		if err != nil {
			return nil, nil, nil, err
		}
		zeros, err = eigenvalues(z, k)
		if err != nil {
			return nil, nil, nil, err
		}
		// Zeros at the origin, counted exactly on the balanced original
		// bordered pencil. Always: a zero of H at DC behind a series
		// capacitor leaves every unknown on the output side exactly zero
		// at t = 0, so the computed H(0) is rounding noise of the same
		// relative size as its terms and no test on H(0) can tell it
		// from a small nonzero value.
		snapSmallest(zeros, originCount(bp.m0, bp.m1, n+1))
		if len(zeros) > 0 && 3*len(zeros)*de.band.cost() <= refineBudget(m) {
			de.refineZeros(zeros, poles)
		}
	}
	w := complex(ss.w0, 0)
	for i := range poles {
		poles[i] *= w
	}
	for i := range zeros {
		zeros[i] *= w
	}
	return tidyRoots(poles), tidyRoots(zeros), de, nil
}

// maxExpose bounds the rounds of exposeAlgebraic and reduce in
// stateSpaceOf: each round removes one level of a higher-index structure
// (an index-k descriptor system needs k − 1), and circuit pencils rarely
// go beyond index 3.
const maxExpose = 8

// stateSpaceOf reduces bp and brings it to standard form: eliminations
// (reduce), and while the reduced c may be singular, exact row
// combinations that expose further algebraic equations
// (exposeAlgebraic) and eliminations again. It returns the reduced
// pencil and its standard form, or no standard form when a singular c
// remains (no exact dependence explains it), leaving the caller to the
// general path.
func stateSpaceOf(bp *borderedPencil) (*borderedPencil, *stateSpace, error) {
	rb, err := bp.reduce()
	if err != nil {
		return nil, nil, err
	}
	for round := 0; ; round++ {
		if ss, ok := rb.toStateSpace(false); ok {
			return rb, ss, nil
		}
		if round == maxExpose {
			break
		}
		exposed := &borderedPencil{n: rb.n, m0: rb.m0, m1: rb.m1, w0: rb.w0}
		if !exposed.exposeAlgebraic() {
			break
		}
		if rb, err = exposed.reduce(); err != nil {
			return nil, nil, err
		}
	}
	ss, ok := rb.toStateSpace(true)
	if !ok {
		return nil, nil, nil
	}
	return rb, ss, nil
}

// refineBudget is the work, in complex multiply-adds of banded
// factorizations, allowed for refining the roots of a reduced pencil of
// order m: about that of the dense eigenvalue computation itself, and at
// least 2·10⁷ (a few hundredths of a second), which covers every root of
// a dense pencil up to order 30 or so.
func refineBudget(m int) int { return max(m*m*m, 20_000_000) }

// refinePoles refines, in place, the poles t (balanced units) whose
// estimated relative error ε·normA/|t| from the QR algorithm exceeds
// 1e-12 (the eigenvalues of a matrix of norm ‖A‖ carry absolute errors
// of about ε·‖A‖ for a well-conditioned spectrum), worst first, within
// refineBudget. A pair's member with positive imaginary part is refined
// and mirrored.
func refinePoles(de *descriptor, t []complex128, normA float64) {
	type cand struct {
		i   int
		est float64
	}
	var cs []cand
	for i, v := range t {
		if v == 0 || imag(v) < 0 {
			continue
		}
		if est := epsilon * normA / cmplx.Abs(v); est > 1e-12 {
			cs = append(cs, cand{i, est})
		}
	}
	sort.Slice(cs, func(a, b int) bool { return cs[a].est > cs[b].est })
	budget := refineBudget(de.m)
	per := (maxSweeps / 2) * max(de.band.cost(), 1)
	for _, c := range cs {
		if budget < per {
			break
		}
		budget -= per
		v := t[c.i]
		tr, ok := de.refinePole(v)
		if !ok {
			continue
		}
		t[c.i] = tr
		if imag(v) > 0 {
			for j := range t {
				if t[j] == cmplx.Conj(v) {
					t[j] = cmplx.Conj(tr)
					break
				}
			}
		}
	}
}

// snapSmallest sets the k roots of least modulus to exactly zero.
func snapSmallest(r []complex128, k int) {
	if k <= 0 {
		return
	}
	idx := make([]int, len(r))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return cmplx.Abs(r[idx[a]]) < cmplx.Abs(r[idx[b]]) })
	for _, i := range idx[:min(k, len(r))] {
		r[i] = 0
	}
}

// originCount returns how many roots the square pencil m0 + t·m1 (N×N,
// row-major, not modified) has at t = 0, with their algebraic
// multiplicity, by exact deflation: Gaussian elimination with partial
// pivoting on the rows of m0, applied to m1 alike, leaves the rows that
// depend on the others with no entry in m0; such a row is t·r, and
// det(m0 + t·m1) = t·det(the pencil with that row replaced by r), one
// root at the origin taken out. Again until m0 is nonsingular. An entry
// counts as zero when it falls below 8·N·ε times the magnitude of the
// terms it was computed from (a running bound kept for every entry
// through all the eliminations): the cancellation of a Laplacian row sum
// (a node floating at DC, a series capacitor blocking it) is told from a
// genuinely small entry by that componentwise bound, not by the entry's
// size against the whole matrix. A Jordan block at the origin (a double
// zero of a high-pass, integrators in series) counts fully, which a rank
// or a computed eigenvalue cannot tell from a ring of radius ~ε^(1/k).
// It returns −1 for a singular pencil.
func originCount(m0, m1 []float64, N int) int {
	a0 := append([]float64(nil), m0...)
	a1 := append([]float64(nil), m1...)
	g0, g1 := make([]float64, N*N), make([]float64, N*N) // the bounds
	for i := range a0 {
		g0[i], g1[i] = math.Abs(a0[i]), math.Abs(a1[i])
	}
	tol := 8 * float64(N) * epsilon
	zeroTest := func(a, g []float64, i int) {
		if math.Abs(a[i]) <= tol*g[i] {
			a[i] = 0
		}
	}
	k := 0
	used := make([]bool, N)
	for round := 0; round <= N; round++ {
		for i := range used {
			used[i] = false
		}
		for j := 0; j < N; j++ {
			p, best := -1, 0.0
			for i := 0; i < N; i++ {
				if used[i] {
					continue
				}
				zeroTest(a0, g0, i*N+j)
				if v := math.Abs(a0[i*N+j]); v > best {
					p, best = i, v
				}
			}
			if p < 0 {
				continue
			}
			used[p] = true
			for i := 0; i < N; i++ {
				if used[i] || a0[i*N+j] == 0 {
					continue
				}
				l := a0[i*N+j] / a0[p*N+j]
				al := math.Abs(l)
				for c := 0; c < N; c++ {
					if c != j && (g0[p*N+c] != 0) {
						a0[i*N+c] -= l * a0[p*N+c]
						g0[i*N+c] += al * g0[p*N+c]
						zeroTest(a0, g0, i*N+c)
					}
					if g1[p*N+c] != 0 {
						a1[i*N+c] -= l * a1[p*N+c]
						g1[i*N+c] += al * g1[p*N+c]
						zeroTest(a1, g1, i*N+c)
					}
				}
				a0[i*N+j] = 0
			}
		}
		shifted := false
		for i := 0; i < N; i++ {
			if used[i] {
				continue
			}
			// Row i is t·(row i of a1): take the factor t out.
			nonzero := false
			for c := 0; c < N; c++ {
				a0[i*N+c], g0[i*N+c] = a1[i*N+c], g1[i*N+c]
				a1[i*N+c], g1[i*N+c] = 0, 0
				nonzero = nonzero || a0[i*N+c] != 0
			}
			if !nonzero {
				return -1
			}
			k++
			shifted = true
		}
		if !shifted {
			return k
		}
	}
	return k
}

// mayBeSingular reports whether the m×m matrix a may be singular: its
// condition estimate is below suspectRcond.
func mayBeSingular(a []float64, m int) bool {
	f := append([]float64(nil), a...)
	work := make([]float64, 4*m)
	anorm := lp.Dlange(lapack.MaxColumnSum, m, m, f, m, work)
	ipiv := make([]int, m)
	return !lp.Dgetrf(m, m, f, m, ipiv) || lp.Dgecon(lapack.MaxColumnSum, m, f, m, anorm, work, make([]int, m)) < suspectRcond
}

// suspectRcond is the reciprocal condition estimate below which a matrix
// is examined for exact singularity (exposeAlgebraic, originCount);
// genuinely nonsingular circuit matrices with values over 12 decades
// reach about 1e-12 after balancing.
const suspectRcond = 1e-9
