package mechanics

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// Uncertainty holds the ± of each margin input, read as one standard
// uncertainty in the input's own unit (metres, m/s, degrees). Zero means
// exact.
type Uncertainty struct {
	BarM    float64
	H0M     float64
	VzMS    float64
	PeakM   float64
	DM      float64
	VxMS    float64
	ArchDeg float64
	LengthM float64
	DropM   float64
	DepthM  float64
}

// DefaultUncertainty returns typical ± for coach-field measurements (common
// practice estimates, not sourced values): vz 0.1 m/s, h0 0.02 m, peak 0.02
// m, D 0.10 m, vx 0.2 m/s, arch 10°, length 0.01 m, drop 0.02 m, depth 0.02
// m, bar 0.005 m.
func DefaultUncertainty() Uncertainty {
	return Uncertainty{BarM: 0.005, H0M: 0.02, VzMS: 0.1, PeakM: 0.02, DM: 0.10, VxMS: 0.2,
		ArchDeg: 10, LengthM: 0.01, DropM: 0.02, DepthM: 0.02}
}

// MarginInput describes one clearance to assess. Zero fields are "not
// given"; see each field for its default.
type MarginInput struct {
	BarM float64 // bar height, required
	// H0M is the c.m. height at take-off. 0: TakeoffHeightFraction·StatureM
	// when StatureM is given (noted in Assumptions). Not needed when only
	// PeakM is given and there is no take-off distance.
	H0M float64
	// VzMS is the take-off vertical velocity; PeakM a measured c.m. peak.
	// Give exactly one of them (the other 0).
	VzMS  float64
	PeakM float64
	// DM is the take-off distance to the bar plane and VxMS the horizontal
	// velocity. With both, the c.m. height at the bar plane is used instead
	// of the peak. DM without VxMS is an error; VxMS alone only adds the
	// peak's distance to the result.
	DM   float64
	VxMS float64
	GMS2 float64 // 0: StandardGravity
	// StatureM bounds h0 (h0 ≤ stature), is the arc length when LengthM is
	// 0, and sets the default depth.
	StatureM float64
	// The posture's requirement. Arc model (DropGiven false): the body of
	// length LengthM (0: StatureM) bent into an arc of ArchDeg degrees.
	// DropGiven true: DropM is s, e.g. COMResult.DropM of the segment model.
	ArchDeg   float64
	LengthM   float64
	DropGiven bool
	DropM     float64
	// DepthM is d, apex of the midline to the underside. 0:
	// DefaultUndersideDepth(StatureM) (noted in Assumptions).
	DepthM float64
	Sigma  Uncertainty
	// Assumed holds the ± of the inputs that were assumed rather than
	// typed, each the spread of its published range (PublishedRange.Sigma
	// or a stated common-practice spread). An input with a non-zero
	// Assumed ± uses it in place of its Sigma, and its share counts in
	// SigmaAssumedM instead of SigmaTypedM.
	Assumed Uncertainty
}

// Contribution is one input's share of the margin's uncertainty.
type Contribution struct {
	Input       string  // Field* name: "vz", "h0", "peak", "D", "vx", "arch", "length", "drop", "depth", "bar"
	SigmaIn     float64 // the input's ± in its own unit
	Sensitivity float64 // ∂margin/∂input, metres per input unit
	SigmaM      float64 // |Sensitivity|·SigmaIn, metres
	Assumed     bool    // the input was assumed: SigmaIn is its published range's spread
}

// MarginResult is the clearance margin and how it was reached.
type MarginResult struct {
	MarginM float64 // c.m. height used − (bar + d − s); positive clears, negative knocks
	SigmaM  float64 // first-order ± of the margin: √Σ(∂M/∂xᵢ·σᵢ)² = √(typed² + assumed²)
	// SigmaTypedM is the part of SigmaM from typed inputs (input
	// precision), SigmaAssumedM the part from assumed ones (range spreads).
	SigmaTypedM, SigmaAssumedM float64
	Clears                     bool    // MarginM > 0
	COMAtBarM                  float64 // c.m. height used: at the bar plane (AtBarPlane) or the peak
	RequiredM                  float64 // bar + d − s
	DropM                      float64 // s used
	DepthM                     float64 // d used
	H0M                        float64 // h0 used (0 if not needed and not given)
	VzMS                       float64 // vz given or derived from the peak (0 if not derivable)
	PeakM                      float64 // peak given or h0 + vz²/2g (0 if not derivable)
	GMS2                       float64 // gravity used
	// AtBarPlane is true when DM and VxMS were given.
	AtBarPlane bool
	TimeToBarS float64 // D/vx (AtBarPlane)
	// PeakDistanceM is vx·vz/g, the take-off distance that puts the peak
	// over the bar (0 without vx and vz).
	PeakDistanceM float64
	// PeakPastBarM is how far past the bar plane the peak falls (negative:
	// before it), PeakDistance − D (AtBarPlane only).
	PeakPastBarM float64
	// TakeoffShiftM is the change of take-off distance that would put the
	// peak over the bar (+ take off farther from the bar), equal to
	// PeakPastBarM.
	TakeoffShiftM float64
	Contributions []Contribution // largest first; inputs with zero ± are left out
	Dominant      string         // Input of the largest contribution, "" if none
	Assumptions   []string       // defaults taken, in plain words
}

