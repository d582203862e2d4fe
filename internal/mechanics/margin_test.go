package mechanics

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

// A margin against independent computations: s from the heights of
// 200,000 points along the arc (arcDropSampled, the centroid integral by
// the midpoint rule) and the peak from a numerically integrated flight
// (integrateFlight); margin = peak − (bar + d − s), the design's formula.
func TestMarginByHand(t *testing.T) {
	in := MarginInput{BarM: 1.80, VzMS: 4.3, H0M: 1.22, ArchDeg: 90, LengthM: 1.78, DepthM: 0.11, StatureM: 1.78}
	r, err := Margin(in)
	if err != nil {
		t.Fatal(err)
	}
	s := arcDropSampled(1.78, math.Pi/2, 200000)
	_, _, peak := numericPeak(1.22, 4.3, 0, StandardGravity)
	want := peak - (1.80 + 0.11 - s)
	if math.Abs(r.MarginM-want) > 1e-6 || math.Abs(r.DropM-s) > 1e-8 || math.Abs(r.PeakM-peak) > 1e-6 || !r.Clears {
		t.Errorf("margin %+v, want %v (s=%v, peak=%v)", r, want, s, peak)
	}
	if r.SigmaM != 0 || r.Dominant != "" || len(r.Contributions) != 0 {
		t.Errorf("zero uncertainty gave ±%v (%v)", r.SigmaM, r.Dominant)
	}
}

// Every sensitivity against a central finite difference of Margin, in all
// four modes, and σ as the root-sum-square of the contributions.
func TestMarginSensitivities(t *testing.T) {
	sig := DefaultUncertainty()
	base := []MarginInput{
		{BarM: 1.95, VzMS: 4.4, H0M: 1.25, ArchDeg: 80, LengthM: 1.84, DepthM: 0.11, Sigma: sig},
		{BarM: 1.95, PeakM: 2.05, H0M: 1.25, ArchDeg: 80, LengthM: 1.84, DepthM: 0.11, Sigma: sig},
		{BarM: 1.95, VzMS: 4.4, H0M: 1.25, DM: 1.1, VxMS: 3.9, ArchDeg: 20, LengthM: 1.84, DepthM: 0.11, Sigma: sig},
		{BarM: 1.95, PeakM: 2.2, H0M: 1.25, DM: 1.1, VxMS: 3.9, DropGiven: true, DropM: 0.16, DepthM: 0.11, Sigma: sig},
	}
	type knob struct {
		name string
		set  func(*MarginInput, float64)
		get  func(MarginInput) float64
	}
	knobs := []knob{
		{FieldBar, func(m *MarginInput, v float64) { m.BarM = v }, func(m MarginInput) float64 { return m.BarM }},
		{FieldH0, func(m *MarginInput, v float64) { m.H0M = v }, func(m MarginInput) float64 { return m.H0M }},
		{FieldVz, func(m *MarginInput, v float64) { m.VzMS = v }, func(m MarginInput) float64 { return m.VzMS }},
		{FieldPeak, func(m *MarginInput, v float64) { m.PeakM = v }, func(m MarginInput) float64 { return m.PeakM }},
		{FieldTakeoffDist, func(m *MarginInput, v float64) { m.DM = v }, func(m MarginInput) float64 { return m.DM }},
		{FieldVx, func(m *MarginInput, v float64) { m.VxMS = v }, func(m MarginInput) float64 { return m.VxMS }},
		{FieldArch, func(m *MarginInput, v float64) { m.ArchDeg = v }, func(m MarginInput) float64 { return m.ArchDeg }},
		{FieldLength, func(m *MarginInput, v float64) { m.LengthM = v }, func(m MarginInput) float64 { return m.LengthM }},
		{FieldDrop, func(m *MarginInput, v float64) { m.DropM = v }, func(m MarginInput) float64 { return m.DropM }},
		{FieldDepth, func(m *MarginInput, v float64) { m.DepthM = v }, func(m MarginInput) float64 { return m.DepthM }},
	}
	for i, in := range base {
		r, err := Margin(in)
		if err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		var ss float64
		for _, c := range r.Contributions {
			ss += c.SigmaM * c.SigmaM
			var k knob
			for _, kk := range knobs {
				if kk.name == c.Input {
					k = kk
				}
			}
			h := 1e-6 * math.Max(1, math.Abs(k.get(in)))
			up, dn := in, in
			k.set(&up, k.get(in)+h)
			k.set(&dn, k.get(in)-h)
			ru, err1 := Margin(up)
			rd, err2 := Margin(dn)
			if err1 != nil || err2 != nil {
				t.Fatalf("case %d %s: %v %v", i, c.Input, err1, err2)
			}
			fd := (ru.MarginM - rd.MarginM) / (2 * h)
			if math.Abs(fd-c.Sensitivity) > 1e-6*math.Max(1, math.Abs(fd)) {
				t.Errorf("case %d: ∂M/∂%s = %.9f, finite difference %.9f", i, c.Input, c.Sensitivity, fd)
			}
		}
		if !near(r.SigmaM, math.Sqrt(ss), 1e-12) {
			t.Errorf("case %d: σ %v, RSS %v", i, r.SigmaM, math.Sqrt(ss))
		}
		if !slices.IsSortedFunc(r.Contributions, func(a, b Contribution) int {
			switch {
			case a.SigmaM > b.SigmaM:
				return -1
			case a.SigmaM < b.SigmaM:
				return 1
			}
			return 0
		}) || r.Dominant != r.Contributions[0].Input {
			t.Errorf("case %d: contributions not largest first: %+v", i, r.Contributions)
		}
	}
}

