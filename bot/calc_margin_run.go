package bot

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// assumedDepthSigmaM is the spread given to an assumed body depth, 2 cm
// (common practice: trunk depths of jumpers of one stature).
const assumedDepthSigmaM = 0.02

// marginState is what runMargin gathers before it writes the replies.
type marginState struct {
	m           marginArgs
	env         calcEnv
	b           calcBody
	sex         mechanics.Sex
	in          mechanics.MarginInput
	res         mechanics.MarginResult
	across      *mechanics.AcrossSpeed // with `from`, or speed/angle without it
	postureText string
	notes       []string    // the full read-out's assumptions, with sources
	assumed     []string    // short names of what was assumed
	flags       []rangeNote // out-of-range values, one line each
	flight      flightAngle
	mc          *mechanics.MarginSpread // set when the reply's ± comes from the Monte Carlo run
	firstM      float64                 // the first-order ±, kept when mc replaces it
}

// marginDraws is the Monte Carlo run's size: 3 × 2000 margins, about 10 ms,
// good to about 2 % on the ± (1/√(2n)).
const marginDraws = 2000

// peakSpotNodes is the grid of the peak-spot moments: 40 × 40 closed
// forms, about 20 µs; the midpoint rule on this smooth integrand is good
// to a fraction of a per cent here (checked against a 300 × 300 grid in the
// tests).
const peakSpotNodes = 40

// peakSpot carries into the assumed ± what judging the c.m. at its peak
// hides when the take-off distance is not typed: the c.m. crosses the bar
// plane somewhere near its peak, lower by the parabola's fall over the
// gap, whose spread over the published take-off distances and speeds
// across the bar comes from mechanics.PeakSpotSpread.
func (st *marginState) peakSpot() {
	if st.m.hasD || st.res.VzMS <= 0 {
		return
	}
	mean, sd, err := mechanics.PeakSpotSpread(st.res.VzMS, st.env.gMS2, st.sex, peakSpotNodes)
	if err != nil || sd == 0 {
		return
	}
	c := mechanics.Contribution{Input: "spot", SigmaIn: sd, Sensitivity: 1, SigmaM: sd, Assumed: true}
	cs := append(st.res.Contributions, c)
	slices.SortStableFunc(cs, func(a, b mechanics.Contribution) int { return cmp.Compare(b.SigmaM, a.SigmaM) })
	st.res.Contributions = cs
	st.res.SigmaAssumedM = math.Hypot(st.res.SigmaAssumedM, sd)
	st.res.SigmaM = math.Hypot(st.res.SigmaTypedM, st.res.SigmaAssumedM)
	st.assumed = append(st.assumed, "take-off spot")
	dR, _ := mechanics.RangeFor(mechanics.QTakeoffDist, st.sex, mechanics.Elite)
	vR, _ := mechanics.RangeFor(mechanics.QAcrossSpeed, st.sex, mechanics.Elite)
	imp := st.env.imp
	st.notes = append(st.notes, fmt.Sprintf("for take-offs %s out with the speed across the bar that puts the peak near the bar plane, g·D/vz with the spread of the %s row, the c.m. crosses the bar plane on average %s below its peak, ± %s; that ± is in the assumed part (add from D to judge it at the bar plane)",
		formatSpan(dR), formatSpan(vR), units.SmallAbs(mean, imp), units.SmallAbs(sd, imp)))
}

// curved is the cheap test before the Monte Carlo run: the second-order
// term of the c.m. height at the bar plane, −g·Δt²/2 with Δt the spread
// of t = D/vx (σt² = t²((σD/D)² + (σvx/vx)²)), has a standard deviation
// g·σt²/√2 for a normal Δt; when adding it in quadrature changes the
// first-order ± by less than 2 %, the first order is kept without drawing.
func (st *marginState) curved() bool {
	in, res := st.in, st.res
	t := res.TimeToBarS
	sigVx := math.Hypot(math.Max(in.Sigma.VxMS, 0), in.Assumed.VxMS)
	sigD := math.Max(in.Sigma.DM, in.Assumed.DM)
	sigT2 := t * t * (math.Pow(sigD/in.DM, 2) + math.Pow(sigVx/in.VxMS, 2))
	curv := res.GMS2 * sigT2 / math.Sqrt2
	return math.Hypot(res.SigmaM, curv) > 1.02*res.SigmaM
}