// Margin returns the clearance margin of one jump (design: margin = c.m.
// height when crossing the bar plane − (bar + d − s)):
//
//	C = h0 + vz²/(2g)                       peak (no take-off distance)
//	C = peak                                 measured peak (no take-off distance)
//	C = h0 + vz·t − g·t²/2,  t = D/vx        at the bar plane
//	Q = bar + d − s                          what the posture needs there
//	M = C − Q
//
// With a measured peak and a take-off distance, vz = √(2g(peak − h0)). s is
// the arc model's drop (ArcDrop of LengthM and ArchDeg) or the given DropM.
// The uncertainty is first order: σ_M² = Σ (∂M/∂xᵢ)² σᵢ², with analytic
// partial derivatives (∂M/∂h0 = 1 or 1 − g·t/vz, ∂M/∂vz = vz/g or t,
// ∂M/∂peak = 1 or g·t/vz, ∂M/∂D = (vz − g·t)/vx, ∂M/∂vx = −t(vz − g·t)/vx,
// ∂M/∂θ = ds/dθ, ∂M/∂L = s/L, ∂M/∂s = 1, ∂M/∂d = ∂M/∂bar = −1); inputs are
// treated as independent, and the linearisation holds while each ± is
// small against the curvature (e.g. vz ± 0.1 m/s at 4.4 m/s).
//
// Assumptions: the body's apex is over the bar when the c.m. crosses the bar
// plane; the c.m. moves as a projectile; the posture is held through the
// crossing. A positive margin means the model's c.m. passes high enough, not
// that the bar stays up: heels, arms and timing still decide. Whether a
// height is safe or sensible to attempt is for the coach, not this model.
func Margin(in MarginInput) (MarginResult, error) {
	var r MarginResult
	note := func(format string, a ...any) { r.Assumptions = append(r.Assumptions, fmt.Sprintf(format, a...)) }

	g, err := gravityOrStandard(in.GMS2)
	if err != nil {
		return MarginResult{}, fmt.Errorf("margin: %w", err)
	}
	if in.GMS2 == 0 {
		note("standard gravity %.5f m/s² (no venue set)", StandardGravity)
	}
	r.GMS2 = g
	if err := checkBar(in.BarM); err != nil {
		return MarginResult{}, fmt.Errorf("margin: %w", err)
	}
	if in.StatureM != 0 {
		if err := checkStature(in.StatureM); err != nil {
			return MarginResult{}, fmt.Errorf("margin: %w", err)
		}
	}
	if err := in.Sigma.validate(); err != nil {
		return MarginResult{}, fmt.Errorf("margin: %w", err)
	}
	if err := in.Assumed.validate(); err != nil {
		return MarginResult{}, fmt.Errorf("margin: assumed: %w", err)
	}

	// Flight inputs.
	if err := checkVz(in.VzMS); err != nil {
		return MarginResult{}, fmt.Errorf("margin: %w", err)
	}
	if in.PeakM != 0 {
		if err := positiveUpTo(FieldPeak, in.PeakM, maxPeakM, "m"); err != nil {
			return MarginResult{}, fmt.Errorf("margin: %w", err)
		}
	}
	if err := checkDist(in.DM); err != nil {
		return MarginResult{}, fmt.Errorf("margin: %w", err)
	}
	if err := checkVx(in.VxMS); err != nil {
		return MarginResult{}, fmt.Errorf("margin: %w", err)
	}
	vzGiven, peakGiven := in.VzMS > 0, in.PeakM > 0
	switch {
	case vzGiven && peakGiven:
		return MarginResult{}, fmt.Errorf("margin: %w", inputErr(FieldPeak, in.PeakM, "give the take-off vz or the measured peak, not both"))
	case !vzGiven && !peakGiven:
		return MarginResult{}, fmt.Errorf("margin: %w", inputErr(FieldVz, in.VzMS, "needs the take-off vz or a measured peak"))
	}
	if in.DM > 0 && in.VxMS == 0 {
		return MarginResult{}, fmt.Errorf("margin: %w", inputErr(FieldVx, 0, "a take-off distance needs the horizontal velocity too"))
	}
	r.AtBarPlane = in.DM > 0 && in.VxMS > 0
	needH0 := vzGiven || r.AtBarPlane

	h0 := in.H0M
	if h0 == 0 && needH0 && in.StatureM > 0 {
		h0 = TakeoffHeightFraction * in.StatureM
		note("take-off c.m. height assumed %.2f m = %.2f × stature", h0, TakeoffHeightFraction)
	}
	if h0 != 0 || needH0 {
		if h0 == 0 {
			return MarginResult{}, fmt.Errorf("margin: %w", inputErr(FieldH0, 0, "needs the take-off c.m. height or the stature"))
		}
		if err := checkH0(h0); err != nil {
			return MarginResult{}, fmt.Errorf("margin: %w", err)
		}
		if in.StatureM > 0 && h0 > in.StatureM {
			return MarginResult{}, fmt.Errorf("margin: %w", inputErr(FieldH0, h0, fmt.Sprintf("above the stature %.2f m", in.StatureM)))
		}
	}
	r.H0M = h0

	// Posture requirement.
	var dSdArchDeg, dSdL float64
	usesArc := !in.DropGiven
	if usesArc {
		l := in.LengthM
		if l == 0 {
			if in.StatureM == 0 {
				return MarginResult{}, fmt.Errorf("margin: %w", inputErr(FieldLength, 0, "the arc model needs the body length or the stature"))
			}
			l = in.StatureM
			note("arc length = stature %.2f m", l)
		}
		if err := inRange(FieldArch, in.ArchDeg, 0, 180, "degrees"); err != nil {
			return MarginResult{}, fmt.Errorf("margin: %w", err)
		}
		theta := Radians(in.ArchDeg)
		s, err := ArcDrop(l, theta)
		if err != nil {
			return MarginResult{}, fmt.Errorf("margin: posture: %w", err)
		}
		slope, err := ArcDropSlope(l, theta)
		if err != nil {
			return MarginResult{}, fmt.Errorf("margin: posture: %w", err)
		}
		r.DropM = s
		dSdArchDeg = slope * math.Pi / 180
		dSdL = s / l
	} else {
		if err := inRange(FieldDrop, in.DropM, -maxNeedM, maxNeedM, "m"); err != nil {
			return MarginResult{}, fmt.Errorf("margin: %w", err)
		}
		r.DropM = in.DropM
	}
	d := in.DepthM
	if d == 0 {
		if in.StatureM == 0 {
			return MarginResult{}, fmt.Errorf("margin: %w", inputErr(FieldDepth, 0, "needs the body depth d or the stature"))
		}
		d, _ = DefaultUndersideDepth(in.StatureM)
		note("midline-to-underside depth assumed %.3f m (half the trunk depth)", d)
	}
	if err := positiveUpTo(FieldDepth, d, maxNeedM, "m"); err != nil {
		return MarginResult{}, fmt.Errorf("margin: %w", err)
	}
	r.DepthM = d
	r.RequiredM = in.BarM + d - r.DropM

	// Flight: c.m. height used and its partial derivatives.
	var dC struct{ h0, vz, peak, dist, vx float64 }
	vz := in.VzMS
	if peakGiven && h0 > 0 {
		v, err := VzForPeak(in.PeakM, h0, g)
		if err != nil {
			return MarginResult{}, fmt.Errorf("margin: %w", err)
		}
		vz = v
	}
	r.VzMS = vz
	if vzGiven {
		r.PeakM = h0 + vz*vz/(2*g)
	} else {
		r.PeakM = in.PeakM
	}
	if in.VxMS > 0 && vz > 0 {
		r.PeakDistanceM = in.VxMS * vz / g
	}
	switch {
	case !r.AtBarPlane && vzGiven:
		r.COMAtBarM = r.PeakM
		dC.h0, dC.vz = 1, vz/g
	case !r.AtBarPlane:
		r.COMAtBarM = in.PeakM
		dC.peak = 1
	default:
		if vz == 0 {
			return MarginResult{}, fmt.Errorf("margin: %w", inputErr(FieldPeak, in.PeakM, "equals the take-off height: no flight to reconstruct"))
		}
		to := Takeoff{H0M: h0, VzMS: vz, VxMS: in.VxMS, GMS2: g}
		c, err := to.HeightAtBarPlane(in.DM)
		if err != nil {
			return MarginResult{}, fmt.Errorf("margin: flight to the bar plane: %w", err)
		}
		t := in.DM / in.VxMS
		r.COMAtBarM, r.TimeToBarS = c, t
		r.PeakPastBarM = r.PeakDistanceM - in.DM
		r.TakeoffShiftM = r.PeakPastBarM
		dC.dist = (vz - g*t) / in.VxMS
		dC.vx = -t * (vz - g*t) / in.VxMS
		if vzGiven {
			dC.h0, dC.vz = 1, t
		} else {
			dC.h0, dC.peak = 1-g*t/vz, g*t/vz
		}
	}
	r.MarginM = r.COMAtBarM - r.RequiredM
	r.Clears = r.MarginM > 0

	// Uncertainty.
	sg, sa := in.Sigma, in.Assumed
	r.Contributions = make([]Contribution, 0, 10)
	add := func(name string, typed, assumed, sens float64, used bool) {
		sigma, isAssumed := typed, assumed > 0
		if isAssumed {
			sigma = assumed
		}
		if !used || sigma == 0 {
			return
		}
		r.Contributions = append(r.Contributions, Contribution{Input: name, SigmaIn: sigma, Sensitivity: sens, SigmaM: math.Abs(sens) * sigma, Assumed: isAssumed})
	}
	add(FieldBar, sg.BarM, sa.BarM, -1, true)
	add(FieldH0, sg.H0M, sa.H0M, dC.h0, needH0)
	add(FieldVz, sg.VzMS, sa.VzMS, dC.vz, vzGiven)
	add(FieldPeak, sg.PeakM, sa.PeakM, dC.peak, peakGiven)
	add(FieldTakeoffDist, sg.DM, sa.DM, dC.dist, r.AtBarPlane)
	add(FieldVx, sg.VxMS, sa.VxMS, dC.vx, r.AtBarPlane)
	add(FieldArch, sg.ArchDeg, sa.ArchDeg, dSdArchDeg, usesArc)
	add(FieldLength, sg.LengthM, sa.LengthM, dSdL, usesArc)
	add(FieldDrop, sg.DropM, sa.DropM, 1, !usesArc)
	add(FieldDepth, sg.DepthM, sa.DepthM, -1, true)
	slices.SortStableFunc(r.Contributions, func(a, b Contribution) int { return cmp.Compare(b.SigmaM, a.SigmaM) })
	var typed, assumed float64
	for _, c := range r.Contributions {
		if c.Assumed {
			assumed += c.SigmaM * c.SigmaM
		} else {
			typed += c.SigmaM * c.SigmaM
		}
	}
	r.SigmaTypedM, r.SigmaAssumedM = math.Sqrt(typed), math.Sqrt(assumed)
	r.SigmaM = math.Sqrt(typed + assumed)
	if len(r.Contributions) > 0 {
		r.Dominant = r.Contributions[0].Input
	} else {
		r.Contributions = nil
	}
	return r, nil
}

func (u Uncertainty) validate() error {
	for _, f := range []struct {
		name string
		v    float64
	}{{FieldBar, u.BarM}, {FieldH0, u.H0M}, {FieldVz, u.VzMS}, {FieldPeak, u.PeakM}, {FieldTakeoffDist, u.DM},
		{FieldVx, u.VxMS}, {FieldArch, u.ArchDeg}, {FieldLength, u.LengthM}, {FieldDrop, u.DropM}, {FieldDepth, u.DepthM}} {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) {
			return inputErr(FieldSigma, f.v, "± of "+f.name+" is not a finite number")
		}
		if f.v < 0 {
			return inputErr(FieldSigma, f.v, "± of "+f.name+" cannot be negative")
		}
	}
	return nil
}

// LargestAssumed returns the largest contribution of an assumed input, and
// false when nothing assumed contributes.
func (r MarginResult) LargestAssumed() (Contribution, bool) {
	for _, c := range r.Contributions { // largest first
		if c.Assumed {
			return c, true
		}
	}
	return Contribution{}, false
}
