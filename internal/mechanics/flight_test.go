package mechanics

import (
	"errors"
	"math"
	"testing"
)

// Constant-acceleration kinematics (any physics text, e.g. Halliday,
// Resnick and Walker ch. 2): v = v0 − g·t, z = z0 + v0·t − g·t²/2,
// v² = v0² − 2g(z − z0). A ball thrown up at 4.9 m/s with g = 9.8 m/s²
// stops after 0.5 s, 1.225 m higher.
func TestFlightKinematics(t *testing.T) {
	to := Takeoff{H0M: 1.0, VzMS: 4.9, GMS2: 9.8}
	rise, _ := to.Rise()
	tp, _ := to.PeakTime()
	peak, _ := to.PeakHeight()
	if !near(rise, 1.225, 1e-12) || !near(tp, 0.5, 1e-12) || !near(peak, 2.225, 1e-12) {
		t.Errorf("rise %v, peak time %v, peak %v; want 1.225, 0.5, 2.225", rise, tp, peak)
	}
	for _, ts := range []float64{0, 0.1, 0.25, 0.5, 0.8} {
		z, err := to.HeightAt(ts)
		if err != nil {
			t.Fatal(err)
		}
		v := to.VzMS - to.GMS2*ts
		if lhs, rhs := v*v, to.VzMS*to.VzMS-2*to.GMS2*(z-to.H0M); math.Abs(lhs-rhs) > 1e-12 {
			t.Errorf("t=%v: v²=%v but v0²−2gΔz=%v", ts, lhs, rhs)
		}
	}
	// Symmetric flight: back at h0 after 2·vz/g.
	back, _ := to.FlightTimeTo(1.0)
	if !near(back, 1.0, 1e-12) {
		t.Errorf("flight back to h0 %v s, want 1.0", back)
	}
}

// TestFlightOverTheBar compares the closed forms with a numerically
// integrated flight (integrateFlight, fourth-order Runge–Kutta): the peak's
// height, time and distance, and the height at a bar plane 1.1 m out.
func TestFlightOverTheBar(t *testing.T) {
	to := Takeoff{H0M: 1.25, VzMS: 4.4, VxMS: 3.9}
	peak, _ := to.PeakHeight()
	pd, _ := to.PeakDistance()
	pt, _ := to.PeakTime()
	nt, nx, nz := numericPeak(1.25, 4.4, 3.9, StandardGravity)
	if math.Abs(peak-nz) > 1e-6 || math.Abs(pt-nt) > 1e-4 || math.Abs(pd-nx) > 1e-3 {
		t.Errorf("peak %.6f m at %.4f s, %.4f m out; integrated %.6f m at %.4f s, %.4f m", peak, pt, pd, nz, nt, nx)
	}
	tb, _ := to.TimeToBarPlane(1.1)
	if !near(tb, 1.1/3.9, 1e-15) {
		t.Errorf("time to bar plane %v", tb)
	}
	z, _ := to.HeightAtBarPlane(1.1)
	if want := numericHeightAtX(1.25, 4.4, 3.9, StandardGravity, 1.1); math.Abs(z-want) > 1e-6 || z >= peak {
		t.Errorf("height at D=1.1: %v, integrated %v (below peak %v)", z, want, peak)
	}
	ang, _ := Takeoff{H0M: 1.2, VzMS: 4, VxMS: 4}.AngleDeg()
	if !near(ang, 45, 1e-12) {
		t.Errorf("take-off angle %v, want 45", ang)
	}
	// Landing: the time to a landing height satisfies z(t) = landing.
	for _, land := range []float64{0, 0.5, 1.25, 2.0} {
		tl, err := to.FlightTimeTo(land)
		if err != nil {
			t.Fatal(err)
		}
		if want := numericLanding(1.25, 4.4, StandardGravity, land); math.Abs(tl-want) > 1e-6 {
			t.Errorf("landing %v: %.7f s, integrated %.7f s", land, tl, want)
		}
	}
}

