package bot

import (
	"fmt"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/units"
)

// flightSpecs are the keywords of `flight`.
var flightSpecs = []optionSpec{
	{Key: "v", Aliases: []string{"vz"}, Kind: kindSpeed},
	{Key: "up", Kind: kindSeconds},
	{Key: "h0", Aliases: []string{"h1"}, Kind: kindLength},
	{Key: "speed", Aliases: []string{"vx"}, Kind: kindSpeed},
	{Key: "angle", Kind: kindAngle},
	{Key: "across", Kind: kindSpeed},
	{Key: "mat", Aliases: []string{"landing"}, Kind: kindLength},
	{Key: "time", Aliases: []string{"t"}, Kind: kindSeconds},
	{Key: "sex", Kind: kindWord},
}

// placeholderH0M stands in for an unknown take-off height in quantities
// that do not depend on it (rise vz²/2g, time to peak vz/g, time back to
// take-off height 2vz/g, travel to the peak vx·vz/g).
const placeholderH0M = 1.0

// flightState is what runFlight gathers before it writes the replies.
type flightState struct {
	env            calcEnv
	vz, sigVz      float64 // m/s
	up             *videoTime
	upS            float64
	h0             float64
	hasH0          bool
	across         *mechanics.AcrossSpeed
	sex            mechanics.Sex
	flags          []rangeNote
	assumed, notes []string
}

func runFlight(c *call) (Reply, error) {
	const ex = exampleFlight
	args, video, err := foldFrames(c.args, "flight up 108 frames at 240fps")
	if err != nil {
		return Reply{}, err
	}
	o, err := parseOptions(args, flightSpecs, ex)
	if err != nil {
		return Reply{}, err
	}
	if len(o.rest) > 0 {
		return Reply{}, unknownWords(o.rest, ex, "flight takes v VZ or up T (take-off to peak) with h0, speed, angle, across and mat, or time T for a jump test")
	}
	t, hasT := o.num("time")
	_, hasV := o.num("v")
	_, hasUp := o.num("up")
	switch {
	case hasT && (hasV || hasUp || o.has("h0") || o.has("speed") || o.has("across") || o.has("mat")):
		return Reply{}, usageErr(ex, "give either v VZ or up T (a take-off) or time T (a jump test), not both")
	case hasT:
		return jumpTest(c, t, video, "flight time", exampleJump)
	case hasV && hasUp:
		return Reply{}, usageErr(ex, "give v VZ or up T (the time from take-off to the c.m. peak), not both")
	case !hasV && !hasUp:
		return Reply{}, usageErr(ex, "give the vertical take-off speed with v VZ (m/s), the time from take-off to the peak with up T (s, or 108 frames at 240fps), or a jump-test flight time with time T")
	}
	env, err := c.loadCalc("", nil)
	if err != nil {
		return Reply{}, err
	}
	fs := &flightState{env: env, sex: flightSex(o)}
	if err := fs.vertical(o, video); err != nil {
		return Reply{}, err
	}
	if err := fs.horizontal(o); err != nil {
		return Reply{}, err
	}
	full, err := fs.fullReply(o)
	if err != nil {
		return Reply{}, err
	}
	return fs.shortReply(full).reply(full), nil
}

// flightSex reads `sex` for the range flags; unknown spans both sexes.
func flightSex(o options) mechanics.Sex {
	switch w, _ := o.word("sex"); w {
	case "m", "M", "male":
		return mechanics.Male
	case "f", "F", "female", "w":
		return mechanics.Female
	}
	return mechanics.SexUnknown
}

// vertical reads vz, typed or from the time to the peak (vz = g·T), with
// its ±: typed 0.1 m/s, or g·σT with σT one frame or 10 ms.
func (fs *flightState) vertical(o options, video *videoTime) error {
	const ex = exampleFlight
	if up, ok := o.num("up"); ok {
		vz, err := mechanics.VzFromPeakTime(up, fs.env.gMS2)
		if err != nil {
			return calcErr(err, "flight up 0.45")
		}
		fs.vz, fs.upS, fs.up = vz, up, video
		fs.sigVz = fs.env.gMS2 * timeSigma(video)
	} else {
		vz, _ := o.num("v")
		if err := checkTypedVz(vz, "v", ex); err != nil {
			return err
		}
		fs.vz, fs.sigVz = vz, mechanics.DefaultUncertainty().VzMS
	}
	fs.flag(mechanics.QVz, fs.vz)
	h0, hasH0 := o.num("h0")
	if hasH0 && (h0 <= 0 || h0 > 3) {
		return usageErr(ex, "h0 %s is not a take-off c.m. height; it is about 0.70 × stature, e.g. h0 1.25", fmtM(h0))
	}
	fs.h0, fs.hasH0 = h0, hasH0
	return nil
}

