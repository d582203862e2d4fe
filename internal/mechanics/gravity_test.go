package mechanics

import (
	"errors"
	"math"
	"testing"
)

// WGS84 normal gravity on the ellipsoid (NIMA TR8350.2, 3rd ed., ch. 4):
// equator γe = 9.7803253359 and pole γp = 9.8321849378 m/s² are the
// published values. At 45° the formula gives 9.8061977694 m/s²: that value
// is from several public implementations of TR8350.2 eq. 4-1 that agree to
// 1e-10, not read from the report itself (the 9.80619920 recalled from
// memory belongs to GRS80, whose γe is 9.7803267715).
func TestNormalGravityWGS84(t *testing.T) {
	for _, tc := range []struct {
		latDeg, want, tol float64
		source            string
	}{
		{0, 9.7803253359, 1e-10, "TR8350.2 γe"},
		{90, 9.8321849378, 1e-9, "TR8350.2 γp"},
		{-90, 9.8321849378, 1e-9, "TR8350.2 γp (south)"},
		{45, 9.8061977694, 1e-9, "TR8350.2 eq. 4-1 at 45°, public implementations"},
	} {
		g, err := NormalGravity(tc.latDeg, 0)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(g-tc.want) > tc.tol {
			t.Errorf("%s: γ(%v°) = %.10f, want %.10f", tc.source, tc.latDeg, g, tc.want)
		}
	}
}

// Free-air gradient about −3.086e-6 m/s² per metre (reference.md, after
// TR8350.2 eq. 4-3).
func TestNormalGravityFreeAir(t *testing.T) {
	for _, lat := range []float64{0, 40, 60} {
		g0, _ := NormalGravity(lat, 0)
		g1, _ := NormalGravity(lat, 1000)
		grad := (g1 - g0) / 1000
		if math.Abs(grad+FreeAirGradient) > 0.01*FreeAirGradient {
			t.Errorf("lat %v°: gradient %.4e, want about −%.4e", lat, grad, FreeAirGradient)
		}
	}
	// Mexico City (19.4° N, 2240 m) against a sea-level venue at the same
	// latitude: about 6.9 mm/s² less gravity (free-air only).
	hi, _ := NormalGravity(19.4, 2240)
	lo, _ := NormalGravity(19.4, 0)
	if d := lo - hi; d < 0.0068 || d > 0.0070 {
		t.Errorf("2240 m lowers g by %.5f m/s², want about 0.0069", d)
	}
}

func TestGravityAt(t *testing.T) {
	g, err := GravityAt(nil)
	if err != nil || g != StandardGravity || StandardGravity != 9.80665 { // CGPM 1901, exact
		t.Errorf("GravityAt(nil) = %v, %v", g, err)
	}
	v := &Venue{LatDeg: 40.4, AltM: 650}
	g, err = GravityAt(v)
	want, _ := NormalGravity(40.4, 650)
	if err != nil || g != want {
		t.Errorf("GravityAt(%+v) = %v, %v; want %v", *v, g, err, want)
	}
}

// The rise difference against two independently computed rises vz²/2g.
func TestRiseChange(t *testing.T) {
	eq, _ := NormalGravity(0, 0)
	pole, _ := NormalGravity(90, 0)
	d, err := RiseChange(4.4, pole, eq)
	if err != nil {
		t.Fatal(err)
	}
	rEq, _ := Takeoff{H0M: 1.2, VzMS: 4.4, GMS2: eq}.Rise()
	rPole, _ := Takeoff{H0M: 1.2, VzMS: 4.4, GMS2: pole}.Rise()
	if !near(d, rEq-rPole, 1e-9) || d < 0.005 || d > 0.0055 {
		t.Errorf("RiseChange pole→equator = %.6f m, rises differ by %.6f", d, rEq-rPole)
	}
	same, _ := RiseChange(4.4, 0, StandardGravity)
	if same != 0 {
		t.Errorf("RiseChange with equal gravity = %v", same)
	}
}

func TestGravityRejects(t *testing.T) {
	for _, tc := range []struct {
		lat, alt float64
		field    string
	}{
		{91, 0, FieldLatitude}, {-90.5, 0, FieldLatitude}, {math.NaN(), 0, FieldLatitude},
		{0, 1e5, FieldAltitude}, {0, -2000, FieldAltitude}, {0, math.Inf(-1), FieldAltitude},
	} {
		_, err := NormalGravity(tc.lat, tc.alt)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != tc.field {
			t.Errorf("NormalGravity(%v, %v): %v, want field %q", tc.lat, tc.alt, err, tc.field)
		}
	}
	for _, g := range []float64{1.62, 25, -9.8, math.NaN()} {
		if _, err := RiseChange(4, g, 0); err == nil {
			t.Errorf("RiseChange accepted g=%v", g)
		}
	}
	if _, err := RiseChange(-1, 0, 0); err == nil {
		t.Error("RiseChange accepted negative vz")
	}
}
