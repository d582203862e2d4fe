package mechanics

import (
	"fmt"
	"strings"
)

// Sex selects the male or female columns of a segment table.
type Sex int

// Sexes. SexUnknown is the zero value: a profile that does not say.
const (
	SexUnknown Sex = iota
	Male
	Female
)

// String returns "unknown", "male" or "female".
func (s Sex) String() string {
	switch s {
	case Male:
		return "male"
	case Female:
		return "female"
	}
	return "unknown"
}

// ParseSex reads "m", "male", "f" or "female" in any case.
func ParseSex(s string) (Sex, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "m", "male":
		return Male, nil
	case "f", "female":
		return Female, nil
	}
	return SexUnknown, &InputError{Field: FieldSex, Reason: fmt.Sprintf("%q is not m, male, f or female", s)}
}

// SegmentKind is one of the eight kinds of body segment; limbs come in a
// left and a right Segment of the same kind.
type SegmentKind int

// Segment kinds, in table order.
const (
	KindHead     SegmentKind = iota // head and neck
	KindTrunk                       // trunk (thorax, abdomen, pelvis)
	KindUpperArm                    // shoulder joint to elbow joint
	KindForearm                     // elbow joint to wrist joint
	KindHand                        // wrist joint to the hand's tip of the table
	KindThigh                       // hip joint to knee joint
	KindShank                       // knee joint to ankle
	KindFoot                        // heel to toe
	NumKinds                        // number of kinds (8)
)

// String returns the kind's name, e.g. "upper arm".
func (k SegmentKind) String() string {
	if k < 0 || k >= NumKinds {
		return fmt.Sprintf("kind(%d)", int(k))
	}
	return [NumKinds]string{"head", "trunk", "upper arm", "forearm", "hand", "thigh", "shank", "foot"}[k]
}

// Segment is one of the 14 segments of the body model.
type Segment int

// The 14 segments: head+neck, trunk, and left and right upper arm, forearm,
// hand, thigh, shank and foot.
const (
	Head Segment = iota
	Trunk
	UpperArmLeft
	UpperArmRight
	ForearmLeft
	ForearmRight
	HandLeft
	HandRight
	ThighLeft
	ThighRight
	ShankLeft
	ShankRight
	FootLeft
	FootRight
	NumSegments // number of segments (14)
)

// Kind returns the segment's kind.
func (s Segment) Kind() SegmentKind {
	switch {
	case s == Head:
		return KindHead
	case s == Trunk:
		return KindTrunk
	case s >= UpperArmLeft && s < NumSegments:
		return SegmentKind(2 + (int(s)-int(UpperArmLeft))/2)
	}
	return -1
}

// String returns e.g. "head", "trunk", "left thigh".
func (s Segment) String() string {
	switch {
	case s == Head || s == Trunk:
		return s.Kind().String()
	case s >= UpperArmLeft && s < NumSegments:
		side := "left "
		if (int(s)-int(UpperArmLeft))%2 == 1 {
			side = "right "
		}
		return side + s.Kind().String()
	}
	return fmt.Sprintf("segment(%d)", int(s))
}

// SegmentParams are one segment kind's parameters in a table.
type SegmentParams struct {
	MassFraction   float64 // segment mass / body mass
	COMFraction    float64 // c.m. from the end nearer the trunk (head: neck end; trunk: upper end; foot: heel), / length
	LengthFraction float64 // segment length / stature, as the model uses it (ChainFit included)
	Ends           string  // the landmarks the length runs between
}

// SegmentTable is a set of body-segment parameters for the 14-segment model.
type SegmentTable struct {
	Name   string
	Source string
	Sex    Sex // SexUnknown for a table with one column
	Params [NumKinds]SegmentParams

	// ShoulderFraction places the shoulder joint on the trunk: its distance
	// from the trunk's upper end as a fraction of trunk length.
	ShoulderFraction float64
	// AnkleHeightFraction is the ankle joint's height above the sole when
	// standing, as a fraction of stature.
	AnkleHeightFraction float64
	// HeelFraction is how far the ankle joint lies ahead of the heel, as a
	// fraction of foot length.
	HeelFraction float64
	// ChainFit is the factor applied to the lengths of head, trunk, thigh and
	// shank (the longitudinal chain) so that the standing vertex meets the
	// stature: AnkleHeight + ChainFit·Σ(chain lengths) = stature. 1 when the
	// table's lengths already add up.
	ChainFit float64
}

