package ac

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/blas"
)

// Sweeper evaluates H(s) = Out·(G + s·C)⁻¹·B at many points, cheaply
// after a reduction done once. There are two ways, and NewSweeper takes
// the cheaper per point:
//
//   - banded elimination (see bandPencil) of the reduced problem (see
//     borderedPencil.reduce): circuit matrices whose unknowns each touch a few
//     neighbours gather in a narrow band, and one factorization and one
//     solve cost n·kl·(kl + ku) complex multiply-adds, exact in structure
//     and needing no accuracy guard;
//   - the Hessenberg form (Laub, Efficient multivariable frequency response
//     computations, IEEE Trans. Autom. Control 26, 1981; from memory), about
//     n² per point whatever the structure, for dense pencils.
//
// The Hessenberg form: with the balanced pencil g + t·c (s = w0·t, see
// balance), a real shift σ for which F = g + σ·c is well conditioned, and
// the Hessenberg decomposition A = F⁻¹·c = Q·Hs·Qᵀ (lapack Dgehrd, Dorghr),
//
//	g + t·c = F·(I + (t − σ)·A),
//	H(s) = cᵀ·(I + (t − σ)·Hs)⁻¹·w,   w = Qᵀ·F⁻¹·Dr·B,   c = Qᵀ·Dc·Outᵀ,
//
// so each point is one solve with the upper Hessenberg matrix
// I + (t − σ)·Hs. That solve is Gaussian elimination with partial pivoting
// between adjacent rows, fused with the forward substitution of
// Uᵀ·v = c so that H = vᵀ·(L⁻¹·P·w) needs neither U nor the solution
// vector: two rows of workspace, no allocation. Points where its accuracy
// guard fails (see maxRelErr) are computed by the banded elimination.
// Above the highest pole a transfer of relative degree r falls like
// s^(−r) and comes out of cancellation in any orthogonal coordinates, so
// that no second Hessenberg form (at a higher shift, say) would save
// those points; on a 200-node ladder with bridges (r ≈ 115) that was 607
// points of 1000, hence the banded elimination as the first choice.
//
// A Sweeper is not safe for concurrent use: it owns its workspace.
type Sweeper struct {
	de   *descriptor // banded evaluation of the reduced problem
	band bool        // every point by de; else the Hessenberg form
	w0   float64

	n     int
	sigma float64
	h     []float64 // Hs, n×n row-major (entries below the subdiagonal unused)
	w, c  []float64
	r, q  []complex128 // the two working rows
	acc   []complex128 // running Uᵀ-substitution sums

	direct int     // Hessenberg points computed by de instead (for tests)
	scale  float64 // ‖c‖₂·‖w‖₂
	hnorm  float64 // ‖Hs‖_F
}

// Accuracy guard. The Hessenberg solve is backward stable: it returns
// the exact result for I + μ·Hs perturbed by about ε·(1 + |μ|·‖Hs‖), which
// changes y by up to about ε·(1 + |μ|·‖Hs‖)·‖c‖·‖w‖. Where that bound
// exceeds maxRelErr·|y|, the orthogonal coordinates have mixed quantities
// of very different size and H comes out of their cancellation: far
// above the highest pole (where |H| falls as a high power of ω) or near a
// zero of H. Such points are recomputed by the banded elimination, exact
// in structure. The bound is pessimistic by two to four orders in the
// cases tested, so results stay well within 1e-9 relative of a direct
// solve.
const maxRelErr = 1e-7

// useBand reports whether the banded solve of de (one factorization and
// one solve per point) is cheaper than the Hessenberg solve of order n
// (about n² complex multiply-adds for the elimination and the
// substitution together). On a 200-node ladder with bridges the band has
// kl = ku = 4 to 6: some 25 000 against 40 000, and no guard to fail.
func useBand(de *descriptor, n int) bool {
	bp := de.band
	return bp.cost()+bp.n*(2*bp.kl+bp.ku+1) <= n*n
}

// NewSweeper reduces p for fast evaluation of its transfer function. It
// fails when the pencil is singular.
func NewSweeper(p *Problem) (*Sweeper, error) {
	bp, err := newBordered(p)
	if err != nil {
		return nil, err
	}
	rb, err := bp.reduce()
	if err != nil {
		return nil, err
	}
	de := newDescriptor(rb)
	if useBand(de, bp.n) {
		return &Sweeper{de: de, band: true, w0: bp.w0}, nil
	}
	return newHessenbergSweeper(p, de)
}

// newHessenbergSweeper builds the Hessenberg form of p, with de for the
// points that fail the accuracy guard.
func newHessenbergSweeper(p *Problem, de *descriptor) (*Sweeper, error) {
	sp, err := balance(p.G, p.C)
	if err != nil {
		return nil, err
	}
	n := sp.n
	sw := &Sweeper{de: de, n: n, w0: sp.w0, r: make([]complex128, n), q: make([]complex128, n), acc: make([]complex128, n)}
	if n == 0 {
		return sw, nil
	}
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
	t := s / complex(sw.w0, 0)
	if !sw.band {
		if sw.n == 0 {
			return sw.banded(t)
		}
		mu := t - complex(sw.sigma, 0)
		y := sw.hessenberg(mu)
		if cmplx.IsInf(y) || epsilon*(1+cmplx.Abs(mu)*sw.hnorm)*sw.scale <= maxRelErr*cmplx.Abs(y) {
			return y
		}
		sw.direct++
	}
	return sw.banded(t)
}

// banded returns H by the banded elimination of the reduced problem.
func (sw *Sweeper) banded(t complex128) complex128 {
	h, _, k := sw.de.h(t, false)
	if sw.de.singular {
		return cmplx.Inf()
	}
	return h * complex(math.Ldexp(1, -k), 0)
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