// Property: the inverses, the best bar for a take-off and the vz a bar
// needs, undo each other (a round trip, not a check of a number).
func TestPropertyFlightInverses(t *testing.T) {
	for _, need := range []float64{-0.05, 0, 0.03} {
		to := Takeoff{H0M: 1.28, VzMS: 4.5, VxMS: 4.0, GMS2: 9.79}
		best, err := to.BestBar(need)
		if err != nil {
			t.Fatal(err)
		}
		vz, err := VzForBar(best, need, to.H0M, to.GMS2)
		if err != nil || !near(vz, to.VzMS, 1e-12) {
			t.Errorf("need %v: VzForBar(best bar %v) = %v (%v), want %v", need, best, vz, err, to.VzMS)
		}
		bestAt, err := to.BestBarAt(1.0, need)
		if err != nil {
			t.Fatal(err)
		}
		vz, err = VzForBarAt(bestAt, need, to.H0M, 1.0, to.VxMS, to.GMS2)
		if err != nil || !near(vz, to.VzMS, 1e-12) {
			t.Errorf("need %v: VzForBarAt(%v) = %v (%v), want %v", need, bestAt, vz, err, to.VzMS)
		}
		vp, err := VzForPeak(to.H0M+to.VzMS*to.VzMS/(2*to.GMS2), to.H0M, to.GMS2)
		if err != nil || !near(vp, to.VzMS, 1e-12) {
			t.Errorf("VzForPeak = %v, %v", vp, err)
		}
	}
	if vz, err := VzForBar(1.0, 0, 1.2, 0); err != nil || vz != 0 {
		t.Errorf("bar below h0 needs vz %v, %v; want 0", vz, err)
	}
}

func TestFlightRejects(t *testing.T) {
	type call struct {
		name  string
		err   error
		field string
	}
	ok := Takeoff{H0M: 1.2, VzMS: 4.4, VxMS: 4}
	e := func(_ float64, err error) error { return err }
	for _, c := range []call{
		{"vz above 7", e(Takeoff{H0M: 1.2, VzMS: 7.5}.PeakHeight()), FieldVz},
		{"negative vz", e(Takeoff{H0M: 1.2, VzMS: -1}.Rise()), FieldVz},
		{"NaN vz", e(Takeoff{H0M: 1.2, VzMS: math.NaN()}.PeakTime()), FieldVz},
		{"negative vx", e(Takeoff{H0M: 1.2, VzMS: 4, VxMS: -3}.PeakDistance()), FieldVx},
		{"h0 above 3 m", e(Takeoff{H0M: 3.5, VzMS: 4}.Rise()), FieldH0},
		{"no h0", e(Takeoff{VzMS: 4}.Rise()), FieldH0},
		{"moon gravity", e(Takeoff{H0M: 1.2, VzMS: 4, GMS2: 1.62}.Rise()), FieldGravity},
		{"negative time", e(ok.HeightAt(-0.1)), FieldTime},
		{"after landing", e(ok.HeightAt(3)), FieldTime},
		{"bar plane without vx", e(Takeoff{H0M: 1.2, VzMS: 4}.HeightAtBarPlane(1)), FieldVx},
		{"negative D", e(ok.HeightAtBarPlane(-1)), FieldTakeoffDist},
		{"D infinite", e(ok.TimeToBarPlane(math.Inf(1))), FieldTakeoffDist},
		{"landing above peak", e(ok.FlightTimeTo(3)), FieldLanding},
		{"landing below ground", e(ok.FlightTimeTo(-0.1)), FieldLanding},
		{"need NaN", e(ok.BestBar(math.NaN())), FieldNeed},
		{"no bar cleared", e(Takeoff{H0M: 0.3, VzMS: 0}.BestBar(0.5)), FieldBar},
		{"peak below h0", e(VzForPeak(1.0, 1.2, 0)), FieldPeak},
		{"peak needs vz > 7", e(VzForPeak(3.9, 1.0, 0)), FieldPeak},
		{"bar needs vz > 7", e(VzForBar(2.9, 0.9, 0.3, 0)), FieldBar},
		{"bar 0", e(VzForBar(0, 0, 1.2, 0)), FieldBar},
		{"D zero at bar plane", e(VzForBarAt(2, 0, 1.2, 0, 4, 0)), FieldTakeoffDist},
		{"vx zero at bar plane", e(VzForBarAt(2, 0, 1.2, 1, 0, 0)), FieldVx},
	} {
		var ie *InputError
		if !errors.As(c.err, &ie) || ie.Field != c.field {
			t.Errorf("%s: %v, want *InputError on %q", c.name, c.err, c.field)
		}
	}
}