// MassSum returns Σ mass fractions over the 14 segments (limbs twice).
func (t SegmentTable) MassSum() float64 {
	var sum float64
	for s := Head; s < NumSegments; s++ {
		sum += t.Params[s.Kind()].MassFraction
	}
	return sum
}

// drillisAnkleFraction is the ankle height / stature of Drillis and Contini
// (Winter, Biomechanics and Motor Control of Human Movement, Fig. 4.1).
const drillisAnkleFraction = 0.039

// heelFraction: ankle joint about a fifth of the foot length ahead of the
// heel (from memory; common practice in foot models).
const heelFraction = 0.20

// deLevaRow is one row of de Leva (1996) Table 4: mass %, c.m. % from the
// first-named end, mean length in mm.
type deLevaRow struct {
	massPct, comPct, lengthMM float64
	comFromFar                bool // c.m. % measured from the end away from the trunk
	ends                      string
}

// DeLeva1996 returns de Leva's adjustments of the Zatsiorsky–Seluyanov
// parameters (de Leva P., 1996, J Biomech 29(9):1223-1230, Table 4) for Male
// or Female. Lengths are the table's mean lengths divided by the reference
// subjects' stature (1741 mm male, 1735 mm female), so they scale with the
// athlete's stature; the head (vertex–cervicale) and trunk (cervicale–mid-hip)
// rows are used. Placed end to end, the head, trunk, thigh and shank of the
// table plus the ankle height (0.039 of stature, Drillis and Contini via
// Winter) exceed the stature by 1.7 % (male) or fall 0.5 % short (female),
// because joint centres do not stand on one vertical line; ChainFit scales
// those four lengths to close the gap. The shoulder joint is placed on the
// trunk from the table's mid-shoulder–mid-hip trunk length (515.5 / 497.9
// mm, from a public copy of Table 4, not the paper itself).
func DeLeva1996(sex Sex) (SegmentTable, error) {
	var rows [NumKinds]deLevaRow
	var statureMM, midShoulderTrunkMM float64
	switch sex {
	case Male:
		statureMM, midShoulderTrunkMM = 1741, 515.5
		rows = [NumKinds]deLevaRow{
			KindHead:     {6.94, 50.02, 242.9, true, "cervicale to vertex"},
			KindTrunk:    {43.46, 51.38, 603.3, false, "cervicale to mid-hip (hip joint centres)"},
			KindUpperArm: {2.71, 57.72, 281.7, false, "shoulder joint centre to elbow joint centre"},
			KindForearm:  {1.62, 45.74, 268.9, false, "elbow joint centre to wrist joint centre"},
			KindHand:     {0.61, 79.00, 86.2, false, "wrist joint centre to 3rd metacarpale"},
			KindThigh:    {14.16, 40.95, 422.2, false, "hip joint centre to knee joint centre"},
			KindShank:    {4.33, 44.59, 434.0, false, "knee joint centre to lateral malleolus"},
			KindFoot:     {1.37, 44.15, 258.1, false, "heel to toe tip"},
		}
	case Female:
		statureMM, midShoulderTrunkMM = 1735, 497.9
		rows = [NumKinds]deLevaRow{
			KindHead:     {6.68, 48.41, 243.7, true, "cervicale to vertex"},
			KindTrunk:    {42.57, 49.64, 614.8, false, "cervicale to mid-hip (hip joint centres)"},
			KindUpperArm: {2.55, 57.54, 275.1, false, "shoulder joint centre to elbow joint centre"},
			KindForearm:  {1.38, 45.59, 264.3, false, "elbow joint centre to wrist joint centre"},
			KindHand:     {0.56, 74.74, 78.0, false, "wrist joint centre to 3rd metacarpale"},
			KindThigh:    {14.78, 36.12, 368.5, false, "hip joint centre to knee joint centre"},
			KindShank:    {4.81, 44.16, 432.3, false, "knee joint centre to lateral malleolus"},
			KindFoot:     {1.29, 40.14, 228.3, false, "heel to toe tip"},
		}
	default:
		return SegmentTable{}, &InputError{Field: FieldSex, Reason: "de Leva (1996) has male and female columns; say which"}
	}
	t := SegmentTable{
		Name:                "de Leva 1996 (" + sex.String() + ")",
		Source:              "de Leva P. (1996) J Biomech 29(9):1223-1230, Table 4",
		Sex:                 sex,
		ShoulderFraction:    (rows[KindTrunk].lengthMM - midShoulderTrunkMM) / rows[KindTrunk].lengthMM,
		AnkleHeightFraction: drillisAnkleFraction,
		HeelFraction:        heelFraction,
	}
	chain := (rows[KindHead].lengthMM + rows[KindTrunk].lengthMM + rows[KindThigh].lengthMM + rows[KindShank].lengthMM) / statureMM
	t.ChainFit = (1 - drillisAnkleFraction) / chain
	for k, r := range rows {
		com := r.comPct / 100
		if r.comFromFar {
			com = 1 - com
		}
		l := r.lengthMM / statureMM
		if inChain(SegmentKind(k)) {
			l *= t.ChainFit
		}
		t.Params[k] = SegmentParams{MassFraction: r.massPct / 100, COMFraction: com, LengthFraction: l, Ends: r.ends}
	}
	return t, nil
}