// horizontal reads the speed across the bar (across, or speed and angle).
func (fs *flightState) horizontal(o options) error {
	if !o.has("across") && !o.has("speed") && !o.has("angle") {
		return nil
	}
	ai := mechanics.AcrossInput{GMS2: fs.env.gMS2, Sex: fs.sex}
	ai.AcrossMS, _ = o.num("across")
	ai.SpeedMS, _ = o.num("speed")
	ai.AngleDeg, _ = o.num("angle")
	for _, k := range []string{"across", "speed"} {
		if v, ok := o.num(k); ok {
			if err := checkTypedVx(v, k, "flight v 4.4 h0 1.25 speed 4.0 angle 37"); err != nil {
				return err
			}
		}
	}
	ac, err := mechanics.ResolveAcross(ai)
	if err != nil {
		return calcErr(err, "flight v 4.4 h0 1.25 speed 4.0 angle 37")
	}
	fs.across = &ac
	if v, ok := o.num("across"); ok {
		fs.flag(mechanics.QAcrossSpeed, v)
	}
	if v, ok := o.num("speed"); ok {
		fs.flag(mechanics.QHorizSpeed, v)
	}
	if v, ok := o.num("angle"); ok {
		fs.flag(mechanics.QAngleToBar, v)
	}
	if ac.Assumed() {
		fs.assumed = append(fs.assumed, "angle or speed")
	}
	fs.notes = append(fs.notes, marginAcrossNote(ac))
	return nil
}

func (fs *flightState) flag(q mechanics.Quantity, v float64) {
	if f, bad := mechanics.CheckRange(q, v, fs.sex); bad {
		fs.flags = append(fs.flags, rangeNoteOf(f))
	}
}

// angle is the flight angle atan(vz/vx) and how vx was found: the whole
// horizontal speed typed or resolved; with only the speed across the bar,
// the angle is an upper bound (the whole speed is at least that); with
// nothing, the middle of the published speeds.
func (fs *flightState) angle() (deg float64, how string) {
	spd, _ := mechanics.RangeFor(mechanics.QHorizSpeed, fs.sex, mechanics.Elite)
	vx, how := spd.Mid(), fmt.Sprintf("vx %s assumed, the middle of the published %s", calcSpeed(spd.Mid()), formatSpan(spd))
	switch {
	case fs.across != nil && fs.across.Source == mechanics.AcrossTyped:
		vx, how = fs.across.MS, fmt.Sprintf("at most: vx %s is only the speed across the bar, the whole horizontal speed is larger", calcSpeed(fs.across.MS))
	case fs.across != nil:
		vx, how = fs.across.SpeedMS, fmt.Sprintf("vx %s, the whole horizontal speed", calcSpeed(fs.across.SpeedMS))
	}
	d, err := mechanics.FlightAngleDeg(fs.vz, vx)
	if err != nil {
		return 0, ""
	}
	return d, how
}

