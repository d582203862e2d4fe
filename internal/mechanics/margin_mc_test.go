package mechanics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// mcG is standard gravity, 9.80665 m/s², exact by definition (3rd CGPM,
// 1901).
const mcG = 9.80665

// mcCase is one margin with the ± of each input, typed (normal) or
// assumed (uniform over a range of that standard deviation).
type mcCase struct {
	name                                string
	bar, h0, vz, d, vx, archDeg, l, dep float64
	sBar, sH0, sVz, sD, sVx, sArch, sL  float64
	sDep                                float64
	aH0, aVx, aArch, aDep               float64 // assumed ±
}

// mcMargin is the margin of the design written out independently of the
// package: the c.m. as a projectile, z = h0 + vz·t − g·t²/2 at t = D/vx
// (or the peak h0 + vz²/2g without D) (Halliday, Resnick and Walker,
// Fundamentals of Physics, ch. 2 and 4), minus what the arched body needs,
// bar + d − s, with s the drop of the centroid of a circular arc below its
// apex, R − R·sin α/α, R = L/θ, α = θ/2 (Beer and Johnston, Vector
// Mechanics for Engineers: Statics, centroids of common shapes).
func mcMargin(bar, h0, vz, d, vx, archDeg, l, dep float64) (float64, bool) {
	c := h0 + vz*vz/(2*mcG)
	if d > 0 {
		t := d / vx
		c = h0 + vz*t - mcG*t*t/2
		if c < 0 || vx <= 0 {
			return 0, false
		}
	}
	th := archDeg * math.Pi / 180
	s := 0.0
	if th > 1e-9 {
		r, a := l/th, th/2
		s = r - r*math.Sin(a)/a
	}
	return c - (bar + dep - s), true
}

// mcSpread is the test's own Monte Carlo (propagation of distributions,
// JCGM 101:2008): n draws of every input, typed ones normal, assumed ones
// uniform with half-width √3·σ, and the standard deviation of mcMargin.
func mcSpread(c mcCase, n int, seed uint64) (mean, sd float64) {
	rng := rand.New(rand.NewPCG(seed, 12345))
	normal := func(v, s float64) float64 { return v + s*rng.NormFloat64() }
	uniform := func(v, s float64) float64 { return v + (2*rng.Float64()-1)*math.Sqrt(3)*s }
	pick := func(v, typed, assumed float64) float64 {
		if assumed > 0 {
			return uniform(v, assumed)
		}
		return normal(v, typed)
	}
	var xs []float64
	for range n {
		d, vx := c.d, c.vx
		if c.d > 0 {
			d, vx = normal(c.d, c.sD), pick(c.vx, c.sVx, c.aVx)
		}
		m, ok := mcMargin(normal(c.bar, c.sBar), pick(c.h0, c.sH0, c.aH0), normal(c.vz, c.sVz), d, vx,
			pick(c.archDeg, c.sArch, c.aArch), normal(c.l, c.sL), pick(c.dep, c.sDep, c.aDep))
		if ok {
			xs = append(xs, m)
		}
	}
	for _, x := range xs {
		mean += x
	}
	mean /= float64(len(xs))
	for _, x := range xs {
		sd += (x - mean) * (x - mean)
	}
	return mean, math.Sqrt(sd / float64(len(xs)-1))
}

func (c mcCase) input() MarginInput {
	return MarginInput{BarM: c.bar, H0M: c.h0, VzMS: c.vz, DM: c.d, VxMS: c.vx, ArchDeg: c.archDeg, LengthM: c.l, DepthM: c.dep,
		Sigma:   Uncertainty{BarM: c.sBar, H0M: c.sH0, VzMS: c.sVz, DM: c.sD, VxMS: c.sVx, ArchDeg: c.sArch, LengthM: c.sL, DepthM: c.sDep},
		Assumed: Uncertainty{H0M: c.aH0, VxMS: c.aVx, ArchDeg: c.aArch, DepthM: c.aDep}}
}

