package mechanics

import (
	"errors"
	"math"
	"testing"
)

func mustDeLeva(t testing.TB, s Sex) SegmentTable {
	t.Helper()
	tab, err := DeLeva1996(s)
	if err != nil {
		t.Fatal(err)
	}
	return tab
}

// de Leva (1996) Table 4: mass fractions sum to 100.00 % (male) and 99.99 %
// (female); spot values of mass %, c.m. % and mean length (mm) as printed.
func TestDeLeva1996Table4(t *testing.T) {
	for _, tc := range []struct {
		sex     Sex
		massSum float64
		rows    map[SegmentKind][3]float64 // mass %, c.m. % from the table's first end, length mm
	}{
		{Male, 1.0000, map[SegmentKind][3]float64{
			KindHead: {6.94, 50.02, 242.9}, KindTrunk: {43.46, 51.38, 603.3}, KindUpperArm: {2.71, 57.72, 281.7},
			KindForearm: {1.62, 45.74, 268.9}, KindHand: {0.61, 79.00, 86.2}, KindThigh: {14.16, 40.95, 422.2},
			KindShank: {4.33, 44.59, 434.0}, KindFoot: {1.37, 44.15, 258.1},
		}},
		{Female, 0.9999, map[SegmentKind][3]float64{
			KindHead: {6.68, 48.41, 243.7}, KindTrunk: {42.57, 49.64, 614.8}, KindUpperArm: {2.55, 57.54, 275.1},
			KindForearm: {1.38, 45.59, 264.3}, KindHand: {0.56, 74.74, 78.0}, KindThigh: {14.78, 36.12, 368.5},
			KindShank: {4.81, 44.16, 432.3}, KindFoot: {1.29, 40.14, 228.3},
		}},
	} {
		tab := mustDeLeva(t, tc.sex)
		if got := tab.MassSum(); math.Abs(got-tc.massSum) > 1e-12 {
			t.Errorf("%v: mass fractions sum to %.6f, want %.4f", tc.sex, got, tc.massSum)
		}
		for k, want := range tc.rows {
			p := tab.Params[k]
			com := p.COMFraction
			if k == KindHead { // the table measures the head from the vertex
				com = 1 - com
			}
			l, err := DeLevaLengthMM(tab, k)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(p.MassFraction*100-want[0]) > 1e-9 || math.Abs(com*100-want[1]) > 1e-9 || math.Abs(l-want[2]) > 1e-9 {
				t.Errorf("%v %v: mass %.4f%% c.m. %.4f%% length %.2f mm, want %v", tc.sex, k, p.MassFraction*100, com*100, l, want)
			}
		}
	}
}

// Dempster (1955) via Winter, Table 4.1: mass fractions and c.m. from the
// proximal end; Drillis and Contini lengths (Winter Fig. 4.1).
func TestDempsterWinterTable41(t *testing.T) {
	tab := DempsterWinter()
	want := map[SegmentKind][3]float64{ // mass fraction, c.m. fraction, length / stature
		KindTrunk: {0.497, 0.50, 0.288}, KindUpperArm: {0.028, 0.436, 0.186}, KindForearm: {0.016, 0.430, 0.146},
		KindHand: {0.006, 0.506, 0.108}, KindThigh: {0.100, 0.433, 0.245}, KindShank: {0.0465, 0.433, 0.246},
		KindFoot: {0.0145, 0.50, 0.152},
	}
	for k, w := range want {
		p := tab.Params[k]
		if math.Abs(p.MassFraction-w[0]) > 1e-12 || math.Abs(p.COMFraction-w[1]) > 1e-12 || math.Abs(p.LengthFraction-w[2]) > 1e-12 {
			t.Errorf("%v: %+v, want %v", k, p, w)
		}
	}
	if h := tab.Params[KindHead]; math.Abs(h.MassFraction-0.081) > 1e-12 {
		t.Errorf("head and neck mass %v, want 0.081", h.MassFraction)
	}
	if s := tab.MassSum(); math.Abs(s-1) > 1e-12 {
		t.Errorf("Dempster fractions sum to %v, want 1.000", s)
	}
}

