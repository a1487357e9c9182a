package ac

import (
	"math"
	"math/cmplx"
)

// descriptor evaluates the transfer function of a reduced bordered pencil
// (see borderedPencil) by banded Gaussian elimination (see bandPencil):
//
//	H(t)  = (o + t·o1)·x + d + t·e,            (g + t·c)·x = b + t·b1,
//	H'(t) = o1·x + (o + t·o1)·z + e,           (g + t·c)·z = b1 − c·x,
//
// one factorization and two solves. It is the reference against which
// roots are refined: elimination on the band combines only entries that
// the network couples, so H keeps a small relative error even where it is
// tiny (far above the poles, near a zero).
type descriptor struct {
	m            int
	g, c         []float64 // m×m, row-major
	gs, cs       sparseRows
	b, b1, o, o1 []float64
	d, e         float64
	band         *bandPencil
	x, z, w, tmp []complex128
	singular     bool // the last factorization met a zero pivot

	xs, zs, xw []xnum // workspace of logDeriv's extended solves
}

// sparseRows is a row-compressed copy of a square matrix.
type sparseRows struct {
	start []int // row i holds entries start[i]..start[i+1]−1
	col   []int
	val   []float64
}

func compressRows(a []float64, m int) sparseRows {
	s := sparseRows{start: make([]int, m+1)}
	for i := 0; i < m; i++ {
		for j, v := range a[i*m : (i+1)*m] {
			if v != 0 {
				s.col = append(s.col, j)
				s.val = append(s.val, v)
			}
		}
		s.start[i+1] = len(s.col)
	}
	return s
}

// mul sets dst = A·x (trans false) or Aᵀ·x.
func (s sparseRows) mul(dst, x []complex128, trans bool) {
	for i := range dst {
		dst[i] = 0
	}
	for i := 0; i+1 < len(s.start); i++ {
		if trans {
			xi := x[i]
			for k := s.start[i]; k < s.start[i+1]; k++ {
				dst[s.col[k]] += complex(s.val[k], 0) * xi
			}
			continue
		}
		var sum complex128
		for k := s.start[i]; k < s.start[i+1]; k++ {
			sum += complex(s.val[k], 0) * x[s.col[k]]
		}
		dst[i] = sum
	}
}

func newDescriptor(bp *borderedPencil) *descriptor {
	m := bp.n
	M := m + 1
	de := &descriptor{m: m, g: make([]float64, m*m), c: make([]float64, m*m),
		b: make([]float64, m), b1: make([]float64, m), o: make([]float64, m), o1: make([]float64, m),
		x: make([]complex128, m), z: make([]complex128, m), w: make([]complex128, m), tmp: make([]complex128, m)}
	for i := 0; i < m; i++ {
		copy(de.g[i*m:(i+1)*m], bp.m0[i*M:i*M+m])
		copy(de.c[i*m:(i+1)*m], bp.m1[i*M:i*M+m])
		de.b[i], de.b1[i] = -bp.m0[i*M+m], -bp.m1[i*M+m]
		de.o[i], de.o1[i] = bp.m0[m*M+i], bp.m1[m*M+i]
	}
	de.d, de.e = bp.m0[m*M+m], bp.m1[m*M+m]
	de.gs, de.cs = compressRows(de.g, m), compressRows(de.c, m)
	de.band = newBandPencil(m, de.g, de.c)
	return de
}

// h returns H(t) and, with deriv set, H'(t), both times 2^k: far in
// the stop band of a long network H and the unknowns near the output
// fall below the smallest float64 (1e-308 and less 200 nodes down a
// ladder), so when H comes out below 2^−900 times the size of its terms
// the input is scaled by 2^k, k chosen to bring the largest unknown to
// about 2^900, and everything is solved again.
func (de *descriptor) h(t complex128, deriv bool) (hv, dh complex128, k int) {
	m := de.m
	if m == 0 {
		return complex(de.d, 0) + t*complex(de.e, 0), complex(de.e, 0), 0
	}
	de.singular = !de.band.factor(t)
	x := de.x
	scale := 1.0
	for pass := 0; pass < 2; pass++ {
		for i := 0; i < m; i++ {
			x[i] = complex(scale*de.b[i], 0) + t*complex(scale*de.b1[i], 0)
		}
		de.band.solve(x, de.tmp)
		hv = complex(scale*de.d, 0) + t*complex(scale*de.e, 0)
		var xmax, terms float64
		for i := 0; i < m; i++ {
			oi := complex(de.o[i], 0) + t*complex(de.o1[i], 0)
			hv += oi * x[i]
			xmax = math.Max(xmax, abs1(x[i]))
			terms = math.Max(terms, abs1(oi)*abs1(x[i]))
		}
		if pass == 1 || xmax == 0 || math.IsInf(xmax, 0) || math.IsNaN(xmax) || abs1(hv) >= 0x1p-900*math.Max(terms, xmax) {
			break
		}
		_, e := math.Frexp(xmax)
		k = 900 - e
		scale = math.Ldexp(1, k)
	}
	if !deriv {
		return hv, 0, k
	}
	z := de.z
	de.cs.mul(z, x, false)
	for i := 0; i < m; i++ {
		z[i] = complex(scale*de.b1[i], 0) - z[i]
	}
	de.band.solve(z, de.tmp)
	dh = complex(scale*de.e, 0)
	for i := 0; i < m; i++ {
		dh += complex(de.o1[i], 0)*x[i] + (complex(de.o[i], 0)+t*complex(de.o1[i], 0))*z[i]
	}
	return hv, dh, k
}

