package bot

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// Examples shown with the quick calculations; each works as typed.
const (
	exampleMargin = "margin 1.80 v 4.3 h0 1.22 height 1.78"
	exampleFlight = "flight v 4.4 h0 1.25"
	exampleJump   = "flight time 0.60"
	exampleCOM    = "com arch 90 height 1.80"
)

// Defaults of the quick calculations.
const (
	// defaultArchDeg is the arc model's body arch when none is given.
	defaultArchDeg = 90.0
	// defaultVxMS is the horizontal c.m. speed assumed at the end of the
	// take-off when a take-off distance is given without it: the middle of
	// the 3.5-4.5 m/s reported for elite flop jumpers (from memory, Dapena).
	defaultVxMS = 4.0
	// matTopM is the landing-mat top used for the flight time: the rules'
	// minimum landing-area height (World Athletics Technical Rules, 0.7 m).
	matTopM = 0.70
	// peakAgreeM is how far a given peak may sit from the peak computed from
	// vz and h0 before the two are refused as contradictory.
	peakAgreeM = 0.03
	// attemptLookback is how far back margin looks for a logged attempt
	// with a measured peak or vz.
	attemptLookback = 8 * 7 * 24 * time.Hour
	// minJumpTestS and maxJumpTestS bound a jump-test flight time: 0.05 s
	// is a 3 mm jump, 1.2 s a 1.77 m one; outside is a typing slip.
	minJumpTestS = 0.05
	maxJumpTestS = 1.2
)

// Plausibility limits of typed values; outside them the value is almost
// certainly a typo or a unit slip and is refused with the range. They match
// the profile limits so a calculation accepts every stored athlete.
const (
	calcMinBarM     = 0.50 // below any high-jump stand in use (common practice)
	calcMaxBarM     = 2.60 // above the men's world record of 2.45 m (from memory)
	calcMinStatureM = 1.20
	calcMaxStatureM = 2.30
	calcMinDepthM   = 0.05 // body depth, midline to underside
	calcMaxDepthM   = 0.25
)

// calcCaution is shown under a calculation that suggests a change.
const calcCaution = "Estimates from a simplified model; the coach decides. Try a take-off change in practice, not in the middle of a competition."

// calcCommands are the quick calculations: margin, flight, jump test, com.
func calcCommands() []command {
	return []command{
		{name: "margin", aliases: []string{"clearance"}, topic: "calc", access: anyone, details: true,
			usage:   "margin BAR [for ATHLETE] [v VZ] [h0 H] [peak P] [arch DEG] [height STATURE] [depth D] [from D] [across VX | speed V angle A] [model arc|segments] [sex m|f] [table deleva|dempster] [more]",
			example: exampleMargin,
			summary: "does the bar go? c.m. peak, height needed, margin ± and Hay's H1/H2/H3; profile fills in the rest",
			run:     runMargin},
		{name: "flight", topic: "calc", access: anyone, details: true,
			usage:   "flight v VZ | up T [h0 H] [across VX | speed V angle A] [mat H] [sex m|f] | flight time T (T in s, or N frames at F fps)",
			example: exampleFlight,
			summary: "c.m. flight: rise, peak, flight angle, times; vz from the time up (vz = g·T, frames from video); or jump-test height from a flight time",
			run:     runFlight},
		{name: "jump test", aliases: []string{"jumptest"}, topic: "calc", access: anyone, details: true,
			usage:   "jump test T (s, or N frames at F fps)",
			example: "jump test 0.60",
			summary: "jump-test height from flight time (h = g t²/8)",
			run:     runJumpTestCmd},
		{name: "com", aliases: []string{"centre of mass", "center of mass"}, topic: "calc", access: anyone, details: true,
			usage:   "com [for ATHLETE] [arch DEG] [height STATURE] [depth D] [posture " + strings.Join(mechanics.PostureNames(), "|") + "] [model arc|segments|both] [sex m|f] [table deleva|dempster]",
			example: exampleCOM,
			summary: "where the c.m. lies below the apex of the arched body and below the bar contact",
			run:     runCOM},
		crossingCommand(),
	}
}

// calcEnv is what a calculation knows beyond the typed words: the team's
// settings, the gravity in force and, with `for`, the athlete.
type calcEnv struct {
	team    record.Team
	imp     bool
	gMS2    float64
	local   bool            // gMS2 is the venue's normal gravity
	athlete *record.Athlete // nil without `for`
	loc     *time.Location  // the team's time zone, for dates
}

