package mechanics

import (
	"fmt"
	"math"
)

// MaxVzMS is the largest take-off vertical velocity accepted, m/s. Elite
// flop take-offs reach about 4.7 m/s (from memory, Dapena's reports);
// 7 m/s would lift the c.m. 2.5 m.
const MaxVzMS = 7.0

// TakeoffHeightFraction is a typical c.m. height at the end of a flop
// take-off (Hay's H1) as a fraction of stature, about 0.70 (from memory,
// Dapena's reports on elite jumpers). Use it only when h0 was not measured.
const TakeoffHeightFraction = 0.70

// maxFlightTimeS bounds times along the flight path, s.
const maxFlightTimeS = 10.0

// Takeoff is the state of the centre of mass at the end of the take-off:
// height H0M above the ground (m), vertical velocity VzMS (up, m/s),
// horizontal velocity VxMS (towards the bar, m/s) and gravity GMS2 (m/s²;
// 0 means StandardGravity). After take-off the c.m. is a projectile (air
// resistance neglected, under 1 % of the rise at these speeds):
//
//	z(t) = h0 + vz·t − g·t²/2,   x(t) = vx·t
//
// (constant-acceleration kinematics, any physics text).
type Takeoff struct {
	H0M  float64
	VzMS float64
	VxMS float64
	GMS2 float64
}

// Validate checks h0 in (0, 3] m, vz in [0, 7] m/s, vx in [0, 10] m/s and g
// (0 or 9.7..9.9 m/s²).
func (t Takeoff) Validate() error {
	if err := checkH0(t.H0M); err != nil {
		return err
	}
	if err := checkVz(t.VzMS); err != nil {
		return err
	}
	if err := checkVx(t.VxMS); err != nil {
		return err
	}
	_, err := gravityOrStandard(t.GMS2)
	return err
}

// Gravity returns the gravity used, m/s² (StandardGravity when GMS2 is 0).
func (t Takeoff) Gravity() float64 {
	if t.GMS2 == 0 {
		return StandardGravity
	}
	return t.GMS2
}

// Rise returns the c.m. rise from take-off to peak, vz²/(2g), metres
// (Hay's H2).
func (t Takeoff) Rise() (float64, error) {
	if err := t.Validate(); err != nil {
		return 0, err
	}
	return t.VzMS * t.VzMS / (2 * t.Gravity()), nil
}

// PeakTime returns the time from take-off to the peak, vz/g, seconds.
func (t Takeoff) PeakTime() (float64, error) {
	if err := t.Validate(); err != nil {
		return 0, err
	}
	return t.VzMS / t.Gravity(), nil
}

// PeakHeight returns the peak c.m. height, h0 + vz²/(2g), metres.
func (t Takeoff) PeakHeight() (float64, error) {
	r, err := t.Rise()
	if err != nil {
		return 0, err
	}
	return t.H0M + r, nil
}

// AngleDeg returns the take-off angle of the c.m. path above the horizontal,
// atan(vz/vx), degrees (90 when vx is 0). Published flop take-offs lie
// between about 40° and 48° (Dapena 1980).
func (t Takeoff) AngleDeg() (float64, error) {
	if err := t.Validate(); err != nil {
		return 0, err
	}
	return Degrees(math.Atan2(t.VzMS, t.VxMS)), nil
}

// groundTime is when the parabola reaches z = 0.
func (t Takeoff) groundTime() float64 {
	g := t.Gravity()
	return (t.VzMS + math.Sqrt(t.VzMS*t.VzMS+2*g*t.H0M)) / g
}

// HeightAt returns z(t) = h0 + vz·t − g·t²/2 in metres, for tS from 0 up to
// the time the c.m. would reach the ground.
func (t Takeoff) HeightAt(tS float64) (float64, error) {
	if err := t.Validate(); err != nil {
		return 0, err
	}
	if err := inRange(FieldTime, tS, 0, maxFlightTimeS, "s"); err != nil {
		return 0, err
	}
	if tS > t.groundTime() {
		return 0, inputErr(FieldTime, tS, fmt.Sprintf("after %.3f s the c.m. would be below the ground", t.groundTime()))
	}
	g := t.Gravity()
	return t.H0M + t.VzMS*tS - g*tS*tS/2, nil
}

// TimeToBarPlane returns D/vx, seconds: when the c.m. crosses the vertical
// plane of the bar, dM (0..5 m) ahead of the take-off point. vx must be
// positive.
func (t Takeoff) TimeToBarPlane(dM float64) (float64, error) {
	if err := t.Validate(); err != nil {
		return 0, err
	}
	if err := checkDist(dM); err != nil {
		return 0, err
	}
	if t.VxMS == 0 {
		return 0, inputErr(FieldVx, 0, "the horizontal velocity is needed to reach the bar plane")
	}
	return dM / t.VxMS, nil
}

// HeightAtBarPlane returns the c.m. height when it crosses the bar plane,
// z(D/vx) = h0 + vz·D/vx − g·D²/(2vx²), metres.
func (t Takeoff) HeightAtBarPlane(dM float64) (float64, error) {
	ts, err := t.TimeToBarPlane(dM)
	if err != nil {
		return 0, err
	}
	return t.HeightAt(ts)
}

// PeakDistance returns the horizontal distance the c.m. travels to its peak,
// vx·vz/g, metres: the take-off distance that would put the peak over the
// bar.
func (t Takeoff) PeakDistance() (float64, error) {
	if err := t.Validate(); err != nil {
		return 0, err
	}
	return t.VxMS * t.VzMS / t.Gravity(), nil
}

