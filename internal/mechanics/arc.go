package mechanics

import (
	"math"

	"gonum.org/v1/gonum/integrate"
	"gonum.org/v1/gonum/integrate/quad"
)

// maxArcLengthM bounds the arc model's body length.
const maxArcLengthM = 3.0

// maxArcSamples bounds the sample count of the numerical arc integrals.
const maxArcSamples = 1 << 20

// smallAngle is the half-angle below which the arc functions switch from
// the closed form to its power series (see arcDropFactor).
const smallAngle = 0.25

// Arc is a uniform body of length L bent into a circular arc of central
// angle θ, lying in a vertical plane with its apex (the midpoint of the arc)
// uppermost, as the back-layout flop drapes the body over the bar. All
// lengths are metres.
//
//	R = L/θ                         radius
//	OG = R·sin(θ/2)/(θ/2)           centre to c.m. (centroid of a circular arc)
//	s = R − OG                      c.m. below the apex
//	sagitta = R·(1 − cos(θ/2))      apex above the two ends
//	chord = 2R·sin(θ/2)             end to end
//
// The apex is the highest point of the arc, so s is how far the c.m. lies
// below the body's highest (midline) point. For a straight body (θ = 0) the
// radius and the centre distance are infinite (+Inf) and s = 0.
type Arc struct {
	LengthM       float64 // L
	ThetaRad      float64 // θ, central angle, 0..π
	RadiusM       float64 // R = L/θ; +Inf when Straight
	CurvaturePerM float64 // 1/R = θ/L, per metre; 0 when Straight
	CentreToCOMM  float64 // R·sin(θ/2)/(θ/2); +Inf when Straight
	DropM         float64 // s = R − CentreToCOM, c.m. below the apex
	SagittaM      float64 // R(1 − cos(θ/2)), apex above the ends
	ChordM        float64 // 2R sin(θ/2), end to end
	Straight      bool    // θ == 0
}

func checkArc(lengthM, thetaRad float64) error {
	if err := positiveUpTo(FieldLength, lengthM, maxArcLengthM, "m"); err != nil {
		return err
	}
	if err := finite(FieldArch, thetaRad); err != nil {
		return err
	}
	if thetaRad < 0 {
		return inputErr(FieldArch, thetaRad, "arch angle cannot be negative (0 is a straight body)")
	}
	// Radians(180) may round a hair above π.
	if thetaRad > math.Pi*(1+1e-12) {
		return inputErr(FieldArch, thetaRad, "arch angle above 180 degrees (π rad)")
	}
	return nil
}

// NewArc returns the closed-form arc model for body length lengthM (m, up to
// 3) and central angle thetaRad (radians, 0..π). Small angles use a power
// series (see ArcDrop), so the result is accurate to rounding for every θ,
// including the straight limit θ = 0.
func NewArc(lengthM, thetaRad float64) (Arc, error) {
	if err := checkArc(lengthM, thetaRad); err != nil {
		return Arc{}, err
	}
	thetaRad = math.Min(thetaRad, math.Pi)
	a := Arc{LengthM: lengthM, ThetaRad: thetaRad}
	alpha := thetaRad / 2
	a.DropM = lengthM * arcDropFactor(alpha)
	a.ChordM = lengthM * sinc(alpha)
	// R(1 − cos α) = (L/2α)·2sin²(α/2) = L·(α/4)·sinc²(α/2)
	sh := sinc(alpha / 2)
	a.SagittaM = lengthM * alpha / 4 * sh * sh
	if thetaRad == 0 {
		a.Straight = true
		a.RadiusM = math.Inf(1)
		a.CentreToCOMM = math.Inf(1)
		return a, nil
	}
	a.RadiusM = lengthM / thetaRad
	a.CurvaturePerM = thetaRad / lengthM
	a.CentreToCOMM = a.RadiusM * sinc(alpha)
	return a, nil
}

