package mechanics

import (
	"fmt"
	"math"
	"strconv"
)

// InputError reports an input the mechanics cannot accept: a value outside
// its physical or modelled range, a missing value, or NaN/±Inf. Field is one
// of the Field* constants so a caller can name the input in its own words;
// Reason says why in plain language. Functions wrap it with %w when they
// pass it on, so use errors.As to find it.
type InputError struct {
	Field  string  // which input, one of the Field* constants
	Value  float64 // the rejected value (may be NaN or ±Inf)
	Reason string  // why it was rejected
}

// Error formats the error as "mechanics: field = value: reason".
func (e *InputError) Error() string {
	return fmt.Sprintf("mechanics: %s = %g: %s", e.Field, e.Value, e.Reason)
}

// Field names carried by InputError.Field.
const (
	FieldBar         = "bar"
	FieldH0          = "h0"
	FieldVz          = "vz"
	FieldVx          = "vx"
	FieldPeak        = "peak"
	FieldTakeoffDist = "D"
	FieldGravity     = "g"
	FieldArch        = "arch"
	FieldLength      = "length"
	FieldStature     = "stature"
	FieldMass        = "mass"
	FieldDepth       = "depth"
	FieldDrop        = "drop"
	FieldLatitude    = "latitude"
	FieldAltitude    = "altitude"
	FieldFlightTime  = "flight time"
	FieldLanding     = "landing height"
	FieldTime        = "time"
	FieldSex         = "sex"
	FieldPosture     = "posture"
	FieldJoint       = "joint angle"
	FieldSigma       = "uncertainty"
	FieldSamples     = "samples"
	FieldH1          = "H1"
	FieldH2          = "H2"
	FieldH3          = "H3"
	FieldNeed        = "need"
	FieldAngle       = "angle"
	FieldFrames      = "frames"
	FieldFPS         = "fps"
)

// Accepted ranges. They bound what a human high jumper can do, with room to
// spare, so that a typing slip is caught rather than turned into a number.
const (
	maxBarM      = 3.0  // m; the world record is below 2.50 m
	maxHeightM   = 3.0  // m; take-off c.m. height
	maxPeakM     = 4.0  // m
	maxVxMS      = 10.0 // m/s; sprinters peak near 12, take-off vx is 3-5
	maxDistM     = 5.0  // m; take-off distance to the bar plane
	minStatureM  = 0.5
	maxStatureM  = 2.5
	minMassKG    = 10.0
	maxMassKG    = 250.0
	minGMS2      = 9.7 // m/s²; WGS84 normal gravity spans 9.78-9.83 at sea level
	maxGMS2      = 9.9
	maxNeedM     = 1.0 // m; |d − s| larger than this is no human posture
	maxFlightS   = 2 * MaxVzMS / minGMS2
	minAltitudeM = -1000.0
	maxAltitudeM = 9000.0
)

func inputErr(field string, v float64, reason string) *InputError {
	return &InputError{Field: field, Value: v, Reason: reason}
}

// finite rejects NaN and ±Inf.
func finite(field string, v float64) error {
	if math.IsNaN(v) {
		return inputErr(field, v, "not a number")
	}
	if math.IsInf(v, 0) {
		return inputErr(field, v, "infinite")
	}
	return nil
}

// inRange checks lo <= v <= hi (and finiteness). unit is used in the reason.
func inRange(field string, v, lo, hi float64, unit string) error {
	if err := finite(field, v); err != nil {
		return err
	}
	if v < lo {
		return inputErr(field, v, fmt.Sprintf("below %s %s", boundText(lo), unit))
	}
	if v > hi {
		return inputErr(field, v, fmt.Sprintf("above %s %s", boundText(hi), unit))
	}
	return nil
}

// positiveUpTo checks 0 < v <= hi.
func positiveUpTo(field string, v, hi float64, unit string) error {
	if err := finite(field, v); err != nil {
		return err
	}
	if v <= 0 {
		return inputErr(field, v, "must be positive")
	}
	if v > hi {
		return inputErr(field, v, fmt.Sprintf("above %s %s", boundText(hi), unit))
	}
	return nil
}

func checkVz(vzMS float64) error {
	if err := finite(FieldVz, vzMS); err != nil {
		return err
	}
	if vzMS < 0 {
		return inputErr(FieldVz, vzMS, "a take-off vertical velocity cannot be negative")
	}
	if vzMS > MaxVzMS {
		return inputErr(FieldVz, vzMS, fmt.Sprintf("above %g m/s, beyond any human take-off", MaxVzMS))
	}
	return nil
}

func checkVx(vxMS float64) error {
	if err := finite(FieldVx, vxMS); err != nil {
		return err
	}
	if vxMS < 0 {
		return inputErr(FieldVx, vxMS, "speeds cannot be negative; give the horizontal speed towards the bar")
	}
	if vxMS > maxVxMS {
		return inputErr(FieldVx, vxMS, fmt.Sprintf("above %g m/s, beyond any human take-off", maxVxMS))
	}
	return nil
}

func checkH0(h0M float64) error {
	return positiveUpTo(FieldH0, h0M, maxHeightM, "m")
}

func checkBar(barM float64) error {
	return positiveUpTo(FieldBar, barM, maxBarM, "m")
}

func checkStature(statureM float64) error {
	return inRange(FieldStature, statureM, minStatureM, maxStatureM, "m")
}

func checkDist(dM float64) error {
	if err := finite(FieldTakeoffDist, dM); err != nil {
		return err
	}
	if dM < 0 {
		return inputErr(FieldTakeoffDist, dM, "take-off distance cannot be negative")
	}
	if dM > maxDistM {
		return inputErr(FieldTakeoffDist, dM, fmt.Sprintf("above %g m from the bar plane", maxDistM))
	}
	return nil
}

func checkNeed(field string, needM float64) error {
	return inRange(field, needM, -maxNeedM, maxNeedM, "m")
}

// gravityOrStandard returns StandardGravity for 0 and checks anything else.
func gravityOrStandard(gMS2 float64) (float64, error) {
	if gMS2 == 0 {
		return StandardGravity, nil
	}
	if err := inRange(FieldGravity, gMS2, minGMS2, maxGMS2, "m/s² (Earth's surface gravity is 9.76-9.84)"); err != nil {
		return 0, err
	}
	return gMS2, nil
}

// boundText prints a range bound in a refusal to four significant digits
// without an exponent: 1.349, 7, 10000, 0.004167.
func boundText(v float64) string {
	if v == 0 || math.IsInf(v, 0) || math.IsNaN(v) {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	p := math.Pow(10, 3-math.Floor(math.Log10(math.Abs(v))))
	return strconv.FormatFloat(math.Round(v*p)/p, 'f', -1, 64)
}
