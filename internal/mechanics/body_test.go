package mechanics

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// The trunk's closed-form c.m. (linear density along a circular arc) against
// Gauss–Legendre quadrature of ∫ρ(u)·r(u) du over the arc.
func TestTrunkArcCOMAgainstQuadrature(t *testing.T) {
	for _, p := range []float64{0.4, 0.5, 0.5138, 0.6} {
		for _, deg := range []float64{0, 0.5, 20, 60, 120, 180} {
			theta := Radians(deg)
			b := 12 * (p - 0.5)
			rho := func(u float64) float64 { return 1 + b*(u-0.5) }
			x := quad.Fixed(func(u float64) float64 { return rho(u) * trunkAt(u, 0.6, theta).x }, 0, 1, 24, quad.Legendre{}, 0)
			z := quad.Fixed(func(u float64) float64 { return rho(u) * trunkAt(u, 0.6, theta).z }, 0, 1, 24, quad.Legendre{}, 0)
			mass := quad.Fixed(rho, 0, 1, 24, quad.Legendre{}, 0)
			gotX := 0.6 * b * trunkCOMShift(theta/2)
			gotZ := -0.6 * arcDropFactor(theta/2)
			if math.Abs(mass-1) > 1e-14 || math.Abs(gotX-x) > 1e-14 || math.Abs(gotZ-z) > 1e-14 {
				t.Errorf("p=%v θ=%v°: closed (%.15f, %.15f), quadrature (%.15f, %.15f), mass %v", p, deg, gotX, gotZ, x, z, mass)
			}
			// the straight trunk's c.m. lies at fraction p from the upper end
			if deg == 0 && math.Abs(gotX-0.6*(p-0.5)) > 1e-15 {
				t.Errorf("straight trunk c.m. at %v, want %v", gotX, 0.6*(p-0.5))
			}
		}
	}
}

func TestBodyStraightHorizontal(t *testing.T) {
	for _, tab := range []SegmentTable{mustDeLeva(t, Male), mustDeLeva(t, Female), DempsterWinter()} {
		r, err := BodyCOM(Body{StatureM: 1.80}, StraightHorizontal(), tab)
		if err != nil {
			t.Fatal(err)
		}
		// Only the feet (at right angles to the shanks) rise above the line.
		if r.ApexSegment != Trunk || math.Abs(r.DropM) > 0.005 || !near(r.UndersideDepthM, 0.125*1.80/2, 1e-9) {
			t.Errorf("%s lying straight: %+v", tab.Name, r)
		}
	}
}

// Turning the whole body does not change where its c.m. sits on the body.
func TestBodyRotationInvariance(t *testing.T) {
	tab := mustDeLeva(t, Male)
	var l, h [NumKinds]float64
	for k := range l {
		l[k] = tab.Params[k].LengthFraction * 1.8
		h[k] = 0.05
	}
	base := FlopLayout()
	ref := buildModel(base, tab, l, h, 1.8)
	for _, el := range []float64{-170, -45, 0, 30, 90, 180} {
		p := base
		p.TrunkElevationDeg = el
		m := buildModel(p, tab, l, h, 1.8)
		for s := Head; s < NumSegments; s++ {
			d0 := ref.com[s].sub(ref.hip)
			d1 := m.com[s].sub(m.hip)
			if math.Abs(math.Hypot(d0.x, d0.z)-math.Hypot(d1.x, d1.z)) > 1e-12 {
				t.Errorf("elevation %v: %v moved relative to the hip", el, s)
			}
		}
	}
}

func TestBodyLayout(t *testing.T) {
	tab := mustDeLeva(t, Male)
	r, err := BodyCOM(Body{StatureM: 1.85, MassKG: 75, Sex: Male}, FlopLayout(), tab)
	if err != nil {
		t.Fatal(err)
	}
	// In a well-arched layout the c.m. may pass at or below the bar
	// (common practice; Dapena 1980 reports clearances with the c.m. peak
	// level with the bar): the posture's need d − s is negative.
	if r.ApexSegment != Trunk || r.NeedM >= 0 || r.DropM <= r.UndersideDepthM || r.BelowUndersideM != -r.NeedM {
		t.Errorf("layout: %+v", r)
	}
	var kg, frac float64
	for s, sc := range r.Segments {
		if sc.Segment != Segment(s) || sc.LengthM <= 0 {
			t.Errorf("segment %d: %+v", s, sc)
		}
		kg += sc.MassKG
		frac += sc.MassFraction
	}
	if !near(kg, 75*tab.MassSum(), 1e-12) || !near(frac, tab.MassSum(), 1e-12) {
		t.Errorf("segment masses sum to %v kg (%v)", kg, frac)
	}
	// Mass-weighted mean of the segment c.m.s is the whole-body c.m.
	var zx, zz float64
	for _, sc := range r.Segments {
		zx += sc.MassFraction * sc.COM.XM
		zz += sc.MassFraction * sc.COM.ZM
	}
	if !near(zx/frac, r.COM.XM, 1e-12) || !near(zz/frac, r.COM.ZM, 1e-12) {
		t.Errorf("Σmr/M = (%v, %v), COM %+v", zx/frac, zz/frac, r.COM)
	}
}

func TestBodyDepthOverride(t *testing.T) {
	tab := mustDeLeva(t, Female)
	r, err := BodyCOM(Body{StatureM: 1.70, Depths: Depths{TrunkM: 0.30}}, FlopLayout(), tab)
	if err != nil {
		t.Fatal(err)
	}
	if !near(r.UndersideDepthM, 0.15, 1e-9) {
		t.Errorf("trunk depth 0.30 gives d = %v, want 0.15", r.UndersideDepthM)
	}
	def, _ := BodyCOM(Body{StatureM: 1.70}, FlopLayout(), tab)
	if def.DropM != r.DropM {
		t.Errorf("depth changed the c.m.: %v vs %v", def.DropM, r.DropM)
	}
}

