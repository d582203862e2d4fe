package bot

import (
	"fmt"
	"math"
	"strings"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/passplot"
	"github.com/lathmark-team/lathmark/internal/units"
)

const exampleCrossing = "crossing 2.00 v 4.4 h0 1.25 height 1.86 from 1.1"

func crossingCommand() command {
	return command{name: "crossing", aliases: []string{"pass"}, topic: "calc", access: anyone, details: true,
		usage:   "crossing BAR [for ATHLETE] [v VZ] [h0 H] [height STATURE] [mass KG] [sex m|f] [from D] [across VX | speed V angle A] [arch DEG] [kick T (s, or N frames at F fps)] [spin DEG/S]",
		example: exampleCrossing,
		summary: "which body part passes lowest over the bar, by how much, and a picture of the pass",
		run:     runCrossing}
}

func crossingSpecs() []optionSpec {
	return []optionSpec{
		{Key: "for", Kind: kindWord},
		{Key: "v", Aliases: []string{"vz"}, Kind: kindSpeed},
		{Key: "h0", Aliases: []string{"h1"}, Kind: kindLength},
		{Key: "height", Aliases: []string{"stature", "ht"}, Kind: kindLength},
		{Key: "mass", Kind: kindMass},
		{Key: "sex", Kind: kindWord},
		{Key: "from", Aliases: []string{"dist", "distance", "takeoff"}, Kind: kindLength},
		{Key: "across", Kind: kindSpeed},
		{Key: "speed", Aliases: []string{"vx"}, Kind: kindSpeed},
		{Key: "angle", Kind: kindAngle},
		{Key: "arch", Kind: kindAngle},
		{Key: "kick", Kind: kindSeconds},
		{Key: "spin", Kind: kindNumber},
		{Key: "depth", Kind: kindLength},
		{Key: "table", Kind: kindWord},
	}
}