// nonLinear replaces the first-order ± by a Monte Carlo one where they
// differ by more than 5 % (at the bar plane near the peak, where the
// margin curves in the take-off distance and the speed across the bar).
func (st *marginState) nonLinear() {
	if !st.res.AtBarPlane || !st.curved() {
		return
	}
	mc, err := mechanics.MarginMonteCarlo(st.in, marginDraws, 1)
	if err != nil || math.Abs(mc.SigmaM-st.res.SigmaM) <= 0.05*st.res.SigmaM {
		return
	}
	st.mc, st.firstM = &mc, st.res.SigmaM
	st.res.SigmaM, st.res.SigmaTypedM, st.res.SigmaAssumedM = mc.SigmaM, mc.SigmaTypedM, mc.SigmaAssumedM
	st.notes = append(st.notes, fmt.Sprintf("± from %d Monte Carlo draws: near the peak the margin curves in the take-off distance and the speed across the bar, so the first-order ± (%s) falls short; the draws' mean margin is %s",
		marginDraws, units.SmallAbs(st.firstM, st.env.imp), units.Small(mc.MeanM, st.env.imp)))
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
	st := &marginState{m: m, env: env, b: b, sex: b.segmentBody().Sex}
	st.notes = append(st.notes, b.notes...)
	st.b.notes = nil
	if err := st.takeoff(att, hasAtt); err != nil {
		return Reply{}, err
	}
	if err := st.posture(); err != nil {
		return Reply{}, err
	}
	if err := st.checkReach(); err != nil {
		return Reply{}, err
	}
	if st.res, err = mechanics.Margin(st.in); err != nil {
		return Reply{}, calcErr(err, ex)
	}
	st.peakSpot()
	st.nonLinear()
	st.flagOutputs()
	full, change, err := st.fullReply()
	if err != nil {
		return Reply{}, err
	}
	return st.shortReply(change).reply(full), nil
}