// vz ± 0.1 m/s at 4.4 m/s moves the peak by vz/g·0.1 ≈ 4.5 cm, more than h0
// ± 2 cm or the other defaults: vz dominates a peak-over-the-bar margin.
func TestMarginDominantInput(t *testing.T) {
	r, err := Margin(MarginInput{BarM: 2.00, VzMS: 4.4, StatureM: 1.86, ArchDeg: 90, Sigma: DefaultUncertainty()})
	if err != nil {
		t.Fatal(err)
	}
	if r.Dominant != FieldVz || !near(r.Contributions[0].SigmaM, 4.4/StandardGravity*0.1, 1e-12) {
		t.Errorf("dominant %q, contributions %+v", r.Dominant, r.Contributions)
	}
	// The defaults taken are stated.
	joined := strings.Join(r.Assumptions, "; ")
	for _, want := range []string{"take-off c.m. height assumed 1.30 m", "standard gravity", "arc length = stature", "depth assumed"} {
		if !strings.Contains(joined, want) {
			t.Errorf("assumptions %q lack %q", joined, want)
		}
	}
}

// Property: a measured peak gives the same margin as the vz that produces
// it; with the take-off distance equal to the peak distance vx·vz/g, the
// bar-plane margin equals the peak margin and the peak falls over the bar.
func TestPropertyMarginModesAgree(t *testing.T) {
	g := 9.80
	vz, h0, vx := 4.3, 1.24, 4.1
	peak := h0 + vz*vz/(2*g)
	common := MarginInput{BarM: 1.90, H0M: h0, GMS2: g, ArchDeg: 70, LengthM: 1.80, DepthM: 0.11}
	a, b, c, d := common, common, common, common
	a.VzMS = vz
	b.PeakM = peak
	c.VzMS, c.DM, c.VxMS = vz, vx*vz/g, vx
	d.PeakM, d.DM, d.VxMS = peak, vx*vz/g, vx
	var got [4]MarginResult
	for i, in := range []MarginInput{a, b, c, d} {
		r, err := Margin(in)
		if err != nil {
			t.Fatal(err)
		}
		got[i] = r
	}
	for i := 1; i < 4; i++ {
		if math.Abs(got[i].MarginM-got[0].MarginM) > 1e-12 || math.Abs(got[i].VzMS-vz) > 1e-12 {
			t.Errorf("mode %d: margin %v vz %v, want %v %v", i, got[i].MarginM, got[i].VzMS, got[0].MarginM, vz)
		}
	}
	for _, r := range got[2:] {
		if !r.AtBarPlane || math.Abs(r.PeakPastBarM) > 1e-12 || math.Abs(r.TakeoffShiftM) > 1e-12 {
			t.Errorf("peak over the bar: %+v", r)
		}
	}
}

// Taking off too close: the peak falls after the bar plane, the bar-plane
// height is below the peak, and moving back by TakeoffShiftM puts the peak
// over the bar.
func TestMarginTakeoffTooClose(t *testing.T) {
	in := MarginInput{BarM: 2.00, VzMS: 4.5, H0M: 1.28, DM: 0.7, VxMS: 4.0, ArchDeg: 90, StatureM: 1.90}
	r, err := Margin(in)
	if err != nil {
		t.Fatal(err)
	}
	if r.PeakPastBarM <= 0 || r.COMAtBarM >= r.PeakM {
		t.Fatalf("close take-off: %+v", r)
	}
	in.DM += r.TakeoffShiftM
	r2, err := Margin(in)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(r2.COMAtBarM-r.PeakM) > 1e-12 || math.Abs(r2.PeakPastBarM) > 1e-12 {
		t.Errorf("after the shift the bar-plane height is %v, peak %v", r2.COMAtBarM, r.PeakM)
	}
}

