package dc

import (
	"path/filepath"
	"reflect"
	"testing"

	"tangent/cases"
)

// preparedCircuits returns the circuits the Prepared tests run on: the
// embedded examples, a chain of amplifier stages, and the hard circuits,
// whose solves go through the continuations (and re-analyse the pivot
// order on the way).
func preparedCircuits(t *testing.T) map[string]*cases.Circuit {
	t.Helper()
	out := map[string]*cases.Circuit{"chain of 10": amplifierChain(10)}
	for _, name := range cases.Examples() {
		c, err := cases.Example(name)
		if err != nil {
			t.Fatal(err)
		}
		out[name] = c
	}
	files, err := filepath.Glob(filepath.Join("..", "testdata", "hard", "*.toml"))
	if err != nil {
		t.Fatal(err)
	}
	for _, f := range files {
		c, err := cases.Load(f)
		if err != nil {
			t.Fatal(err)
		}
		out[filepath.Base(f)] = c
	}
	return out
}

// A Prepared's answers depend only on the circuit and the options: each
// Solve equals a fresh SolveWith bit for bit, whatever was solved before
// (a guess that leads elsewhere, a run that fails), and an answer already
// returned is not changed by later solves. This is the determinism
// contract of the package (same input, same output), checked by
// comparison rather than against an outside reference.
func TestPreparedRepeatable(t *testing.T) {
	for name, c := range preparedCircuits(t) {
		t.Run(name, func(t *testing.T) {
			fresh, err := Solve(c)
			if err != nil {
				t.Fatal(err)
			}
			again, err := Solve(c) // kept to compare first with after the other solves
			if err != nil {
				t.Fatal(err)
			}
			p, err := Prepare(c)
			if err != nil {
				t.Fatal(err)
			}
			first, err := p.Solve(Options{})
			if err != nil {
				t.Fatal(err)
			}
			// Disturb the prepared state: a failing plain run, and a
			// run from a guess with every node at a tenth of its value.
			_, _ = p.Solve(Options{NoFallbacks: true})
			guess := *fresh
			guess.X = append([]float64(nil), fresh.X...)
			for i := range guess.X {
				guess.X[i] *= 0.1
			}
			fromGuess, err := p.Solve(Options{Guess: &guess})
			if err != nil {
				t.Fatal(err)
			}
			checkBalance(t, fromGuess, 1e-9, 1e-14)
			last, err := p.Solve(Options{})
			if err != nil {
				t.Fatal(err)
			}
			for _, op := range []*OperatingPoint{first, last} {
				if !reflect.DeepEqual(op, fresh) {
					t.Fatalf("prepared solve differs from a fresh one:\nX %v\nwant %v", op.X, fresh.X)
				}
			}
			if !reflect.DeepEqual(first, again) {
				t.Error("a later solve changed an answer already returned")
			}
			if first.X[0] == last.X[0] && &first.X[0] == &last.X[0] {
				t.Error("two answers share their solution vector")
			}
		})
	}
}

// Prepare reports the errors that no iteration can mend, as Solve does.
func TestPrepareErrors(t *testing.T) {
	ms := map[string]*cases.Model{"d": model(cases.DeviceDiode, map[string]float64{"saturation_current": 1e-14})}
	c := build(ms, vsrc("V", "a", "gnd", 1), diode("D1", "nosuch", "a", "gnd"))
	if _, err := Prepare(c); err == nil {
		t.Error("undefined model: no error")
	}
}
