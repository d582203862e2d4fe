package bot

import (
	"fmt"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/units"
)

// flightSpecs are the keywords of `flight`.
var flightSpecs = []optionSpec{
	{Key: "v", Aliases: []string{"vz"}, Kind: kindSpeed},
	{Key: "h0", Aliases: []string{"h1"}, Kind: kindLength},
	{Key: "vx", Aliases: []string{"speed"}, Kind: kindSpeed},
	{Key: "mat", Aliases: []string{"landing"}, Kind: kindLength},
	{Key: "time", Aliases: []string{"t"}, Kind: kindSeconds},
}

// placeholderH0M stands in for an unknown take-off height in quantities
// that do not depend on it (rise vz²/2g, time to peak vz/g, time back to
// take-off height 2vz/g, travel to the peak vx·vz/g).
const placeholderH0M = 1.0

func runFlight(c *call) (Reply, error) {
	const ex = exampleFlight
	o, err := parseOptions(c.args, flightSpecs, ex)
	if err != nil {
		return Reply{}, err
	}
	if len(o.rest) > 0 {
		return Reply{}, unknownWords(o.rest, ex, "flight takes v VZ with h0, vx and mat, or time T for a jump test")
	}
	t, hasT := o.num("time")
	vz, hasV := o.num("v")
	switch {
	case hasT && (hasV || o.has("h0") || o.has("vx") || o.has("mat")):
		return Reply{}, usageErr(ex, "give either v VZ (a take-off) or time T (a jump test), not both")
	case hasT:
		return jumpTest(c, t, "time", exampleJump)
	case !hasV:
		return Reply{}, usageErr(ex, "give the vertical take-off speed with v VZ (m/s), or a jump-test flight time with time T (s)")
	}
	if err := checkTypedVz(vz, "v", ex); err != nil {
		return Reply{}, err
	}
	h0, hasH0 := o.num("h0")
	if hasH0 && (h0 <= 0 || h0 > 3) {
		return Reply{}, usageErr(ex, "h0 %s is not a take-off c.m. height; it is about 0.70 × stature, e.g. h0 1.25", fmtM(h0))
	}
	vx, hasVx := o.num("vx")
	if hasVx {
		if err := checkTypedVx(vx, "vx", "flight v 4.4 h0 1.25 vx 4.0"); err != nil {
			return Reply{}, err
		}
	}
	mat, hasMat := o.num("mat")
	if hasMat && (mat <= 0 || mat > 3) {
		return Reply{}, usageErr("flight v 4.4 h0 1.25 mat 0.80", "mat %s is not a landing-mat height; e.g. mat 0.80", fmtM(mat))
	}
	if !hasMat {
		mat = matTopM
	}
	env, err := c.loadCalc("", nil)
	if err != nil {
		return Reply{}, err
	}
	imp := env.imp
	tk := mechanics.Takeoff{H0M: placeholderH0M, VzMS: vz, VxMS: vx, GMS2: env.gMS2}
	if hasH0 {
		tk.H0M = h0
	}
	rise, err := tk.Rise()
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	tPeak, err := tk.PeakTime()
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	r := Reply{Title: fmt.Sprintf("Flight from vz %s", calcSpeed(vz))}
	add := func(label, value string) { r.Fields = append(r.Fields, Field{label, value}) }
	var notes []string
	add("Peak rise (H2)", calcFine(rise, imp)+" = vz²/2g")
	if hasH0 {
		peak, err := tk.PeakHeight()
		if err != nil {
			return Reply{}, calcErr(err, ex)
		}
		add("C.m. peak", fmt.Sprintf("%s (h0 %s + rise)", calcFine(peak, imp), calcFine(h0, imp)))
	}
	add("Time to peak", fmt.Sprintf("%.3f s = vz/g", tPeak))
	add("Flight time, back to take-off height", fmt.Sprintf("%.3f s = 2vz/g", 2*tPeak))
	switch {
	case hasH0 && hasMat && mat > tk.H0M+rise:
		return Reply{}, usageErr("flight v 4.4 h0 1.25 mat 0.70", "the mat top %s is above the c.m. peak %s; give a lower mat", calcFine(mat, imp), calcFine(tk.H0M+rise, imp))
	case hasH0 && mat > tk.H0M+rise:
		notes = append(notes, fmt.Sprintf("the c.m. never rises to the %s mat top, so no landing time is shown (add mat H for a lower one)", flightLength(mat, imp)))
	case hasH0:
		tLand, err := tk.FlightTimeTo(mat)
		if err != nil {
			return Reply{}, calcErr(err, ex)
		}
		add(fmt.Sprintf("Flight time, c.m. down to mat-top height %s", flightLength(mat, imp)), fmt.Sprintf("%.3f s", tLand))
		if !hasMat {
			notes = append(notes, fmt.Sprintf("landing-mat top %s, the rules' minimum landing-area height (add mat H to set it)", flightLength(matTopM, imp)))
		}
	default:
		notes = append(notes, "no h0 given: the c.m. peak and the time to the mat need the take-off c.m. height (add h0 1.25)")
	}
	if hasVx {
		x, err := tk.PeakDistance()
		if err != nil {
			return Reply{}, calcErr(err, ex)
		}
		add("Horizontal travel to the peak", fmt.Sprintf("%s = vx·vz/g (at vx %s)", calcFine(x, imp), calcSpeed(vx)))
	} else {
		notes = append(notes, "no vx given (add vx 4.0 for the horizontal travel to the peak)")
	}
	g, err := env.gravityField(vz)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	r.Fields = append(r.Fields, g)
	notes = append(notes, "point-mass flight of the c.m., no air resistance", env.gravityAssumption())
	r.Assumptions = notes
	return r, nil
}