// The defaults of the bot: DefaultUncertainty for typed values; assumed
// h0 ±(0.74 − 0.66)/√12 of stature, arch ±60°/√12, depth ±2 cm, speed
// across the bar ±(2.6 − 2.2)/√12 m/s (the range table's rows).
var mcDefault = mcCase{sBar: 0.005, sH0: 0.02, sVz: 0.1, sD: 0.10, sVx: 0.2, sArch: 10, sL: 0.01, sDep: 0.02}

func mcWith(c mcCase) mcCase {
	c.sBar, c.sH0, c.sVz, c.sD, c.sVx, c.sArch, c.sL, c.sDep = mcDefault.sBar, mcDefault.sH0, mcDefault.sVz, mcDefault.sD, mcDefault.sVx, mcDefault.sArch, mcDefault.sL, mcDefault.sDep
	return c
}

// TestMarginFirstOrderAgreesWithMonteCarlo: for the default cases (c.m.
// judged at the peak, or at a bar plane well away from the peak), the
// first-order ± of Margin agrees with the test's own Monte Carlo within
// 10 % of the ±.
func TestMarginFirstOrderAgreesWithMonteCarlo(t *testing.T) {
	n := 40000
	if testing.Short() {
		n = 10000
	}
	cases := []mcCase{
		mcWith(mcCase{name: "typed, at the peak", bar: 1.80, h0: 1.22, vz: 4.3, archDeg: 90, l: 1.78, dep: 0.111}),
		mcWith(mcCase{name: "h0, arch and depth assumed", bar: 2.00, h0: 1.302, vz: 4.4, archDeg: 90, l: 1.86, dep: 0.116,
			aH0: 0.08 / math.Sqrt(12) * 1.86, aArch: 60 / math.Sqrt(12), aDep: 0.02}),
		mcWith(mcCase{name: "bar plane 0.5 m before the peak", bar: 1.80, h0: 1.20, vz: 4.3, d: 1.0, vx: 3.5, archDeg: 90, l: 1.78, dep: 0.111}),
		mcWith(mcCase{name: "women's figures", bar: 1.75, h0: 1.21, vz: 4.0, archDeg: 100, l: 1.75, dep: 0.11}),
	}
	for _, c := range cases {
		r, err := Margin(c.input())
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		_, sd := mcSpread(c, n, 7)
		t.Logf("%s: first-order ± %.2f cm, Monte Carlo ± %.2f cm (%+.1f %%)", c.name, 100*r.SigmaM, 100*sd, 100*(r.SigmaM-sd)/sd)
		if d := math.Abs(r.SigmaM - sd); d > 0.10*sd {
			t.Errorf("%s: first-order ± %.4f m, Monte Carlo %.4f m: differ by %.0f %% (want ≤ 10 %%)", c.name, r.SigmaM, sd, 100*d/sd)
		}
	}
}

