package explain

import (
	"math"
	"math/cmplx"
	"sort"

	"tangent/ac"
	"tangent/cases"
	"tangent/internal/cdense"
	"tangent/mna"
)

// Sensitivity is the normalized sensitivity of a root r (pole or zero) to
// an element value x,
//
//	S = (x/r)·∂r/∂x = ∂(ln r)/∂(ln x),
//
// so Re S = ∂ln|r|/∂ln x is the sensitivity of the root's natural
// frequency |r| and Im S = ∂(arg r)/∂ln x (rad) that of its angle; both are
// real for a real root. It is computed from the right and left
// eigenvectors of the pencil at r (first-order perturbation theory), not
// by solving again: see rootSensitivities.
type Sensitivity struct {
	Element int        // index into Explanation.Elements
	S       complex128 // dimensionless
	// Share is |S|/Σ|S| over every element of the root: how much of the
	// root's total sensitivity this element carries.
	Share float64
	// Storage is −Re S for a capacitor or inductor and 0 otherwise: the
	// element's share of the root's natural frequency. A common scale
	// factor k on every C and L moves every root to r/k, so by Euler's
	// theorem on homogeneous functions the storage shares of a root sum to
	// exactly 1 (Im S of the storage elements sums to 0).
	Storage float64
}

// Root is a pole or a zero of the transfer, with the elements that set it.
type Root struct {
	S complex128 // rad/s
	// Visible is false for a pole that a zero of the transfer cancels (a
	// mode of the circuit that the transfer does not see). Zeros are
	// always visible.
	Visible bool
	// Sens holds every element with S ≠ 0 (above the rounding level
	// noiseFloor·max|S|), by decreasing |S|; it is nil where Note says
	// why there is none.
	Sens []Sensitivity
	// Note says why Sens is nil ("multiple root", "defective pencil at
	// this root", "at the origin"), or, for a root at the origin, that
	// Sens holds storage shares only (S = 0 for every element: see
	// originShares).
	Note string
}

// pencil is a real square pencil G + s·C, row-major. The element stamps
// apply to its first unknowns (the circuit's); the rest are test-source
// branches and, for the zeros, the border.
type pencil struct {
	n    int
	g, c []float64
}

// polePencil returns the pencil G + s·C of problem p.
func polePencil(p *ac.Problem) *pencil {
	n, _ := p.G.Dims()
	pc := &pencil{n: n, g: make([]float64, n*n), c: make([]float64, n*n)}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			pc.g[i*n+j] = p.G.At(i, j)
			pc.c[i*n+j] = p.C.At(i, j)
		}
	}
	return pc
}

// zeroPencil returns the system pencil of the zeros (as ac.Zeros),
//
//	[ G   B ] + s·[ C  0 ]
//	[ Out 0 ]     [ 0  0 ],
//
// whose finite eigenvalues are the zeros of H and the modes H does not see.
func zeroPencil(p *ac.Problem) *pencil {
	n, _ := p.G.Dims()
	m := n + 1
	pc := &pencil{n: m, g: make([]float64, m*m), c: make([]float64, m*m)}
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			pc.g[i*m+j] = p.G.At(i, j)
			pc.c[i*m+j] = p.C.At(i, j)
		}
		pc.g[i*m+n] = p.B[i]
		pc.g[n*m+i] = p.Out[i]
	}
	return pc
}

// Tolerances of the eigenvector computation.
const (
	// inverseSteps is the number of inverse-iteration steps. With the
	// shift equal to the eigenvalue to about 1e-12 (package ac refines
	// every root), each step reduces the other components by the ratio of
	// that error to the gap to the next eigenvalue: one step would do,
	// the others clean up a poor start vector.
	inverseSteps = 3
	// maxResidual bounds ‖Â·x‖∞ for the equilibrated matrix Â = R·(G +
	// r·C)·Cs (largest |re| + |im| of each row and column in (0.5, 1])
	// and ‖x‖∞ = 1: a true eigenvector leaves about n·ε; 1e-8 allows for
	// a root known to 1e-9 relative and a few hundred unknowns.
	maxResidual = 1e-8
	// minCoupling bounds |wᵀ·(r·C)·v| relative to ‖w‖·‖v‖ in the
	// equilibrated coordinates, below which the root is taken for a
	// defective (Jordan-block) eigenvalue, whose sensitivity is infinite.
	minCoupling = 1e-12
	// noiseFloor: sensitivities below this fraction of a root's largest
	// are rounding errors of exact zeros (about ε times the condition of
	// the eigenvectors), not dependences.
	noiseFloor = 1e-13
	// clusterTol: roots closer than this (relative) are one multiple root,
	// the clustering threshold of package ac.
	clusterTol = 1e-6
)

