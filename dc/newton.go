package dc

import (
	"errors"
	"fmt"
	"math"

	"tangent/cases"
	"tangent/internal/sparse"
	"tangent/mna"
)

// solver holds the equations of one circuit and the buffers of its Newton
// iterations. The unknowns are mna's: node voltages, then branch currents.
// The equations solved are
//
//	F(x) = G·x − λ·b + gh·x_nodes + i(x) = 0
//
// with G and b from mna.Build, i(x) the device currents leaving each node
// into the devices, λ the source scale (1 but during source ramping) and
// gh the helper conductance from every node to ground (0 but during
// continuation).
type solver struct {
	c    *cases.Circuit // expanded
	sys  *mna.System
	n    int
	opts cases.SolverOptions

	branch   []bool // unknown is a branch current
	jac      *sparse.Matrix
	lin      []float64 // G's values by slot
	diag     []int     // slot of (i, i) of each node unknown, −1 for branches
	rowSum   []float64 // Σ_j over node columns of G_ij, for the residual scale
	lu       sparse.LU
	devs     []*device
	b        []float64 // DC right-hand side
	x, xNew  []float64
	x0       []float64 // start point of the methods (zero unless a guess is given)
	rhs      []float64
	f, scale []float64 // KCL residual and its scale per row
	dx       []float64 // last update

	// State of the last Newton run, for diagnosis.
	last runReport
}

// runReport describes how one Newton run ended.
type runReport struct {
	iterations int
	converged  bool
	reason     string // why it stopped without converging
	singular   *sparse.SingularError
	// snapshot of the last iterate, its update and residual, per unknown
	x, dx, f, scale []float64
	moves           []deviceMove
}

// deviceMove records how far a device's controlling voltages moved in
// the last Newton step of a failed run.
type deviceMove struct {
	part  string
	names [3]string
	dv    [3]float64
}

// newSolver builds the equations of the expanded circuit c, whose device
// parts are, in order, those of devs.
func newSolver(c *cases.Circuit, sys *mna.System, devs []*device) (*solver, error) {
	n := sys.Layout.Size()
	s := &solver{c: c, sys: sys, n: n, opts: solverOptions(c.Solver), devs: devs}
	s.branch = make([]bool, n)
	for i, u := range sys.Layout.Unknowns {
		s.branch[i] = u.Branch
	}
	pat := sparse.NewPatternSize(n, len(sys.G)+9*len(devs)+n)
	ints := make([]int, len(sys.G)+n)
	linSlot := ints[:len(sys.G)]
	for k, e := range sys.G {
		linSlot[k] = pat.Slot(e.Row, e.Col)
	}
	k := 0
	for pi, p := range c.Parts {
		if !cases.IsDevice(p.Kind) {
			continue
		}
		d := devs[k]
		k++
		d.attach(p, sys.Terminals[pi])
		d.register(pat)
	}
	// Structural check before the helper-conductance diagonal joins the
	// pattern: it would hide a node nothing ties down.
	if rows, cols := pat.StructuralDefect(); len(rows)+len(cols) > 0 {
		return nil, s.structuralError(rows, cols)
	}
	s.diag = ints[len(sys.G):]
	for i := range s.diag {
		s.diag[i] = -1
		if !s.branch[i] {
			s.diag[i] = pat.Slot(i, i)
		}
	}
	s.jac = pat.Matrix()
	nnz := s.jac.Len()
	// The float vectors of the solver, in one allocation.
	fl := make([]float64, nnz+9*n)
	vec := func(m int) []float64 {
		v := fl[:m:m]
		fl = fl[m:]
		return v
	}
	s.lin = vec(nnz)
	for k, e := range sys.G {
		s.lin[linSlot[k]] += e.Value
	}
	s.rowSum = vec(n)
	for i := 0; i < n; i++ {
		for _, k := range s.jac.RowSlots(i) {
			if _, j := s.jac.Position(int(k)); !s.branch[j] && s.lin[k] != 0 {
				s.rowSum[i] += s.lin[k]
			}
		}
	}
	s.b = vec(n)
	copy(s.b, sys.DC)
	s.x = vec(n)
	s.xNew = vec(n)
	s.rhs = vec(n)
	s.f = vec(n)
	s.scale = vec(n)
	s.dx = vec(n)
	s.x0 = vec(n)
	return s, nil
}

