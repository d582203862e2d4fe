package bot

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/units"
)

// peakSpotM is how far the peak may fall from the bar plane before the
// read-out suggests moving the take-off (common practice: a few cm is below
// what a coach can mark on the apron).
const peakSpotM = 0.05

// marginAdvice is the coaching read-out of a margin: a sentence for the
// full reply, a shorter one for the phone, and whether it suggests a
// change (then the reply carries the caution).
type marginAdvice struct {
	full, short string
	change      bool
}

// tooClose reports whether the margin is within its ± of zero.
func (st *marginState) tooClose() bool { return math.Abs(st.res.MarginM) < st.res.SigmaM }

// verdict is the first line of the short reply.
func (st *marginState) verdict() string {
	res, imp := st.res, st.env.imp
	at := " at " + units.Length(st.m.barM, imp) + st.env.who()
	pm := " ± " + shortSigma(res.SigmaM, imp)
	switch {
	case st.tooClose():
		sign := "+"
		if res.MarginM < 0 {
			sign = units.Minus
		}
		return "Too close to call: " + sign + shortCM(res.MarginM, imp) + pm + at
	case res.Clears:
		return "Clears by " + shortCM(res.MarginM, imp) + pm + at
	}
	return "Knocks: " + shortCM(res.MarginM, imp) + " short" + pm + at
}

// advice words what to do next. It never suggests a move that still
// knocks, never one resting on an assumed speed across the bar, none when
// the margin is too close to call, and it says when a suggested take-off
// spot is outside the published take-off distances.
func (st *marginState) advice() (marginAdvice, error) {
	res, imp := st.res, st.env.imp
	if st.tooClose() {
		// A move is suggested only when it rests on typed numbers and
		// clears by more than the ±; otherwise too close means no change.
		if res.AtBarPlane && res.VzMS > 0 && math.Abs(res.PeakPastBarM) >= peakSpotM {
			if a, ok := st.spotAdvice(); ok && a.change && res.PeakM-res.RequiredM > res.SigmaM {
				return a, nil
			}
		}
		a := marginAdvice{full: "The margin is within its ± of zero: too close to call from these numbers; no change is suggested."}
		if res.AtBarPlane && math.Abs(res.PeakPastBarM) >= peakSpotM {
			where := "past"
			if res.PeakPastBarM < 0 {
				where = "before"
			}
			a.full += fmt.Sprintf(" On these numbers the peak falls %s %s the bar; check the take-off distance and the speed across the bar before moving anything.", calcShift(res.PeakPastBarM, imp), where)
		}
		return a, nil
	}
	if res.AtBarPlane && res.VzMS > 0 && math.Abs(res.PeakPastBarM) >= peakSpotM {
		if a, ok := st.spotAdvice(); ok {
			return a, nil
		}
	}
	if !res.Clears {
		return st.vzAdvice()
	}
	if res.AtBarPlane {
		return marginAdvice{full: "The peak falls over the bar: the take-off spot suits this take-off.", short: "The peak falls over the bar."}, nil
	}
	a := marginAdvice{full: fmt.Sprintf("On these numbers the c.m. would clear a bar up to about %s.", units.Length(st.m.barM+res.MarginM, imp))}
	if st.across != nil && res.VzMS > 0 {
		x := st.across.MS * res.VzMS / res.GMS2
		a.full += fmt.Sprintf(" At %s across the bar the peak comes %s from the take-off: a take-off that far from the bar puts it over the bar.", calcSpeed(st.across.MS), units.Length(x, imp))
		if f, bad := mechanics.CheckRange(mechanics.QTakeoffDist, x, st.sex); bad {
			a.full += " That spot is outside the published take-off distances (" + f.Line + ")."
		}
		a.short = fmt.Sprintf("Peak %s out from the take-off.", units.Length(x, imp))
	}
	return a, nil
}

// spotAdvice is the read-out when the peak falls away from the bar plane:
// a move of the take-off spot when it would clear and rests on typed
// numbers only.
func (st *marginState) spotAdvice() (marginAdvice, bool) {
	res, imp := st.res, st.env.imp
	past := res.PeakPastBarM
	where, move := "past", "further out"
	if past < 0 {
		where, move = "before", "closer in"
	}
	if st.across != nil && st.across.Assumed() {
		return marginAdvice{
			full:  fmt.Sprintf("On the assumed speed across the bar the peak falls %s %s the bar; that rests on an assumption, so no move is suggested: give across VX, or speed V angle A.", calcShift(past, imp), where),
			short: "No move suggested: the speed across the bar is assumed (give across VX).",
		}, true
	}
	atPeak := res.PeakM - res.RequiredM
	if atPeak <= 0 {
		return marginAdvice{}, false // no spot clears: say what vz it needs
	}
	spot := st.m.dM + res.TakeoffShiftM
	outside := ""
	if f, bad := mechanics.CheckRange(mechanics.QTakeoffDist, spot, st.sex); bad {
		outside = " That spot is outside the published take-off distances (" + f.Line + ")."
	}
	a := marginAdvice{change: true,
		full: fmt.Sprintf("The peak falls %s %s the bar: a take-off about %s %s (%s from the bar) would put it over the bar (margin then %s).%s",
			calcShift(past, imp), where, calcShift(res.TakeoffShiftM, imp), move, units.Length(spot, imp), units.Small(atPeak, imp), outside),
		short: fmt.Sprintf("Peak %s %s the bar: try a take-off %s %s.", shortCM(past, imp), where, shortCM(res.TakeoffShiftM, imp), move),
	}
	if outside != "" {
		a.short += " That spot is outside the published range."
	}
	return a, true
}

