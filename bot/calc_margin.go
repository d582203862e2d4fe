package bot

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// marginSpecs are the keywords of `margin`, in any order.
var marginSpecs = []optionSpec{
	{Key: "bar", Kind: kindLength},
	{Key: "for", Kind: kindWord},
	{Key: "v", Aliases: []string{"vz"}, Kind: kindSpeed},
	{Key: "h0", Aliases: []string{"h1"}, Kind: kindLength},
	{Key: "peak", Kind: kindLength},
	{Key: "arch", Kind: kindAngle},
	{Key: "height", Aliases: []string{"stature", "ht"}, Kind: kindLength},
	{Key: "depth", Kind: kindLength},
	{Key: "from", Aliases: []string{"dist", "distance", "takeoff"}, Kind: kindLength},
	{Key: "speed", Aliases: []string{"vx"}, Kind: kindSpeed},
	{Key: "angle", Kind: kindAngle},
	{Key: "across", Kind: kindSpeed},
	{Key: "model", Kind: kindWord},
	{Key: "sex", Kind: kindWord},
	{Key: "table", Kind: kindWord},
}

// marginArgs is what the coach typed for `margin`, checked but not yet
// completed from the profile.
type marginArgs struct {
	o       options
	barM    float64
	vzMS    float64
	hasVz   bool
	peakM   float64
	hasPeak bool
	h0M     float64
	hasH0   bool
	archDeg float64
	hasArch bool
	dM      float64
	hasD    bool
	vxMS    float64
	hasVx   bool
	model   string
	forName string
}

func parseMarginArgs(c *call) (marginArgs, error) {
	const ex = exampleMargin
	var m marginArgs
	o, err := parseOptions(c.args, marginSpecs, ex)
	if err != nil {
		return m, err
	}
	m.o = o
	m.barM, _ = o.num("bar")
	hasBar := o.has("bar")
	for _, t := range o.rest {
		v, err := units.ParseLength(t.Raw)
		if err != nil {
			return m, unknownWords([]token{t}, ex, "margin takes a bar height, then v, h0, peak, arch, height, depth, from, speed, model; name an athlete with for NAME")
		}
		if hasBar {
			return m, usageErr(ex, "two bar heights (%s and %q); give one", units.Bar(m.barM, false), t.Raw)
		}
		m.barM, hasBar = v, true
	}
	if !hasBar {
		return m, usageErr(ex, "give the bar height first, e.g. margin 1.80, margin 180cm or margin 5-11")
	}
	if m.barM < calcMinBarM || m.barM > calcMaxBarM {
		return m, usageErr(ex, "bar %s is outside %.2f–%.2f m; give metres (1.80), centimetres (180cm) or feet-inches (5-11)", fmtM(m.barM), calcMinBarM, calcMaxBarM)
	}
	m.forName, _ = o.word("for")
	if m.vzMS, m.hasVz = o.num("v"); m.hasVz {
		if err := checkTypedVz(m.vzMS, "v", ex); err != nil {
			return m, err
		}
	}
	if m.peakM, m.hasPeak = o.num("peak"); m.hasPeak && (m.peakM <= 0 || m.peakM > 4) {
		return m, usageErr("margin 1.80 peak 2.02 height 1.78", "peak %s is not a c.m. peak; give the highest c.m. height in flight, e.g. peak 2.02", fmtM(m.peakM))
	}
	if m.h0M, m.hasH0 = o.num("h0"); m.hasH0 && (m.h0M <= 0 || m.h0M > 3) {
		return m, usageErr(ex, "h0 %s is not a take-off c.m. height; it is about 0.70 × stature, e.g. h0 1.22", fmtM(m.h0M))
	}
	if m.archDeg, m.hasArch, err = checkTypedArch(o, ex); err != nil {
		return m, err
	}
	if m.dM, m.hasD = o.num("from"); m.hasD && (m.dM <= 0 || m.dM > 5) {
		return m, usageErr("margin 1.80 v 4.3 height 1.78 from 1.0 speed 3.5", "from %s: the take-off distance is from the take-off foot to the bar plane, above 0 and at most 5 m, e.g. from 1.0", fmtM(m.dM))
	}
	if m.vxMS, m.hasVx = o.num("speed"); m.hasVx {
		if err := checkTypedVx(m.vxMS, "speed", "margin 1.80 v 4.3 height 1.78 from 1.0 speed 3.5"); err != nil {
			return m, err
		}
	}
	def := "arc"
	if o.has("table") {
		def = "segments"
	}
	if m.model, err = parseCalcModel(o, def, false, ex); err != nil {
		return m, err
	}
	if m.model == "arc" && o.has("table") {
		return m, usageErr(ex+" model segments table dempster", "a segment table applies to the segment model; add model segments")
	}
	return m, nil
}

