package mechanics

import (
	"errors"
	"math"
	"testing"
)

// crossingCase is the worked case: vz 4.4 m/s, h0 1.25 m, stature
// 1.86 m, take-off 1.1 m from the bar plane, speed across the bar g·D/vz
// (the c.m. peaks near the bar plane; /work reference: derived from
// Dapena 1980's observation that the peak lies close to the bar plane).
func crossingCase(t *testing.T, barM float64) CrossingInput {
	t.Helper()
	tab, err := DeLeva1996(Male)
	if err != nil {
		t.Fatal(err)
	}
	return CrossingInput{Body: Body{StatureM: 1.86, MassKG: 80}, Table: tab, BarM: barM, H0M: 1.25, VzMS: 4.4,
		DM: 1.1, VxAcrossMS: StandardGravity * 1.1 / 4.4}
}

// TestCrossingRigidClosedForm checks the sweep against a case worked by
// hand: a straight rigid body (one posture throughout) rotating at a
// constant rate.
//
// Derivation. Let the body keep posture P. From BodyCOM in the standing
// pose (trunk upright), the c.m. lies at (cx, cz) from the vertex, so the
// vertex lies at −(cx, cz) from the c.m.; in the crossing frame (x towards
// the bar, the head leading, i.e. mirrored) that is v0 = (cx, −cz), of
// length ρ and polar angle ψs = atan2(−cz, cx). The trunk angle is φ(t) =
// φ0 − ω·t and the standing pose has φ = 90°, so the vertex's polar angle
// about the c.m. is ψ(t) = ψs + φ(t) − 90°. The c.m. follows x = vx·t,
// z = h0 + vz·t − g·t²/2 and crosses x = D at t_b = D/vx. Choose φ0 so that
// the vertex is straight above the c.m. at t_b: ψ(t_b) = 90°, i.e.
// φ0 = 180° − ψs + ω·t_b. Then the vertex's x is
//
//	x_v(t) − D = vx·(t − t_b) + ρ·cos(90° − ω(t − t_b)) = vx·τ + ρ·sin(ωτ),  τ = t − t_b,
//
// which is 0 at τ = 0 and strictly increasing while vx > ρ·ω (its
// derivative vx + ρω·cos ωτ > 0), so the vertex crosses the bar plane once,
// at t_b, at the height z(t_b) + ρ. With D = 1.1 m, vx = 3 m/s, ω = 100°/s
// (1.745 rad/s) and ρ ≈ 0.8 m, vx > ρω holds.
func TestCrossingRigidClosedForm(t *testing.T) {
	for _, sex := range []Sex{Male, Female} {
		tab, err := DeLeva1996(sex)
		if err != nil {
			t.Fatal(err)
		}
		body := Body{StatureM: 1.80}
		straight := Posture{Name: "straight", KneeFlexDeg: 0}
		ref, err := BodyCOM(body, Standing(), tab)
		if err != nil {
			t.Fatal(err)
		}
		cx, cz := ref.COM.XM, ref.COM.ZM
		rho := math.Hypot(cx, cz)
		psiS := Degrees(math.Atan2(-cz, cx))
		const d, vx, omega, h0, vz, bar = 1.1, 3.0, 100.0, 1.20, 4.3, 1.70
		tb := d / vx
		in := CrossingInput{Body: body, Table: tab, BarM: bar, H0M: h0, VzMS: vz, DM: d, VxAcrossMS: vx,
			SpinDegS: omega, TakeoffTrunkDeg: 180 - psiS + omega*tb, KickS: 0.5,
			Postures: &CrossingPostures{Takeoff: straight, Layout: straight, Lifted: straight}}
		r, err := Crossing(in)
		if err != nil {
			t.Fatal(err)
		}
		want := h0 + vz*tb - StandardGravity*tb*tb/2 + rho - bar
		got := r.Points[0]
		if got.Name != "vertex" || !got.Crossed {
			t.Fatalf("%v: first point %+v, want the vertex crossing", sex, got)
		}
		if math.Abs(got.HeightM-want) > 0.001 || math.Abs(got.TimeS-tb) > CrossingStepS {
			t.Errorf("%v: vertex crosses %.4f m above the bar at %.4f s, hand-worked %.4f m at %.4f s", sex, got.HeightM, got.TimeS, want, tb)
		}
	}
}