// FlightTimeTo returns the time from take-off until the c.m. comes down to
// landingM (0 up to the peak height), seconds: the later root of z(t) =
// landing, t = (vz + √(vz² + 2g(h0 − landing)))/g.
func (t Takeoff) FlightTimeTo(landingM float64) (float64, error) {
	peak, err := t.PeakHeight()
	if err != nil {
		return 0, err
	}
	if err := finite(FieldLanding, landingM); err != nil {
		return 0, err
	}
	if landingM < 0 {
		return 0, inputErr(FieldLanding, landingM, "below the ground")
	}
	if landingM > peak {
		return 0, inputErr(FieldLanding, landingM, fmt.Sprintf("above the peak, %.3f m", peak))
	}
	g := t.Gravity()
	disc := math.Max(0, t.VzMS*t.VzMS+2*g*(t.H0M-landingM))
	return (t.VzMS + math.Sqrt(disc)) / g, nil
}

// BestBar returns the highest bar this take-off clears with the peak over
// the bar, peak − need, metres, where needM = d − s is the c.m. height the
// posture needs above the bar (COMResult.NeedM).
func (t Takeoff) BestBar(needM float64) (float64, error) {
	if err := checkNeed(FieldNeed, needM); err != nil {
		return 0, err
	}
	peak, err := t.PeakHeight()
	if err != nil {
		return 0, err
	}
	return positiveBar(peak - needM)
}

// BestBarAt returns the highest bar cleared when the c.m. crosses the bar
// plane dM after take-off: z(D/vx) − need, metres.
func (t Takeoff) BestBarAt(dM, needM float64) (float64, error) {
	if err := checkNeed(FieldNeed, needM); err != nil {
		return 0, err
	}
	z, err := t.HeightAtBarPlane(dM)
	if err != nil {
		return 0, err
	}
	return positiveBar(z - needM)
}

func positiveBar(barM float64) (float64, error) {
	if barM <= 0 {
		return 0, inputErr(FieldBar, barM, "this take-off and posture clear no bar above the ground")
	}
	return barM, nil
}

// VzForPeak returns the take-off vertical velocity that carries the c.m.
// from h0M to peakM, √(2g(peak − h0)), m/s. gMS2 0 means StandardGravity.
func VzForPeak(peakM, h0M, gMS2 float64) (float64, error) {
	g, err := gravityOrStandard(gMS2)
	if err != nil {
		return 0, err
	}
	if err := checkH0(h0M); err != nil {
		return 0, err
	}
	if err := positiveUpTo(FieldPeak, peakM, maxPeakM, "m"); err != nil {
		return 0, err
	}
	if peakM < h0M {
		return 0, inputErr(FieldPeak, peakM, fmt.Sprintf("below the take-off height %.3f m; the c.m. rises after take-off", h0M))
	}
	vz := math.Sqrt(2 * g * (peakM - h0M))
	if vz > MaxVzMS {
		return 0, inputErr(FieldPeak, peakM, fmt.Sprintf("needs vz %.2f m/s, above %g m/s", vz, MaxVzMS))
	}
	return vz, nil
}

// VzForBar returns the take-off vertical velocity needed to clear barM with
// the peak over the bar, for a posture needing needM (= d − s) of c.m.
// height above the bar: √(2g(bar + need − h0)), m/s, or 0 when the needed
// height is not above h0.
func VzForBar(barM, needM, h0M, gMS2 float64) (float64, error) {
	g, err := gravityOrStandard(gMS2)
	if err != nil {
		return 0, err
	}
	if err := checkBar(barM); err != nil {
		return 0, err
	}
	if err := checkNeed(FieldNeed, needM); err != nil {
		return 0, err
	}
	if err := checkH0(h0M); err != nil {
		return 0, err
	}
	rise := barM + needM - h0M
	if rise <= 0 {
		return 0, nil
	}
	return vzWithin(math.Sqrt(2*g*rise), barM)
}

// VzForBarAt returns the take-off vertical velocity needed for the c.m. to
// be at bar + need when it crosses the bar plane dM (> 0) after take-off at
// horizontal velocity vxMS (> 0): with t = D/vx,
// vz = (bar + need − h0 + g·t²/2)/t, m/s, or 0 if even vz = 0 would do.
func VzForBarAt(barM, needM, h0M, dM, vxMS, gMS2 float64) (float64, error) {
	g, err := gravityOrStandard(gMS2)
	if err != nil {
		return 0, err
	}
	if err := checkBar(barM); err != nil {
		return 0, err
	}
	if err := checkNeed(FieldNeed, needM); err != nil {
		return 0, err
	}
	if err := checkH0(h0M); err != nil {
		return 0, err
	}
	if err := checkDist(dM); err != nil {
		return 0, err
	}
	if dM == 0 {
		return 0, inputErr(FieldTakeoffDist, 0, "a take-off in the bar plane leaves no flight to the bar; give the distance or use the peak")
	}
	if err := checkVx(vxMS); err != nil {
		return 0, err
	}
	if vxMS == 0 {
		return 0, inputErr(FieldVx, 0, "the horizontal velocity is needed to reach the bar plane")
	}
	t := dM / vxMS
	vz := (barM + needM - h0M + g*t*t/2) / t
	if vz <= 0 {
		return 0, nil
	}
	return vzWithin(vz, barM)
}

func vzWithin(vz, barM float64) (float64, error) {
	if vz > MaxVzMS {
		return 0, inputErr(FieldBar, barM, fmt.Sprintf("needs vz %.2f m/s, above %g m/s", vz, MaxVzMS))
	}
	return vz, nil
}
