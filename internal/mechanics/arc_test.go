package mechanics

import (
	"errors"
	"math"
	"testing"
)

// Centroid of a circular arc of radius r and half-angle α lies r·sin α/α
// from the centre (Beer and Johnston, Vector Mechanics for Engineers:
// Statics, table "Centroids of common shapes of lines"; also Meriam and
// Kraige). Each case computes that formula directly and compares NewArc.
func TestArcCentroidBeerJohnston(t *testing.T) {
	for _, tc := range []struct {
		lengthM, thetaDeg float64
	}{
		{1.80, 30}, {1.80, 60}, {1.80, 90}, {1.80, 120}, {1.80, 180}, {0.60, 45}, {2.40, 150},
	} {
		theta := Radians(tc.thetaDeg)
		a, err := NewArc(tc.lengthM, theta)
		if err != nil {
			t.Fatalf("NewArc(%v, %v°): %v", tc.lengthM, tc.thetaDeg, err)
		}
		r := tc.lengthM / theta
		alpha := theta / 2
		wantOG := r * math.Sin(alpha) / alpha // Beer & Johnston: r sin α / α
		if !near(a.RadiusM, r, 1e-15) || !near(a.CentreToCOMM, wantOG, 1e-14) {
			t.Errorf("θ=%v°: R=%v OG=%v, want R=%v OG=%v", tc.thetaDeg, a.RadiusM, a.CentreToCOMM, r, wantOG)
		}
		if !near(a.DropM, r-wantOG, 1e-12) {
			t.Errorf("θ=%v°: s=%v, want R − OG = %v", tc.thetaDeg, a.DropM, r-wantOG)
		}
		// Plane geometry: sagitta R(1 − cos α), chord 2R sin α.
		if !near(a.SagittaM, r*(1-math.Cos(alpha)), 1e-12) || !near(a.ChordM, 2*r*math.Sin(alpha), 1e-12) {
			t.Errorf("θ=%v°: sagitta %v chord %v", tc.thetaDeg, a.SagittaM, a.ChordM)
		}
	}
}

// Quarter-circle arc (θ = 90°): the centroid lies 2√2/π·r from the centre
// on the axis of symmetry (Beer and Johnston's table gives 2r/π from each
// radius; on the 45° axis that is √2·2r/π). Semicircular arc (θ = 180°):
// 2r/π from the centre (same table).
func TestArcQuarterAndSemicircle(t *testing.T) {
	for _, tc := range []struct {
		thetaDeg, wantOverR float64
		source              string
	}{
		{90, 2 * math.Sqrt2 / math.Pi, "Beer & Johnston, quarter-circle arc"},
		{180, 2 / math.Pi, "Beer & Johnston, semicircular arc"},
	} {
		a, err := NewArc(1.75, Radians(tc.thetaDeg))
		if err != nil {
			t.Fatal(err)
		}
		if got := a.CentreToCOMM / a.RadiusM; !near(got, tc.wantOverR, 1e-14) {
			t.Errorf("%s: OG/R = %.15f, want %.15f", tc.source, got, tc.wantOverR)
		}
	}
}

// The numerical integrals over the arc must agree with the closed form.
// Simpson's rule (gonum integrate.Simpsons) converges as n⁻⁴; Gauss–Legendre
// (gonum quad) with 8 points is exact to rounding for this smooth integrand.
func TestArcNumericMatchesClosedForm(t *testing.T) {
	for _, deg := range []float64{0.001, 1, 10, 45, 90, 135, 180} {
		for _, l := range []float64{0.6, 1.8, 2.5} {
			theta := Radians(deg)
			closed, err := NewArc(l, theta)
			if err != nil {
				t.Fatal(err)
			}
			num, err := ArcNumeric(l, theta, 64)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(num.DropM-closed.DropM) > 2e-8*l {
				t.Errorf("θ=%v° L=%v: Simpson s=%.12g, closed %.12g", deg, l, num.DropM, closed.DropM)
			}
			if !closed.Straight && math.Abs(num.CentreToCOMM-closed.CentreToCOMM) > 2e-8*l {
				t.Errorf("θ=%v° L=%v: Simpson OG=%.12g, closed %.12g", deg, l, num.CentreToCOMM, closed.CentreToCOMM)
			}
			q, err := ArcDropQuad(l, theta, 8)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(q-closed.DropM) > 1e-14*l+1e-13*closed.DropM {
				t.Errorf("θ=%v° L=%v: Gauss–Legendre s=%.16g, closed %.16g", deg, l, q, closed.DropM)
			}
		}
	}
}

// Composite Simpson's rule has error O(h⁴) (any numerical-analysis text,
// e.g. Burden and Faires): halving h cuts the error about 16-fold.
func TestArcSimpsonConvergenceOrder(t *testing.T) {
	exact, _ := ArcDrop(1.8, math.Pi)
	e16, _ := ArcDropNumeric(1.8, math.Pi, 16)
	e32, _ := ArcDropNumeric(1.8, math.Pi, 32)
	ratio := math.Abs(e16-exact) / math.Abs(e32-exact)
	if ratio < 14 || ratio > 18 {
		t.Errorf("Simpson error ratio n=16/n=32 = %.2f, want about 16", ratio)
	}
}

