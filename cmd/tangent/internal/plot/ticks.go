package plot

import (
	"math"
	"sort"

	"gonum.org/v1/plot"
)

// ticks are the marks of one axis: the labelled ticks and unlabelled minor
// ticks for the axis itself, and the values where grid lines go.
type ticks struct {
	marks     []plot.Tick // Label "" marks a minor tick
	gridMajor []float64
	gridMinor []float64
}

// decadeEvery are the label strides, in decades, tried in turn until the
// labels fit; past 1 they keep labels on whole SI prefixes (1 k, 1 M, 1 G).
var decadeEvery = [...]int{1, 3, 6, 9, 12, 24}

func modPos(k, n int) int { return ((k % n) + n) % n }

// logTicks marks a logarithmic frequency axis over [lo, hi] Hz (lo > 0):
// decades, labelled every one, two, three ... decades so that at most
// maxLabels labels appear; 2…9 × 10ᵏ as minor ticks and faint grid lines
// when a decade is at least minorRoom long (minorOK). Spans shorter than a
// decade or two get labels at 1, 2 and 5 × 10ᵏ.
func logTicks(lo, hi float64, maxLabels int, minorOK bool, unit string) ticks {
	if maxLabels < 2 {
		maxLabels = 2
	}
	const slack = 1e-9 // a decade at the very edge of the range still counts
	in := func(v float64) bool { return v >= lo*(1-slack) && v <= hi*(1+slack) }
	kLo := int(math.Floor(math.Log10(lo))) - 1
	kHi := int(math.Ceil(math.Log10(hi))) + 1
	var decs []int
	for k := kLo; k <= kHi; k++ {
		if in(math.Pow(10, float64(k))) {
			decs = append(decs, k)
		}
	}
	every := decadeEvery[len(decadeEvery)-1]
	for _, e := range decadeEvery {
		n := 0
		for _, k := range decs {
			if modPos(k, e) == 0 {
				n++
			}
		}
		if n <= maxLabels {
			every = e
			break
		}
	}
	labelled := map[float64]bool{}
	nLab := 0
	for _, k := range decs {
		if modPos(k, every) == 0 {
			labelled[math.Pow(10, float64(k))] = true
			nLab++
		}
	}
	var extra []float64 // 1-2-5 steps for short spans
	if nLab < 2 {
		for _, mults := range [][]float64{{1, 2, 5}, {1, 2, 3, 4, 5, 6, 7, 8, 9}} {
			extra = extra[:0]
			for k := kLo; k <= kHi; k++ {
				for _, m := range mults {
					v := m * math.Pow(10, float64(k))
					if in(v) {
						extra = append(extra, v)
					}
				}
			}
			if len(extra) >= 3 {
				break
			}
		}
		for _, v := range extra {
			labelled[v] = true
		}
		minorOK = true
	}
	var t ticks
	for k := kLo; k <= kHi; k++ {
		dec := math.Pow(10, float64(k))
		for m := 1; m <= 9; m++ {
			v := float64(m) * dec
			if !in(v) {
				continue
			}
			switch {
			case labelled[v]:
				t.marks = append(t.marks, plot.Tick{Value: v, Label: formatEng(v, 3, unit)})
				t.gridMajor = append(t.gridMajor, v)
			case m == 1:
				t.marks = append(t.marks, plot.Tick{Value: v})
				t.gridMajor = append(t.gridMajor, v)
			case minorOK:
				t.marks = append(t.marks, plot.Tick{Value: v})
				t.gridMinor = append(t.gridMinor, v)
			}
		}
	}
	return t
}

// linearRange chooses ticks for a linear axis covering [lo, hi]: the
// smallest step from steps that puts at most maxTicks ticks in the range.
// The range is rounded outwards to a multiple of the step, or of half the
// step where a whole step would add more than a fifth of empty axis.
// A range narrower than minSpan is widened to minSpan around its centre.
func linearRange(lo, hi, minSpan float64, steps []float64, maxTicks int, format func(float64) string) (min, max float64, t ticks) {
	if hi-lo < minSpan {
		c := (hi + lo) / 2
		lo, hi = c-minSpan/2, c+minSpan/2
	}
	if maxTicks < 4 {
		maxTicks = 4
	}
	const eps = 1e-9
	count := func(s float64) int { return int(math.Ceil(hi/s-eps)-math.Floor(lo/s+eps)) + 1 }
	step := steps[len(steps)-1]
	for _, s := range steps {
		if count(s) <= maxTicks {
			step = s
			break
		}
	}
	// The largest step may still give too many ticks on a huge range.
	for i := 0; count(step) > maxTicks; i++ {
		step *= [2]float64{2, 2.5}[i%2]
	}
	out := step
	if (math.Ceil(hi/step-eps)-math.Floor(lo/step+eps))*step-(hi-lo) > 0.2*(hi-lo) {
		out = step / 2
	}
	min = math.Floor(lo/out+eps) * out
	max = math.Ceil(hi/out-eps) * out
	for k := math.Ceil(min/step - eps); k*step <= max+eps*step; k++ {
		v := k * step
		if v == 0 {
			v = 0 // no −0
		}
		t.marks = append(t.marks, plot.Tick{Value: v, Label: format(v)})
		t.gridMajor = append(t.gridMajor, v)
	}
	return min, max, t
}