// ArcDrop returns s, how far the c.m. of a uniform arc of length lengthM (m)
// and central angle thetaRad (rad, 0..π) lies below its apex, in metres:
//
//	s = R·(1 − sin α/α),  R = L/θ, α = θ/2,  i.e.  s = L·(1 − sin α/α)/(2α)
//
// For α < 0.25 the series s = L·(α/12 − α³/240 + α⁵/10080 − …) is used, which
// avoids the cancellation in 1 − sin α/α; s → 0 as θ → 0 (straight body).
// Source: centroid of a circular arc, r·sin α/α from the centre (Beer and
// Johnston, Vector Mechanics for Engineers: Statics, table of centroids).
func ArcDrop(lengthM, thetaRad float64) (float64, error) {
	if err := checkArc(lengthM, thetaRad); err != nil {
		return 0, err
	}
	return lengthM * arcDropFactor(math.Min(thetaRad, math.Pi)/2), nil
}

// ArcDropSlope returns ds/dθ in metres per radian for the arc model (see
// ArcDrop): with f(α) = (1 − sin α/α)/(2α),
//
//	ds/dθ = L·f′(α)/2,  f′(α) = (2 sin α − α(1 + cos α))/(2α³)
//
// (series 1/12 − α²/80 + … below α = 0.25). It is positive for every θ in
// (0, π]: more arch always lowers the c.m. relative to the apex.
func ArcDropSlope(lengthM, thetaRad float64) (float64, error) {
	if err := checkArc(lengthM, thetaRad); err != nil {
		return 0, err
	}
	return lengthM * arcDropFactorSlope(math.Min(thetaRad, math.Pi)/2) / 2, nil
}

// ArcNumeric computes the arc model by numerical integration over the arc
// length instead of the closed form: with σ the arc length from the apex
// (−L/2..L/2) and φ = σθ/L the angle from the axis of symmetry,
//
//	OG = (1/L)∫ R·cos φ dσ,   s = (1/L)∫ R·(1 − cos φ) dσ = (1/L)∫ 2R·sin²(φ/2) dσ
//
// sampled at n+1 equally spaced points (n ≥ 2 intervals) and integrated with
// gonum's composite Simpson rule (integrate.Simpsons). The sin² form keeps
// small angles free of cancellation. The error falls as n⁻⁴; with n = 64 it
// is below 1e-8 of L at θ = 180° (below 0.02 µm for a 1.8 m body). Sagitta and chord are
// geometric and taken from the closed form. θ = 0 gives the straight body.
func ArcNumeric(lengthM, thetaRad float64, n int) (Arc, error) {
	a, err := NewArc(lengthM, thetaRad)
	if err != nil {
		return Arc{}, err
	}
	if n < 2 || n > maxArcSamples {
		return Arc{}, inputErr(FieldSamples, float64(n), "need 2 to 1048576 intervals")
	}
	if a.Straight {
		return a, nil
	}
	x := make([]float64, n+1)
	fc := make([]float64, n+1)
	fs := make([]float64, n+1)
	r := a.RadiusM
	k := a.ThetaRad / lengthM
	for i := range x {
		sigma := -lengthM/2 + lengthM*float64(i)/float64(n)
		if i == n {
			sigma = lengthM / 2
		}
		phi := sigma * k
		sh := math.Sin(phi / 2)
		x[i] = sigma
		fc[i] = r * math.Cos(phi)
		fs[i] = 2 * r * sh * sh
	}
	a.CentreToCOMM = integrate.Simpsons(x, fc) / lengthM
	a.DropM = integrate.Simpsons(x, fs) / lengthM
	return a, nil
}

// ArcDropNumeric returns s from ArcNumeric (Simpson's rule on n intervals).
func ArcDropNumeric(lengthM, thetaRad float64, n int) (float64, error) {
	a, err := ArcNumeric(lengthM, thetaRad, n)
	if err != nil {
		return 0, err
	}
	return a.DropM, nil
}