// DeLevaLengthMM returns de Leva's (1996, Table 4) published mean length in
// millimetres of a segment kind in table t, undoing the stature scaling and
// ChainFit. It lets tests and reports compare a table with the paper.
func DeLevaLengthMM(t SegmentTable, k SegmentKind) (float64, error) {
	var statureMM float64
	switch t.Sex {
	case Male:
		statureMM = 1741
	case Female:
		statureMM = 1735
	default:
		return 0, &InputError{Field: FieldSex, Reason: "not a de Leva table"}
	}
	if k < 0 || k >= NumKinds {
		return 0, &InputError{Field: FieldPosture, Value: float64(k), Reason: "no such segment kind"}
	}
	l := t.Params[k].LengthFraction * statureMM
	if inChain(k) {
		l /= t.ChainFit
	}
	return l, nil
}

func inChain(k SegmentKind) bool {
	return k == KindHead || k == KindTrunk || k == KindThigh || k == KindShank
}

// Drillis–Contini landmark heights / stature (Winter, Fig. 4.1).
const (
	drillisShoulder = 0.818
	drillisHip      = 0.530
	drillisKnee     = 0.285
	// earCanal is the assumed height of the ear canal / stature, where
	// Dempster's head-and-neck c.m. lies: the vertex less half of Drillis
	// and Contini's head height 0.130 (an assumption of this model).
	earCanal = 1 - 0.130/2
)

// DempsterWinter returns Dempster's (1955) segment parameters as tabulated
// by Winter (Biomechanics and Motor Control of Human Movement, Table 4.1):
// mass fractions and c.m. from the proximal end, with segment lengths from
// Drillis and Contini's fractions of stature (Winter Fig. 4.1): shoulder
// 0.818, hip 0.530, knee 0.285, ankle 0.039, upper arm 0.186, forearm 0.146,
// hand 0.108, foot 0.152. The head-and-neck runs from shoulder level to the
// vertex (0.182) with its c.m. at the ear canal, taken as 0.935 of stature.
// The trunk runs from the greater trochanter (taken as the hip) to the
// glenohumeral joint, so the shoulder sits at its upper end. The c.m.
// fractions are applied to the Drillis–Contini lengths, whose landmarks are
// close to but not the same as Dempster's (hand: to the knuckle; foot:
// ankle to the 2nd metatarsal head, taken as half the heel–toe line); the
// whole-body c.m. moves by millimetres.
func DempsterWinter() SegmentTable {
	headLen := 1 - drillisShoulder
	return SegmentTable{
		Name:   "Dempster (Winter)",
		Source: "Dempster (1955) via Winter, Biomechanics and Motor Control of Human Movement, Table 4.1 and Fig. 4.1",
		Params: [NumKinds]SegmentParams{
			KindHead:     {0.081, (earCanal - drillisShoulder) / headLen, headLen, "shoulder level to vertex (c.m. at the ear canal)"},
			KindTrunk:    {0.497, 0.50, drillisShoulder - drillisHip, "glenohumeral joint to greater trochanter"},
			KindUpperArm: {0.028, 0.436, 0.186, "glenohumeral joint to elbow axis"},
			KindForearm:  {0.016, 0.430, 0.146, "elbow axis to ulnar styloid"},
			KindHand:     {0.006, 0.506, 0.108, "wrist axis to fingertip"},
			KindThigh:    {0.100, 0.433, drillisHip - drillisKnee, "greater trochanter to femoral condyles"},
			KindShank:    {0.0465, 0.433, drillisKnee - drillisAnkleFraction, "femoral condyles to medial malleolus"},
			KindFoot:     {0.0145, 0.50, 0.152, "heel to toe"},
		},
		ShoulderFraction:    0,
		AnkleHeightFraction: drillisAnkleFraction,
		HeelFraction:        heelFraction,
		ChainFit:            1,
	}
}

