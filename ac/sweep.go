package ac

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/blas"
)

// Sweeper evaluates H(s) = Out·(G + s·C)⁻¹·B at many points for O(n²) work
// each, after an O(n³) reduction (Laub, Efficient multivariable frequency
// response computations, IEEE Trans. Autom. Control 26, 1981; from
// memory).
//
// With the balanced pencil g + t·c (s = w0·t, see balance), a real shift σ
// for which F = g + σ·c is well conditioned, and the Hessenberg
// decomposition A = F⁻¹·c = Q·Hs·Qᵀ (lapack Dgehrd, Dorghr),
//
//	g + t·c = F·(I + (t − σ)·A),
//	H(s) = cᵀ·(I + (t − σ)·Hs)⁻¹·w,   w = Qᵀ·F⁻¹·Dr·B,   c = Qᵀ·Dc·Outᵀ,
//
// so each point is one solve with the upper Hessenberg matrix
// I + (t − σ)·Hs. That solve is Gaussian elimination with partial pivoting
// between adjacent rows, fused with the forward substitution of
// Uᵀ·v = c so that H = vᵀ·(L⁻¹·P·w) needs neither U nor the solution
// vector: two rows of workspace, no allocation.
//
// A Sweeper is not safe for concurrent use: it owns its workspace.
type Sweeper struct {
	n     int
	w0    float64
	sigma float64
	h     []float64 // Hs, n×n row-major (entries below the subdiagonal unused)
	w, c  []float64
	r, q  []complex128 // the two working rows
	acc   []complex128 // running Uᵀ-substitution sums

	// Direct-solve fallback: the balanced pencil, Dr·B, Dc·Out and
	// workspace.
	sp     *scaledPencil
	b, out []float64
	x      []complex128
	lu     clu
	direct int     // points computed by the fallback (for tests)
	scale  float64 // ‖c‖₂·‖w‖₂
	hnorm  float64 // ‖Hs‖_F
}

// Accuracy guard. The Hessenberg solve is backward stable: it returns
// the exact result for I + μ·Hs perturbed by about ε·(1 + |μ|·‖Hs‖), which
// changes y by up to about ε·(1 + |μ|·‖Hs‖)·‖c‖·‖w‖. Where that bound
// exceeds maxRelErr·|y|, the orthogonal coordinates have mixed quantities
// of very different size and H comes out of their cancellation: far
// above the highest pole (where |H| falls as a high power of ω) or near a
// zero of H. Such points are recomputed by a direct complex LU solve of
// the balanced pencil, O(n³) but exact in structure. The bound is
// pessimistic by two to four orders in the cases tested, so results stay
// well within 1e-9 relative of a direct solve.
const maxRelErr = 1e-7

// NewSweeper reduces p for fast evaluation of its transfer function. It
// fails when no real shift makes G + σ·C nonsingular (a singular pencil).
func NewSweeper(p *Problem) (*Sweeper, error) {
	sp, err := balance(p.G, p.C)
	if err != nil {
		return nil, err
	}
	n := sp.n
	sw := &Sweeper{n: n, w0: sp.w0, r: make([]complex128, n), q: make([]complex128, n), acc: make([]complex128, n),
		sp: sp, b: make([]float64, n), out: make([]float64, n), x: make([]complex128, n)}
	if n == 0 {
		return sw, nil
	}
	for i := 0; i < n; i++ {
		sw.b[i] = sp.dr[i] * p.B[i]
		sw.out[i] = sp.dc[i] * p.Out[i]
	}
	sw.lu.a = make([]complex128, n*n)
	sw.lu.piv = make([]int, n)
	sigma, lu, ipiv, ok := shiftedLU(sp.g, sp.c, n)
	if !ok {
		return nil, ErrSingularPencil
	}
	sw.sigma = sigma
	a := append([]float64(nil), sp.c...)
	lp.Dgetrs(blas.NoTrans, n, n, lu, n, ipiv, a, n)
	w := make([]float64, n)
	for i := range w {
		w[i] = sp.dr[i] * p.B[i]
	}
	lp.Dgetrs(blas.NoTrans, n, 1, lu, n, ipiv, w, 1)

	tau := make([]float64, max(n-1, 1))
	work := make([]float64, 1)
	lp.Dgehrd(n, 0, n-1, a, n, tau[:n-1], work, -1)
	lwork := max(int(work[0]), n)
	lp.Dorghr(n, 0, n-1, a, n, tau[:n-1], work, -1)
	lwork = max(lwork, int(work[0]))
	work = make([]float64, lwork)
	lp.Dgehrd(n, 0, n-1, a, n, tau[:n-1], work, lwork)
	sw.h = make([]float64, n*n)
	for i := 0; i < n; i++ {
		for j := max(i-1, 0); j < n; j++ {
			sw.h[i*n+j] = a[i*n+j]
		}
	}
	lp.Dorghr(n, 0, n-1, a, n, tau[:n-1], work, lwork) // a = Q
	sw.w = make([]float64, n)
	bl.Dgemv(blas.Trans, n, n, 1, a, n, w, 1, 0, sw.w, 1)
	oc := make([]float64, n)
	for i := range oc {
		oc[i] = sp.dc[i] * p.Out[i]
	}
	sw.c = make([]float64, n)
	bl.Dgemv(blas.Trans, n, n, 1, a, n, oc, 1, 0, sw.c, 1)
	sw.scale = frob(sw.c) * frob(sw.w)
	sw.hnorm = frob(sw.h)
	return sw, nil
}

