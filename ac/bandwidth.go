package ac

import (
	"math"
	"math/cmplx"
)

// Bandwidth is the −3 dB band of a transfer function, in the sense of
// DESIGN.md's JSON contract. Frequencies are in hertz; a nil field means
// there is none.
type Bandwidth struct {
	// Reference is the level the band is measured from: |H(0)| when the
	// DC gain is finite and nonzero, else the largest |H(j·ω)| (mid-band;
	// the limit |H(∞)| for a high-pass). Zero when there is no finite
	// reference (H ≡ 0, a pole at the origin, |H| growing without bound).
	Reference float64
	// RefHz is where the reference is taken: 0 for DC, the peak frequency
	// for mid-band, +Inf for a high-pass.
	RefHz float64
	// HighHz is the first frequency above RefHz where |H| = Reference/√2.
	HighHz *float64
	// LowHz, for a reference above DC only, is the last frequency below
	// RefHz where |H| = Reference/√2.
	LowHz *float64
	// WidthHz is HighHz − LowHz, or HighHz for a DC reference.
	WidthHz *float64
}

// gridPerDecade is the density of the log grid on which |H| is scanned for
// its maximum and for level crossings before they are refined; 40 points
// per decade separate features down to a relative width of 6 %.
const gridPerDecade = 40

// logMag returns ln|H(j·ω)| from the factored form, as sums of logarithms
// so that no product over- or underflows.
func (r *Rational) logMag(w float64) float64 {
	jw := complex(0, w)
	l := math.Log(math.Abs(r.K0))
	for _, z := range r.Zeros {
		if z == 0 {
			l += math.Log(w)
		} else {
			l += math.Log(cmplx.Abs(z-jw)) - math.Log(cmplx.Abs(z))
		}
	}
	for _, p := range r.Poles {
		if p == 0 {
			l -= math.Log(w)
		} else {
			l -= math.Log(cmplx.Abs(p-jw)) - math.Log(cmplx.Abs(p))
		}
	}
	return l
}

// grid returns the scan grid in rad/s: from three decades below the
// smallest nonzero root modulus to three above the largest.
func (r *Rational) grid() []float64 {
	lo, hi := math.Inf(1), 0.0
	for _, v := range append(append([]complex128(nil), r.Zeros...), r.Poles...) {
		if a := cmplx.Abs(v); a != 0 {
			lo, hi = math.Min(lo, a), math.Max(hi, a)
		}
	}
	if hi == 0 {
		return nil
	}
	lo, hi = lo*1e-3, hi*1e3
	np := int(math.Ceil(math.Log10(hi/lo)*gridPerDecade)) + 1
	w := make([]float64, np)
	for i := range w {
		w[i] = lo * math.Pow(hi/lo, float64(i)/float64(np-1))
	}
	return w
}

// crossing refines a root of ln|H(jω)| − level between grid points a < b
// where the difference changes sign, by bisection on ln ω to full double
// precision.
func (r *Rational) crossing(a, b, level float64) float64 {
	fa := r.logMag(a) - level
	la, lb := math.Log(a), math.Log(b)
	for i := 0; i < 100; i++ {
		m := 0.5 * (la + lb)
		if m == la || m == lb {
			break
		}
		fm := r.logMag(math.Exp(m)) - level
		if (fm >= 0) == (fa >= 0) {
			la, fa = m, fm
		} else {
			lb = m
		}
	}
	return math.Exp(0.5 * (la + lb))
}

