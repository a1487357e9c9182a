package ac

import "math"

// eliminate removes infinite eigenvalues of the balanced pencil g + t·c
// that show in its structure, by Gaussian elimination, before the
// orthogonal staircase deals with the rest:
//
//   - a column j with no entry in c (an algebraic unknown) is eliminated
//     with the row p of its largest entry of g (partial pivoting): rows
//     i ← rows i − (g_ij/g_pj)·row p, then row p and column j go;
//   - a row p with no entry in c (an algebraic equation) is eliminated
//     with the column q of its largest entry of g: columns k ← columns k −
//     (g_pk/g_pq)·column q, then row p and column q go.
//
// Either way det(g + t·c) changes by the constant factor ±g_pj (±g_pq),
// so the finite eigenvalues stay; the pencil stays linear because the
// pivot row (column) of the elimination is free of t. Entries of c are
// only ever combined with exact zeros in those positions, so the zero
// pattern on which the next step decides is exact, not a rank decision:
// this is the structural index reduction of a descriptor system, and it
// keeps the staircase's rank decisions (whose rounding errors grow with
// every level) for the few infinite eigenvalues without such structure.
// A zero column or row of both g and c means a singular pencil.
//
// The result is the reduced pencil (order m ≤ n), balanced again.
func eliminate(p *scaledPencil) (*scaledPencil, error) {
	n := p.n
	g := append([]float64(nil), p.g...)
	c := append([]float64(nil), p.c...)
	rowOn := make([]bool, n)
	colOn := make([]bool, n)
	for i := range rowOn {
		rowOn[i], colOn[i] = true, true
	}
	left := n
	for left > 0 {
		done := false
		for j := 0; j < n && !done; j++ {
			if !colOn[j] {
				continue
			}
			zero := true
			for i := 0; i < n && zero; i++ {
				zero = !rowOn[i] || c[i*n+j] == 0
			}
			if !zero {
				continue
			}
			piv, pv := -1, 0.0
			for i := 0; i < n; i++ {
				if rowOn[i] && math.Abs(g[i*n+j]) > pv {
					piv, pv = i, math.Abs(g[i*n+j])
				}
			}
			if piv < 0 {
				return nil, ErrSingularPencil
			}
			for i := 0; i < n; i++ {
				if !rowOn[i] || i == piv || g[i*n+j] == 0 {
					continue
				}
				l := g[i*n+j] / g[piv*n+j]
				for k := 0; k < n; k++ {
					if colOn[k] {
						g[i*n+k] -= l * g[piv*n+k]
						c[i*n+k] -= l * c[piv*n+k]
					}
				}
				g[i*n+j] = 0
			}
			rowOn[piv], colOn[j] = false, false
			left--
			done = true
		}
		for i := 0; i < n && !done; i++ {
			if !rowOn[i] {
				continue
			}
			zero := true
			for k := 0; k < n && zero; k++ {
				zero = !colOn[k] || c[i*n+k] == 0
			}
			if !zero {
				continue
			}
			piv, pv := -1, 0.0
			for k := 0; k < n; k++ {
				if colOn[k] && math.Abs(g[i*n+k]) > pv {
					piv, pv = k, math.Abs(g[i*n+k])
				}
			}
			if piv < 0 {
				return nil, ErrSingularPencil
			}
			for k := 0; k < n; k++ {
				if !colOn[k] || k == piv || g[i*n+k] == 0 {
					continue
				}
				l := g[i*n+k] / g[i*n+piv]
				for r := 0; r < n; r++ {
					if rowOn[r] {
						g[r*n+k] -= l * g[r*n+piv]
						c[r*n+k] -= l * c[r*n+piv]
					}
				}
				g[i*n+k] = 0
			}
			rowOn[i], colOn[piv] = false, false
			left--
			done = true
		}
		if !done {
			break
		}
	}
	var rows, cols []int
	for i := 0; i < n; i++ {
		if rowOn[i] {
			rows = append(rows, i)
		}
		if colOn[i] {
			cols = append(cols, i)
		}
	}
	m := len(rows)
	q := &scaledPencil{n: m, g: make([]float64, m*m), c: make([]float64, m*m), w0: p.w0}
	for a, i := range rows {
		for b, k := range cols {
			q.g[a*m+b] = g[i*n+k]
			q.c[a*m+b] = c[i*n+k]
		}
	}
	return q, nil
}