// ArcDropQuad returns s by n-point Gauss–Legendre quadrature (gonum
// quad.Fixed with quad.Legendre) of the same integral as ArcNumeric,
// s = (1/L)∫ 2R·sin²(σθ/2L) dσ over σ in [−L/2, L/2]. The integrand is
// smooth, so a handful of points (n = 8) is already exact to rounding.
// n runs from 1 to 1048576.
func ArcDropQuad(lengthM, thetaRad float64, n int) (float64, error) {
	if err := checkArc(lengthM, thetaRad); err != nil {
		return 0, err
	}
	if n < 1 || n > maxArcSamples {
		return 0, inputErr(FieldSamples, float64(n), "need 1 to 1048576 points")
	}
	thetaRad = math.Min(thetaRad, math.Pi)
	if thetaRad == 0 {
		return 0, nil
	}
	r := lengthM / thetaRad
	k := thetaRad / lengthM
	f := func(sigma float64) float64 {
		sh := math.Sin(sigma * k / 2)
		return 2 * r * sh * sh
	}
	return quad.Fixed(f, -lengthM/2, lengthM/2, n, quad.Legendre{}, 0) / lengthM, nil
}

// RequiredCOMHeight returns the c.m. height, in metres, that a posture needs
// when its apex is over a bar at barM: bar + d − s, with s (dropM) the c.m.
// drop below the apex of the midline and d (depthM) the depth from the
// midline down to the body's underside there.
func RequiredCOMHeight(barM, dropM, depthM float64) (float64, error) {
	if err := checkBar(barM); err != nil {
		return 0, err
	}
	if err := inRange(FieldDrop, dropM, -maxNeedM, maxNeedM, "m"); err != nil {
		return 0, err
	}
	if err := positiveUpTo(FieldDepth, depthM, maxNeedM, "m"); err != nil {
		return 0, err
	}
	return barM + depthM - dropM, nil
}

// sinc returns sin(x)/x, with sinc(0) = 1 and a series near 0.
func sinc(x float64) float64 {
	if math.Abs(x) < 1e-4 {
		x2 := x * x
		return 1 - x2/6 + x2*x2/120
	}
	return math.Sin(x) / x
}

// arcDropFactor returns f(α) = (1 − sin α/α)/(2α), so that s = L·f(θ/2).
// Below smallAngle it sums f(α) = Σ_{k≥1} (−1)^{k+1} α^{2k−1} / (2·(2k+1)!),
// whose ninth term is below 1e-20 of the first at α = 0.25.
func arcDropFactor(alpha float64) float64 {
	if alpha == 0 {
		return 0
	}
	if alpha < smallAngle {
		a2 := alpha * alpha
		term := alpha / 12 // k = 1: α/(2·3!)
		sum := term
		for k := 2; k <= 9; k++ {
			// ratio of term k to term k−1: −α²/((2k)(2k+1))
			term *= -a2 / float64((2*k)*(2*k+1))
			sum += term
		}
		return sum
	}
	return (1 - math.Sin(alpha)/alpha) / (2 * alpha)
}

// arcDropFactorSlope returns f′(α) for arcDropFactor:
// f′(α) = (2 sin α − α(1 + cos α))/(2α³), series
// Σ_{k≥1} (−1)^{k+1} (2k−1) α^{2k−2} / (2·(2k+1)!) below smallAngle.
func arcDropFactorSlope(alpha float64) float64 {
	if alpha < smallAngle {
		a2 := alpha * alpha
		pow := 1.0      // α^{2k−2}
		fact := 6.0     // (2k+1)!
		sign := 1.0     // (−1)^{k+1}
		sum := 1.0 / 12 // k = 1: 1/(2·3!)
		for k := 2; k <= 9; k++ {
			pow *= a2
			fact *= float64((2 * k) * (2*k + 1))
			sign = -sign
			sum += sign * float64(2*k-1) * pow / (2 * fact)
		}
		return sum
	}
	return (2*math.Sin(alpha) - alpha*(1+math.Cos(alpha))) / (2 * alpha * alpha * alpha)
}