// takeoff fills h0, vz or peak, and the speed across the bar, with their
// ± (typed or assumed) and the range flags of the typed values.
func (st *marginState) takeoff(att record.Attempt, hasAtt bool) error {
	const ex = exampleMargin
	m, b, env, imp := st.m, st.b, st.env, st.env.imp
	st.in = mechanics.MarginInput{BarM: m.barM, GMS2: env.gMS2, StatureM: b.statureM, Sigma: mechanics.DefaultUncertainty()}
	h0 := m.h0M
	h0R, _ := mechanics.RangeFor(mechanics.QH0Fraction, st.sex, mechanics.Elite)
	if !m.hasH0 {
		h0 = mechanics.TakeoffHeightFraction * b.statureM
		st.in.Assumed.H0M = h0R.Sigma() * b.statureM
		st.assumed = append(st.assumed, "h0")
		st.notes = append(st.notes, fmt.Sprintf("take-off c.m. height assumed %s = %.2f × stature, ± %s from the published %s (%s); add h0 to set it",
			units.Length(h0, imp), mechanics.TakeoffHeightFraction, units.SmallAbs(st.in.Assumed.H0M, imp), formatSpan(h0R), h0R.Source))
	} else if h0 > b.statureM {
		return usageErr(ex, "h0 %s is above the athlete's height %s; h0 is the c.m. height at take-off, about 0.70 × stature", units.Length(h0, imp), units.Length(b.statureM, imp))
	} else {
		st.flag(mechanics.QH0Fraction, h0/b.statureM)
	}
	st.in.H0M = h0
	f, err := reconcilePeakVz(m, h0, att, hasAtt, env)
	if err != nil {
		return err
	}
	if f.note != "" {
		st.notes = append(st.notes, f.note)
	}
	st.in.VzMS, st.in.PeakM = f.vzMS, f.peakM
	vz := st.vzUsed()
	if vz > 0 {
		st.flag(mechanics.QVz, vz)
	}
	if m.hasD {
		st.flag(mechanics.QTakeoffDist, m.dM)
	}
	st.flagTypedDirection()
	if m.hasD || m.hasVx || m.o.has("angle") || m.o.has("across") {
		ai := mechanics.AcrossInput{SpeedMS: m.vxMS, DM: m.dM, VzMS: vz, GMS2: env.gMS2, Sex: st.sex}
		ai.AngleDeg, _ = m.o.num("angle")
		ai.AcrossMS, _ = m.o.num("across")
		if !m.hasD && ai.SpeedMS == 0 && ai.AngleDeg == 0 && ai.AcrossMS == 0 {
			return usageErr("margin 1.80 v 4.3 height 1.78 from 1.0", "a speed across the bar needs the take-off distance too: add from D")
		}
		ac, err := mechanics.ResolveAcross(ai)
		if err != nil {
			return calcErr(err, "margin 1.80 v 4.3 height 1.78 from 1.0 speed 4.0 angle 37")
		}
		st.across = &ac
		st.notes = append(st.notes, marginAcrossNote(ac))
		if ac.Assumed() {
			st.assumed = append(st.assumed, "speed across the bar "+calcSpeed(ac.MS))
		}
	}
	if m.hasD {
		st.in.DM, st.in.VxMS = m.dM, st.across.MS
		st.in.Sigma.VxMS, st.in.Assumed.VxMS = st.across.SigmaTypedMS, st.across.SigmaAssumedMS
		if st.in.Sigma.VxMS == 0 && st.in.Assumed.VxMS == 0 {
			st.in.Sigma.VxMS = mechanics.TypedSpeedSigmaMS
		}
	} else {
		st.notes = append(st.notes, "c.m. judged at its peak, which published flop take-offs put close to the bar plane (Dapena 1980); add from D to judge it where it crosses the bar plane")
	}
	st.flight = marginFlightAngle(vz, st.across, m, st.sex)
	if st.flight.deg > 0 {
		st.flag(mechanics.QFlightAngle, st.flight.deg)
	}
	return nil
}

// vzUsed is the vz typed, logged or derived from a measured peak, m/s.
func (st *marginState) vzUsed() float64 {
	if st.in.VzMS > 0 {
		return st.in.VzMS
	}
	if st.in.PeakM > st.in.H0M {
		return math.Sqrt(2 * st.env.gMS2 * (st.in.PeakM - st.in.H0M))
	}
	return 0
}

// flagTypedDirection flags a typed speed, angle or speed across the bar
// outside the published ranges.
func (st *marginState) flagTypedDirection() {
	if st.m.hasVx {
		st.flag(mechanics.QHorizSpeed, st.m.vxMS)
	}
	if a, ok := st.m.o.num("angle"); ok {
		st.flag(mechanics.QAngleToBar, a)
	}
	if v, ok := st.m.o.num("across"); ok {
		st.flag(mechanics.QAcrossSpeed, v)
	}
}

// flag adds the one-line flag of a value outside its published range.
func (st *marginState) flag(q mechanics.Quantity, v float64) {
	if f, bad := mechanics.CheckRange(q, v, st.sex); bad {
		st.flags = append(st.flags, rangeNoteOf(f))
	}
}

// flagOutputs flags a result above the world record: the bar the c.m.
// would clear (bar + margin) or the c.m. peak less a typical layout's need.
func (st *marginState) flagOutputs() {
	if !st.res.Clears {
		return
	}
	if n, bad := worldRecordFlag(st.m.barM+st.res.MarginM, st.sex, "the c.m. would clear"); bad {
		st.flags = append(st.flags, n)
	}
}