// calcLatestAttempt finds the athlete's most recent attempt with a measured
// peak or vz in the lookback window, by one range scan.
func (c *call) calcLatestAttempt(tx Tx, athleteID uint64) (record.Attempt, bool, error) {
	var (
		last  record.Attempt
		found bool
	)
	err := tx.Attempts(athleteID, c.now.Add(-attemptLookback), c.now.Add(1), func(a record.Attempt) error {
		if a.PeakM > 0 || a.VzMS > 0 {
			last, found = a, true
		}
		return nil
	})
	return last, found, err
}

func runMargin(c *call) (Reply, error) {
	const ex = exampleMargin
	m, err := parseMarginArgs(c)
	if err != nil {
		return Reply{}, err
	}
	var (
		att    record.Attempt
		hasAtt bool
	)
	env, err := c.loadCalc(m.forName, func(tx Tx, env *calcEnv) error {
		if env.athlete == nil || m.hasVz || m.hasPeak {
			return nil
		}
		var err error
		att, hasAtt, err = c.calcLatestAttempt(tx, env.athlete.ID)
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	b, err := resolveCalcBody(m.o, env, ex)
	if err != nil {
		return Reply{}, err
	}
	imp := env.imp
	var notes []string
	notes = append(notes, b.notes...)
	b.notes = nil

	// Take-off c.m. height.
	h0 := m.h0M
	if !m.hasH0 {
		h0 = mechanics.TakeoffHeightFraction * b.statureM
		notes = append(notes, fmt.Sprintf("take-off c.m. height assumed %s = %.2f × stature (add h0 to set it)", units.Length(h0, imp), mechanics.TakeoffHeightFraction))
	} else if h0 > b.statureM {
		return Reply{}, usageErr(ex, "h0 %s is above the athlete's height %s; h0 is the c.m. height at take-off, about 0.70 × stature", units.Length(h0, imp), units.Length(b.statureM, imp))
	}

	// Vertical speed or peak: typed, contradictory, or from a logged attempt.
	vz, peak := m.vzMS, m.peakM
	switch {
	case m.hasVz && m.hasPeak:
		pv, err := mechanics.ComparePeakVz(h0, vz, peak, env.gMS2) // the one peak-vs-vz rule, shared with log
		if err != nil {
			return Reply{}, calcErr(err, ex)
		}
		if !pv.Agree {
			return Reply{}, usageErr(ex, "peak %s and v %s disagree: vz %s from h0 %s gives a peak of %s, %s away. Give one of them (or the right h0)",
				units.Length(peak, imp), calcNum(vz), calcSpeed(vz), units.Length(h0, imp), units.Length(pv.FromVzM, imp), units.SmallAbs(math.Abs(pv.DiffM), imp))
		}
		notes = append(notes, fmt.Sprintf("peak %s agrees with vz %s within %s, so vz was used", units.Length(peak, imp), calcSpeed(vz), units.SmallAbs(mechanics.PeakVzToleranceM, imp)))
		peak = 0
	case m.hasVz:
	case m.hasPeak:
	case hasAtt:
		when := att.Time.In(env.loc).Format("Mon 2 Jan")
		if att.VzMS > 0 {
			vz = att.VzMS
			notes = append(notes, fmt.Sprintf("vz %s from %s's attempt at %s on %s, the latest with a measured vz or peak in 8 weeks (v VZ overrides it)", calcSpeed(vz), env.athlete.Name, units.Length(att.BarM, imp), when))
		} else {
			peak = att.PeakM
			notes = append(notes, fmt.Sprintf("peak %s from %s's attempt at %s on %s, the latest with a measured vz or peak in 8 weeks (v VZ or peak P overrides it)", units.Length(peak, imp), env.athlete.Name, units.Length(att.BarM, imp), when))
		}
	case env.athlete != nil:
		return Reply{}, usageErr("margin "+units.Bar(m.barM, imp)+" for "+env.athlete.Name+" v 4.3", "%s has no logged attempt with a peak or vz in the last 8 weeks; give v VZ (take-off vertical speed, m/s) or peak P (c.m. peak)", env.athlete.Name)
	default:
		return Reply{}, usageErr(ex, "give v VZ (the vertical take-off speed, m/s) or peak P (the c.m. peak height)")
	}
	if peak > 0 && peak < h0 {
		return Reply{}, usageErr("margin 1.80 peak 2.02 h0 1.22 height 1.78", "peak %s is below the take-off c.m. height %s; the c.m. rises after take-off", units.Length(peak, imp), units.Length(h0, imp))
	}

	var r0flags []string
	if vz > 0 {
		if f, bad := mechanics.CheckRange(mechanics.QVz, vz, b.segmentBody().Sex); bad {
			r0flags = append(r0flags, f.Line)
		}
	}
	in := mechanics.MarginInput{BarM: m.barM, H0M: h0, VzMS: vz, PeakM: peak, GMS2: env.gMS2, StatureM: b.statureM, Sigma: mechanics.DefaultUncertainty()}

	// Where the c.m. is judged: at the bar plane, or at the peak.
	vx := m.vxMS
	if m.hasD {
		ai := mechanics.AcrossInput{SpeedMS: m.vxMS, DM: m.dM, VzMS: vz, GMS2: env.gMS2, Sex: b.segmentBody().Sex}
		ai.AngleDeg, _ = m.o.num("angle")
		ai.AcrossMS, _ = m.o.num("across")
		if ai.VzMS == 0 && peak > h0 {
			ai.VzMS = math.Sqrt(2 * env.gMS2 * (peak - h0))
		}
		ac, err := mechanics.ResolveAcross(ai)
		if err != nil {
			return Reply{}, calcErr(err, "margin 1.80 v 4.3 height 1.78 from 1.0 speed 4.0 angle 37")
		}
		vx = ac.MS
		notes = append(notes, marginAcrossNote(ac))
		in.DM, in.VxMS = m.dM, vx
		in.Sigma.VxMS = ac.SigmaMS()
		if f, bad := mechanics.CheckRange(mechanics.QTakeoffDist, m.dM, ai.Sex); bad {
			r0flags = append(r0flags, f.Line)
		}
	} else {
		notes = append(notes, "c.m. judged at its peak (add from D speed VX to judge it where it crosses the bar plane)")
	}

	// What the posture needs.
	var postureText string
	switch m.model {
	case "segments":
		table, tname, tnotes, err := pickSegmentTable(m.o.words["table"], b.sex, calcAthleteName(env), ex)
		if err != nil {
			return Reply{}, err
		}
		notes = append(notes, tnotes...)
		p := mechanics.FlopLayout()
		if m.hasArch {
			p.TrunkArchDeg = m.archDeg
		}
		res, err := mechanics.BodyCOM(b.segmentBody(), p, table)
		if err != nil {
			return Reply{}, calcErr(err, ex)
		}
		in.DropGiven, in.DropM, in.DepthM = true, res.DropM, res.UndersideDepthM
		if b.depthM > 0 {
			in.DepthM = b.depthM
		}
		postureText = fmt.Sprintf("segments, layout with trunk arch %s°", calcNum(p.TrunkArchDeg))
		notes = append(notes, fmt.Sprintf("segment model: back-layout posture (head back %s°, trunk arch %s°, hips %s°, knees %s°), %s table", calcNum(-p.NeckFlexDeg), calcNum(p.TrunkArchDeg), calcNum(p.HipExtDeg), calcNum(p.KneeFlexDeg), tname))
	default:
		arch := m.archDeg
		if !m.hasArch {
			arch = defaultArchDeg
			notes = append(notes, fmt.Sprintf("arch assumed %s° (add arch DEG to set it)", calcNum(arch)))
		}
		in.ArchDeg, in.LengthM = arch, b.statureM
		d, err := b.arcDepth(imp)
		if err != nil {
			return Reply{}, calcErr(err, ex)
		}
		in.DepthM = d
		postureText = fmt.Sprintf("arc %s°", calcNum(arch))
		notes = append(notes, "arc model: body length along the arc = stature")
	}
	notes = append(notes, b.notes...)

	if m.hasD {
		// The c.m. must reach the bar plane before it is back down at
		// take-off height (2vz/g after take-off).
		vzEff := vz
		if vzEff == 0 {
			vzEff = math.Sqrt(2 * env.gMS2 * (peak - h0))
		}
		if tBar, tBack := m.dM/vx, 2*vzEff/env.gMS2; vzEff > 0 && tBar > tBack {
			return Reply{}, usageErr("margin 1.80 v 4.3 height 1.78 from 1.0 speed 3.5", "from %s at speed %s the c.m. would take %.2f s to reach the bar plane, but it is back at take-off height after %.2f s; check from and speed",
				units.Length(m.dM, imp), calcSpeed(vx), tBar, tBack)
		}
	}
	res, err := mechanics.Margin(in)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	// Hay's decomposition, bar = H1 + H2 − H3: H1 the take-off c.m. height,
	// H2 the rise to the peak, H3 the peak above the bar.
	h1, h2, h3 := res.H0M, res.PeakM-res.H0M, res.PeakM-m.barM

	r := Reply{Title: fmt.Sprintf("Margin at %s%s", units.Length(m.barM, imp), env.who()), Ephemeral: env.private()}
	add := func(label, value string) { r.Fields = append(r.Fields, Field{label, value}) }
	peakText := units.Length(res.PeakM, imp)
	if res.VzMS > 0 {
		peakText += fmt.Sprintf(", %.2f s after take-off", res.VzMS/res.GMS2)
	}
	add("C.m. peak", peakText)
	if res.AtBarPlane {
		add("C.m. at the bar plane", fmt.Sprintf("%s, %.2f s after take-off (%s out at %s)", units.Length(res.COMAtBarM, imp), res.TimeToBarS, units.Length(m.dM, imp), calcSpeed(vx)))
	}
	add("Height needed", fmt.Sprintf("%s = bar + depth %s − c.m. drop %s (%s)", units.Length(res.RequiredM, imp), units.SmallAbs(res.DepthM, imp), calcSmall(res.DropM, imp), postureText))
	verdict := "clears"
	switch {
	case math.Abs(res.MarginM) < res.SigmaM:
		verdict = "too close to call"
		if res.Clears {
			verdict = "clears, but within its ±"
		}
	case !res.Clears:
		verdict = "knocks"
	}
	add("Margin", fmt.Sprintf("%s ± %s: %s", units.Small(res.MarginM, imp), units.SmallAbs(res.SigmaM, imp), verdict))
	if len(res.Contributions) > 0 {
		add("Largest ±", marginContribution(res.Contributions, imp))
	}
	add("Hay's heights", haySum(h1, h2, h3, imp))
	g, err := env.gravityField(res.VzMS)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	r.Fields = append(r.Fields, g)

	line, change, err := marginReadout(res, m.barM, m.dM, !m.hasD && m.hasVx, vx, imp)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	if line != "" {
		r.Lines = append(r.Lines, line)
	}
	r.Lines = append(r.Lines, r0flags...)
	if change {
		r.Caution = calcCaution
	}
	notes = append(notes, "± is one standard uncertainty from typical input precision")
	notes = append(notes, env.gravityAssumption())
	r.Assumptions = notes
	return r, nil
}

// calcAthleteName is the athlete's name or "".
func calcAthleteName(env calcEnv) string {
	if env.athlete == nil {
		return ""
	}
	return env.athlete.Name
}

// marginContribution names the input that dominates the ± and the next one.
func marginContribution(cs []mechanics.Contribution, imp bool) string {
	s := fmt.Sprintf("%s (%s gives ±%s)", marginInputName(cs[0].Input), marginSigmaIn(cs[0], imp), units.SmallAbs(cs[0].SigmaM, imp))
	if len(cs) > 1 {
		s += fmt.Sprintf("; next %s ±%s", marginInputName(cs[1].Input), units.SmallAbs(cs[1].SigmaM, imp))
	}
	return s
}

// marginInputName is a margin input in the coach's words.
func marginInputName(in string) string {
	switch in {
	case "vz":
		return "vz"
	case "h0":
		return "take-off height h0"
	case "peak":
		return "peak"
	case "D":
		return "take-off distance"
	case "vx":
		return "speed across the bar"
	case "arch":
		return "arch"
	case "length":
		return "body length"
	case "drop":
		return "c.m. drop"
	case "depth":
		return "body depth"
	case "bar":
		return "bar"
	}
	return in
}

// marginSigmaIn formats an input's ± in its own unit.
func marginSigmaIn(c mechanics.Contribution, imp bool) string {
	switch c.Input {
	case "vz", "vx":
		return "±" + calcSpeed(c.SigmaIn)
	case "arch":
		return "±" + calcNum(c.SigmaIn) + "°"
	}
	return "±" + units.SmallAbs(c.SigmaIn, imp)
}

// peakSpotM is how far the peak may fall from the bar plane before the
// read-out suggests moving the take-off (common practice: a few cm is below
// what a coach can mark on the apron).
const peakSpotM = 0.05

// marginReadout is the one plain line of coaching read-out, and whether it
// suggests a change (then the reply carries the caution).
func marginReadout(res mechanics.MarginResult, barM, dM float64, vxOnly bool, vxMS float64, imp bool) (string, bool, error) {
	need := res.RequiredM - barM
	if res.AtBarPlane && res.VzMS > 0 {
		past := res.PeakPastBarM
		if atPeak := res.PeakM - res.RequiredM; math.Abs(past) >= peakSpotM && atPeak > 0 {
			outside := ""
			if f, bad := mechanics.CheckRange(mechanics.QTakeoffDist, dM+res.TakeoffShiftM, mechanics.SexUnknown); bad {
				outside = " That spot is outside the published take-off distances (" + f.Line + ")."
			}
			where, move := "past", "further out"
			if past < 0 {
				where, move = "before", "closer in"
			}
			return fmt.Sprintf("The peak falls %s %s the bar: a take-off about %s %s would put it over the bar (margin then %s).%s",
				calcShift(past, imp), where, calcShift(res.TakeoffShiftM, imp), move, units.Small(atPeak, imp), outside), true, nil
		}
		if res.Clears {
			return "The peak falls over the bar: the take-off spot suits this take-off.", false, nil
		}
	}
	if !res.Clears {
		var (
			vz  float64
			err error
		)
		if res.AtBarPlane {
			vz, err = mechanics.VzForBarAt(barM, need, res.H0M, dM, vxMS, res.GMS2)
		} else {
			vz, err = mechanics.VzForBar(barM, need, res.H0M, res.GMS2)
		}
		var ie *mechanics.InputError
		if errors.As(err, &ie) {
			return fmt.Sprintf("To clear, this take-off would need a vz above %s from the same take-off height: out of reach on these numbers.", calcSpeed(mechanics.MaxVzMS)), false, nil
		}
		if err != nil {
			return "", false, err
		}
		extra := ""
		if res.VzMS > 0 {
			extra = fmt.Sprintf(" (%+.2f m/s)", vz-res.VzMS)
		}
		return fmt.Sprintf("To clear, this take-off needs about vz %s%s from the same take-off height.", calcSpeed(vz), extra), true, nil
	}
	if math.Abs(res.MarginM) < res.SigmaM {
		return "The margin is within its ± of zero: too close to call from these numbers.", false, nil
	}
	var parts []string
	parts = append(parts, fmt.Sprintf("On these numbers the c.m. would clear a bar up to about %s.", units.Length(barM+res.MarginM, imp)))
	if vxOnly && res.VzMS > 0 {
		tk := mechanics.Takeoff{H0M: res.H0M, VzMS: res.VzMS, VxMS: vxMS, GMS2: res.GMS2}
		x, err := tk.PeakDistance()
		if err != nil {
			return "", false, err
		}
		parts = append(parts, fmt.Sprintf("At %s the peak comes %s past the take-off: a take-off that far out puts it over the bar.", calcSpeed(vxMS), units.Length(x, imp)))
	}
	return strings.Join(parts, " "), false, nil
}

// marginAcrossNote says which speed across the bar was used and where it
// came from (mechanics take-off direction model).
func marginAcrossNote(a mechanics.AcrossSpeed) string {
	switch a.Source {
	case mechanics.AcrossTyped:
		return fmt.Sprintf("speed across the bar %s, as typed", calcSpeed(a.MS))
	case mechanics.AcrossSpeedAngle:
		return fmt.Sprintf("speed across the bar %s = %s × sin %.0f°", calcSpeed(a.MS), calcSpeed(a.SpeedMS), a.AngleDeg)
	case mechanics.AcrossAngleAssumed:
		return fmt.Sprintf("speed across the bar %s = %s × sin %.0f°, angle to the bar assumed from elite run-ups (Dapena, from memory; add angle A)", calcSpeed(a.MS), calcSpeed(a.SpeedMS), a.AngleDeg)
	case mechanics.AcrossSpeedAssumed:
		return fmt.Sprintf("speed across the bar %s = %s (assumed, Dapena from memory) × sin %.0f° (add speed V)", calcSpeed(a.MS), calcSpeed(a.SpeedMS), a.AngleDeg)
	}
	clamp := ""
	if a.Clamped {
		clamp = ", moved to the edge of the published range"
	}
	return fmt.Sprintf("speed across the bar assumed %s ± %.2f = g·D/vz, the c.m. peaking at the bar plane as published (Dapena 1980)%s; add across VX, or speed V angle A", calcSpeed(a.MS), a.SigmaAssumedMS, clamp)
}