func runCrossing(c *call) (Reply, error) {
	const ex = exampleCrossing
	args, _, err := foldFrames(c.args, ex+" kick 130 frames at 240fps")
	if err != nil {
		return Reply{}, err
	}
	o, err := parseOptions(args, crossingSpecs(), ex)
	if err != nil {
		return Reply{}, err
	}
	var barM float64
	for _, t := range o.rest {
		v, err := units.ParseLength(t.Raw)
		if err != nil {
			return Reply{}, unknownWords([]token{t}, ex, "crossing takes a bar height, then v, h0, height, from, across, arch, kick, spin; name an athlete with for NAME")
		}
		if barM != 0 {
			return Reply{}, usageErr(ex, "two bar heights; give one")
		}
		barM = v
	}
	if barM == 0 {
		return Reply{}, usageErr(ex, "give the bar height first, e.g. crossing 2.00")
	}
	if barM < calcMinBarM || barM > calcMaxBarM {
		return Reply{}, usageErr(ex, "bar %s is outside %.2f–%.2f m", fmtM(barM), calcMinBarM, calcMaxBarM)
	}
	forName, _ := o.word("for")
	env, err := c.loadCalc(forName, nil)
	if err != nil {
		return Reply{}, err
	}
	b, err := resolveCalcBody(o, env, ex)
	if err != nil {
		return Reply{}, err
	}
	table, _, tnotes, err := pickSegmentTable(wordOr(o, "table"), b.sex, env.who(), ex)
	if err != nil {
		return Reply{}, err
	}
	vz, ok := o.num("v")
	if !ok {
		return Reply{}, usageErr(ex, "the crossing needs the take-off vz: add v 4.4")
	}
	if err := checkTypedVz(vz, "v", ex); err != nil {
		return Reply{}, err
	}
	d, ok := o.num("from")
	if !ok {
		return Reply{}, usageErr(ex, "the crossing needs the take-off distance to the bar plane: add from 1.1")
	}
	var assumed, shortAssumed []string
	h0, ok := o.num("h0")
	if !ok {
		shortAssumed = append(shortAssumed, "h0")
		h0 = mechanics.TakeoffHeightFraction * b.statureM
		assumed = append(assumed, fmt.Sprintf("h0 %s (0.70 × height)", units.Length(h0, env.imp)))
	}
	vx, acrossTyped := o.num("across")
	if !acrossTyped {
		if sp, hasSp := o.num("speed"); hasSp {
			a, hasA := o.num("angle")
			if !hasA {
				return Reply{}, usageErr(ex+" speed 4.0 angle 35", "speed needs the angle to the bar too (angle 35), or give across VX")
			}
			vx, acrossTyped = sp*math.Sin(a*math.Pi/180), true
		} else {
			vx = env.gMS2 * d / vz
			shortAssumed = append(shortAssumed, "speed across the bar")
			assumed = append(assumed, fmt.Sprintf("speed across the bar %s = g·D/vz (peak over the bar)", calcSpeed(vx)))
		}
	}
	if err := checkTypedVx(vx, "across", ex); err != nil {
		return Reply{}, err
	}
	in := mechanics.CrossingInput{Body: b.segmentBody(), Table: table, BarM: barM, H0M: h0, VzMS: vz, DM: d, VxAcrossMS: vx, GMS2: env.gMS2}
	if v, ok := o.num("arch"); ok {
		in.ArchDeg, in.ArchGiven = v, true
	}
	in.KickS, _ = o.num("kick")
	in.SpinDegS, _ = o.num("spin")
	r, err := mechanics.Crossing(in)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	lines := crossingLines(r, env.imp)
	flags := crossingFlags(in, acrossTyped)
	lines = append(lines, flags...)
	short := calcShort{verdict: crossingVerdict(r, env.imp) + " at " + units.Bar(barM, env.imp) + env.who()}
	if len(lines) > 1 {
		short.body = append(short.body, shortLine{lines[1], 3})
	}
	if len(flags) > 0 {
		short.body = append(short.body, shortLine{"Check: " + strings.Join(flags, "; "), 0})
	}
	if r.Touches {
		adv := crossingAdvice(in, r)
		lines = append(lines, adv)
		short.body = append(short.body, shortLine{adv + " The coach decides.", 1})
	}
	mr, err := mechanics.Margin(mechanics.MarginInput{BarM: barM, H0M: h0, VzMS: vz, DM: d, VxMS: vx, GMS2: env.gMS2,
		StatureM: b.statureM, ArchDeg: defaultArchDeg})
	if err == nil && mr.Clears && r.Touches {
		lines = append(lines, fmt.Sprintf("The c.m. margin says it clears (%s): it judges the c.m. against the body's depth at one point; the %s pass at another moment.", calcSigned(mr.MarginM, env.imp), r.Lowest().Part))
	}
	png, err := crossingPicture(in, r, env.imp)
	if err != nil {
		return Reply{}, fmt.Errorf("crossing picture: %w", err)
	}
	name := fmt.Sprintf("crossing-%.0fcm.png", barM*100)
	if fa := crossingFlightAngle(o, vz, vx, in.Body.Sex); fa != "" {
		lines = append(lines, fa)
		short.body = append(short.body, shortLine{strings.SplitN(fa, " = ", 2)[0], 4})
		if !o.has("speed") {
			shortAssumed = append(shortAssumed, "vx")
		}
	}
	lines = append(lines, "Picture: "+name)
	assumed = append(assumed, b.notes...)
	assumed = append(assumed, tnotes...)
	assumed = append(assumed, r.Assumptions...)
	full := Reply{Title: "Crossing " + units.Bar(barM, env.imp) + env.who(), Lines: lines,
		Assumptions: []string{strings.Join(assumed, "; ")},
		Caution:     "Something to try in practice; the coach decides.",
		Files:       []File{{Name: name, MIME: "image/png", Title: "Pass over " + units.Bar(barM, env.imp), Data: png}}}
	short.assumed = shortAssumed
	return short.reply(full), nil
}

// crossingVerdict is the first line: the lowest part and its clearance.
func crossingVerdict(r mechanics.CrossingResult, imp bool) string {
	low := r.Lowest()
	if low.Touches {
		return fmt.Sprintf("Knocks: the %s touch, %s below", low.Part, shortCM(low.ClearanceM, imp))
	}
	return fmt.Sprintf("Clears: the %s lowest, by %s", low.Part, shortCM(low.ClearanceM, imp))
}