// vzAdvice says what vz a knocking take-off would need, or that the bar is
// out of reach on these numbers.
func (st *marginState) vzAdvice() (marginAdvice, error) {
	res := st.res
	need := res.RequiredM - st.m.barM
	var (
		vz  float64
		err error
	)
	if res.AtBarPlane {
		vz, err = mechanics.VzForBarAt(st.m.barM, need, res.H0M, st.m.dM, st.in.VxMS, res.GMS2)
	} else {
		vz, err = mechanics.VzForBar(st.m.barM, need, res.H0M, res.GMS2)
	}
	var ie *mechanics.InputError
	if errors.As(err, &ie) {
		return marginAdvice{
			full:  fmt.Sprintf("To clear, this take-off would need a vz above %s from the same take-off height: out of reach on these numbers.", calcSpeed(mechanics.MaxVzMS)),
			short: "Out of reach on these numbers.",
		}, nil
	}
	if err != nil {
		return marginAdvice{}, err
	}
	extra := ""
	if res.VzMS > 0 {
		extra = fmt.Sprintf(" (%+.2f m/s)", vz-res.VzMS)
	}
	return marginAdvice{change: true,
		full:  fmt.Sprintf("To clear, this take-off needs about vz %s%s from the same take-off height.", calcSpeed(vz), extra),
		short: fmt.Sprintf("To clear it needs vz %s%s.", calcSpeed(vz), extra),
	}, nil
}

// sigmaLine is the short reply's ± in two parts, naming what dominates.
func (st *marginState) sigmaLine() string {
	res, imp := st.res, st.env.imp
	s := "± " + shortCM(res.SigmaTypedM, imp) + " from your numbers"
	if typed := largestTyped(res.Contributions); typed != "" && res.SigmaAssumedM == 0 {
		s += " (" + marginInputKey(typed) + " most)"
	}
	if res.SigmaAssumedM == 0 {
		return s
	}
	s += ", ± " + shortCM(res.SigmaAssumedM, imp) + " more from what I assumed"
	var give []string
	if c, ok := res.LargestAssumed(); ok {
		s += " (" + marginInputKey(c.Input) + " most)"
		for _, o := range res.Contributions {
			if o.Assumed && o.SigmaM >= 0.3*c.SigmaM && len(give) < 2 {
				give = append(give, marginInputKey(o.Input))
			}
		}
	}
	if len(give) > 0 {
		s += ": give " + strings.Join(give, " and ") + " to narrow it"
	}
	return s
}

// largestTyped names the largest typed contribution, "" when none.
func largestTyped(cs []mechanics.Contribution) string {
	for _, c := range cs {
		if !c.Assumed {
			return c.Input
		}
	}
	return ""
}

// marginInputKey is the keyword that sets a margin input.
func marginInputKey(in string) string {
	switch in {
	case "vx":
		return "speed and angle"
	case "D", "spot":
		return "from D"
	case "length":
		return "height"
	}
	return in
}

// numbersLine is the short reply's numbers: the c.m. used, the height the
// posture needs, the flight angle.
func (st *marginState) numbersLine() string {
	res, imp := st.res, st.env.imp
	s := "C.m. peak " + units.Length(res.PeakM, imp)
	if res.AtBarPlane {
		peak := "peak " + units.Length(res.PeakM, imp)
		if math.Abs(res.PeakM-res.COMAtBarM) < 0.005 {
			peak = "its peak"
		}
		s = "C.m. " + units.Length(res.COMAtBarM, imp) + " at the bar plane (" + peak + ")"
	}
	s += ", needs " + units.Length(res.RequiredM, imp) + " (" + st.postureText + ")"
	if st.flight.deg > 0 {
		s += "; flight " + fmtDeg(st.flight.deg) + "°"
	}
	return s
}

// shortReply is the phone-sized answer.
func (st *marginState) shortReply(change bool) calcShort {
	adv, _ := st.advice()
	s := calcShort{verdict: st.verdict(), assumed: st.assumed}
	s.body = append(s.body, shortLine{st.numbersLine(), 3}, shortLine{st.sigmaLine(), 2})
	if l := checkLine(st.flags); l != "" {
		s.body = append(s.body, shortLine{l, 0})
	}
	if adv.short != "" {
		if change {
			adv.short += " A model estimate: the coach decides."
		}
		s.body = append(s.body, shortLine{adv.short, 1})
	}
	return s
}