// eigvecs returns the right and left eigenvectors v, w of the pencil at its
// simple eigenvalue r, (G + r·C)·v = 0 and wᵀ·(G + r·C) = 0, by inverse
// iteration with the equilibrated matrix Â = R·(G + r·C)·Cs: v = Cs·x with
// Â·x = 0 and w = R·y with yᵀ·Â = 0. coupling is |wᵀ·(r·C)·v|/(‖x‖₂·‖y‖₂),
// small for a defective eigenvalue (0 at r = 0, where it says nothing).
// ok is false when the residual of either vector exceeds maxResidual.
func (pc *pencil) eigvecs(r complex128) (v, w []complex128, coupling float64, ok bool) {
	n := pc.n
	a := make([]complex128, n*n)
	for i := range a {
		a[i] = complex(pc.g[i], 0) + r*complex(pc.c[i], 0)
	}
	rs, cs := equilibrate(n, func(i, j int) float64 { return abs1(a[i*n+j]) })
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a[i*n+j] *= complex(rs[i]*cs[j], 0)
		}
	}
	// Â is singular at the eigenvalue: Factor replaces its zero pivot,
	// and each solve returns a large multiple of the null vector.
	var f cdense.LU
	f.Factor(a, n)
	x, y := startVector(n), startVector(n)
	for it := 0; it < inverseSteps; it++ {
		f.Solve(x)
		normInf(x)
		f.SolveT(y)
		normInf(y)
	}
	// Residuals ‖Â·x‖∞ and ‖yᵀ·Â‖∞.
	var rx, ry float64
	for i := 0; i < n; i++ {
		var sx, sy complex128
		for j := 0; j < n; j++ {
			if v := a[i*n+j]; v != 0 {
				sx += v * x[j]
			}
			if v := a[j*n+i]; v != 0 {
				sy += y[j] * v
			}
		}
		rx, ry = math.Max(rx, cmplx.Abs(sx)), math.Max(ry, cmplx.Abs(sy))
	}
	if !(rx <= maxResidual && ry <= maxResidual) {
		return nil, nil, 0, false
	}
	v, w = make([]complex128, n), make([]complex128, n)
	for i := 0; i < n; i++ {
		v[i] = complex(cs[i], 0) * x[i]
		w[i] = complex(rs[i], 0) * y[i]
	}
	// wᵀ·(r·C)·v = yᵀ·(R·r·C·Cs)·x, in the equilibrated coordinates.
	d := r * bilinear(w, pc.c, n, v)
	coupling = cmplx.Abs(d) / (norm2(x) * norm2(y))
	return v, w, coupling, true
}

// startVector is a fixed start for inverse iteration with no special
// structure, so that it is not orthogonal to any eigenvector of a
// circuit pencil in practice; fixed, so results are repeatable.
func startVector(n int) []complex128 {
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(1+math.Mod(float64(i)*0.6180339887498949, 1), 0)
	}
	return x
}

func normInf(x []complex128) {
	var m float64
	var big complex128
	for _, v := range x {
		if a := cmplx.Abs(v); a > m {
			m, big = a, v
		}
	}
	if m == 0 || math.IsInf(m, 0) || math.IsNaN(m) {
		return
	}
	// Dividing by the largest entry (not its modulus) makes that entry 1,
	// so a real eigenvector comes out real.
	inv := 1 / big
	for i := range x {
		x[i] *= inv
	}
}

func norm2(x []complex128) float64 {
	var s float64
	for _, v := range x {
		s = math.Hypot(s, cmplx.Abs(v))
	}
	return s
}

// bilinear returns wᵀ·M·v for the row-major n×n real M.
func bilinear(w []complex128, m []float64, n int, v []complex128) complex128 {
	var s complex128
	for i := 0; i < n; i++ {
		if w[i] == 0 {
			continue
		}
		var t complex128
		row := m[i*n : (i+1)*n]
		for j, a := range row {
			if a != 0 {
				t += complex(a, 0) * v[j]
			}
		}
		s += w[i] * t
	}
	return s
}

