package mechanics

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// More arch never raises the c.m. relative to the apex: in the arc model
// for any length and angle, and in the segment model as the trunk arch grows
// up to 150°. (With the other joint angles held, arching the trunk past
// about 160° swings the hanging head or shanks beyond straight down, and
// further arch lifts them again: a property of the fixed-angle posture,
// documented in doc.go, and beyond any human spine.)
func TestPropertyMoreArchNeverRaisesCOM(t *testing.T) {
	for _, l := range []float64{0.3, 1.0, 1.8, 2.5} {
		prev := -1.0
		for i := 0; i <= 4000; i++ {
			theta := math.Pi * float64(i) / 4000
			s, err := ArcDrop(l, theta)
			if err != nil {
				t.Fatal(err)
			}
			if s < prev {
				t.Fatalf("L=%v: s fell from %.17g to %.17g at θ=%v", l, prev, s, theta)
			}
			prev = s
			if slope, _ := ArcDropSlope(l, theta); slope <= 0 {
				t.Fatalf("L=%v θ=%v: ds/dθ = %v", l, theta, slope)
			}
		}
	}
	tables := []SegmentTable{mustDeLeva(t, Male), mustDeLeva(t, Female), DempsterWinter()}
	layoutStraightLegs := FlopLayout()
	layoutStraightLegs.KneeFlexDeg = 0
	for _, tab := range tables {
		for _, base := range []Posture{FlopLayout(), layoutStraightLegs, StraightHorizontal()} {
			prev := math.Inf(-1)
			for a := 0.0; a <= 150; a += 0.25 {
				p := base
				p.TrunkArchDeg = a
				r, err := BodyCOM(Body{StatureM: 1.8}, p, tab)
				if err != nil {
					t.Fatal(err)
				}
				if r.DropM < prev-1e-12 {
					t.Fatalf("%s, %s: s fell from %.6f to %.6f at arch %v°", tab.Name, base.Name, prev, r.DropM, a)
				}
				prev = r.DropM
			}
		}
	}
}

// Higher vz never lowers the peak, nor the margin, nor the bar-plane height.
func TestPropertyHigherVzNeverLowersPeak(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for range 5000 {
		h0 := 0.5 + 1.5*rng.Float64()
		v1, v2 := 7*rng.Float64(), 7*rng.Float64()
		if v1 > v2 {
			v1, v2 = v2, v1
		}
		g := 9.76 + 0.08*rng.Float64()
		p1, err1 := Takeoff{H0M: h0, VzMS: v1, GMS2: g}.PeakHeight()
		p2, err2 := Takeoff{H0M: h0, VzMS: v2, GMS2: g}.PeakHeight()
		if err1 != nil || err2 != nil || p2 < p1 {
			t.Fatalf("vz %v→%v: peak %v→%v (%v %v)", v1, v2, p1, p2, err1, err2)
		}
		if v1 == 0 {
			continue
		}
		in := MarginInput{BarM: 1.5, H0M: h0, GMS2: g, ArchDeg: 90, LengthM: 1.8, DepthM: 0.1}
		in.VzMS = v1
		m1, err1 := Margin(in)
		in.VzMS = v2
		m2, err2 := Margin(in)
		if err1 != nil || err2 != nil || m2.MarginM < m1.MarginM {
			t.Fatalf("vz %v→%v: margin %v→%v (%v %v)", v1, v2, m1.MarginM, m2.MarginM, err1, err2)
		}
	}
}