// loadCalc reads the team and, when forName is set, the athlete, checking
// the speaker may read that profile. extra, if not nil, runs in the same
// read transaction once the athlete is known.
func (c *call) loadCalc(forName string, extra func(tx Tx, env *calcEnv) error) (calcEnv, error) {
	var env calcEnv
	err := c.view(func(tx Tx) error {
		var err error
		if env.team, err = tx.Team(); err != nil {
			return err
		}
		if forName != "" {
			a, err := c.athleteFor(tx, forName)
			if err != nil {
				return err
			}
			env.athlete = &a
		}
		if extra != nil {
			return extra(tx, &env)
		}
		return nil
	})
	if err != nil {
		return env, err
	}
	env.imp = imperial(env.team)
	env.gMS2 = mechanics.StandardGravity
	if env.team.HasLocation {
		g, err := mechanics.NormalGravity(env.team.LatDeg, env.team.AltM)
		if err != nil {
			return env, usageErr("team location lat 40.4 alt 650", "the team venue cannot give a gravity (%v); a head coach can fix it with team location", err)
		}
		env.gMS2, env.local = g, true
	}
	env.loc = time.UTC
	if env.team.TZ != "" {
		if l, err := time.LoadLocation(env.team.TZ); err == nil {
			env.loc = l
		}
	}
	return env, nil
}

// private reports whether the reply shows a private athlete's numbers.
func (env calcEnv) private() bool { return env.athlete != nil && env.athlete.Private }

// who names the athlete for titles: " for Mira", or "".
func (env calcEnv) who() string {
	if env.athlete == nil {
		return ""
	}
	return " for " + env.athlete.Name
}

// gravityField shows the gravity used. With a venue set and vz known, it
// adds how much the local gravity changes the rise against standard gravity
// (mechanics.RiseChange: vz²/2·(1/g_local − 1/g_standard)).
func (env calcEnv) gravityField(vzMS float64) (Field, error) {
	if !env.local {
		return Field{"Gravity", "9.80665 m/s² (standard)"}, nil
	}
	v := fmt.Sprintf("%.4f m/s² at the venue (latitude %.2f°, altitude %s)", env.gMS2, env.team.LatDeg, altitudeText(env.team.AltM, env.imp))
	if vzMS > 0 {
		d, err := mechanics.RiseChange(vzMS, mechanics.StandardGravity, env.gMS2)
		if err != nil {
			return Field{}, err
		}
		more := "more"
		if d < 0 {
			more = "less"
		}
		v += fmt.Sprintf("; this take-off rises %s %s than at standard gravity", calcTiny(math.Abs(d), env.imp), more)
	}
	return Field{"Gravity", v}, nil
}

// gravityAssumption is the assumption line about gravity.
func (env calcEnv) gravityAssumption() string {
	if env.local {
		return "local gravity from the team venue, WGS84 normal gravity (`team location off` returns to standard gravity)"
	}
	return "standard gravity 9.80665 m/s², no venue set (a head coach sets one with team location lat DEG alt M)"
}

// calcBody is the athlete's build as a calculation uses it, with notes on where
// each value came from.
type calcBody struct {
	statureM float64
	massKG   float64
	sex      record.Sex
	depthM   float64 // d given or from the profile; 0 = model default
	notes    []string
}

// resolveCalcBody fills stature, sex, mass and depth from what was typed and
// from the profile. A calculation needs the stature; without it the reply
// says how to give it.
func resolveCalcBody(o options, env calcEnv, example string) (calcBody, error) {
	var b calcBody
	a := env.athlete
	if v, ok := o.num("height"); ok {
		if v < calcMinStatureM || v > calcMaxStatureM {
			return b, usageErr(example, "height %s is outside %.2f–%.2f m; give the athlete's stature in metres (1.78), centimetres (178cm) or feet-inches (5-10)", fmtM(v), calcMinStatureM, calcMaxStatureM)
		}
		b.statureM = v
	} else if a != nil && a.StatureM > 0 {
		b.statureM = a.StatureM
		b.notes = append(b.notes, fmt.Sprintf("height %s from %s's profile (height H overrides it)", units.Length(a.StatureM, env.imp), a.Name))
	} else if a != nil {
		return b, usageErr("athlete set "+a.Name+" height 1.78", "%s's profile has no height; set it, or add height 1.78", a.Name)
	} else {
		return b, usageErr(example, "I need the athlete's height (stature): add height 1.78, or name a profile with for NAME")
	}
	if w, ok := o.word("sex"); ok {
		switch strings.ToLower(w) {
		case "m", "male", "man", "boy":
			b.sex = record.SexMale
		case "f", "female", "woman", "girl", "w":
			b.sex = record.SexFemale
		default:
			return b, usageErr(example+" sex f", "sex %q: use m or f (it picks the body-segment table)", w)
		}
	} else if a != nil {
		b.sex = a.Sex
	}
	if a != nil {
		b.massKG = a.MassKg
	}
	if v, ok := o.num("depth"); ok {
		if v < calcMinDepthM || v > calcMaxDepthM {
			return b, usageErr(example+" depth 11cm", "depth %s is outside %.0f–%.0f cm; it is the body's depth from the midline to its underside at the apex", fmtM(v), calcMinDepthM*100, calcMaxDepthM*100)
		}
		b.depthM = v
	} else if a != nil && a.BodyDepthM > 0 {
		b.depthM = a.BodyDepthM
		b.notes = append(b.notes, fmt.Sprintf("body depth %s from %s's profile", units.SmallAbs(a.BodyDepthM, env.imp), a.Name))
	}
	return b, nil
}