// solverOptions fills zero fields with the defaults of the case format.
// The defaults (relative 1e-9, 1 nV, 1 pA, 100 iterations) are tighter than
// the 1e-3 relative tolerance common in circuit simulation because the
// bias point feeds a linearization whose derivatives we want to many
// digits; Newton's quadratic convergence makes the extra digits cost one
// or two iterations (common practice).
func solverOptions(o cases.SolverOptions) cases.SolverOptions {
	d := cases.DefaultSolverOptions()
	if o.RelativeTolerance > 0 {
		d.RelativeTolerance = o.RelativeTolerance
	}
	if o.VoltageTolerance > 0 {
		d.VoltageTolerance = o.VoltageTolerance
	}
	if o.CurrentTolerance > 0 {
		d.CurrentTolerance = o.CurrentTolerance
	}
	if o.MaxIterations > 0 {
		d.MaxIterations = o.MaxIterations
	}
	return d
}

func (s *solver) name(i int) string { return s.sys.Layout.Unknowns[i].Name }

// resetDevices makes the current x the reference of every junction limit.
func (s *solver) resetDevices() {
	for _, d := range s.devs {
		d.reset(s.x)
	}
}

// evaluate evaluates every device at s.x (limiting junction steps when
// limit is set) and reports whether any step was limited.
func (s *solver) evaluate(limit bool) bool {
	limited := false
	for _, d := range s.devs {
		d.evaluate(s.x, limit)
		limited = limited || d.limited
	}
	return limited
}

// residual computes the KCL residual F(x) of every node row and its
// scale: the largest current magnitude through the node, taken over the
// terms of the row (each conductance's current G_ij·(x_j − x_i), the
// current to ground rowSum_i·x_i, branch currents, sources and device
// terminal currents). Branch rows are linear and hold exactly after any
// solve; they get a zero residual.
func (s *solver) residual(gh, lam float64) {
	x := s.x
	for i := 0; i < s.n; i++ {
		if s.branch[i] {
			s.f[i], s.scale[i] = 0, 0
			continue
		}
		xi := x[i]
		var sum float64
		sc := math.Abs(s.rowSum[i] * xi)
		for _, k := range s.jac.RowSlots(i) {
			g := s.lin[k]
			if g == 0 {
				continue // a slot only a device or the helper fills
			}
			_, j := s.jac.Position(int(k))
			xj := x[j]
			sum += g * xj
			// The diagonal's term g·(xi − xi) is ±0 and never raises
			// the scale, which is ≥ 0 (or NaN).
			d := xj - xi
			if s.branch[j] {
				d = xj
			}
			if term := math.Abs(g * d); term > sc {
				sc = term
			}
		}
		src := lam * s.b[i]
		sum += gh*xi - src
		sc = maxNonNegative(sc, maxNonNegative(math.Abs(src), math.Abs(gh*xi)))
		s.f[i], s.scale[i] = sum, sc
	}
	for _, d := range s.devs {
		d.addCurrents(s.f, s.scale)
	}
}

// maxNonNegative is math.Max for operands that are ≥ +0, +Inf or NaN, as
// magnitudes are: with no −0 to sort out, ordinary operands take two
// comparisons.
func maxNonNegative(a, b float64) float64 {
	switch {
	case a > b:
		return a
	case b > a:
		return b
	case a != a || b != b: // a NaN: +Inf wins over it, as in math.Max
		if math.IsInf(a, 1) || math.IsInf(b, 1) {
			return math.Inf(1)
		}
		return math.NaN()
	}
	return a
}

// residualOK reports whether every node's residual is within
// relative_tolerance·scale + current_tolerance.
func (s *solver) residualOK() bool {
	for i := 0; i < s.n; i++ {
		if math.Abs(s.f[i]) > s.opts.RelativeTolerance*s.scale[i]+s.opts.CurrentTolerance {
			return false
		}
	}
	return true
}

