package mechanics

import (
	"fmt"
	"math"
)

// The take-off direction model.
//
// The horizontal c.m. velocity at the end of a flop take-off has a speed V
// and points at an angle A to the bar (the run-up curves, and the jumper
// leaves the ground running partly along the bar). Only its component
// across the bar carries the c.m. to the bar plane:
//
//	v_across = V·sin A        [m/s]
//	v_along  = V·cos A        [m/s]
//
// Everything that finds where the c.m. crosses the bar plane (t = D/v_across)
// or where the peak falls (v_across·vz/g from the take-off, measured across
// the bar) uses v_across. The flight angle of the c.m. path above the
// horizontal uses the whole horizontal speed: atan(vz/V).
//
// When only part of it is typed, the rest comes from the range table
// (RangeFor; elite rows): a missing angle is the middle of QAngleToBar, a
// missing speed the middle of QHorizSpeed. When neither is typed, the
// component across the bar is taken from the published finding that the
// c.m. peaks close to the bar plane (Dapena 1980): v_across = g·D/vz, kept
// inside the developing QAcrossSpeed row, with the spread of the elite
// QAcrossSpeed row.

// Typical precision of typed take-off values (common practice: what a
// coach reads off video or a timing gate).
const (
	TypedSpeedSigmaMS  = 0.2 // horizontal speed or its component, m/s
	TypedAngleSigmaDeg = 5   // angle to the bar, degrees
)

// AcrossSource says how AcrossSpeed.MS was reached.
type AcrossSource int

// Sources of the speed across the bar.
const (
	AcrossTyped        AcrossSource = iota // typed as `across`
	AcrossSpeedAngle                       // typed speed and angle: V·sin A
	AcrossAngleAssumed                     // typed speed, assumed angle
	AcrossSpeedAssumed                     // typed angle, assumed speed
	AcrossPeakAtBar                        // nothing typed: g·D/vz, peak at the bar plane
)

// AcrossInput is what is known of the horizontal velocity at take-off.
// Zero means not given. DM and VzMS are needed only when neither AcrossMS
// nor SpeedMS nor AngleDeg is given.
type AcrossInput struct {
	AcrossMS float64 // component across the bar, m/s (0..10)
	SpeedMS  float64 // whole horizontal speed, m/s (0..10)
	AngleDeg float64 // angle between the horizontal velocity and the bar, degrees (0..90]
	DM       float64 // take-off distance to the bar plane, m
	VzMS     float64 // take-off vertical velocity, m/s
	GMS2     float64 // 0: StandardGravity
	Sex      Sex     // picks the range rows; SexUnknown spans both
}

// AcrossSpeed is the component of the horizontal c.m. velocity across the
// bar, with its ± split into what was typed and what was assumed.
type AcrossSpeed struct {
	MS             float64 // component across the bar, m/s
	SpeedMS        float64 // whole horizontal speed used or assumed, m/s
	AngleDeg       float64 // angle to the bar used or assumed, degrees
	SigmaTypedMS   float64 // ± from typed values, m/s
	SigmaAssumedMS float64 // ± from assumed values (range spreads), m/s
	Source         AcrossSource
	Clamped        bool // g·D/vz fell outside the developing range and was moved to its edge
}

// Assumed reports whether any part of the value was assumed.
func (a AcrossSpeed) Assumed() bool { return a.Source != AcrossTyped && a.Source != AcrossSpeedAngle }

// SigmaMS is the whole ±, √(typed² + assumed²), m/s.
func (a AcrossSpeed) SigmaMS() float64 { return math.Hypot(a.SigmaTypedMS, a.SigmaAssumedMS) }