// The margin is continuous in its inputs: the change from nudging any input
// shrinks with the nudge (1e-6 → 1e-8 cuts it at least 50-fold), including
// across the arc model's switch to its series (arch 2·0.25 rad ≈ 28.65°)
// and at arch 0.
func TestPropertyMarginContinuous(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	check := func(in MarginInput) {
		t.Helper()
		r0, err := Margin(in)
		if err != nil {
			return // outside the valid region; continuity is claimed inside it
		}
		moved := func(i int, nudge float64) (float64, bool) {
			up := in
			p := [...]*float64{&up.BarM, &up.H0M, &up.VzMS, &up.PeakM, &up.DM, &up.VxMS, &up.ArchDeg, &up.LengthM, &up.DepthM}[i]
			if *p == 0 {
				return 0, false // zero means "not given": changing it changes the mode
			}
			*p += nudge
			r1, err := Margin(up)
			if err != nil {
				return 0, false // stepped out of the valid region
			}
			return math.Abs(r1.MarginM - r0.MarginM), true
		}
		for i := range 9 {
			big, ok1 := moved(i, 1e-6)
			small, ok2 := moved(i, 1e-8)
			if ok1 && ok2 && (small > big/50+1e-12 || big > 1e-4) {
				t.Fatalf("input %d: nudges 1e-6 and 1e-8 moved the margin by %g and %g: %+v", i, big, small, in)
			}
		}
	}
	for range 3000 {
		in := MarginInput{
			BarM:     1.0 + 1.4*rng.Float64(),
			H0M:      0.8 + 0.7*rng.Float64(),
			ArchDeg:  180 * rng.Float64(),
			LengthM:  1.4 + 0.8*rng.Float64(),
			DepthM:   0.05 + 0.1*rng.Float64(),
			StatureM: 2.3,
		}
		if rng.IntN(2) == 0 {
			in.VzMS = 2 + 4*rng.Float64()
		} else {
			in.PeakM = in.H0M + 0.05 + 1.2*rng.Float64()
		}
		if rng.IntN(2) == 0 {
			in.DM, in.VxMS = 0.5+1.5*rng.Float64(), 2+3*rng.Float64()
		}
		check(in)
	}
	for _, arch := range []float64{Degrees(2 * smallAngle), 1e-9, 180 - 1e-6} {
		check(MarginInput{BarM: 1.9, VzMS: 4.3, H0M: 1.2, ArchDeg: arch, LengthM: 1.8, DepthM: 0.1})
		lo, _ := Margin(MarginInput{BarM: 1.9, VzMS: 4.3, H0M: 1.2, ArchDeg: arch - 1e-9, LengthM: 1.8, DepthM: 0.1})
		hi, _ := Margin(MarginInput{BarM: 1.9, VzMS: 4.3, H0M: 1.2, ArchDeg: arch + 1e-9, LengthM: 1.8, DepthM: 0.1})
		if math.Abs(hi.MarginM-lo.MarginM) > 1e-10 {
			t.Errorf("step of %g in the margin at arch %v°", hi.MarginM-lo.MarginM, arch)
		}
	}
}

// Never a silent NaN: over wild inputs, Margin either fails with an
// *InputError or returns finite numbers.
func TestPropertyNoSilentNaN(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	wild := func() float64 {
		switch rng.IntN(10) {
		case 0:
			return math.NaN()
		case 1:
			return math.Inf(1 - 2*rng.IntN(2))
		case 2:
			return 0
		case 3:
			return -rng.Float64() * 5
		}
		return rng.Float64() * 4
	}
	for range 20000 {
		in := MarginInput{BarM: wild(), H0M: wild(), VzMS: wild(), PeakM: wild(), DM: wild(), VxMS: wild(),
			GMS2: [...]float64{0, 9.81, wild()}[rng.IntN(3)], StatureM: wild(), ArchDeg: wild() * 45, LengthM: wild(),
			DropGiven: rng.IntN(3) == 0, DropM: wild() / 4, DepthM: wild() / 10,
			Sigma: Uncertainty{VzMS: wild() / 10, H0M: wild() / 10, ArchDeg: wild()}}
		assertFiniteOrInputError(t, in)
	}
}

