package mechanics

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// MarginSpread is a Monte Carlo estimate of a margin's spread: the margin
// recomputed for inputs drawn around their values, typed ones from a
// normal distribution of their Sigma, assumed ones evenly over their
// published range (half-width √3 × their Assumed ±, the uniform
// distribution whose standard deviation that ± is; GUM, JCGM 100:2008
// §4.3.7; propagation of distributions, JCGM 101:2008).
type MarginSpread struct {
	MeanM         float64 // mean margin over the draws, m (the first-order value ignores the curvature's shift)
	SigmaM        float64 // standard deviation with every input drawn, m
	SigmaTypedM   float64 // with only the typed inputs drawn, m
	SigmaAssumedM float64 // with only the assumed inputs drawn, m
	N             int     // draws kept in the full run (draws the model refuses, e.g. a c.m. below the ground, are left out)
}

// MarginMonteCarlo draws n sets of inputs (seeded, so the same input
// gives the same answer) and returns the spread of Margin over them. It is
// the ± to use where the margin is strongly non-linear in its inputs, as
// at the bar plane near the peak, where ∂M/∂D and ∂M/∂vx vanish and the
// first-order ± misses the curvature. n is 100..100000.
func MarginMonteCarlo(in MarginInput, n int, seed uint64) (MarginSpread, error) {
	if n < 100 || n > 100000 {
		return MarginSpread{}, fmt.Errorf("margin monte carlo: %d draws (want 100..100000)", n)
	}
	if _, err := Margin(in); err != nil {
		return MarginSpread{}, err
	}
	var out MarginSpread
	var err error
	if out.MeanM, out.SigmaM, out.N, err = marginDraws(in, n, seed, true, true); err != nil {
		return MarginSpread{}, err
	}
	if _, out.SigmaTypedM, _, err = marginDraws(in, n, seed+1, true, false); err != nil {
		return MarginSpread{}, err
	}
	if _, out.SigmaAssumedM, _, err = marginDraws(in, n, seed+2, false, true); err != nil {
		return MarginSpread{}, err
	}
	return out, nil
}

// marginDraws runs n draws, perturbing the typed and/or the assumed
// inputs, and returns the mean and standard deviation of the margins.
func marginDraws(in MarginInput, n int, seed uint64, typed, assumed bool) (mean, sd float64, kept int, err error) {
	rng := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	base := in
	base.Sigma, base.Assumed = Uncertainty{}, Uncertainty{}
	draw := func(v, sTyped, sAssumed float64) float64 {
		if v == 0 {
			return 0 // not given: Margin fills its own default
		}
		if sAssumed > 0 {
			if assumed {
				return v + (2*rng.Float64()-1)*math.Sqrt(3)*sAssumed
			}
			return v
		}
		if typed && sTyped > 0 {
			return v + rng.NormFloat64()*sTyped
		}
		return v
	}
	var sum, sumSq float64
	for range n {
		x := base
		st, sa := in.Sigma, in.Assumed
		x.BarM = draw(in.BarM, st.BarM, sa.BarM)
		x.H0M = draw(in.H0M, st.H0M, sa.H0M)
		x.VzMS = draw(in.VzMS, st.VzMS, sa.VzMS)
		x.PeakM = draw(in.PeakM, st.PeakM, sa.PeakM)
		x.DM = draw(in.DM, st.DM, sa.DM)
		x.VxMS = draw(in.VxMS, st.VxMS, sa.VxMS)
		x.ArchDeg = draw(in.ArchDeg, st.ArchDeg, sa.ArchDeg)
		x.LengthM = draw(in.LengthM, st.LengthM, sa.LengthM)
		x.DropM = draw(in.DropM, st.DropM, sa.DropM)
		x.DepthM = draw(in.DepthM, st.DepthM, sa.DepthM)
		r, err := Margin(x)
		if err != nil {
			continue
		}
		kept++
		sum += r.MarginM
		sumSq += r.MarginM * r.MarginM
	}
	if kept < n/2 {
		return 0, 0, kept, fmt.Errorf("margin monte carlo: only %d of %d draws were possible take-offs", kept, n)
	}
	mean = sum / float64(kept)
	return mean, math.Sqrt(math.Max(0, sumSq/float64(kept)-mean*mean)), kept, nil
}
