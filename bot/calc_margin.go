package bot

import (
	"fmt"
	"math"

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
	case "spot":
		return "where the peak falls"
	}
	return in
}

// marginSigmaIn formats an input's ± in its own unit.
func marginSigmaIn(c mechanics.Contribution, imp bool) string {
	switch c.Input {
	case "vz", "vx":
		return "±" + calcSpeed(c.SigmaIn)
	case "spot":
		return "(take-off distance and speed across the bar)"
	case "arch":
		return "±" + fmtDeg(c.SigmaIn) + "°"
	}
	return "±" + units.SmallAbs(c.SigmaIn, imp)
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

// marginFlight is the take-off's vertical motion as the margin uses it:
// a vz, or a measured peak (one of them non-zero), and a note saying
// where it came from.
type marginFlight struct {
	vzMS, peakM float64
	note        string
}

// reconcilePeakVz is the one place where the margin decides between a
// typed vz, a typed c.m. peak and the athlete's latest measured attempt:
// a typed vz and peak must agree within peakAgreeM (then vz is used), a
// typed value overrides the log, and without either the latest attempt
// with a measured vz (else peak) in 8 weeks is used.
func reconcilePeakVz(m marginArgs, h0M float64, att record.Attempt, hasAtt bool, env calcEnv) (marginFlight, error) {
	const ex = exampleMargin
	imp := env.imp
	f := marginFlight{vzMS: m.vzMS, peakM: m.peakM}
	switch {
	case m.hasVz && m.hasPeak:
		tk := mechanics.Takeoff{H0M: h0M, VzMS: f.vzMS, GMS2: env.gMS2}
		fromVz, err := tk.PeakHeight()
		if err != nil {
			return f, calcErr(err, ex)
		}
		if diff := math.Abs(fromVz - f.peakM); diff > peakAgreeM {
			return f, usageErr(ex, "peak %s and v %s disagree: vz %s from h0 %s gives a peak of %s, %s away. Give one of them (or the right h0)",
				units.Length(f.peakM, imp), calcNum(f.vzMS), calcSpeed(f.vzMS), units.Length(h0M, imp), units.Length(fromVz, imp), units.SmallAbs(diff, imp))
		}
		f.note = fmt.Sprintf("peak %s agrees with vz %s within %s, so vz was used", units.Length(f.peakM, imp), calcSpeed(f.vzMS), units.SmallAbs(peakAgreeM, imp))
		f.peakM = 0
	case m.hasVz, m.hasPeak:
	case hasAtt:
		when := att.Time.In(env.loc).Format("Mon 2 Jan")
		if att.VzMS > 0 {
			f.vzMS = att.VzMS
			f.note = fmt.Sprintf("vz %s from %s's attempt at %s on %s, the latest with a measured vz or peak in 8 weeks (v VZ overrides it)", calcSpeed(f.vzMS), env.athlete.Name, units.Length(att.BarM, imp), when)
		} else {
			f.peakM = att.PeakM
			f.note = fmt.Sprintf("peak %s from %s's attempt at %s on %s, the latest with a measured vz or peak in 8 weeks (v VZ or peak P overrides it)", units.Length(f.peakM, imp), env.athlete.Name, units.Length(att.BarM, imp), when)
		}
	case env.athlete != nil:
		return f, usageErr("margin "+units.Bar(m.barM, imp)+" for "+env.athlete.Name+" v 4.3", "%s has no logged attempt with a peak or vz in the last 8 weeks; give v VZ (take-off vertical speed, m/s) or peak P (c.m. peak)", env.athlete.Name)
	default:
		return f, usageErr(ex, "give v VZ (the vertical take-off speed, m/s) or peak P (the c.m. peak height)")
	}
	if f.peakM > 0 && f.peakM < h0M {
		return f, usageErr("margin 1.80 peak 2.02 h0 1.22 height 1.78", "peak %s is below the take-off c.m. height %s; the c.m. rises after take-off", units.Length(f.peakM, imp), units.Length(h0M, imp))
	}
	return f, nil
}