// posture fills what the posture needs (arc or segment model).
func (st *marginState) posture() error {
	const ex = exampleMargin
	m, imp := st.m, st.env.imp
	switch m.model {
	case "segments":
		table, tname, tnotes, err := pickSegmentTable(m.o.words["table"], st.b.sex, calcAthleteName(st.env), ex)
		if err != nil {
			return err
		}
		st.notes = append(st.notes, tnotes...)
		p := mechanics.FlopLayout()
		if m.hasArch {
			p.TrunkArchDeg = m.archDeg
		}
		res, err := mechanics.BodyCOM(st.b.segmentBody(), p, table)
		if err != nil {
			return calcErr(err, ex)
		}
		st.in.DropGiven, st.in.DropM, st.in.DepthM = true, res.DropM, res.UndersideDepthM
		if st.b.depthM > 0 {
			st.in.DepthM = st.b.depthM
		}
		st.postureText = fmt.Sprintf("segments, trunk arch %s°", fmtDeg(p.TrunkArchDeg))
		st.notes = append(st.notes, fmt.Sprintf("segment model: back-layout posture (head back %s°, trunk arch %s°, hips %s°, knees %s°), %s table", fmtDeg(-p.NeckFlexDeg), fmtDeg(p.TrunkArchDeg), fmtDeg(p.HipExtDeg), fmtDeg(p.KneeFlexDeg), tname))
	default:
		arch := m.archDeg
		if !m.hasArch {
			arch = defaultArchDeg
			archR, _ := mechanics.RangeFor(mechanics.QArch, mechanics.SexUnknown, mechanics.Elite)
			st.in.Assumed.ArchDeg = archR.Sigma()
			st.assumed = append(st.assumed, "arch")
			st.notes = append(st.notes, fmt.Sprintf("arch assumed %s° ± %s°, the spread of %s (%s); add arch DEG to set it", fmtDeg(arch), fmtDeg(archR.Sigma()), formatSpan(archR), archR.Source))
		}
		st.in.ArchDeg, st.in.LengthM = arch, st.b.statureM
		d, err := st.b.arcDepth(imp)
		if err != nil {
			return calcErr(err, ex)
		}
		if st.b.depthM == 0 {
			st.in.Assumed.DepthM = assumedDepthSigmaM
			st.assumed = append(st.assumed, "depth")
		}
		st.in.DepthM = d
		st.postureText = fmt.Sprintf("arc %s°", fmtDeg(arch))
		st.notes = append(st.notes, "arc model: body length along the arc = stature")
	}
	st.notes = append(st.notes, st.b.notes...)
	return nil
}

// checkReach refuses a take-off whose c.m. is back at take-off height (2vz/g)
// before it reaches the bar plane.
func (st *marginState) checkReach() error {
	if !st.m.hasD {
		return nil
	}
	vz, vx := st.vzUsed(), st.in.VxMS
	if tBar, tBack := st.m.dM/vx, 2*vz/st.env.gMS2; vz > 0 && tBar > tBack {
		return usageErr("margin 1.80 v 4.3 height 1.78 from 1.0 speed 3.5", "from %s at %s across the bar the c.m. would take %.2f s to reach the bar plane, but it is back at take-off height after %.2f s; check from and speed",
			units.Length(st.m.dM, st.env.imp), calcSpeed(vx), tBar, tBack)
	}
	return nil
}

// flightAngle is the c.m. path's angle above the horizontal at take-off,
// atan(vz/vx) with vx the whole horizontal speed, and which vx it used.
type flightAngle struct {
	deg, vxMS float64
	how       string // "typed", "assumed", "from the speed across the bar"
}