func TestMarginRejects(t *testing.T) {
	ok := MarginInput{BarM: 2.0, VzMS: 4.4, H0M: 1.25, StatureM: 1.85, ArchDeg: 90}
	mod := func(f func(*MarginInput)) MarginInput { m := ok; f(&m); return m }
	for _, tc := range []struct {
		name  string
		in    MarginInput
		field string
	}{
		{"vz and peak", mod(func(m *MarginInput) { m.PeakM = 2.1 }), FieldPeak},
		{"neither vz nor peak", mod(func(m *MarginInput) { m.VzMS = 0 }), FieldVz},
		{"vz above 7", mod(func(m *MarginInput) { m.VzMS = 7.1 }), FieldVz},
		{"negative vz", mod(func(m *MarginInput) { m.VzMS = -4 }), FieldVz},
		{"h0 above stature", mod(func(m *MarginInput) { m.H0M = 1.9 }), FieldH0},
		{"no h0 nor stature", MarginInput{BarM: 2, VzMS: 4, ArchDeg: 90, LengthM: 1.8, DepthM: 0.1}, FieldH0},
		{"D without vx", mod(func(m *MarginInput) { m.DM = 1 }), FieldVx},
		{"negative vx", mod(func(m *MarginInput) { m.VxMS = -1 }), FieldVx},
		{"arch 200", mod(func(m *MarginInput) { m.ArchDeg = 200 }), FieldArch},
		{"NaN arch", mod(func(m *MarginInput) { m.ArchDeg = math.NaN() }), FieldArch},
		{"no length nor stature", MarginInput{BarM: 2, VzMS: 4, H0M: 1.2, ArchDeg: 90, DepthM: 0.1}, FieldLength},
		{"no depth nor stature", MarginInput{BarM: 2, VzMS: 4, H0M: 1.2, ArchDeg: 90, LengthM: 1.8}, FieldDepth},
		{"bar NaN", mod(func(m *MarginInput) { m.BarM = math.NaN() }), FieldBar},
		{"bar 3.5", mod(func(m *MarginInput) { m.BarM = 3.5 }), FieldBar},
		{"negative sigma", mod(func(m *MarginInput) { m.Sigma.VzMS = -0.1 }), FieldSigma},
		{"infinite sigma", mod(func(m *MarginInput) { m.Sigma.ArchDeg = math.Inf(1) }), FieldSigma},
		{"peak below h0 with D", MarginInput{BarM: 2, PeakM: 1.1, H0M: 1.2, DM: 1, VxMS: 4, StatureM: 1.8, ArchDeg: 60}, FieldPeak},
		{"peak equals h0 with D", MarginInput{BarM: 2, PeakM: 1.2, H0M: 1.2, DM: 1, VxMS: 4, StatureM: 1.8, ArchDeg: 60}, FieldPeak},
		{"c.m. lands before the bar", MarginInput{BarM: 1, VzMS: 0.5, H0M: 0.5, DM: 4.9, VxMS: 0.5, StatureM: 1.8, ArchDeg: 60}, FieldTime},
		{"drop above 1 m", MarginInput{BarM: 2, VzMS: 4, H0M: 1.2, DropGiven: true, DropM: 1.5, DepthM: 0.1}, FieldDrop},
		{"moon", mod(func(m *MarginInput) { m.GMS2 = 1.62 }), FieldGravity},
	} {
		_, err := Margin(tc.in)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != tc.field {
			t.Errorf("%s: %v, want *InputError on %q", tc.name, err, tc.field)
		}
	}
}

// The segment model's s and d feed the margin directly.
func TestMarginFromSegmentModel(t *testing.T) {
	tab := mustDeLeva(t, Female)
	body, err := BodyCOM(Body{StatureM: 1.76}, FlopLayout(), tab)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Margin(MarginInput{BarM: 1.80, VzMS: 4.0, H0M: 1.20, StatureM: 1.76, DropGiven: true,
		DropM: body.DropM, DepthM: body.UndersideDepthM, Sigma: DefaultUncertainty()})
	if err != nil {
		t.Fatal(err)
	}
	best, _ := Takeoff{H0M: 1.20, VzMS: 4.0}.BestBar(body.NeedM)
	if !near(r.MarginM, best-1.80, 1e-12) {
		t.Errorf("margin %v, best bar − bar %v", r.MarginM, best-1.80)
	}
	for _, c := range r.Contributions {
		if c.Input == FieldArch || c.Input == FieldLength {
			t.Errorf("arc inputs counted with a given drop: %+v", c)
		}
	}
}

// RequiredCOMHeight is the design's bar + d − s.
func TestRequiredCOMHeight(t *testing.T) {
	got, err := RequiredCOMHeight(2.00, 0.15, 0.11)
	if err != nil || !near(got, 1.96, 1e-15) {
		t.Errorf("RequiredCOMHeight = %v, %v; want 1.96", got, err)
	}
	for _, c := range [][3]float64{{0, 0.1, 0.1}, {2, math.NaN(), 0.1}, {2, 0.1, 0}, {2, 2, 0.1}, {2, 0.1, math.Inf(1)}} {
		if _, err := RequiredCOMHeight(c[0], c[1], c[2]); err == nil {
			t.Errorf("RequiredCOMHeight%v accepted", c)
		}
	}
}