func assertFiniteOrInputError(t *testing.T, in MarginInput) {
	t.Helper()
	r, err := Margin(in)
	if err != nil {
		var ie *InputError
		if !errors.As(err, &ie) {
			t.Fatalf("%+v: error %v is not an *InputError", in, err)
		}
		return
	}
	for _, v := range []float64{r.MarginM, r.SigmaM, r.COMAtBarM, r.RequiredM, r.DropM, r.DepthM, r.H0M, r.VzMS,
		r.PeakM, r.GMS2, r.TimeToBarS, r.PeakDistanceM, r.PeakPastBarM, r.TakeoffShiftM} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("%+v: non-finite result %+v", in, r)
		}
	}
}

func FuzzMargin(f *testing.F) {
	f.Add(2.0, 1.25, 4.4, 0.0, 0.0, 0.0, 90.0, 1.85, 0.11)
	f.Add(2.0, 1.25, 0.0, 2.05, 1.1, 3.9, 60.0, 1.85, 0.11)
	f.Add(1.8, 1.2, 4.3, 0.0, 1.0, 4.0, 0.0, 1.78, 0.0)
	f.Add(math.NaN(), 1.0, 7.5, -1.0, 9.0, -3.0, 200.0, 0.0, -0.1)
	f.Fuzz(func(t *testing.T, bar, h0, vz, peak, d, vx, arch, length, depth float64) {
		assertFiniteOrInputError(t, MarginInput{BarM: bar, H0M: h0, VzMS: vz, PeakM: peak, DM: d, VxMS: vx,
			ArchDeg: arch, LengthM: length, DepthM: depth, StatureM: 1.9, Sigma: DefaultUncertainty()})
	})
}

// Errors from inner calls keep their type through %w wrapping, and read
// "mechanics: field = value: reason".
func TestInputErrorWrapping(t *testing.T) {
	_, err := Margin(MarginInput{BarM: 2, VzMS: 4.4, H0M: 1.2, LengthM: 5, ArchDeg: 90, DepthM: 0.1})
	var ie *InputError
	if !errors.As(err, &ie) || ie.Field != FieldLength || ie.Value != 5 {
		t.Fatalf("wrapped error %v", err)
	}
	want := "margin: posture: mechanics: length = 5: above 3 m"
	if err.Error() != want {
		t.Errorf("error text %q, want %q", err.Error(), want)
	}
}

// Any posture inside the joint ranges gives finite geometry: a c.m. above
// the lowest surface point, an underside at or below the apex, and a
// whole-body c.m. inside the box of the segment c.m.s.
func TestPropertyBodyCOMAnyPosture(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	tables := []SegmentTable{mustDeLeva(t, Male), mustDeLeva(t, Female), DempsterWinter()}
	u := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	for range 3000 {
		p := Posture{NeckFlexDeg: u(-90, 90), TrunkArchDeg: u(0, 180), HipExtDeg: u(-150, 90), KneeFlexDeg: u(0, 170),
			ShoulderFlexDeg: u(-90, 180), ElbowFlexDeg: u(0, 160), AnklePlantarDeg: u(-40, 90), TrunkElevationDeg: u(-180, 180)}
		if rng.IntN(10) == 0 {
			p.TrunkArchDeg = 0
		}
		h := u(0.5, 2.5)
		r, err := BodyCOM(Body{StatureM: h}, p, tables[rng.IntN(3)])
		if err != nil {
			t.Fatalf("%+v: %v", p, err)
		}
		if r.COMHeightM <= 0 || r.UndersideDepthM < 0 || r.COMHeightM > h {
			t.Fatalf("%+v: %+v", p, r)
		}
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, s := range r.Segments {
			lo, hi = math.Min(lo, s.COM.ZM), math.Max(hi, s.COM.ZM)
		}
		if r.COM.ZM < lo-1e-12 || r.COM.ZM > hi+1e-12 {
			t.Fatalf("%+v: c.m. z %v outside the segments' %v..%v", p, r.COM.ZM, lo, hi)
		}
	}
}