// tripletForm returns wᵀ·M·v for M in triplet form.
func tripletForm(w []complex128, m mna.Triplets, v []complex128) complex128 {
	var s complex128
	for _, e := range m {
		s += w[e.Row] * complex(e.Value, 0) * v[e.Col]
	}
	return s
}

// rootSensitivities returns the normalized sensitivities of the simple
// nonzero root r of pc to every element. With v, w the right and left
// eigenvectors, a perturbation of x changes the root by (Wilkinson's
// first-order formula for the generalized eigenproblem, from memory)
//
//	∂r/∂x = −wᵀ·(∂G/∂x + r·∂C/∂x)·v / (wᵀ·C·v),
//
// where ∂G/∂x and ∂C/∂x are the element's own stamp (see elements). The
// result is sorted by decreasing |S|, zeros left out; note says why there
// is none ("" when there are).
func rootSensitivities(pc *pencil, r complex128, elems []element) ([]Sensitivity, string) {
	v, w, coupling, ok := pc.eigvecs(r)
	if !ok {
		return nil, "no eigenvector to working accuracy"
	}
	den := bilinear(w, pc.c, pc.n, v)
	if r == 0 {
		return originShares(w, v, den, elems)
	}
	if coupling < minCoupling {
		return nil, "defective pencil at this root"
	}
	var out []Sensitivity
	var total float64
	for i, e := range elems {
		num := tripletForm(w, e.dG, v) + r*tripletForm(w, e.dC, v)
		if num == 0 {
			continue
		}
		s := complex(e.xhat, 0) / r * (-num / den)
		if e.Kind == cases.Resistor {
			s = -s // S_R = −S_G
		}
		if imag(r) == 0 {
			s = complex(real(s), 0) // exact for a real root; the imaginary part is rounding
		}
		sv := Sensitivity{Element: i, S: s}
		if e.Storage() {
			sv.Storage = -real(s)
		}
		out = append(out, sv)
		total += cmplx.Abs(s)
	}
	// What stays below noiseFloor·max|S| is rounding of an exact zero (an
	// element the root does not depend on) and is left out.
	var largest float64
	for _, sv := range out {
		largest = math.Max(largest, cmplx.Abs(sv.S))
	}
	kept := out[:0]
	for _, sv := range out {
		if cmplx.Abs(sv.S) > noiseFloor*largest {
			kept = append(kept, sv)
		} else {
			total -= cmplx.Abs(sv.S)
		}
	}
	out = kept
	for i := range out {
		if total > 0 {
			out[i].Share = cmplx.Abs(out[i].S) / total
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return cmplx.Abs(out[i].S) > cmplx.Abs(out[j].S) })
	return out, ""
}

// originShares returns the storage shares of a simple root at the origin,
// which no element value moves (S = 0 for every element): the storage
// share of a capacitor or inductor, −Re S = Re(x·wᵀ·∂C/∂x·v)/(wᵀ·C·v) for
// a root away from the origin, does not involve the root, and its limit
// says which elements make the root (the coupling capacitor that blocks
// DC, say). The shares sum to 1 as elsewhere.
func originShares(w, v []complex128, den complex128, elems []element) ([]Sensitivity, string) {
	if den == 0 || cmplx.IsNaN(den) || cmplx.IsInf(den) {
		return nil, "at the origin"
	}
	var out []Sensitivity
	for i, e := range elems {
		if !e.Storage() {
			continue
		}
		share := real(complex(e.xhat, 0) * tripletForm(w, e.dC, v) / den)
		if math.Abs(share) > noiseFloor {
			out = append(out, Sensitivity{Element: i, Storage: share})
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return math.Abs(out[i].Storage) > math.Abs(out[j].Storage) })
	return out, originNote
}

// originNote is the note of a root at the origin.
const originNote = "at the origin: no element moves it; storage shares only"

// multiple reports whether root r of the list all has another root within
// clusterTol relative (or both at the origin).
func multiple(r complex128, all []complex128) bool {
	n := 0
	for _, q := range all {
		if d := cmplx.Abs(q - r); d <= clusterTol*math.Max(cmplx.Abs(q), cmplx.Abs(r)) {
			n++
		}
	}
	return n > 1
}