// TestCrossingBarShift: raising the bar moves nothing but the bar, so every
// part's clearance drops by exactly the rise and the order of parts stays
// (a property of the geometry: the flight does not depend on the bar).
func TestCrossingBarShift(t *testing.T) {
	lo, err := Crossing(crossingCase(t, 2.00))
	if err != nil {
		t.Fatal(err)
	}
	hi, err := Crossing(crossingCase(t, 2.10))
	if err != nil {
		t.Fatal(err)
	}
	if lo.Lowest().Part != hi.Lowest().Part {
		t.Fatalf("lowest part %s at 2.00, %s at 2.10", lo.Lowest().Part, hi.Lowest().Part)
	}
	for i, p := range lo.Parts {
		q := hi.Parts[i]
		if p.Part != q.Part || math.Abs(p.ClearanceM-q.ClearanceM-0.10) > 1e-9 {
			t.Errorf("part %d: %s %+.4f at 2.00, %s %+.4f at 2.10; want the same part 0.10 m lower", i, p.Part, p.ClearanceM, q.Part, q.ClearanceM)
		}
	}
	for i, p := range lo.Points {
		if q := hi.Points[i]; math.Abs(p.HeightM-q.HeightM-0.10) > 1e-9 {
			t.Errorf("%s: %+.4f vs %+.4f", p.Name, p.HeightM, q.HeightM)
		}
	}
}

// kneeAboveHip is the first time the knees rise above the hips.
func kneeAboveHip(t *testing.T, in CrossingInput) float64 {
	t.Helper()
	var times []float64
	for i := 0; i <= 1000; i++ {
		times = append(times, float64(i)*CrossingStepS)
	}
	poses, err := CrossingPoses(in, times)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range poses {
		if p.TimeS > in.DM/in.VxAcrossMS && p.Knee.ZM > p.Hip.ZM {
			return p.TimeS
		}
	}
	return math.Inf(1)
}

// TestCrossingFasterSpinLiftsLegsSooner: with the same leg lift, a faster
// rotation about the c.m. raises the knees above the hips earlier (Dapena
// 1980, rotation in the flop: the somersault rotation carries the legs up).
func TestCrossingFasterSpinLiftsLegsSooner(t *testing.T) {
	slow, fast := crossingCase(t, 2.00), crossingCase(t, 2.00)
	slow.SpinDegS, fast.SpinDegS = 170, 230
	slow.KickS, fast.KickS = 0.55, 0.55
	ts, tf := kneeAboveHip(t, slow), kneeAboveHip(t, fast)
	if math.IsInf(tf, 1) || tf >= ts {
		t.Errorf("knees above hips at %.3f s with 230 deg/s and %.3f s with 170 deg/s; want the faster spin sooner", tf, ts)
	}
}

// TestCrossingCOMOnParabola recomputes the whole-body c.m. from the segment
// centres (Σ mᵢrᵢ/Σ mᵢ with the table's fractions) at every millisecond and
// checks it against the projectile path x = vx·t, z = h0 + vz·t − g·t²/2
// (constant-acceleration kinematics) to 1 mm, for each segment table.
func TestCrossingCOMOnParabola(t *testing.T) {
	male, _ := DeLeva1996(Male)
	female, _ := DeLeva1996(Female)
	for _, tab := range []SegmentTable{male, female, DempsterWinter()} {
		in := crossingCase(t, 2.00)
		in.Table = tab
		for i := 0; i <= 900; i++ {
			ts := float64(i) * CrossingStepS
			seg, err := SegmentCentres(in, ts)
			if err != nil {
				t.Fatal(err)
			}
			var sx, sz, m float64
			for s, p := range seg {
				f := tab.Params[Segment(s).Kind()].MassFraction
				sx, sz, m = sx+f*p.XM, sz+f*p.ZM, m+f
			}
			wx, wz := in.VxAcrossMS*ts, in.H0M+in.VzMS*ts-StandardGravity*ts*ts/2
			if math.Hypot(sx/m-wx, sz/m-wz) > 0.001 {
				t.Fatalf("%s at %.3f s: c.m. (%.4f, %.4f), parabola (%.4f, %.4f)", tab.Name, ts, sx/m, sz/m, wx, wz)
			}
		}
		r, err := Crossing(in)
		if err != nil {
			t.Fatal(err)
		}
		if !r.Parts[0].Passed || math.IsNaN(r.Parts[0].ClearanceM) {
			t.Errorf("%s: lowest part %+v", tab.Name, r.Parts[0])
		}
	}
}