// TestMarginMonteCarloNearThePeak: with the take-off distance that puts
// the peak in the bar plane (D = vx·vz/g), ∂M/∂D and ∂M/∂vx vanish and the
// first-order ± misses the curvature (the margin can only fall). There
// MarginMonteCarlo must agree with the test's independent Monte Carlo
// within 5 % and its mean must lie below the first-order margin, as the
// curvature −g·Δt²/2 says.
func TestMarginMonteCarloNearThePeak(t *testing.T) {
	c := mcWith(mcCase{name: "peak in the bar plane", bar: 2.00, h0: 1.25, vz: 4.4, vx: 2.4, archDeg: 90, l: 1.86, dep: 0.116,
		aVx: 0.4 / math.Sqrt(12), aArch: 60 / math.Sqrt(12), aDep: 0.02})
	c.d = c.vx * c.vz / mcG
	first, err := Margin(c.input())
	if err != nil {
		t.Fatal(err)
	}
	mean, sd := mcSpread(c, 40000, 11)
	got, err := MarginMonteCarlo(c.input(), 4000, 1)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("near the peak: first-order ± %.2f cm, package MC ± %.2f cm (mean shift %+.2f cm), test MC ± %.2f cm", 100*first.SigmaM, 100*got.SigmaM, 100*(got.MeanM-first.MarginM), 100*sd)
	if d := math.Abs(got.SigmaM - sd); d > 0.05*sd {
		t.Errorf("MarginMonteCarlo ± %.4f m, test's Monte Carlo %.4f m (differ by %.0f %%)", got.SigmaM, sd, 100*d/sd)
	}
	if got.MeanM >= first.MarginM || mean >= first.MarginM {
		t.Errorf("near the peak the mean margin (package %.4f, test %.4f) should fall below the first-order %.4f", got.MeanM, mean, first.MarginM)
	}
	if s := math.Hypot(got.SigmaTypedM, got.SigmaAssumedM); math.Abs(s-got.SigmaM) > 0.1*got.SigmaM {
		t.Errorf("typed %.4f and assumed %.4f parts do not make up the whole %.4f in quadrature", got.SigmaTypedM, got.SigmaAssumedM, got.SigmaM)
	}
}

// TestMarginMonteCarloRefuses: the draw count is bounded and a refused
// input is refused here too.
func TestMarginMonteCarloRefuses(t *testing.T) {
	in := mcWith(mcCase{bar: 1.80, h0: 1.22, vz: 4.3, archDeg: 90, l: 1.78, dep: 0.111}).input()
	if _, err := MarginMonteCarlo(in, 10, 1); err == nil {
		t.Error("10 draws accepted")
	}
	in.VzMS = -1
	if _, err := MarginMonteCarlo(in, 1000, 1); err == nil {
		t.Error("a negative vz accepted")
	}
}

// TestPeakSpotSpreadAgainstMonteCarlo: the mean and spread of the fall
// between the peak and the bar plane, g·x²/(2v²), x = D − v·vz/g, for D
// uniform on 0.9–1.3 m and v = g·D/vz plus a speed error uniform with the
// standard deviation of the 2.2–2.6 m/s elite-men row ((2.6 − 2.2)/√12),
// against the same moments from 400,000 Monte Carlo draws written here (an
// independent computation; JCGM 101:2008): within 2 %. With vz 4.4 m/s the
// fall is a few millimetres: the peak sits close to the bar plane, as
// Dapena (1980) found.
func TestPeakSpotSpreadAgainstMonteCarlo(t *testing.T) {
	const vz = 4.4
	n := 400000
	if testing.Short() {
		n = 100000
	}
	rng := rand.New(rand.NewPCG(21, 22))
	half := 0.4 / 2 // uniform of sd 0.4/√12 has half-width 0.2
	var xs []float64
	var mean float64
	for range n {
		d := 0.9 + 0.4*rng.Float64()
		v := mcG*d/vz + (2*rng.Float64()-1)*half
		x := d - v*vz/mcG
		l := mcG * x * x / (2 * v * v)
		xs = append(xs, l)
		mean += l / float64(n)
	}
	var sd float64
	for _, l := range xs {
		sd += (l - mean) * (l - mean) / float64(n-1)
	}
	sd = math.Sqrt(sd)
	gotMean, gotSD, err := PeakSpotSpread(vz, 0, Male, 100)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("peak-spot fall: mean %.3f cm, sd %.3f cm (Monte Carlo %.3f, %.3f)", 100*gotMean, 100*gotSD, 100*mean, 100*sd)
	if math.Abs(gotMean-mean) > 0.02*mean || math.Abs(gotSD-sd) > 0.02*sd {
		t.Errorf("mean %.5f sd %.5f m, Monte Carlo %.5f %.5f", gotMean, gotSD, mean, sd)
	}
	if _, _, err := PeakSpotSpread(0, 0, Male, 100); err == nil {
		t.Error("vz 0 accepted")
	}
}