// logDeriv returns H'(t)/H(t). When H is out of float64's range even
// after the scaling of h, the solves are repeated on numbers with
// exponents of their own (xnum), which no range limits.
func (de *descriptor) logDeriv(t complex128) (complex128, bool) {
	hv, dh, _ := de.h(t, true)
	if hv != 0 && isFinite(hv) && isFinite(dh) {
		return dh / hv, true
	}
	if de.singular || de.m == 0 {
		return 0, false
	}
	m := de.m
	if de.xs == nil {
		de.xs, de.zs, de.xw = make([]xnum, m), make([]xnum, m), make([]xnum, m)
	}
	x, z := de.xs, de.zs
	for i := 0; i < m; i++ {
		x[i] = xnorm(complex(de.b[i], 0)+t*complex(de.b1[i], 0), 0)
	}
	de.band.solveX(x, de.xw)
	// z = (g + t·c)⁻¹·(b1 − c·x), c·x summed row by row.
	for i := 0; i < m; i++ {
		acc := xnorm(complex(de.b1[i], 0), 0)
		for p := de.cs.start[i]; p < de.cs.start[i+1]; p++ {
			acc = acc.sub(x[de.cs.col[p]].mul(complex(de.cs.val[p], 0)))
		}
		z[i] = acc
	}
	de.band.solveX(z, de.xw)
	hx := xnorm(complex(de.d, 0)+t*complex(de.e, 0), 0)
	dx := xnorm(complex(de.e, 0), 0)
	for i := 0; i < m; i++ {
		oi := complex(de.o[i], 0) + t*complex(de.o1[i], 0)
		hx = hx.sub(x[i].mul(-oi))
		dx = dx.sub(x[i].mul(-complex(de.o1[i], 0))).sub(z[i].mul(-oi))
	}
	if hx.m == 0 {
		return 0, false
	}
	w := dx.m / hx.m * complex(math.Ldexp(1, max(-1000, min(1000, dx.e-hx.e))), 0)
	return w, isFinite(w)
}

// hReal returns H(t) for a real t, unscaled; rho = |H|/(largest term
// |(o + t·o1)_i·x_i|, or |d|); ok is false when H is out of range.
func (de *descriptor) hReal(t float64) (h, rho float64, ok bool) {
	hv, _, k := de.h(complex(t, 0), false)
	terms := math.Abs(de.d) * math.Ldexp(1, k)
	for i := 0; i < de.m; i++ {
		terms = math.Max(terms, math.Abs(de.o[i]+t*de.o1[i])*cmplx.Abs(de.x[i]))
	}
	h = math.Ldexp(real(hv), -k)
	if de.singular {
		return 0, 0, false
	}
	if !isFinite(hv) || h == 0 || terms == 0 {
		return h, 0, h != 0 && isFinite(hv)
	}
	return h, math.Abs(real(hv)) / terms, true
}

// Step sizes of root refinement, relative to the root: stepTol is where
// an iteration stops (a few ε: the evaluation's rounding makes smaller
// steps noise); acceptTol is the last step below which a refined root is
// kept, a root then being good to about acceptTol squared (quadratic and
// cubic convergence).
const (
	stepTol   = 16 * epsilon
	acceptTol = 1e-8
	// retryOffset, retryReach and retrySweeps shape the unconstrained
	// second pass of refineZeros: pairs of real zeros a few per cent
	// apart came out of the eigenvalue step of 200-node networks as
	// complex pairs, and estimates 10 to 40 % off on 500-node ones.
	retryOffset = 1e-3
	retryReach  = 10
	retrySweeps = 64
	// maxSweeps bounds the refinement iterations; from an estimate good
	// to 1e-6, quadratic convergence needs three.
	maxSweeps = 8
)