// ResolveAcross returns the speed across the bar from what is known (see
// the take-off direction model above). The ± of V·sin A is first order:
// σ² = (sin A·σ_V)² + (V·cos A·σ_A)², σ_A in radians.
func ResolveAcross(in AcrossInput) (AcrossSpeed, error) {
	for _, f := range []struct {
		name string
		v    float64
	}{{FieldVx, in.AcrossMS}, {FieldVx, in.SpeedMS}} {
		if err := checkVx(f.v); err != nil {
			return AcrossSpeed{}, err
		}
	}
	if err := inRange(FieldAngle, in.AngleDeg, 0, 90, "degrees"); err != nil {
		return AcrossSpeed{}, err
	}
	given := in.AcrossMS > 0
	if given && (in.SpeedMS > 0 || in.AngleDeg > 0) {
		return AcrossSpeed{}, inputErr(FieldVx, in.AcrossMS, "give the speed across the bar or the speed and angle, not both")
	}
	angR, _ := RangeFor(QAngleToBar, in.Sex, Elite)
	spdR, _ := RangeFor(QHorizSpeed, in.Sex, Elite)
	sigA := Radians(TypedAngleSigmaDeg)
	switch {
	case given:
		return AcrossSpeed{MS: in.AcrossMS, SigmaTypedMS: TypedSpeedSigmaMS, Source: AcrossTyped}, nil
	case in.SpeedMS > 0 || in.AngleDeg > 0:
		a := AcrossSpeed{SpeedMS: in.SpeedMS, AngleDeg: in.AngleDeg, Source: AcrossSpeedAngle}
		sigV, sigVAssumed, sigAAssumed := TypedSpeedSigmaMS, 0.0, 0.0
		if a.AngleDeg == 0 {
			a.AngleDeg, a.Source = angR.Mid(), AcrossAngleAssumed
			sigA, sigAAssumed = 0, Radians(angR.Sigma())
		}
		if a.SpeedMS == 0 {
			a.SpeedMS, a.Source = spdR.Mid(), AcrossSpeedAssumed
			sigV, sigVAssumed = 0, spdR.Sigma()
		}
		s, c := math.Sincos(Radians(a.AngleDeg))
		a.MS = a.SpeedMS * s
		a.SigmaTypedMS = math.Hypot(s*sigV, a.SpeedMS*c*sigA)
		a.SigmaAssumedMS = math.Hypot(s*sigVAssumed, a.SpeedMS*c*sigAAssumed)
		return a, nil
	}
	g, err := gravityOrStandard(in.GMS2)
	if err != nil {
		return AcrossSpeed{}, err
	}
	if err := checkDist(in.DM); err != nil {
		return AcrossSpeed{}, err
	}
	if err := checkVz(in.VzMS); err != nil {
		return AcrossSpeed{}, err
	}
	if in.DM == 0 || in.VzMS == 0 {
		return AcrossSpeed{}, inputErr(FieldVx, 0, "assuming the speed across the bar needs the take-off distance and vz")
	}
	acR, _ := RangeFor(QAcrossSpeed, in.Sex, Elite)
	dev, _ := RangeFor(QAcrossSpeed, in.Sex, Developing)
	a := AcrossSpeed{MS: g * in.DM / in.VzMS, SigmaAssumedMS: acR.Sigma(), Source: AcrossPeakAtBar}
	if a.MS < dev.Lo || a.MS > dev.Hi {
		a.MS, a.Clamped = math.Min(math.Max(a.MS, dev.Lo), dev.Hi), true
	}
	a.SpeedMS = spdR.Mid()
	if a.MS < a.SpeedMS {
		a.AngleDeg = Degrees(math.Asin(a.MS / a.SpeedMS))
	} else {
		a.SpeedMS, a.AngleDeg = a.MS, 90
	}
	return a, nil
}

// FlightAngleDeg is the c.m. path's angle above the horizontal at take-off,
// atan(vz/V) in degrees, with V the whole horizontal speed (not the part
// across the bar). Published flop take-offs: 40° to 48° (Dapena 1980).
func FlightAngleDeg(vzMS, horizontalMS float64) (float64, error) {
	if err := checkVz(vzMS); err != nil {
		return 0, err
	}
	if err := checkVx(horizontalMS); err != nil {
		return 0, err
	}
	return Degrees(math.Atan2(vzMS, horizontalMS)), nil
}

// VzFromPeakTime returns vz = g·T from the time T (s, 0 < T ≤ 0.7) from
// take-off to the c.m. peak, m/s: at the peak the vertical velocity is
// zero, so vz − g·T = 0 (constant-acceleration kinematics).
func VzFromPeakTime(tS, gMS2 float64) (float64, error) {
	g, err := gravityOrStandard(gMS2)
	if err != nil {
		return 0, err
	}
	if err := inRange(FieldTime, tS, 0, MaxVzMS/g, "s"); err != nil {
		return 0, err
	}
	if tS == 0 {
		return 0, inputErr(FieldTime, 0, "the time to the peak must be above 0")
	}
	return g * tS, nil
}

// Frames is a time counted in video frames: Count frames at FPS frames per
// second.
type Frames struct {
	Count float64
	FPS   float64
}

// Seconds returns Count/FPS, s.
func (f Frames) Seconds() (float64, error) {
	if err := inRange(FieldFrames, f.Count, 1, 10000, "frames"); err != nil {
		return 0, err
	}
	if err := inRange(FieldFPS, f.FPS, 10, 2000, "frames per second"); err != nil {
		return 0, err
	}
	return f.Count / f.FPS, nil
}

// ResolutionS is the timing ± of one frame, 1/FPS seconds: the start and
// the end are each read to the nearest frame, so the count is good to
// about one frame (at 240 fps, 4.2 ms).
func (f Frames) ResolutionS() (float64, error) {
	if err := inRange(FieldFPS, f.FPS, 10, 2000, "frames per second"); err != nil {
		return 0, err
	}
	return 1 / f.FPS, nil
}

// String prints "108 frames at 240 fps".
func (f Frames) String() string {
	return fmt.Sprintf("%s frames at %s fps", trimNum(f.Count), trimNum(f.FPS))
}