func TestStandingIsUpright(t *testing.T) {
	r, err := BodyCOM(Body{StatureM: 1.80}, Standing(), mustDeLeva(t, Male))
	if err != nil {
		t.Fatal(err)
	}
	// The vertex is the apex; the line through it runs down the whole body.
	if r.ApexSegment != Head || math.Abs(r.COM.XM) > 0.01 || !near(r.DropM+r.COMHeightM, 1.80, 1e-9) {
		t.Errorf("standing: %+v", r)
	}
}

func TestPostureByName(t *testing.T) {
	for name, want := range map[string]string{"Standing": "standing", "stand": "standing", "FLAT": "horizontal",
		"straight": "horizontal", " layout ": "layout", "flop": "layout"} {
		p, err := PostureByName(name)
		if err != nil || p.Name != want {
			t.Errorf("PostureByName(%q) = %v, %v", name, p.Name, err)
		}
	}
	var ie *InputError
	if _, err := PostureByName("pike"); !errors.As(err, &ie) || ie.Field != FieldPosture {
		t.Errorf("PostureByName(pike): %v", err)
	}
	if got := PostureNames(); len(got) != 3 || got[0] != "horizontal" {
		t.Errorf("PostureNames = %v", got)
	}
	for _, p := range []Posture{Standing(), StraightHorizontal(), FlopLayout()} {
		if err := p.Validate(); err != nil {
			t.Errorf("%s: %v", p.Name, err)
		}
	}
}

func TestBodyRejects(t *testing.T) {
	tab := mustDeLeva(t, Male)
	bad := DempsterWinter()
	bad.Params[KindThigh].MassFraction = 0.3
	odd := DempsterWinter()
	odd.Params[KindTrunk].COMFraction = 0.8
	layout := FlopLayout()
	for _, tc := range []struct {
		name  string
		body  Body
		p     Posture
		table SegmentTable
		field string
	}{
		{"no stature", Body{}, layout, tab, FieldStature},
		{"stature 3 m", Body{StatureM: 3}, layout, tab, FieldStature},
		{"NaN stature", Body{StatureM: math.NaN()}, layout, tab, FieldStature},
		{"mass 5 kg", Body{StatureM: 1.8, MassKG: 5}, layout, tab, FieldMass},
		{"negative depth", Body{StatureM: 1.8, Depths: Depths{ThighM: -0.1}}, layout, tab, FieldDepth},
		{"depth above half stature", Body{StatureM: 1.8, Depths: Depths{TrunkM: 1.0}}, layout, tab, FieldDepth},
		{"arch 200", Body{StatureM: 1.8}, Posture{TrunkArchDeg: 200}, tab, FieldArch},
		{"arch negative", Body{StatureM: 1.8}, Posture{TrunkArchDeg: -5}, tab, FieldArch},
		{"knee NaN", Body{StatureM: 1.8}, Posture{KneeFlexDeg: math.NaN()}, tab, FieldJoint},
		{"knee hyperextended", Body{StatureM: 1.8}, Posture{KneeFlexDeg: -20}, tab, FieldJoint},
		{"elevation Inf", Body{StatureM: 1.8}, Posture{TrunkElevationDeg: math.Inf(1)}, tab, FieldJoint},
		{"fractions do not sum", Body{StatureM: 1.8}, layout, bad, FieldPosture},
		{"trunk c.m. not representable", Body{StatureM: 1.8}, layout, odd, FieldPosture},
		{"empty table", Body{StatureM: 1.8}, layout, SegmentTable{}, FieldPosture},
	} {
		_, err := BodyCOM(tc.body, tc.p, tc.table)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != tc.field {
			t.Errorf("%s: %v, want *InputError on %q", tc.name, err, tc.field)
		}
	}
}

// The exact annular-sector intersection against brute-force membership.
func TestSectorAgainstSampling(t *testing.T) {
	for _, tc := range []struct{ rad, r, psi1, span float64 }{
		{0.5, 0.1, 1.0, 1.2}, {0.2, 0.11, -0.3, math.Pi}, {0.3, 0.4, 2.0, 0.7}, {1.0, 0.05, -2.5, 2.0},
	} {
		c := vec{0.1, -0.2}
		for x0 := -1.6; x0 <= 1.6; x0 += 0.0625 {
			s := surface{x0: x0, lowest: math.Inf(1)}
			s.sector(c, tc.rad, tc.r, tc.psi1, tc.psi1+tc.span)
			in := func(z float64) bool {
				w := vec{x0 - c.x, z - c.z}
				d := math.Hypot(w.x, w.z)
				if d < tc.rad-tc.r || d > tc.rad+tc.r {
					return false
				}
				return cross(dir(tc.psi1), w) >= 0 && cross(w, dir(tc.psi1+tc.span)) >= 0
			}
			covered := func(z float64) bool {
				for _, v := range s.iv[:s.n] {
					if z >= v.lo && z <= v.hi {
						return true
					}
				}
				return false
			}
			for z := -2.0; z <= 2.0; z += 0.001 {
				if in(z) != covered(z) {
					t.Fatalf("%+v x0=%v z=%v: inside %v, intervals %v", tc, x0, z, in(z), s.iv[:s.n])
				}
			}
		}
	}
}
