package mechanics

import (
	"math"
	"testing"
)

// Check: vz = g·T at the peak; 108 frames at 240 fps is 0.45 s, and
// 9.80665 × 0.45 = 4.413 m/s (hand computation, constant-acceleration
// kinematics).
func TestVzFromPeakTimeFrames(t *testing.T) {
	f := Frames{Count: 108, FPS: 240}
	ts, err := f.Seconds()
	if err != nil {
		t.Fatal(err)
	}
	vz, err := VzFromPeakTime(ts, 0)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(vz-4.41299) > 1e-4 {
		t.Errorf("vz = %.5f m/s, want 4.41299", vz)
	}
	res, _ := f.ResolutionS()
	if math.Abs(res-0.0041667) > 1e-6 {
		t.Errorf("one frame at 240 fps = %.7f s, want 0.0041667", res)
	}
}

// Check: 4.0·sin 37° = 2.4073 m/s (hand computation: sin 37° = 0.60182).
func TestResolveAcrossSpeedAngle(t *testing.T) {
	a, err := ResolveAcross(AcrossInput{SpeedMS: 4.0, AngleDeg: 37})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(a.MS-2.4073) > 1e-4 || a.Assumed() {
		t.Errorf("across = %.4f (assumed %v), want 2.4073 typed", a.MS, a.Assumed())
	}
}

// Check: with nothing typed the peak falls in the bar plane: the assumed
// component is g·D/vz, 9.80665 × 1.0 / 4.4 = 2.2288 m/s, which is inside
// the 2.2–2.6 m/s derived elite-men row; so the peak distance vx·vz/g
// equals D and no take-off change follows.
func TestResolveAcrossPeakAtBar(t *testing.T) {
	a, err := ResolveAcross(AcrossInput{DM: 1.0, VzMS: 4.4, Sex: Male})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(a.MS-2.2288) > 1e-4 || !a.Assumed() || a.SigmaAssumedMS == 0 {
		t.Errorf("across = %+v, want 2.2288 assumed with a spread", a)
	}
	// Against a numerically integrated flight at that speed, the peak
	// falls in the bar plane 1.0 m out.
	if _, x, _ := numericPeak(1.25, 4.4, a.MS, StandardGravity); math.Abs(x-1.0) > 1e-3 {
		t.Errorf("integrated peak %.4f m out, want the take-off distance 1.0", x)
	}
}

// Check: the flight angle atan(4.4/4.0) = 47.73° (hand computation) lies
// in Dapena's (1980) 40–48°.
func TestFlightAngle(t *testing.T) {
	a, err := FlightAngleDeg(4.4, 4.0)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(a-47.726) > 1e-3 {
		t.Errorf("flight angle %.3f°, want 47.726", a)
	}
	if _, flagged := CheckRange(QFlightAngle, a, Male); flagged {
		t.Errorf("47.7° flagged, but Dapena (1980) reports 40–48°")
	}
}

// Checks against the range table's sources: vz 6.5 m/s is above the
// 4.3–4.7 m/s of elite men (Dapena, from memory); a 1.0 s jump-test
// flight (1.23 m by Bosco et al. 1983) is above any countermovement jump;
// an across speed of 8 m/s is above the derived rows; vz 4.4 passes.
func TestCheckRangeFlags(t *testing.T) {
	for _, c := range []struct {
		q    Quantity
		v    float64
		sex  Sex
		flag bool
	}{
		{QVz, 6.5, Male, true},
		{QVz, 4.4, Male, false},
		{QJumpTestTime, 1.0, SexUnknown, true},
		{QAcrossSpeed, 8, SexUnknown, true},
		{QTakeoffDist, 2.5, SexUnknown, true},
		{QTakeoffDist, 0.3, SexUnknown, true},
		{QTakeoffDist, 1.0, SexUnknown, false},
		{QH0Fraction, 0.5 / 1.86, Male, true},
		{QClearHeight, 3.41, Male, true},
	} {
		f, got := CheckRange(c.q, c.v, c.sex)
		if got != c.flag {
			t.Errorf("%s %g: flagged %v (%q), want %v", c.q, c.v, got, f.Line, c.flag)
		}
	}
}

// Property: every row of the range table has Lo < Hi and names a source.
func TestPropertyRangeRowsWellFormed(t *testing.T) {
	for _, r := range PublishedRanges() {
		if !(r.Lo < r.Hi) || r.Source == "" {
			t.Errorf("row %+v: want Lo < Hi and a source", r)
		}
	}
}