// refineZeros polishes the zeros z of H (balanced units, closed under
// conjugation) given its poles p, by Newton's method on
//
//	f_i(t) = H(t)·Π(t − p_k)/Π_{j≠i}(t − z_j) = K·(t − z_i),
//
// which is linear in t once the other roots are exact: its Newton step is
// 1/(H'/H + Σ 1/(t − p_k) − Σ_{j≠i} 1/(t − z_j)), the correction of
// Aberth and Ehrlich (Aberth, Iteration methods for finding all zeros of a
// polynomial simultaneously, Math. Comp. 27, 1973; from memory). Dividing
// out the other roots keeps the steps sane in the stop band, where H
// varies by orders of magnitude between neighbouring roots and plain
// Newton wanders. Sweeps update every zero in turn (Gauss-Seidel) until
// each step is below stepTol·|z| or after maxSweeps sweeps.
//
// The first pass keeps real zeros real and pairs conjugate. An estimate
// can be on the wrong side of that line (two close real zeros computed as
// a pair of small imaginary part, or the reverse), which the first pass
// cannot cross: zeros that did not converge are refined again without
// the constraint, a real one started slightly off the axis, within a
// reach of retryReach (the estimates of networks with a relative degree
// in the hundreds can be tens of per cent off, and the iteration, which
// repels each zero from all the others, finds its way); a result within
// 1e-12 of the axis is made real (tidyRoots pairs the rest).
//
// A zero keeps its refined value when its last step was below
// acceptTol·|z| and it stayed within reach of its estimate, else the
// estimate. It returns how many zeros were refined.
func (de *descriptor) refineZeros(z, p []complex128) int {
	n := len(z)
	z0 := append([]complex128(nil), z...)
	pair := make([]int, n) // index of the conjugate, or −1
	for i, v := range z {
		pair[i] = -1
		if imag(v) != 0 {
			for j, w := range z {
				if j != i && w == cmplx.Conj(v) {
					pair[i] = j
					break
				}
			}
		}
	}
	last := make([]float64, n)
	for i := range last {
		last[i] = math.Inf(1)
	}
	// Pass 1: the members with imag ≥ 0 lead, their partners mirror.
	var lead []int
	for i, v := range z {
		if v != 0 && (imag(v) > 0 || (imag(v) == 0) || pair[i] < 0) {
			lead = append(lead, i)
		}
	}
	de.aberth(z, z0, p, lead, pair, last, true, refineReach, maxSweeps)
	for i, v := range z0 {
		if imag(v) < 0 && pair[i] >= 0 {
			last[i] = last[pair[i]]
		}
	}
	// Pass 2: what failed, unconstrained.
	var retry []int
	sign := 1.0
	for i, v := range z0 {
		if v == 0 || last[i] <= acceptTol {
			continue
		}
		retry = append(retry, i)
		// Start off the symmetric positions, which the iteration would
		// keep: a pair's members moved apart along the axis, a real
		// zero off it, alternately up and down.
		switch {
		case imag(v) > 0:
			z[i] = v * complex(1+retryOffset, 0)
		case imag(v) < 0:
			z[i] = v * complex(1-retryOffset, 0)
		default:
			z[i] = complex(real(v), sign*retryOffset*math.Abs(real(v)))
			sign = -sign
		}
	}
	if len(retry) > 0 {
		de.aberth(z, z0, p, retry, nil, last, false, retryReach, retrySweeps)
	}
	for i := range z {
		if z0[i] == 0 {
			continue
		}
		if last[i] > acceptTol {
			z[i] = z0[i]
			continue
		}
		if math.Abs(imag(z[i])) <= 1e-12*cmplx.Abs(z[i]) {
			z[i] = complex(real(z[i]), 0)
		}
	}
	// The set must stay closed under conjugation. The second pass may
	// hand a pair's members to other estimates; if what it leaves is not
	// closed, all of its zeros go back to their estimates (a closed set).
	if !conjugateClosed(z) {
		for _, i := range retry {
			z[i], last[i] = z0[i], math.Inf(1)
		}
	}
	refined := 0
	for i := range z {
		if z0[i] != 0 && last[i] <= acceptTol {
			refined++
		}
	}
	return refined
}