// TestCapsuleLowAt checks the capsule's lowest point on a vertical line
// against brute force: the lowest of many points sampled inside the capsule
// (an independent computation: distance to the segment ≤ r).
func TestCapsuleLowAt(t *testing.T) {
	caps := []capsule{
		{vec{0, 0}, vec{1, 0.3}, 0.1},
		{vec{0.5, 1}, vec{0.4, 0.2}, 0.06},
		{vec{0, 0}, vec{0, 1}, 0.05},
		{vec{1, 1}, vec{0, 0.2}, 0.12},
	}
	dist := func(k capsule, p vec) float64 {
		d := k.q.sub(k.p)
		s := 0.0
		if l2 := d.x*d.x + d.z*d.z; l2 > 0 {
			s = math.Max(0, math.Min(1, ((p.x-k.p.x)*d.x+(p.z-k.p.z)*d.z)/l2))
		}
		c := k.p.add(d.scale(s))
		return math.Hypot(p.x-c.x, p.z-c.z)
	}
	for i, k := range caps {
		for _, x0 := range []float64{-0.2, -0.03, 0, 0.02, 0.3, 0.45, 0.5, 0.9, 1.05, 1.3} {
			want, hit := math.Inf(1), false
			for z := -0.5; z <= 1.5; z += 1e-5 {
				if dist(k, vec{x0, z}) <= k.r {
					want, hit = z, true
					break
				}
			}
			got, ok := k.lowAt(x0)
			if ok != hit || (ok && math.Abs(got-want) > 2e-5) {
				t.Errorf("capsule %d at x=%g: got %.5f %v, brute force %.5f %v", i, x0, got, ok, want, hit)
			}
		}
	}
}

func TestCrossingRefusesBadInput(t *testing.T) {
	cases := []struct {
		name  string
		edit  func(*CrossingInput)
		field string
	}{
		{"no speed across", func(in *CrossingInput) { in.VxAcrossMS = 0 }, FieldVx},
		{"no distance", func(in *CrossingInput) { in.DM = 0 }, FieldTakeoffDist},
		{"spin too fast", func(in *CrossingInput) { in.SpinDegS = 2000 }, FieldSpin},
		{"kick NaN", func(in *CrossingInput) { in.KickS = math.NaN() }, FieldKick},
		{"arch over 180", func(in *CrossingInput) { in.ArchDeg, in.ArchGiven = 200, true }, FieldArch},
		{"h0 above stature", func(in *CrossingInput) { in.H0M = 1.9 }, FieldH0},
		{"no vz", func(in *CrossingInput) { in.VzMS = 0 }, FieldVz},
	}
	for _, c := range cases {
		in := crossingCase(t, 2.00)
		c.edit(&in)
		_, err := Crossing(in)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != c.field {
			t.Errorf("%s: err %v, want an InputError on %s", c.name, err, c.field)
		}
	}
}

// TestSuggestKickClears: when the lift is late enough that the legs touch,
// the suggestion is an earlier lift, and the sweep with it clears.
func TestSuggestKickClears(t *testing.T) {
	in := crossingCase(t, 2.10)
	in.KickS = 0.75
	r, err := Crossing(in)
	if err != nil {
		t.Fatal(err)
	}
	if !r.Touches {
		t.Skipf("late lift did not touch (lowest %s %+.3f)", r.Lowest().Part, r.Lowest().ClearanceM)
	}
	a, err := SuggestKick(in)
	if err != nil {
		t.Fatal(err)
	}
	if !a.Found || a.ShiftS >= 0 {
		t.Fatalf("advice %+v, want an earlier lift", a)
	}
	in.KickS = a.KickS
	if r2, _ := Crossing(in); r2.Touches {
		t.Errorf("suggested kick %.2f s still touches: %+v", a.KickS, r2.Lowest())
	}
}