// arcDepth returns d for the arc model: given, from the profile, or the
// model default (half a typical trunk depth), with a note for the default.
func (b *calcBody) arcDepth(imp bool) (float64, error) {
	if b.depthM > 0 {
		return b.depthM, nil
	}
	d, err := mechanics.DefaultUndersideDepth(b.statureM)
	if err != nil {
		return 0, err
	}
	b.notes = append(b.notes, fmt.Sprintf("body depth (midline to underside) assumed %s = half a typical trunk depth (add depth D to set it)", units.SmallAbs(d, imp)))
	return d, nil
}

// pickSegmentTable picks the body-segment table: by choice ("deleva",
// "dempster") or by sex, de Leva's male table when the sex is not known.
func pickSegmentTable(choice string, sex record.Sex, who string, example string) (mechanics.SegmentTable, string, []string, error) {
	var notes []string
	switch strings.ToLower(choice) {
	case "dempster", "winter", "dempster-winter":
		return mechanics.DempsterWinter(), "Dempster (1955, via Winter)", nil, nil
	case "", "deleva", "de-leva", "leva":
	default:
		return mechanics.SegmentTable{}, "", nil, usageErr(example+" table deleva", "table %q: use deleva (de Leva 1996, by sex) or dempster (Dempster via Winter)", choice)
	}
	ms, name := mechanics.Male, "male"
	switch sex {
	case record.SexFemale:
		ms, name = mechanics.Female, "female"
	case record.SexMale:
	default:
		hint := "add sex f for the female table"
		if who != "" {
			hint = "athlete set " + who + " sex f gives the female table"
		}
		notes = append(notes, "sex not known: used de Leva's male segment table ("+hint+")")
	}
	t, err := mechanics.DeLeva1996(ms)
	if err != nil {
		return t, "", nil, err
	}
	return t, "de Leva (1996) " + name, notes, nil
}

// segmentBody is the mechanics body for the segment model. A depth given or
// from the profile (midline to underside) sets the trunk depth to twice it.
func (b calcBody) segmentBody() mechanics.Body {
	mb := mechanics.Body{StatureM: b.statureM, MassKG: b.massKG}
	switch b.sex {
	case record.SexMale:
		mb.Sex = mechanics.Male
	case record.SexFemale:
		mb.Sex = mechanics.Female
	}
	if b.depthM > 0 {
		mb.Depths.TrunkM = 2 * b.depthM
	}
	if mb.MassKG != 0 && (mb.MassKG < 10 || mb.MassKG > 250) {
		mb.MassKG = 0
	}
	return mb
}

// parseCalcModel reads `model arc|segments|both`. def is the model when none is
// given; both is allowed only where allowBoth.
func parseCalcModel(o options, def string, allowBoth bool, example string) (string, error) {
	w, ok := o.word("model")
	if !ok {
		return def, nil
	}
	switch strings.ToLower(w) {
	case "arc", "arch", "bow":
		return "arc", nil
	case "segments", "segment", "seg", "segs", "body":
		return "segments", nil
	case "both", "all":
		if allowBoth {
			return "both", nil
		}
	}
	if allowBoth {
		return "", usageErr(example+" model both", "model %q: use arc, segments or both", w)
	}
	return "", usageErr(example+" model segments", "model %q: use arc or segments", w)
}

// checkTypedArch refuses an arch no body can take.
func checkTypedArch(o options, example string) (float64, bool, error) {
	v, ok := o.num("arch")
	if !ok {
		return 0, false, nil
	}
	if v < 0 || v > 180 || math.IsNaN(v) {
		return 0, false, usageErr(example, "arch %s° is not a body arch: give the bend of the body as 0 (straight) to 180 degrees, e.g. arch 90", calcNum(v))
	}
	return v, true, nil
}

// checkTypedVz refuses a vertical take-off speed no one can have, and the usual
// unit slip (cm/s, km/h).
func checkTypedVz(v float64, key, example string) error {
	if math.IsNaN(v) || v > mechanics.MaxVzMS {
		return usageErr(example, "%s m/s is not a take-off speed; vz is in m/s, e.g. %s 4.3", calcNum(v), key)
	}
	if v <= 0 {
		return usageErr(example, "vz %s m/s: the take-off speed is upward, so above 0; e.g. %s 4.3", calcNum(v), key)
	}
	return nil
}