// updateOK reports whether every unknown's last update dx is within
// relative_tolerance·|x| + voltage_tolerance (current_tolerance for branch
// currents).
func (s *solver) updateOK() bool {
	for i := 0; i < s.n; i++ {
		abs := s.opts.VoltageTolerance
		if s.branch[i] {
			abs = s.opts.CurrentTolerance
		}
		if math.Abs(s.dx[i]) > s.opts.RelativeTolerance*math.Abs(s.x[i])+abs {
			return false
		}
	}
	return true
}

// assemble writes the Newton matrix and right-hand side at the current
// device evaluations.
func (s *solver) assemble(gh, lam float64) {
	vals := s.jac.Values
	copy(vals, s.lin)
	if gh != 0 {
		for _, k := range s.diag {
			if k >= 0 {
				vals[k] += gh
			}
		}
	}
	for i := range s.rhs {
		s.rhs[i] = lam * s.b[i]
	}
	for _, d := range s.devs {
		d.stamp(vals, s.rhs)
	}
}

// newton runs Newton-Raphson with junction limiting from s.x on the
// equations with helper conductance gh and source scale lam, for at most
// maxIter solves. It converges when, at an iterate reached by a full
// (unlimited) step, the last update and the KCL residual both pass their
// tolerances; the devices then hold their evaluation at exactly that
// iterate. On failure s.x holds the last iterate and s.last says why.
func (s *solver) newton(gh, lam float64, maxIter int) bool {
	s.last = runReport{}
	for k := 0; ; k++ {
		limited := s.evaluate(k > 0)
		// The residual is only needed once the update has settled.
		if k > 0 && !limited && s.updateOK() {
			s.residual(gh, lam)
			if s.residualOK() {
				s.last.iterations, s.last.converged = k, true
				return true
			}
		}
		if k == maxIter {
			s.fail(gh, lam, k, fmt.Sprintf("no convergence in %d iterations", k), nil)
			return false
		}
		s.assemble(gh, lam)
		if err := s.lu.Factor(s.jac); err != nil {
			var se *sparse.SingularError
			errors.As(err, &se)
			s.fail(gh, lam, k, "the Newton matrix is singular", se)
			return false
		}
		s.lu.Solve(s.xNew, s.rhs)
		finite := true
		for i, v := range s.xNew {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				finite = false
				break
			}
			s.dx[i] = v - s.x[i]
		}
		if !finite {
			s.fail(gh, lam, k+1, "the iterate is no longer finite", nil)
			return false
		}
		s.x, s.xNew = s.xNew, s.x
	}
}

// fail records the state of a failed run for diagnosis.
func (s *solver) fail(gh, lam float64, iterations int, reason string, se *sparse.SingularError) {
	r := runReport{iterations: iterations, reason: reason, singular: se}
	r.x = append([]float64(nil), s.x...)
	r.dx = append([]float64(nil), s.dx...)
	for _, d := range s.devs {
		step := d.controls(s.dx) // controls are linear: their change over the last step
		m := deviceMove{part: d.part.Name}
		switch d.kind {
		case cases.Diode:
			m.names = [3]string{"v"}
		case cases.BJT:
			m.names = [3]string{"be", "bc"}
		default:
			m.names = [3]string{"gs", "ds", "bs"}
		}
		m.dv = step
		r.moves = append(r.moves, m)
	}
	// The residual at the last iterate itself, devices unlimited.
	s.evaluate(false)
	s.residual(gh, lam)
	r.f = append([]float64(nil), s.f...)
	r.scale = append([]float64(nil), s.scale...)
	s.last = r
}

// structuralError names the unknowns that no arrangement of values can
// determine.
func (s *solver) structuralError(rows, cols []int) error {
	e := &SingularError{File: s.c.File}
	seen := map[int]bool{}
	for _, i := range append(append([]int(nil), cols...), rows...) {
		if seen[i] {
			continue
		}
		seen[i] = true
		u := s.sys.Layout.Unknowns[i]
		if u.Branch {
			e.Branches = append(e.Branches, u.Name)
		} else {
			e.Nodes = append(e.Nodes, u.Name)
		}
	}
	return e
}