// invSum returns Σ 1/(t − r_j) over j ≠ skip, by real arithmetic
// (Go's complex division guards against overflow at a cost that
// dominates a sum over hundreds of roots; the differences here are
// within range).
func invSum(t complex128, r []complex128, skip int) complex128 {
	var sr, si float64
	tr, ti := real(t), imag(t)
	for j, v := range r {
		if j == skip {
			continue
		}
		dr, di := tr-real(v), ti-imag(v)
		q := 1 / (dr*dr + di*di)
		sr += dr * q
		si -= di * q
	}
	return complex(sr, si)
}

// conjugateClosed reports whether every complex root in z has its
// conjugate among the others, to within clusterTol.
func conjugateClosed(z []complex128) bool {
	used := make([]bool, len(z))
	for i, v := range z {
		if imag(v) <= 0 {
			continue
		}
		found := false
		for j, w := range z {
			if !used[j] && imag(w) < 0 && cmplx.Abs(w-cmplx.Conj(v)) <= clusterTol*cmplx.Abs(v) {
				used[j], found = true, true
				break
			}
		}
		if !found {
			return false
		}
		_ = i
	}
	for j, w := range z {
		if imag(w) < 0 && !used[j] {
			return false
		}
	}
	return true
}

// aberth runs the sweeps of refineZeros over the zeros idx, recording
// each one's last relative step in last (+Inf when it left reach of its
// estimate z0 or H was out of range). With keep set, real zeros take
// real steps and pair[i] mirrors zero i.
func (de *descriptor) aberth(z, z0, p []complex128, idx, pair []int, last []float64, keep bool, reach float64, sweeps int) {
	done := make(map[int]bool, len(idx))
	for sweep := 0; sweep < sweeps; sweep++ {
		active := false
		for _, i := range idx {
			if done[i] {
				continue
			}
			t := z[i]
			w, ok := de.logDeriv(t)
			if !ok {
				done[i] = true // H vanishes identically here: keep the estimate
				continue
			}
			w += invSum(t, p, -1) - invSum(t, z, i)
			step := 1 / w
			if !isFinite(step) {
				done[i] = true
				continue
			}
			if keep && imag(z0[i]) == 0 {
				step = complex(real(step), 0)
			}
			tn := t - step
			if cmplx.Abs(tn-z0[i]) > reach*cmplx.Abs(z0[i]) {
				done[i], last[i] = true, math.Inf(1)
				continue
			}
			z[i] = tn
			if keep && pair != nil && pair[i] >= 0 {
				z[pair[i]] = cmplx.Conj(tn)
			}
			last[i] = cmplx.Abs(step) / cmplx.Abs(tn)
			if last[i] <= stepTol {
				done[i] = true
				continue
			}
			active = true
		}
		if !active {
			return
		}
	}
}

// refinePole polishes an eigenvalue t0 of the pencil g + t·c by
// two-sided Rayleigh-quotient iteration (Parlett, The Rayleigh quotient
// iteration and some generalizations for nonnormal matrices, Math. Comp.
// 28, 1974; from memory),
//
//	x ← (g + t·c)⁻¹·c·x,  y ← (g + t·c)⁻ᵀ·cᵀ·y,  t ← −(yᵀ·g·x)/(yᵀ·c·x),
//
// started from x = y = (1, …, 1) and banded solves; it converges
// cubically once the vectors settle. The result is kept when the last
// step is below acceptTol·|t| and t stayed within refineReach of t0. A
// real t0 stays real.
func (de *descriptor) refinePole(t0 complex128) (complex128, bool) {
	m := de.m
	x, y, w := make([]complex128, m), make([]complex128, m), make([]complex128, m)
	for i := range x {
		x[i], y[i] = 1, 1
	}
	t := t0
	lastStep := math.Inf(1)
	for it := 0; it < maxSweeps; it++ {
		de.band.factor(t)
		de.cs.mul(w, x, false)
		de.band.solve(w, de.tmp)
		copy(x, w)
		de.cs.mul(w, y, true)
		de.band.solveT(w, de.tmp)
		copy(y, w)
		normalize(x)
		normalize(y)
		de.gs.mul(w, x, false)
		var num, den complex128
		for i := range w {
			num += y[i] * w[i]
		}
		de.cs.mul(w, x, false)
		for i := range w {
			den += y[i] * w[i]
		}
		tn := -num / den
		if imag(t0) == 0 {
			tn = complex(real(tn), 0)
		}
		if !isFinite(tn) || cmplx.Abs(tn-t0) > refineReach*cmplx.Abs(t0) {
			return t0, false
		}
		lastStep = cmplx.Abs(tn-t) / cmplx.Abs(tn)
		t = tn
		if lastStep <= stepTol {
			break
		}
	}
	if lastStep > acceptTol {
		return t0, false
	}
	return t, true
}