// fullReply is every term of the flight with its formula.
func (fs *flightState) fullReply(o options) (Reply, error) {
	const ex = exampleFlight
	env, imp, vz := fs.env, fs.env.imp, fs.vz
	mat, hasMat := o.num("mat")
	if hasMat && (mat <= 0 || mat > 3) {
		return Reply{}, usageErr("flight v 4.4 h0 1.25 mat 0.80", "mat %s is not a landing-mat height; e.g. mat 0.80", fmtM(mat))
	}
	if !hasMat {
		mat = matTopM
	}
	tk := mechanics.Takeoff{H0M: placeholderH0M, VzMS: vz, GMS2: env.gMS2}
	if fs.hasH0 {
		tk.H0M = fs.h0
	}
	if fs.across != nil {
		tk.VxMS = fs.across.MS
	}
	rise, err := tk.Rise()
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	tPeak := vz / tk.Gravity()
	r := Reply{Title: fmt.Sprintf("Flight from vz %s", calcSpeed(vz))}
	add := func(label, value string) { r.Fields = append(r.Fields, Field{label, value}) }
	notes := fs.notes
	if fs.up != nil || fs.upS > 0 {
		src := fmt.Sprintf("%.3f s", fs.upS)
		if fs.up != nil {
			src = fs.up.frames.String()
		}
		add("Vz from the time up", fmt.Sprintf("%s ± %.2f = g·T, T %s to the peak (± %s)", calcSpeed(vz), fs.sigVz, src, fmtMS(fs.sigVz/env.gMS2)))
	}
	add("Peak rise (H2)", fmt.Sprintf("%s ± %s = vz²/2g", flightLength(rise, imp), units.SmallAbs(vz/tk.Gravity()*fs.sigVz, imp)))
	if fs.hasH0 {
		add("C.m. peak", fmt.Sprintf("%s (h0 %s + rise)", flightLength(fs.h0+rise, imp), flightLength(fs.h0, imp)))
	}
	add("Time to peak", fmt.Sprintf("%.3f s = vz/g", tPeak))
	add("Back to take-off height", fmt.Sprintf("%.3f s = 2vz/g", 2*tPeak))
	switch {
	case fs.hasH0 && hasMat && mat > tk.H0M+rise:
		return Reply{}, usageErr("flight v 4.4 h0 1.25 mat 0.70", "the mat top %s is above the c.m. peak %s; give a lower mat", flightLength(mat, imp), flightLength(tk.H0M+rise, imp))
	case fs.hasH0 && mat > tk.H0M+rise:
		notes = append(notes, fmt.Sprintf("the c.m. never rises to the %s mat top, so no landing time is shown (add mat H for a lower one)", flightLength(mat, imp)))
	case fs.hasH0:
		tLand, err := tk.FlightTimeTo(mat)
		if err != nil {
			return Reply{}, calcErr(err, ex)
		}
		add("Down to the mat top", fmt.Sprintf("%.3f s (mat top %s)", tLand, flightLength(mat, imp)))
		if !hasMat {
			notes = append(notes, fmt.Sprintf("landing-mat top %s, the rules' minimum landing-area height (add mat H to set it)", flightLength(matTopM, imp)))
		}
	default:
		notes = append(notes, "no h0 given: the c.m. peak and the time to the mat need the take-off c.m. height (add h0 1.25)")
	}
	if fs.across != nil {
		x := fs.across.MS * tPeak
		add("Travel to the peak", fmt.Sprintf("%s across the bar = vx·vz/g, vx %s across the bar", flightLength(x, imp), calcSpeed(fs.across.MS)))
	} else {
		notes = append(notes, "no horizontal speed given (add across VX, or speed V angle A, for the travel to the peak)")
	}
	deg, how := fs.angle()
	if deg > 0 {
		add("Flight angle", fmt.Sprintf("%s° = atan(vz/vx), %s", fmtDeg(deg), how))
		fs.flag(mechanics.QFlightAngle, deg)
		if fs.across == nil {
			fs.assumed = append(fs.assumed, "vx")
		}
	}
	g, err := env.gravityField(vz)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	r.Fields = append(r.Fields, g)
	r.Lines = fullFlags(fs.flags)
	notes = append(notes, "point-mass flight of the c.m., no air resistance", env.gravityAssumption())
	r.Assumptions = notes
	return r, nil
}

// shortReply is the phone-sized flight answer.
func (fs *flightState) shortReply(full Reply) calcShort {
	imp, g := fs.env.imp, fs.env.gMS2
	rise, tPeak := fs.vz*fs.vz/(2*g), fs.vz/g
	s := calcShort{assumed: fs.assumed}
	s.verdict = fmt.Sprintf("Rise %s from vz %s", flightLength(rise, imp), calcSpeed(fs.vz))
	if fs.hasH0 {
		s.verdict = fmt.Sprintf("Peak %s: rise %s from vz %s", flightLength(fs.h0+rise, imp), flightLength(rise, imp), calcSpeed(fs.vz))
	}
	nums := fmt.Sprintf("Up %.2f s, back to take-off height %.2f s", tPeak, 2*tPeak)
	if deg, _ := fs.angle(); deg > 0 {
		at := ""
		if fs.across != nil && fs.across.Source == mechanics.AcrossTyped {
			at = "≤ " // only the speed across the bar is known
		}
		nums += fmt.Sprintf("; flight %s%s°", at, fmtDeg(deg))
	}
	if fs.across != nil {
		nums += "; peak " + flightLength(fs.across.MS*tPeak, imp) + " out"
	}
	s.body = append(s.body, shortLine{nums, 3})
	pm := fmt.Sprintf("± %s on the rise from vz ± %.2f m/s", shortCM(tPeak*fs.sigVz, imp), fs.sigVz)
	if fs.up != nil {
		r, _ := fs.up.frames.ResolutionS()
		pm += fmt.Sprintf(" (1 frame at %s fps = ± %s)", calcNum(fs.up.frames.FPS), fmtMS(r))
	}
	s.body = append(s.body, shortLine{pm, 2})
	if l := checkLine(fs.flags); l != "" {
		s.body = append(s.body, shortLine{l, 0})
	}
	return s
}

// fmtMS prints a short time in milliseconds: "4.2 ms".
func fmtMS(s float64) string { return fmt.Sprintf("%.1f ms", s*1000) }

// flightLength formats a height in a flight reply: "0.70 m" in metric, and
// in imperial inches to a tenth ("27.6 in"), the unit of the reply's other
// heights, rather than feet-inches rounded to the inch.
func flightLength(m float64, imp bool) string {
	if imp {
		return calcFine(m, imp)
	}
	return units.Length(m, imp)
}
