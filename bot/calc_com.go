package bot

import (
	"fmt"
	"math"
	"strings"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/units"
)

// comSpecs are the keywords of `com`.
var comSpecs = []optionSpec{
	{Key: "for", Kind: kindWord},
	{Key: "arch", Kind: kindAngle},
	{Key: "height", Aliases: []string{"stature", "ht"}, Kind: kindLength},
	{Key: "depth", Kind: kindLength},
	{Key: "posture", Aliases: []string{"pose"}, Kind: kindWord},
	{Key: "model", Kind: kindWord},
	{Key: "sex", Kind: kindWord},
	{Key: "table", Kind: kindWord},
}

// comArc is the arc model's answer in the numbers `com` shows.
type comArc struct {
	arc    mechanics.Arc
	depthM float64
}

func runCOM(c *call) (Reply, error) {
	const ex = exampleCOM
	o, err := parseOptions(c.args, comSpecs, ex)
	if err != nil {
		return Reply{}, err
	}
	if len(o.rest) > 0 {
		return Reply{}, unknownWords(o.rest, ex, "com takes arch, height, depth, posture, model, sex, table; name an athlete with for NAME")
	}
	arch, hasArch, err := checkTypedArch(o, ex)
	if err != nil {
		return Reply{}, err
	}
	def := "arc"
	if o.has("posture") || o.has("table") {
		def = "segments"
	}
	model, err := parseCalcModel(o, def, true, ex)
	if err != nil {
		return Reply{}, err
	}
	if model == "arc" && (o.has("posture") || o.has("table")) {
		return Reply{}, usageErr("com height 1.80 posture layout", "a posture or a segment table applies to the segment model; add model segments or model both")
	}
	posture := mechanics.FlopLayout()
	if w, ok := o.word("posture"); ok {
		if posture, err = mechanics.PostureByName(w); err != nil {
			return Reply{}, usageErr("com height 1.80 posture layout", "posture %q: use one of %s", w, strings.Join(mechanics.PostureNames(), ", "))
		}
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
	imp := env.imp
	notes := append([]string(nil), b.notes...)
	b.notes = nil

	var (
		ar    comArc
		seg   mechanics.COMResult
		tname string
	)
	if model != "segments" {
		a := arch
		if !hasArch {
			a = defaultArchDeg
			notes = append(notes, fmt.Sprintf("arch assumed %s° (add arch DEG to set it)", fmtDeg(a)))
		}
		if ar.arc, err = mechanics.NewArc(b.statureM, mechanics.Radians(a)); err != nil {
			return Reply{}, calcErr(err, ex)
		}
		if ar.depthM, err = b.arcDepth(imp); err != nil {
			return Reply{}, calcErr(err, ex)
		}
		notes = append(notes, b.notes...)
		b.notes = nil
		notes = append(notes, fmt.Sprintf("arc model: uniform body of length = stature %s bent through %s°", units.Length(b.statureM, imp), fmtDeg(a)))
	}
	if model != "arc" {
		table, name, tnotes, err := pickSegmentTable(o.words["table"], b.sex, calcAthleteName(env), ex)
		if err != nil {
			return Reply{}, err
		}
		tname = name
		notes = append(notes, tnotes...)
		if hasArch {
			posture.TrunkArchDeg = arch
			notes = append(notes, fmt.Sprintf("segment model: arch %s° used as the trunk arch", fmtDeg(arch)))
		}
		if seg, err = mechanics.BodyCOM(b.segmentBody(), posture, table); err != nil {
			return Reply{}, calcErr(err, ex)
		}
		notes = append(notes, fmt.Sprintf("segment model: %s posture, %s table, depths %s", posture.Name, tname, comDepthSource(b)))
	}

	r := Reply{Title: "Centre of mass" + env.who(), Ephemeral: env.private()}
	add := func(label, value string) { r.Fields = append(r.Fields, Field{label, value}) }
	switch model {
	case "arc":
		s, d := ar.arc.DropM, ar.depthM
		if ar.arc.Straight {
			add("Model", fmt.Sprintf("arc, %s held straight (arch 0°)", units.Length(b.statureM, imp)))
		} else {
			add("Model", fmt.Sprintf("arc, %s bent through %s° (radius %s, ends %s apart)", units.Length(b.statureM, imp), fmtDeg(mechanics.Degrees(ar.arc.ThetaRad)), units.Length(ar.arc.RadiusM, imp), units.Length(ar.arc.ChordM, imp)))
		}
		add("C.m. below the apex", calcSmall(s, imp))
		add("Underside below apex (d)", units.SmallAbs(d, imp))
		add("C.m. vs the bar contact", comBarContact(s-d, imp))
		r.Lines = append(r.Lines, capitalise(comLine(s-d, imp)))
	case "segments":
		add("Model", fmt.Sprintf("segments, %s posture, %s, %s", posture.Name, tname, units.Length(b.statureM, imp)))
		if posture.Name == mechanics.Standing().Name {
			// Upright, the apex is the top of the head and no bar is under it.
			add("C.m. below the head top", units.Length(seg.DropM, imp))
			add("C.m. above the floor", fmt.Sprintf("%s = %.3f × stature", units.Length(seg.COMHeightM, imp), seg.COMHeightM/b.statureM))
			break
		}
		add("C.m. below the apex", calcSmall(seg.DropM, imp))
		add("C.m. along the body", comAlongBody(seg.COM.XM, imp))
		add("Underside below apex (d)", units.SmallAbs(seg.UndersideDepthM, imp))
		add("C.m. vs the bar contact", comBarContact(seg.BelowUndersideM, imp))
		add("Apex on the", seg.ApexSegment.String())
		r.Lines = append(r.Lines, capitalise(comLine(seg.BelowUndersideM, imp)))
	default:
		arcHead := fmt.Sprintf("arc %s°", fmtDeg(mechanics.Degrees(ar.arc.ThetaRad)))
		segHead := fmt.Sprintf("segments (%s)", posture.Name)
		r.Table = &Table{Header: []string{"", arcHead, segHead}, Rows: [][]string{
			{"c.m. below the apex", calcSmall(ar.arc.DropM, imp), calcSmall(seg.DropM, imp)},
			{"underside below apex (d)", units.SmallAbs(ar.depthM, imp), units.SmallAbs(seg.UndersideDepthM, imp)},
			{"c.m. below bar contact", units.Small(ar.arc.DropM-ar.depthM, imp), units.Small(seg.BelowUndersideM, imp)},
		}}
		r.Lines = append(r.Lines,
			"Arc: "+comLine(ar.arc.DropM-ar.depthM, imp),
			"Segments: "+comLine(seg.BelowUndersideM, imp),
			fmt.Sprintf("The models differ by %s in the c.m. drop: the arc bends the whole body evenly through %s°; the segment model arches the trunk %s° and turns the head and legs at the joints.", units.SmallAbs(ar.arc.DropM-seg.DropM, imp), fmtDeg(mechanics.Degrees(ar.arc.ThetaRad)), fmtDeg(posture.TrunkArchDeg)))
		add("Segment table", tname)
	}
	r.Assumptions = notes
	var flags []rangeNote
	if f, bad := mechanics.CheckRange(mechanics.QArch, arch, mechanics.SexUnknown); hasArch && bad {
		flags = append(flags, rangeNoteOf(f))
		r.Lines = append(r.Lines, fullFlags(flags)...)
	}
	short := comShort(model, ar, seg, posture, b, hasArch, imp)
	if l := checkLine(flags); l != "" {
		short.body = append(short.body, shortLine{l, 0})
	}
	return short.reply(r), nil
}

// comShort is the phone-sized `com` answer: where the c.m. passes against
// the bar with the apex touching it, and the model's arch.
func comShort(model string, ar comArc, seg mechanics.COMResult, p mechanics.Posture, b calcBody, hasArch, imp bool) calcShort {
	var s calcShort
	if !hasArch {
		s.assumed = append(s.assumed, "arch")
	}
	if b.depthM == 0 {
		s.assumed = append(s.assumed, "depth")
	}
	arcDeg := fmtDeg(mechanics.Degrees(ar.arc.ThetaRad))
	switch model {
	case "arc":
		s.verdict = capitalise(comVerdict(ar.arc.DropM-ar.depthM, imp)) + " (arc " + arcDeg + "°)"
		s.body = []shortLine{{fmt.Sprintf("C.m. %s below the apex; underside %s below it", calcSmall(ar.arc.DropM, imp), units.SmallAbs(ar.depthM, imp)), 2}}
	case "segments":
		if p.Name == mechanics.Standing().Name {
			s.verdict = fmt.Sprintf("C.m. %s above the floor, %.2f × stature", units.Length(seg.COMHeightM, imp), seg.COMHeightM/b.statureM)
			s.assumed = nil
			break
		}
		s.verdict = capitalise(comVerdict(seg.BelowUndersideM, imp)) + fmt.Sprintf(" (%s, trunk arch %s°)", p.Name, fmtDeg(p.TrunkArchDeg))
		s.body = []shortLine{{fmt.Sprintf("C.m. %s below the apex, %s; apex on the %s", calcSmall(seg.DropM, imp), comAlongBody(seg.COM.XM, imp), seg.ApexSegment), 2}}
	default:
		s.verdict = fmt.Sprintf("C.m. below the bar: arc %s, segments %s", units.Small(ar.arc.DropM-ar.depthM, imp), units.Small(seg.BelowUndersideM, imp))
		s.body = []shortLine{{fmt.Sprintf("Arc: whole body bent %s°; segments: trunk arched %s°, head and legs at the joints", arcDeg, fmtDeg(p.TrunkArchDeg)), 2},
			{fmt.Sprintf("They differ by %s in the c.m. drop", units.SmallAbs(ar.arc.DropM-seg.DropM, imp)), 3}}
	}
	return s
}

// comVerdict is the short reading: "c.m. 4.9 cm below the bar" with the
// apex touching it, or "c.m. 2.0 cm above the bar: rise that much more".
func comVerdict(belowM float64, imp bool) string {
	if belowM >= 0 {
		return fmt.Sprintf("c.m. passes %s below the bar with the apex touching it", units.SmallAbs(belowM, imp))
	}
	return fmt.Sprintf("c.m. passes %s above the bar with the apex touching it", units.SmallAbs(belowM, imp))
}

// comDepthSource says where the segment model's depths came from.
func comDepthSource(b calcBody) string {
	if b.depthM > 0 {
		return "typical fractions of stature, trunk twice the given depth"
	}
	return "typical fractions of stature (add depth D, midline to underside, to set the trunk's)"
}

// comBarContact describes where the c.m. lies relative to the body's underside
// at the apex, which is where the bar touches: below (+) or above (−).
func comBarContact(belowM float64, imp bool) string {
	if belowM >= 0 {
		return units.SmallAbs(belowM, imp) + " below the underside"
	}
	return units.SmallAbs(belowM, imp) + " above the underside"
}

// comLine is the plain reading of the c.m. against the bar, starting in
// lower case so it can follow a label.
func comLine(belowM float64, imp bool) string {
	if belowM >= 0 {
		return fmt.Sprintf("with the apex just touching the bar, the c.m. passes %s below the bar.", units.SmallAbs(belowM, imp))
	}
	return fmt.Sprintf("with the apex just touching the bar, the c.m. passes %s above the bar: it must rise that much higher than the bar.", units.SmallAbs(belowM, imp))
}

// comAlongBody says how far the c.m. lies from the apex along the body.
func comAlongBody(xM float64, imp bool) string {
	switch {
	case math.Abs(xM) < 0.005:
		return "under the apex"
	case xM > 0:
		return units.SmallAbs(xM, imp) + " from the apex towards the feet"
	default:
		return units.SmallAbs(xM, imp) + " from the apex towards the head"
	}
}

// capitalise upper-cases the first letter of a sentence.
func capitalise(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}