// At returns H(s) for a complex frequency s in rad/s (s = j·2π·f on the
// frequency axis). At a pole it returns complex infinity. It does not
// allocate.
func (sw *Sweeper) At(s complex128) complex128 {
	if sw.n == 0 {
		return 0
	}
	t := s / complex(sw.w0, 0)
	mu := t - complex(sw.sigma, 0)
	y := sw.hessenberg(mu)
	if cmplx.IsInf(y) || epsilon*(1+cmplx.Abs(mu)*sw.hnorm)*sw.scale <= maxRelErr*cmplx.Abs(y) {
		return y
	}
	sw.direct++
	return sw.solveDirect(t)
}

// solveDirect returns H by a complex LU solve of (g + t·c)·x̃ = Dr·B.
func (sw *Sweeper) solveDirect(t complex128) complex128 {
	sw.lu.factor(sw.n, sw.sp.g, sw.sp.c, t)
	for i, v := range sw.b {
		sw.x[i] = complex(v, 0)
	}
	sw.lu.solve(sw.x)
	var y complex128
	for i, v := range sw.out {
		y += complex(v, 0) * sw.x[i]
	}
	return y
}

// hessenberg returns cᵀ·(I + μ·Hs)⁻¹·w.
func (sw *Sweeper) hessenberg(mu complex128) complex128 {
	n := sw.n
	h, r, q, acc := sw.h, sw.r, sw.q, sw.acc
	for j := range acc {
		acc[j] = 0
	}
	// Row 0 of T = I + μ·Hs.
	for j := 0; j < n; j++ {
		r[j] = mu * complex(h[j], 0)
	}
	r[0]++
	rw := complex(sw.w[0], 0)
	var y complex128
	for k := 0; k < n; k++ {
		var qw complex128
		if k+1 < n {
			// Row k+1 of T starts at column k (the subdiagonal).
			hk := h[(k+1)*n:]
			sub := mu * complex(hk[k], 0)
			qw = complex(sw.w[k+1], 0)
			if abs1(sub) > abs1(r[k]) {
				// Pivot on row k+1: it becomes U's row k and the
				// remainder r − l·(row k+1) moves on.
				q[k] = sub
				for j := k + 1; j < n; j++ {
					q[j] = mu * complex(hk[j], 0)
				}
				q[k+1]++
				r, q = q, r
				rw, qw = qw, rw
			} else {
				q[k] = sub
				for j := k + 1; j < n; j++ {
					q[j] = mu * complex(hk[j], 0)
				}
				q[k+1]++
			}
			if r[k] == 0 {
				return cmplx.Inf()
			}
			l := q[k] / r[k]
			if l != 0 {
				rk := r[k+1 : n]
				qk := q[k+1 : n]
				for j, v := range rk {
					qk[j] -= l * v
				}
				qw -= l * rw
			}
		}
		if r[k] == 0 {
			return cmplx.Inf()
		}
		// U's row k is r[k:]: next unknown of Uᵀ·v = c, then its terms
		// in the sums of the later rows.
		vk := (complex(sw.c[k], 0) - acc[k]) / r[k]
		y += vk * rw
		if vk != 0 {
			rk := r[k+1 : n]
			ak := acc[k+1 : n]
			for j, v := range rk {
				ak[j] += v * vk
			}
		}
		r, q = q, r
		rw = qw
	}
	sw.r, sw.q = r, q
	return y
}

// Response fills dst (allocated when nil or too short) with H(j·2π·f) for
// every frequency f in fHz, in hertz, and returns it.
func (sw *Sweeper) Response(fHz []float64, dst []complex128) []complex128 {
	if cap(dst) < len(fHz) {
		dst = make([]complex128, len(fHz))
	}
	dst = dst[:len(fHz)]
	for i, f := range fHz {
		dst[i] = sw.At(complex(0, 2*math.Pi*f))
	}
	return dst
}
