package dc

import (
	"fmt"
	"math"
)

// Helper-conductance continuation and supply (source)
// ramping are artificial-parameter homotopies: a parameter deforms the
// equations from an easy problem into the real one, and Newton follows the
// solution along the way, each stage starting from the last. Both are
// described in R. C. Melville, L. Trajković, S.-C. Fang, L. T. Watson,
// "Artificial parameter homotopy methods for the DC operating point
// problem", IEEE Trans. CAD 12(6), 1993 (from memory). The constants
// below are ours.
const (
	// helperStart is the first helper conductance, S: 1 kΩ from every
	// node to ground pins the nodes near ground without swamping
	// kilohm-level circuits. It grows tenfold (up to helperMax) while
	// Newton fails at it.
	helperStart = 1e-3
	helperMax   = 1.0
	// helperFloor is the smallest nonzero helper conductance, S. Below it
	// the next stage is the real circuit (0 S). When only helperFloor
	// converges, it stays in the answer and is reported: 1e-12 S is the
	// bound DESIGN.md allows.
	helperFloor = 1e-12
	// maxStages bounds the stages of one continuation.
	maxStages = 200
	// rampHelper is the helper conductance held during source ramping, S.
	// It keeps nodes reached only through cut-off channels from making
	// the matrix singular near zero supply; it is stepped out afterwards.
	rampHelper = 1e-9
	// rampFirstStep is the first increment of the source scale, and
	// rampMinStep the increment below which the ramp gives up.
	rampFirstStep = 0.1
	rampMinStep   = 1e-6
	// stageIterations caps the Newton iterations of one continuation
	// stage (max_iterations caps it further): from a nearby solution
	// Newton converges in a handful of steps or not at all, and a stage
	// that does not is cheaper to halve than to pursue (common practice).
	stageIterations = 30
)

// stageLimit is the iteration cap of one continuation stage. A fine stage
// (one that has been cut down several times) is probably at a fold of the
// solution path, where the solution must jump to another branch far away:
// it gets the full max_iterations.
func (s *solver) stageLimit(fine bool) int {
	if fine {
		return s.opts.MaxIterations
	}
	return min(s.opts.MaxIterations, stageIterations)
}

// attemptResult is what one method reached.
type attemptResult struct {
	iterations int
	converged  bool
	helper     float64 // helper conductance left in the answer, S
	detail     string  // how it ended
}

// plainNewton runs Newton from x0.
func (s *solver) plainNewton(x0 []float64) attemptResult {
	copy(s.x, x0)
	s.resetDevices()
	ok := s.newton(0, 1, s.opts.MaxIterations)
	r := attemptResult{iterations: s.last.iterations, converged: ok}
	if !ok {
		r.detail = s.last.reason
	}
	return r
}

// conductanceContinuation solves with a helper conductance gh from every
// node to ground, large enough that Newton converges from x0, then lowers
// gh stage by stage to zero, each stage starting from the last solution.
func (s *solver) conductanceContinuation(x0 []float64) attemptResult {
	copy(s.x, x0)
	s.resetDevices()
	var r attemptResult
	g := helperStart
	for {
		ok := s.newton(g, 1, s.opts.MaxIterations)
		r.iterations += s.last.iterations
		if ok {
			break
		}
		g *= 10
		if g > helperMax {
			r.detail = fmt.Sprintf("no convergence even with %g S from every node to ground (%s)", helperMax, s.last.reason)
			return r
		}
		copy(s.x, x0)
		s.resetDevices()
	}
	return s.descend(g, r)
}

// descend lowers the helper conductance from g (where s.x is a solution)
// to zero, or to helperFloor when zero does not converge.
func (s *solver) descend(g float64, r attemptResult) attemptResult {
	saved := append([]float64(nil), s.x...)
	factor := 10.0
	for stage := 0; stage < maxStages; stage++ {
		next := g / factor
		if g > helperFloor && next < helperFloor {
			next = helperFloor
		} else if g <= helperFloor {
			next = 0
		}
		ok := s.newton(next, 1, s.stageLimit(factor < 1.2))
		r.iterations += s.last.iterations
		if ok {
			if next == 0 {
				r.converged = true
				return r
			}
			g = next
			copy(saved, s.x)
			factor = math.Min(factor*factor, 100)
			continue
		}
		copy(s.x, saved)
		s.resetDevices()
		if next == 0 {
			// Only the floor converges: some node has no other tie at the
			// solution. Re-solve at the floor so the devices hold their
			// evaluation at the answer.
			ok := s.newton(g, 1, s.stageLimit(false))
			r.iterations += s.last.iterations
			if ok {
				r.converged, r.helper = true, g
				return r
			}
			r.detail = fmt.Sprintf("stalled at a helper conductance of %.3g S", g)
			return r
		}
		factor = math.Sqrt(factor)
		if factor < 1.05 {
			r.detail = fmt.Sprintf("stalled at a helper conductance of %.3g S (%s)", g, s.last.reason)
			return r
		}
	}
	r.detail = fmt.Sprintf("stopped after %d stages at a helper conductance of %.3g S", maxStages, g)
	return r
}

// sourceRamp scales every independent source by λ from 0 (where all
// currents vanish and zero is the solution) to 1, with rampHelper from
// every node to ground, then steps the helper out.
func (s *solver) sourceRamp() attemptResult {
	clear(s.x)
	s.resetDevices()
	var r attemptResult
	if !s.newton(rampHelper, 0, s.opts.MaxIterations) {
		r.iterations += s.last.iterations
		r.detail = "no solution even with every source at zero (" + s.last.reason + ")"
		return r
	}
	r.iterations += s.last.iterations
	saved := append([]float64(nil), s.x...)
	lam, step := 0.0, rampFirstStep
	for stage := 0; lam < 1; stage++ {
		if stage == maxStages {
			r.detail = fmt.Sprintf("stopped after %d stages at %.4g %% of the sources", maxStages, 100*lam)
			return r
		}
		next := math.Min(1, lam+step)
		ok := s.newton(rampHelper, next, s.stageLimit(step < 1e-3*rampFirstStep))
		r.iterations += s.last.iterations
		if ok {
			lam = next
			copy(saved, s.x)
			step = math.Min(2*step, 0.5)
			continue
		}
		copy(s.x, saved)
		s.resetDevices()
		step /= 4
		if step < rampMinStep {
			r.detail = fmt.Sprintf("stalled at %.4g %% of the sources (%s)", 100*lam, s.last.reason)
			return r
		}
	}
	return s.descend(rampHelper, r)
}