// fullReply is every term, every assumption with its source, and the
// uncertainty budget: what `more` and the Details button show.
func (st *marginState) fullReply() (Reply, bool, error) {
	const ex = exampleMargin
	res, env, imp := st.res, st.env, st.env.imp
	r := Reply{Title: fmt.Sprintf("Margin at %s%s", units.Length(st.m.barM, imp), env.who()), Ephemeral: env.private()}
	add := func(label, value string) { r.Fields = append(r.Fields, Field{label, value}) }
	peakText := units.Length(res.PeakM, imp)
	if res.VzMS > 0 {
		peakText += fmt.Sprintf(", %.2f s after take-off", res.VzMS/res.GMS2)
	}
	add("C.m. peak", peakText)
	if res.AtBarPlane {
		add("C.m. at the bar plane", fmt.Sprintf("%s, %.2f s after take-off (%s out at %s across the bar)", units.Length(res.COMAtBarM, imp), res.TimeToBarS, units.Length(st.m.dM, imp), calcSpeed(st.in.VxMS)))
	}
	add("Height needed", fmt.Sprintf("%s = bar + depth %s − c.m. drop %s (%s)", units.Length(res.RequiredM, imp), units.SmallAbs(res.DepthM, imp), calcSmall(res.DropM, imp), st.postureText))
	verdict := "clears"
	switch {
	case st.tooClose():
		verdict = "too close to call"
		if res.Clears {
			verdict = "clears, but within its ±"
		}
	case !res.Clears:
		verdict = "knocks"
	}
	add("Margin", fmt.Sprintf("%s ± %s: %s", units.Small(res.MarginM, imp), units.SmallAbs(res.SigmaM, imp), verdict))
	add("± from your numbers", sigmaBudget(res.SigmaTypedM, res.Contributions, false, imp))
	if res.SigmaAssumedM > 0 {
		add("± from assumed values", sigmaBudget(res.SigmaAssumedM, res.Contributions, true, imp))
	}
	if st.flight.deg > 0 {
		add("Flight angle", fmt.Sprintf("%s° = atan(vz/vx), vx %s the whole horizontal speed (%s)", fmtDeg(st.flight.deg), calcSpeed(st.flight.vxMS), st.flight.how))
	}
	add("Hay's heights", st.hayLine())
	g, err := env.gravityField(res.VzMS)
	if err != nil {
		return Reply{}, false, calcErr(err, ex)
	}
	r.Fields = append(r.Fields, g)
	adv, err := st.advice()
	if err != nil {
		return Reply{}, false, calcErr(err, ex)
	}
	if adv.full != "" {
		r.Lines = append(r.Lines, adv.full)
	}
	r.Lines = append(r.Lines, fullFlags(st.flags)...)
	if adv.change {
		r.Caution = calcCaution
	}
	notes := append(st.notes, "± is one standard uncertainty: typed values carry typical input precision (common practice), assumed values the spread of their published range, (Hi − Lo)/√12")
	r.Assumptions = append(notes, env.gravityAssumption())
	return r, adv.change, nil
}

// sigmaBudget lists the typed or the assumed contributions to the ±.
func sigmaBudget(totalM float64, cs []mechanics.Contribution, assumed bool, imp bool) string {
	var parts []string
	for _, c := range cs {
		if c.Assumed == assumed && len(parts) < 3 {
			parts = append(parts, fmt.Sprintf("%s %s gives ±%s", marginInputName(c.Input), marginSigmaIn(c, imp), units.SmallAbs(c.SigmaM, imp)))
		}
	}
	return "±" + units.SmallAbs(totalM, imp) + ": " + strings.Join(parts, "; ")
}

// hayLine is Hay's decomposition with what it tells: H1 as a fraction of
// stature against the published range, and, with a take-off distance, H3
// at the bar plane (bar = H1 + rise to the bar plane − H3 there).
func (st *marginState) hayLine() string {
	res, imp := st.res, st.env.imp
	h1, h2, h3 := res.H0M, res.PeakM-res.H0M, res.PeakM-st.m.barM
	where := ""
	if res.AtBarPlane {
		h2, h3 = res.COMAtBarM-res.H0M, res.COMAtBarM-st.m.barM
		where = ", H2 and H3 at the bar plane"
	}
	s := haySum(h1, h2, h3, imp)
	if st.b.statureM > 0 && h1 > 0 {
		r, _ := mechanics.RangeFor(mechanics.QH0Fraction, st.sex, mechanics.Elite)
		s += fmt.Sprintf(" (H1 %.2f of stature; published %s%s)", h1/st.b.statureM, formatSpan(r), where)
	}
	return s
}