// symlogTicks marks an axis in symlog coordinates u over [uLo, uHi]: the
// origin and ±10ᵏ from 10·x0 outwards, labelled every one, two, three ...
// decades so that at most maxLabels labels appear. Values are u, labels
// are the rad/s values they stand for.
func symlogTicks(s symlog, uLo, uHi float64, maxLabels int) ticks {
	if maxLabels < 3 {
		maxLabels = 3
	}
	kStart := int(math.Ceil(math.Log10(s.x0) + 1 - 1e-9))
	kEnd := int(math.Floor(math.Log10(s.inverse(math.Max(math.Abs(uLo), math.Abs(uHi))))+1e-9)) + 1
	type dec struct {
		k    int
		u    float64
		sign float64
	}
	var decs []dec
	for k := kStart; k <= kEnd; k++ {
		for _, sg := range []float64{-1, 1} {
			u := s.forward(sg * math.Pow(10, float64(k)))
			if u >= uLo && u <= uHi {
				decs = append(decs, dec{k, u, sg})
			}
		}
	}
	every := decadeEvery[len(decadeEvery)-1]
	for _, e := range decadeEvery {
		n := 1 // the origin
		for _, d := range decs {
			if modPos(d.k, e) == 0 {
				n++
			}
		}
		if n <= maxLabels {
			every = e
			break
		}
	}
	var t ticks
	add := func(u float64, label string) {
		t.marks = append(t.marks, plot.Tick{Value: u, Label: label})
		if label != "" {
			t.gridMajor = append(t.gridMajor, u)
		} else {
			t.gridMinor = append(t.gridMinor, u)
		}
	}
	// Negative side outer to inner, the origin, positive side: ascending u.
	for i := len(decs) - 1; i >= 0; i-- {
		if d := decs[i]; d.sign < 0 {
			add(d.u, labelIf(modPos(d.k, every) == 0, -math.Pow(10, float64(d.k))))
		}
	}
	if uLo <= 0 && uHi >= 0 {
		add(0, "0")
	}
	for _, d := range decs {
		if d.sign > 0 {
			add(d.u, labelIf(modPos(d.k, every) == 0, math.Pow(10, float64(d.k))))
		}
	}
	return t
}

func labelIf(ok bool, v float64) string {
	if !ok {
		return ""
	}
	return formatEng(v, 3, "")
}

// thinLabels keeps labels at least minSep apart (in axis units): the
// origin's first, then from the outermost inwards, so the labels that give
// the range survive. Dropped labels leave a minor tick and grid line.
func thinLabels(t ticks, minSep float64) ticks {
	idx := make([]int, 0, len(t.marks))
	for i, m := range t.marks {
		if m.Label != "" {
			idx = append(idx, i)
		}
	}
	sort.SliceStable(idx, func(a, b int) bool {
		va, vb := t.marks[idx[a]].Value, t.marks[idx[b]].Value
		if (va == 0) != (vb == 0) {
			return va == 0
		}
		return math.Abs(va) > math.Abs(vb)
	})
	var kept []float64
	drop := map[int]bool{}
	for _, i := range idx {
		v := t.marks[i].Value
		ok := true
		for _, k := range kept {
			if math.Abs(v-k) < minSep {
				ok = false
				break
			}
		}
		if ok {
			kept = append(kept, v)
		} else {
			drop[i] = true
		}
	}
	var out ticks
	for i, m := range t.marks {
		if drop[i] {
			m.Label = ""
		}
		out.marks = append(out.marks, m)
		if m.Label != "" {
			out.gridMajor = append(out.gridMajor, m.Value)
		} else {
			out.gridMinor = append(out.gridMinor, m.Value)
		}
	}
	return out
}