// standingByHand stacks the published segment lengths vertically for an
// upright stance and sums mᵢzᵢ by hand (no model code), as a fraction of
// stature. ankle and shoulder placement and the foot (its c.m. at half the
// default foot depth above the floor) follow the model's stated assumptions.
func standingByHand(mass, com, length map[SegmentKind]float64, chainFit, shoulderBelowNeck float64) float64 {
	ankle := drillisAnkleFraction
	shank := chainFit * length[KindShank]
	thigh := chainFit * length[KindThigh]
	trunk := chainFit * length[KindTrunk]
	head := chainFit * length[KindHead]
	knee := ankle + shank
	hip := knee + thigh
	neck := hip + trunk
	shoulder := neck - chainFit*shoulderBelowNeck
	elbow := shoulder - length[KindUpperArm]
	wrist := elbow - length[KindForearm]
	z := map[SegmentKind]float64{
		KindShank:    knee - com[KindShank]*shank,
		KindThigh:    hip - com[KindThigh]*thigh,
		KindTrunk:    neck - com[KindTrunk]*trunk,
		KindHead:     neck + com[KindHead]*head,
		KindUpperArm: shoulder - com[KindUpperArm]*length[KindUpperArm],
		KindForearm:  elbow - com[KindForearm]*length[KindForearm],
		KindHand:     wrist - com[KindHand]*length[KindHand],
		KindFoot:     0.045 / 2,
	}
	var sum, m float64
	for k, zk := range z {
		n := 2.0
		if k == KindHead || k == KindTrunk {
			n = 1
		}
		sum += n * mass[k] * zk
		m += n * mass[k]
	}
	return sum / m
}

// Standing c.m. height / stature: the model against a hand calculation from
// the published tables, and both within 0.55–0.57 of stature for de Leva
// (common practice range for adults).
func TestStandingCOMFraction(t *testing.T) {
	// de Leva (1996) Table 4, male, raw: length mm / 1741.
	mL := func(mm float64) float64 { return mm / 1741 }
	male := standingByHand(
		map[SegmentKind]float64{KindHead: 6.94, KindTrunk: 43.46, KindUpperArm: 2.71, KindForearm: 1.62, KindHand: 0.61, KindThigh: 14.16, KindShank: 4.33, KindFoot: 1.37},
		map[SegmentKind]float64{KindHead: 1 - 0.5002, KindTrunk: 0.5138, KindUpperArm: 0.5772, KindForearm: 0.4574, KindHand: 0.79, KindThigh: 0.4095, KindShank: 0.4459},
		map[SegmentKind]float64{KindHead: mL(242.9), KindTrunk: mL(603.3), KindUpperArm: mL(281.7), KindForearm: mL(268.9), KindHand: mL(86.2), KindThigh: mL(422.2), KindShank: mL(434.0)},
		(1-0.039)/mL(242.9+603.3+422.2+434.0), mL(603.3-515.5))
	fL := func(mm float64) float64 { return mm / 1735 }
	female := standingByHand(
		map[SegmentKind]float64{KindHead: 6.68, KindTrunk: 42.57, KindUpperArm: 2.55, KindForearm: 1.38, KindHand: 0.56, KindThigh: 14.78, KindShank: 4.81, KindFoot: 1.29},
		map[SegmentKind]float64{KindHead: 1 - 0.4841, KindTrunk: 0.4964, KindUpperArm: 0.5754, KindForearm: 0.4559, KindHand: 0.7474, KindThigh: 0.3612, KindShank: 0.4416},
		map[SegmentKind]float64{KindHead: fL(243.7), KindTrunk: fL(614.8), KindUpperArm: fL(275.1), KindForearm: fL(264.3), KindHand: fL(78.0), KindThigh: fL(368.5), KindShank: fL(432.3)},
		(1-0.039)/fL(243.7+614.8+368.5+432.3), fL(614.8-497.9))
	// Dempster via Winter Table 4.1 with Drillis–Contini heights (Fig. 4.1).
	dempster := standingByHand(
		map[SegmentKind]float64{KindHead: 0.081, KindTrunk: 0.497, KindUpperArm: 0.028, KindForearm: 0.016, KindHand: 0.006, KindThigh: 0.100, KindShank: 0.0465, KindFoot: 0.0145},
		map[SegmentKind]float64{KindHead: (0.935 - 0.818) / 0.182, KindTrunk: 0.5, KindUpperArm: 0.436, KindForearm: 0.430, KindHand: 0.506, KindThigh: 0.433, KindShank: 0.433},
		map[SegmentKind]float64{KindHead: 0.182, KindTrunk: 0.288, KindUpperArm: 0.186, KindForearm: 0.146, KindHand: 0.108, KindThigh: 0.245, KindShank: 0.246},
		1, 0)

	for _, tc := range []struct {
		name       string
		table      SegmentTable
		hand       float64
		lo, hi     float64
		rangeLabel string
	}{
		{"de Leva male", mustDeLeva(t, Male), male, 0.55, 0.57, "common practice"},
		{"de Leva female", mustDeLeva(t, Female), female, 0.55, 0.57, "common practice"},
		// Dempster's trunk c.m. at mid trochanter–shoulder sits the body
		// c.m. higher; only the hand calculation is a check here, the wider
		// band merely guards the sign and scale.
		{"Dempster/Winter", DempsterWinter(), dempster, 0.54, 0.59, "guard band"},
	} {
		for _, h := range []float64{1.50, 1.78, 2.05} {
			r, err := BodyCOM(Body{StatureM: h}, Standing(), tc.table)
			if err != nil {
				t.Fatal(err)
			}
			got := r.COMHeightM / h
			if math.Abs(got-tc.hand) > 1e-12 {
				t.Errorf("%s, %.2f m: model %.6f of stature, hand calculation %.6f", tc.name, h, got, tc.hand)
			}
			if got < tc.lo || got > tc.hi {
				t.Errorf("%s: standing c.m. at %.4f of stature, outside %v–%v (%s)", tc.name, got, tc.lo, tc.hi, tc.rangeLabel)
			}
		}
	}
}