// Bandwidth returns the −3 dB band of r (see the type). The maximum of
// |H| is located on a log grid of 40 points per decade spanning three
// decades beyond the roots and refined by golden-section search; each
// crossing is bracketed on the same grid and refined by bisection on the
// exact |H(j·ω)| of the factored form.
func (r *Rational) Bandwidth() Bandwidth {
	var bw Bandwidth
	if r.K0 == 0 {
		return bw
	}
	k := r.originOrder()
	w := r.grid()
	hz := func(x float64) *float64 { v := x / (2 * math.Pi); return &v }
	if k == 0 {
		bw.Reference = math.Abs(r.K0)
		level := math.Log(bw.Reference) - 0.5*math.Ln2
		for i := 0; i+1 < len(w); i++ {
			if r.logMag(w[i]) >= level && r.logMag(w[i+1]) < level {
				bw.HighHz = hz(r.crossing(w[i], w[i+1], level))
				bw.WidthHz = bw.HighHz
				break
			}
		}
		return bw
	}
	if k < 0 || len(w) == 0 {
		return bw // a pole at the origin; or H = K0·s^k, unbounded
	}
	// Mid-band: largest |H| on the grid, then the limit at infinity.
	im := 0
	lm := make([]float64, len(w))
	for i := range w {
		lm[i] = r.logMag(w[i])
		if lm[i] > lm[im] {
			im = i
		}
	}
	rel := len(r.Zeros) - len(r.Poles)
	var peakW, peak float64
	switch {
	case im == len(w)-1 && rel > 0:
		return bw // |H| grows without bound
	case im == len(w)-1:
		// High-pass: the supremum is |H(∞)| = |Gain|.
		peakW, peak = math.Inf(1), math.Log(math.Abs(r.Gain()))
	default:
		peakW, peak = r.goldenMax(w[max(im-1, 0)], w[im+1])
	}
	bw.Reference, bw.RefHz = math.Exp(peak), peakW/(2*math.Pi)
	level := peak - 0.5*math.Ln2
	if math.IsInf(peakW, 1) {
		im = len(w) - 1
	} else {
		for i := im; i+1 < len(w); i++ {
			if lm[i] >= level && lm[i+1] < level {
				bw.HighHz = hz(r.crossing(w[i], w[i+1], level))
				break
			}
		}
	}
	for i := im; i > 0; i-- {
		if lm[i] >= level && lm[i-1] < level {
			bw.LowHz = hz(r.crossing(w[i-1], w[i], level))
			break
		}
	}
	if bw.HighHz != nil && bw.LowHz != nil {
		v := *bw.HighHz - *bw.LowHz
		bw.WidthHz = &v
	}
	return bw
}

// goldenMax maximizes ln|H(jω)| over [a, b] by golden-section search on
// ln ω and returns the place and the value.
func (r *Rational) goldenMax(a, b float64) (float64, float64) {
	g := (math.Sqrt(5) - 1) / 2
	la, lb := math.Log(a), math.Log(b)
	x1, x2 := lb-g*(lb-la), la+g*(lb-la)
	f1, f2 := r.logMag(math.Exp(x1)), r.logMag(math.Exp(x2))
	for i := 0; i < 200 && lb-la > 1e-15*math.Max(1, math.Abs(la)); i++ {
		if f1 < f2 {
			la, x1, f1 = x1, x2, f2
			x2 = la + g*(lb-la)
			f2 = r.logMag(math.Exp(x2))
		} else {
			lb, x2, f2 = x2, x1, f1
			x1 = lb - g*(lb-la)
			f1 = r.logMag(math.Exp(x1))
		}
	}
	x := math.Exp(0.5 * (la + lb))
	return x, r.logMag(x)
}

// UnityGainHz returns the lowest frequency, in hertz, where |H(j·ω)| = 1,
// bracketed on the scan grid and refined by bisection; ok is false when
// |H| does not cross 1 there.
func (r *Rational) UnityGainHz() (hz float64, ok bool) {
	if r.K0 == 0 {
		return 0, false
	}
	w := r.grid()
	for i := 0; i+1 < len(w); i++ {
		a, b := r.logMag(w[i]), r.logMag(w[i+1])
		if (a >= 0) != (b >= 0) {
			return r.crossing(w[i], w[i+1], 0) / (2 * math.Pi), true
		}
	}
	return 0, false
}