// checkTypedVx refuses a horizontal speed beyond any take-off.
func checkTypedVx(v float64, key, example string) error {
	if math.IsNaN(v) || v > 10 {
		return usageErr(example, "%s m/s is not a horizontal take-off speed; %s is in m/s, e.g. %s 3.5", calcNum(v), key, key)
	}
	if v <= 0 {
		return usageErr(example, "%s %s m/s: give the horizontal speed towards the bar, above 0, e.g. %s 3.5", key, calcNum(v), key)
	}
	return nil
}

// calcFieldName names a mechanics input in the coach's words, with the keyword
// that sets it.
func calcFieldName(field string) string {
	switch field {
	case mechanics.FieldBar:
		return "the bar height"
	case mechanics.FieldH0, mechanics.FieldH1:
		return "the take-off c.m. height (h0)"
	case mechanics.FieldVz:
		return "the vertical take-off speed (v)"
	case mechanics.FieldVx:
		return "the horizontal speed (speed)"
	case mechanics.FieldPeak:
		return "the c.m. peak (peak)"
	case mechanics.FieldTakeoffDist:
		return "the take-off distance (from)"
	case mechanics.FieldGravity, mechanics.FieldLatitude, mechanics.FieldAltitude:
		return "the venue's gravity (team location)"
	case mechanics.FieldArch:
		return "the arch (arch)"
	case mechanics.FieldLength, mechanics.FieldStature:
		return "the athlete's height (height)"
	case mechanics.FieldMass:
		return "the profile's mass"
	case mechanics.FieldDepth:
		return "the body depth (depth)"
	case mechanics.FieldDrop:
		return "the c.m. drop below the apex"
	case mechanics.FieldFlightTime, mechanics.FieldTime:
		return "the flight time (time)"
	case mechanics.FieldLanding:
		return "the landing height (mat)"
	case mechanics.FieldSex:
		return "the sex (sex)"
	case mechanics.FieldPosture, mechanics.FieldJoint:
		return "the posture (posture)"
	case mechanics.FieldH2:
		return "the rise in flight (H2)"
	case mechanics.FieldAngle:
		return "the angle to the bar (angle)"
	case mechanics.FieldFrames:
		return "the frame count (N frames at F fps)"
	case mechanics.FieldFPS:
		return "the frame rate (N frames at F fps)"
	case mechanics.FieldKick:
		return "the leg-lift time (kick)"
	case mechanics.FieldH3:
		return "the peak above the bar (H3)"
	default:
		return "the input " + field
	}
}

// calcErr turns a mechanics input error into a refusal naming the input in
// the coach's words; anything else is the bot's own failure, wrapped.
func calcErr(err error, example string) error {
	var ie *mechanics.InputError
	if errors.As(err, &ie) {
		return usageErr(example, "%s cannot be used: %s", calcFieldName(ie.Field), ie.Reason)
	}
	return fmt.Errorf("calculation: %w", err)
}

// calcNum prints a typed number back as briefly as possible: 430, 4.3.
func calcNum(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// calcSpeed formats m/s, the unit coaches use in every system.
func calcSpeed(v float64) string { return fmt.Sprintf("%.2f m/s", v) }

// calcFine formats a kinematic length to the millimetre: "0.987 m", or inches
// to a tenth in imperial.
func calcFine(m float64, imp bool) string {
	if imp {
		return fmt.Sprintf("%.1f in", m/units.MetresPerInch)
	}
	return fmt.Sprintf("%.3f m", m)
}

// calcTiny formats millimetre-sized lengths: "4.1 mm" or "0.16 in".
func calcTiny(m float64, imp bool) string {
	if imp {
		return fmt.Sprintf("%.2f in", m/units.MetresPerInch)
	}
	return fmt.Sprintf("%.1f mm", m*1000)
}

// calcSigned formats a length that may be negative: "-0.05 m", "-0-2".
func calcSigned(m float64, imp bool) string {
	if m < 0 {
		return "-" + units.Length(-m, imp)
	}
	return units.Length(m, imp)
}

// calcSmall is units.SmallAbs for a non-negative small length and
// units.Small (with its minus sign) for a negative one.
func calcSmall(m float64, imp bool) string {
	if m < 0 {
		return units.Small(m, imp)
	}
	return units.SmallAbs(m, imp)
}

// calcShift formats a horizontal distance: centimetres (or inches) below a
// metre, the length format above.
func calcShift(m float64, imp bool) string {
	if math.Abs(m) >= 1 {
		return units.Length(math.Abs(m), imp)
	}
	return units.SmallAbs(m, imp)
}