func TestSegmentsAndKinds(t *testing.T) {
	if NumSegments != 14 || NumKinds != 8 {
		t.Fatalf("%d segments of %d kinds, want 14 of 8", NumSegments, NumKinds)
	}
	count := map[SegmentKind]int{}
	names := map[string]bool{}
	for s := Head; s < NumSegments; s++ {
		count[s.Kind()]++
		names[s.String()] = true
	}
	for k := KindHead; k < NumKinds; k++ {
		want := 2
		if k == KindHead || k == KindTrunk {
			want = 1
		}
		if count[k] != want {
			t.Errorf("%v appears %d times, want %d", k, count[k], want)
		}
	}
	if len(names) != 14 || !names["left thigh"] || !names["right hand"] || !names["head"] {
		t.Errorf("segment names %v", names)
	}
	if Segment(99).Kind() != -1 || Segment(99).String() == "" || SegmentKind(42).String() == "" {
		t.Error("out-of-range segment handling")
	}
}

func TestParseSex(t *testing.T) {
	for in, want := range map[string]Sex{"m": Male, "Male": Male, " F ": Female, "female": Female} {
		got, err := ParseSex(in)
		if err != nil || got != want {
			t.Errorf("ParseSex(%q) = %v, %v", in, got, err)
		}
	}
	var ie *InputError
	if _, err := ParseSex("x"); !errors.As(err, &ie) || ie.Field != FieldSex {
		t.Errorf("ParseSex(x): %v", err)
	}
	if _, err := DeLeva1996(SexUnknown); !errors.As(err, &ie) || ie.Field != FieldSex {
		t.Errorf("DeLeva1996(unknown): %v", err)
	}
	if Male.String() != "male" || Female.String() != "female" || SexUnknown.String() != "unknown" {
		t.Error("Sex.String")
	}
}

func TestDefaultDepths(t *testing.T) {
	d, err := DefaultDepths(1.80)
	if err != nil {
		t.Fatal(err)
	}
	if !near(d.TrunkM, 0.225, 1e-12) || !near(d.ThighM, 0.162, 1e-12) {
		t.Errorf("DefaultDepths(1.80) = %+v", d)
	}
	u, _ := DefaultUndersideDepth(1.80)
	if !near(u, d.TrunkM/2, 1e-12) {
		t.Errorf("DefaultUndersideDepth = %v, want half the trunk depth %v", u, d.TrunkM/2)
	}
	for _, h := range []float64{0, 0.3, 2.6, math.NaN()} {
		if _, err := DefaultDepths(h); err == nil {
			t.Errorf("DefaultDepths(%v) accepted", h)
		}
		if _, err := DefaultUndersideDepth(h); err == nil {
			t.Errorf("DefaultUndersideDepth(%v) accepted", h)
		}
	}
}