func wordOr(o options, key string) string { w, _ := o.word(key); return w }

// crossingClear words a clearance: "clear by 11 cm" or "2 cm below".
func crossingClear(m float64, imp bool) string {
	if m < 0 {
		return units.SmallAbs(-m, imp) + " below"
	}
	return "clear by " + units.SmallAbs(m, imp)
}

func crossingLines(r mechanics.CrossingResult, imp bool) []string {
	low := r.Lowest()
	first := fmt.Sprintf("Lowest over the bar: the %s, %s", low.Part, crossingClear(low.ClearanceM, imp))
	if low.Touches {
		first += ": they would touch."
	} else {
		first += "."
	}
	var next []string
	for _, p := range r.Parts[1:min(3, len(r.Parts))] {
		if p.Passed {
			next = append(next, fmt.Sprintf("%s %s", p.Part, crossingClear(p.ClearanceM, imp)))
		}
	}
	out := []string{first}
	if len(next) > 0 {
		s := strings.Join(next, ", ") + "."
		out = append(out, strings.ToUpper(s[:1])+s[1:])
	}
	return out
}

func crossingAdvice(in mechanics.CrossingInput, r mechanics.CrossingResult) string {
	if a, err := mechanics.SuggestKick(in); err == nil && a.Found {
		when := "earlier"
		if a.ShiftS > 0 {
			when = "later"
		}
		return fmt.Sprintf("Lift the legs about %.2f s %s to clear.", math.Abs(a.ShiftS), when)
	}
	if v, ok, err := mechanics.VzToClear(in); err == nil && ok {
		return fmt.Sprintf("No leg-lift timing clears; it would take a take-off vz of about %s.", calcSpeed(v))
	}
	return "No leg-lift timing clears, and no take-off vz up to 7 m/s would: this bar is out of reach for these numbers."
}

func crossingPicture(in mechanics.CrossingInput, r mechanics.CrossingResult, imp bool) ([]byte, error) {
	var strobe, path []float64
	for i := range 7 {
		strobe = append(strobe, r.TimeAtBarS*0.4+float64(i)*(r.TimeAtBarS*0.9)/6)
	}
	for t := 0.0; t <= math.Min(r.EndS, r.TimeAtBarS*2); t += 0.02 {
		path = append(path, t)
	}
	poses, err := mechanics.CrossingPoses(in, strobe)
	if err != nil {
		return nil, err
	}
	pp, err := mechanics.CrossingPoses(in, path)
	if err != nil {
		return nil, err
	}
	var pts []mechanics.Point
	for _, p := range pp {
		pts = append(pts, p.COM)
	}
	return passplot.PNG(passplot.Pass{Title: "Pass over " + units.Bar(in.BarM, imp), BarM: in.BarM, DM: in.DM,
		Path: pts, Poses: poses, Lowest: r.LowestPoint, Imperial: imp}, 800, 600)
}

// crossingFlightAngle words the flight angle atan(vz/vx) with vx the whole
// horizontal speed: typed, else the middle of the published range (an
// upper bound with only the speed across the bar typed).
func crossingFlightAngle(o options, vz, acrossMS float64, sex mechanics.Sex) string {
	spd, _ := mechanics.RangeFor(mechanics.QHorizSpeed, sex, mechanics.Elite)
	vx, how := spd.Mid(), fmt.Sprintf("vx %s assumed, the middle of the published %s", calcSpeed(spd.Mid()), formatSpan(spd))
	if v, ok := o.num("speed"); ok {
		vx, how = v, fmt.Sprintf("vx %s typed", calcSpeed(v))
	} else if _, ok := o.num("across"); ok && acrossMS > vx {
		vx, how = acrossMS, "at most: only the speed across the bar is known"
	}
	d, err := mechanics.FlightAngleDeg(vz, vx)
	if err != nil {
		return ""
	}
	line := fmt.Sprintf("Flight angle %s° = atan(vz/vx), %s.", fmtDeg(d), how)
	if f, bad := mechanics.CheckRange(mechanics.QFlightAngle, d, sex); bad {
		line += " " + capitalise(f.Line) + "."
	}
	return line
}