// Small angles: the series branch must match the cancellation-free
// Gauss–Legendre integral, and s must tend to the Taylor limit L·θ/24 of
// the Beer & Johnston formula (1 − sin α/α ≈ α²/6, R = L/2α).
func TestArcSmallAngle(t *testing.T) {
	for _, theta := range []float64{1e-12, 1e-9, 1e-6, 1e-4, 1e-2, 0.1, 0.49, 0.5, 0.51} {
		s, err := ArcDrop(1.8, theta)
		if err != nil {
			t.Fatal(err)
		}
		q, _ := ArcDropQuad(1.8, theta, 8)
		if !near(s, q, 1e-13) {
			t.Errorf("θ=%g: series/closed %.17g, quadrature %.17g", theta, s, q)
		}
		if theta <= 1e-6 && !near(s, 1.8*theta/24, 1e-10) {
			t.Errorf("θ=%g: s=%g, want L·θ/24=%g", theta, s, 1.8*theta/24)
		}
	}
	// The two branches meet at α = smallAngle without a step.
	below, _ := ArcDrop(1, 2*smallAngle*(1-1e-15))
	above, _ := ArcDrop(1, 2*smallAngle*(1+1e-15))
	if math.Abs(below-above) > 1e-15 {
		t.Errorf("branch step at α=%v: %.17g vs %.17g", smallAngle, below, above)
	}
	sl1, _ := ArcDropSlope(1, 2*smallAngle*(1-1e-15))
	sl2, _ := ArcDropSlope(1, 2*smallAngle*(1+1e-15))
	if math.Abs(sl1-sl2) > 1e-13 {
		t.Errorf("slope branch step: %.17g vs %.17g", sl1, sl2)
	}
}

// ds/dθ against a central finite difference of ArcDrop.
func TestArcDropSlope(t *testing.T) {
	for _, deg := range []float64{0, 5, 28, 29, 60, 90, 150, 179} {
		theta := Radians(deg)
		got, err := ArcDropSlope(1.8, theta)
		if err != nil {
			t.Fatal(err)
		}
		h := 1e-5
		lo, hi := math.Max(0, theta-h), math.Min(math.Pi, theta+h)
		a, _ := ArcDrop(1.8, lo)
		b, _ := ArcDrop(1.8, hi)
		want := (b - a) / (hi - lo)
		if math.Abs(got-want) > 1e-6 {
			t.Errorf("θ=%v°: ds/dθ=%.10f, finite difference %.10f", deg, got, want)
		}
	}
}

func TestArcStraight(t *testing.T) {
	a, err := NewArc(1.8, 0)
	if err != nil {
		t.Fatal(err)
	}
	if !a.Straight || a.DropM != 0 || a.SagittaM != 0 || a.ChordM != 1.8 || !math.IsInf(a.RadiusM, 1) || a.CurvaturePerM != 0 {
		t.Errorf("straight arc: %+v", a)
	}
	if s, _ := ArcDropNumeric(1.8, 0, 10); s != 0 {
		t.Errorf("numeric straight drop %v", s)
	}
}

func TestArcRejects(t *testing.T) {
	for _, tc := range []struct {
		name      string
		l, theta  float64
		n         int
		wantField string
	}{
		{"negative angle", 1.8, -0.1, 8, FieldArch},
		{"above 180°", 1.8, math.Pi + 0.01, 8, FieldArch},
		{"NaN angle", 1.8, math.NaN(), 8, FieldArch},
		{"infinite angle", 1.8, math.Inf(1), 8, FieldArch},
		{"zero length", 0, 1, 8, FieldLength},
		{"negative length", -1, 1, 8, FieldLength},
		{"length above 3 m", 3.5, 1, 8, FieldLength},
		{"NaN length", math.NaN(), 1, 8, FieldLength},
		{"too few samples", 1.8, 1, 1, FieldSamples},
	} {
		t.Run(tc.name, func(t *testing.T) {
			errs := []error{}
			if tc.n >= 2 {
				_, e1 := NewArc(tc.l, tc.theta)
				_, e2 := ArcDrop(tc.l, tc.theta)
				_, e3 := ArcDropSlope(tc.l, tc.theta)
				_, e4 := ArcDropQuad(tc.l, tc.theta, tc.n)
				errs = append(errs, e1, e2, e3, e4)
			}
			_, e5 := ArcNumeric(tc.l, tc.theta, tc.n)
			errs = append(errs, e5)
			for i, err := range errs {
				var ie *InputError
				if !errors.As(err, &ie) || ie.Field != tc.wantField {
					t.Errorf("call %d: err %v, want *InputError on %q", i, err, tc.wantField)
				}
			}
		})
	}
	if _, err := ArcDropQuad(1.8, 1, 0); err == nil {
		t.Error("ArcDropQuad accepted 0 points")
	}
}

// close reports |a − b| ≤ rel·max(|a|, |b|) (or both zero).
func near(a, b, rel float64) bool {
	if a == b {
		return true
	}
	return math.Abs(a-b) <= rel*math.Max(math.Abs(a), math.Abs(b))
}