// flightLength formats a height in a flight reply: "0.70 m" in metric, and
// in imperial inches to a tenth ("27.6 in"), the unit of the reply's other
// heights, rather than feet-inches rounded to the inch.
func flightLength(m float64, imp bool) string {
	if imp {
		return calcFine(m, imp)
	}
	return units.Length(m, imp)
}

// runJumpTestCmd is `jump test T` (or `jump test time T`).
func runJumpTestCmd(c *call) (Reply, error) {
	const ex = "jump test 0.60"
	o, err := parseOptions(c.args, []optionSpec{{Key: "time", Aliases: []string{"t"}, Kind: kindSeconds}}, ex)
	if err != nil {
		return Reply{}, err
	}
	t, ok := o.num("time")
	switch {
	case ok && len(o.rest) > 0, len(o.rest) > 1:
		return Reply{}, unknownWords(o.rest[len(o.rest)-1:], ex, "give one flight time in seconds")
	case !ok && len(o.rest) == 1:
		if t, err = units.ParseSeconds(o.rest[0].Raw); err != nil {
			return Reply{}, usageErr(ex, "%q is not a flight time; give seconds, e.g. jump test 0.60 (or 600ms)", o.rest[0].Raw)
		}
	case !ok:
		return Reply{}, usageErr(ex, "give the flight time in seconds, e.g. jump test 0.60")
	}
	return jumpTest(c, t, "jump test", ex)
}

// bentKneeInflationM is how much landing with bent knees inflated the
// flight-time height in one published comparison, about 2.5 cm (as given in
// the project's shared reference notes on Bosco et al. 1983).
const bentKneeInflationM = 0.025

// jumpTest answers a jump-test flight time with the height h = g·t²/8
// (Bosco, Luhtanen and Komi, 1983) and the take-off speed g·t/2.
func jumpTest(c *call, tS float64, key, ex string) (Reply, error) {
	if tS < minJumpTestS || tS > maxJumpTestS {
		return Reply{}, usageErr(ex, "%s s is not a jump-test flight time; give seconds, e.g. %s 0.60 (or 600ms)", calcNum(tS), key)
	}
	env, err := c.loadCalc("", nil)
	if err != nil {
		return Reply{}, err
	}
	h, err := mechanics.JumpTestHeight(tS, env.gMS2)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	vz, err := mechanics.JumpTestVz(tS, env.gMS2)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	jump := fmt.Sprintf("%.1f cm", h*100)
	if env.imp {
		jump = fmt.Sprintf("%.1f in", h/units.MetresPerInch)
	}
	r := Reply{Title: fmt.Sprintf("Jump test: %s from %.3f s in the air", jump, tS)}
	r.Fields = []Field{
		{"Jump height", jump + " = g·t²/8 (Bosco et al. 1983)"},
		{"Take-off speed", calcSpeed(vz) + " = g·t/2"},
	}
	g, err := env.gravityField(0)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	r.Fields = append(r.Fields, g)
	r.Lines = []string{
		"Valid only for jump tests that take off and land in the same posture (e.g. countermovement jumps on a mat); not for a high jump, whose landing is far below the take-off.",
		fmt.Sprintf("Landing with bent knees or hips lengthens the flight and inflates the height (by about %s in one published comparison).", units.SmallAbs(bentKneeInflationM, env.imp)),
	}
	r.Assumptions = []string{"the c.m. lands at its take-off height", env.gravityAssumption()}
	return r, nil
}