// marginFlightAngle picks the horizontal speed for the flight angle: the
// typed or resolved whole speed, else the middle of the published range.
func marginFlightAngle(vz float64, ac *mechanics.AcrossSpeed, m marginArgs, sex mechanics.Sex) flightAngle {
	if vz <= 0 {
		return flightAngle{}
	}
	fa := flightAngle{how: "assumed"}
	spd, _ := mechanics.RangeFor(mechanics.QHorizSpeed, sex, mechanics.Elite)
	switch {
	case m.hasVx:
		fa.vxMS, fa.how = m.vxMS, "typed"
	case ac != nil && ac.Source == mechanics.AcrossTyped:
		fa.vxMS = math.Max(ac.MS, spd.Mid())
	case ac != nil && ac.SpeedMS > 0:
		fa.vxMS = ac.SpeedMS
	default:
		fa.vxMS = spd.Mid()
	}
	d, err := mechanics.FlightAngleDeg(vz, fa.vxMS)
	if err != nil {
		return flightAngle{}
	}
	fa.deg = d
	return fa
}

// worldRecordFlag flags a height above the world record of the athlete's
// sex (mechanics.WorldRecordM: 2.45 m men, 2.10 m women, from memory; the
// men's when the sex is not known), from the range table's "height
// cleared" rows.
func worldRecordFlag(heightM float64, sex mechanics.Sex, what string) (rangeNote, bool) {
	r, ok := mechanics.RangeFor(mechanics.QClearHeight, sex, mechanics.Elite)
	if !ok || heightM <= r.Hi {
		return rangeNote{}, false
	}
	who := "men's"
	if sex == mechanics.Female {
		who = "women's"
	}
	return rangeNote{
		full:  fmt.Sprintf("%s %.2f m, above the %s world record %.2f m (from memory): check the numbers", what, heightM, who, r.Hi),
		short: fmt.Sprintf("clears %.2f m, above the %.2f m world record", heightM, r.Hi),
	}, true
}

// rangeNote is a flag in two lengths: the full line (mechanics.RangeFlag's
// wording) and a short one for the phone reply.
type rangeNote struct{ full, short string }

// rangeNoteOf words a range flag both ways: "vz 6.50 m/s is far above the
// 4.3–4.7 m/s measured in elite men: check the number" and "vz 6.50 m/s far
// above 4.3–4.7 m/s".
func rangeNoteOf(f mechanics.RangeFlag) rangeNote {
	dir := "below"
	if f.Above {
		dir = "above"
	}
	if strings.Contains(f.Line, " far ") {
		dir = "far " + dir
	}
	v := fmt.Sprintf("%.2f %s", f.Value, f.Range.Unit)
	switch f.Range.Unit {
	case "°":
		v = fmt.Sprintf("%.0f°", f.Value)
		if r := math.Round(f.Value); r == f.Range.Lo || r == f.Range.Hi {
			v = fmt.Sprintf("%.1f°", f.Value) // 34.6°, not "35° below 35–55°"
		}
	case "":
		v = fmt.Sprintf("%.2f", f.Value)
	}
	return rangeNote{full: f.Line, short: fmt.Sprintf("%s %s %s %s", f.Quantity, v, dir, formatSpan(f.Range))}
}

// checkLine joins flags into one short line: "Check: vz 6.50 m/s far above
// 4.3–4.7 m/s; …", "" without flags.
func checkLine(ns []rangeNote) string {
	if len(ns) == 0 {
		return ""
	}
	var ss []string
	for _, n := range ns {
		ss = append(ss, n.short)
	}
	return "Check: " + strings.Join(ss, "; ")
}

// fullFlags returns the full lines of the flags.
func fullFlags(ns []rangeNote) []string {
	var ss []string
	for _, n := range ns {
		ss = append(ss, n.full)
	}
	return ss
}

// formatSpan prints a range row as "0.66–0.74 of stature", "4.3–4.7 m/s".
func formatSpan(r mechanics.PublishedRange) string {
	lo, hi := calcNum(r.Lo), calcNum(r.Hi)
	switch r.Unit {
	case "°":
		return lo + "–" + hi + "°"
	case "":
		return lo + "–" + hi + " of stature"
	}
	return lo + "–" + hi + " " + r.Unit
}

// fmtDeg prints an angle rounded to the degree: "37", never
// "29.999999999999996".
func fmtDeg(v float64) string { return fmt.Sprintf("%.0f", v) }