func (t SegmentTable) validate() error {
	bad := func(reason string) error {
		return &InputError{Field: FieldPosture, Reason: "segment table " + t.Name + ": " + reason}
	}
	for k, p := range t.Params {
		for _, v := range []float64{p.MassFraction, p.COMFraction, p.LengthFraction} {
			if err := finite(FieldPosture, v); err != nil {
				return err
			}
		}
		if p.MassFraction <= 0 || p.MassFraction >= 1 {
			return bad(SegmentKind(k).String() + " mass fraction outside (0, 1)")
		}
		if p.COMFraction < 0 || p.COMFraction > 1 {
			return bad(SegmentKind(k).String() + " c.m. fraction outside [0, 1]")
		}
		if p.LengthFraction <= 0 || p.LengthFraction > 1 {
			return bad(SegmentKind(k).String() + " length fraction outside (0, 1]")
		}
	}
	if c := t.Params[KindTrunk].COMFraction; c < 1.0/3 || c > 2.0/3 {
		return bad("trunk c.m. fraction outside [1/3, 2/3], which a linear mass density along the trunk cannot represent")
	}
	if s := t.MassSum(); s < 0.98 || s > 1.02 {
		return bad(fmt.Sprintf("mass fractions sum to %.4f, not 1", s))
	}
	if t.ShoulderFraction < 0 || t.ShoulderFraction > 0.5 || t.AnkleHeightFraction <= 0 || t.AnkleHeightFraction > 0.1 ||
		t.HeelFraction < 0 || t.HeelFraction > 1 {
		return bad("shoulder, ankle or heel placement out of range")
	}
	return nil
}

// Depths are sagittal thicknesses (front to back, metres) of the segment
// kinds, used to find the body's surface. A zero field takes the default.
type Depths struct {
	HeadM, TrunkM, UpperArmM, ForearmM, HandM, ThighM, ShankM, FootM float64
}

// Default depths / stature. Approximate adult anthropometry (from memory;
// common practice values, not from a cited table): head 0.112, trunk 0.125
// (chest to pelvis), upper arm 0.055, forearm 0.045, hand 0.017, thigh 0.090,
// shank 0.062, foot 0.045. A profile should override them with measurements.
func defaultDepthFractions() [NumKinds]float64 {
	return [NumKinds]float64{0.112, 0.125, 0.055, 0.045, 0.017, 0.090, 0.062, 0.045}
}

func (d Depths) kinds() [NumKinds]float64 {
	return [NumKinds]float64{d.HeadM, d.TrunkM, d.UpperArmM, d.ForearmM, d.HandM, d.ThighM, d.ShankM, d.FootM}
}

func depthsFrom(v [NumKinds]float64) Depths {
	return Depths{v[0], v[1], v[2], v[3], v[4], v[5], v[6], v[7]}
}

// DefaultDepths returns the default sagittal thicknesses for an athlete of
// stature statureM (m): fixed fractions of stature (see Depths).
func DefaultDepths(statureM float64) (Depths, error) {
	if err := checkStature(statureM); err != nil {
		return Depths{}, err
	}
	var v [NumKinds]float64
	for k, f := range defaultDepthFractions() {
		v[k] = f * statureM
	}
	return depthsFrom(v), nil
}

// DefaultUndersideDepth returns d for the arc model, metres: half the default
// trunk depth, 0.0625·stature (about 0.11 m for 1.78 m).
func DefaultUndersideDepth(statureM float64) (float64, error) {
	if err := checkStature(statureM); err != nil {
		return 0, err
	}
	return defaultDepthFractions()[KindTrunk] * statureM / 2, nil
}
