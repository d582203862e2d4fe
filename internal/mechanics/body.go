package mechanics

import (
	"math"
)

// Body is the athlete the segment model is scaled to.
type Body struct {
	StatureM float64 // 0.5..2.5 m
	MassKG   float64 // 0 = unknown (segment masses are then 0); else 10..250 kg
	Sex      Sex     // informational: the table given to BodyCOM decides the parameters
	Depths   Depths  // sagittal thicknesses; zero fields take DefaultDepths
}

// Point is a position in the sagittal plane, metres: x horizontal, z up.
type Point struct {
	XM float64
	ZM float64
}

// SegmentCOM is one segment's share of the whole-body result.
type SegmentCOM struct {
	Segment      Segment
	MassFraction float64 // of body mass
	MassKG       float64 // 0 when the body mass is unknown
	LengthM      float64
	COM          Point // relative to the apex
}

// COMResult is the segment model's answer for one body in one posture. All
// positions are relative to the apex: the highest point of the midline of
// the head, trunk, thighs and shanks, which is where the model puts the bar
// (directly below it).
type COMResult struct {
	COM             Point // whole-body c.m., Σ mᵢrᵢ / Σ mᵢ
	Segments        [NumSegments]SegmentCOM
	ApexSegment     Segment // segment whose midline holds the apex
	DropM           float64 // s: c.m. below the apex (negative: above)
	UndersideDepthM float64 // d: from the apex straight down to the body's underside
	BelowUndersideM float64 // s − d: c.m. below the underside over the bar (negative: above it)
	NeedM           float64 // d − s: c.m. height needed above the bar with the apex over it
	COMHeightM      float64 // c.m. above the body's lowest surface point (standing: above the floor)
	MassKG          float64 // body mass used (0 if unknown)
}

// straightTrunkRad is the arch below which the trunk's slab is taken as a
// straight rectangle rather than an annular sector (whose radius L/θ would
// exceed 600 km); the difference is below 0.1 µm.
const straightTrunkRad = 1e-6

// BodyCOM computes the whole-body c.m. of the 14-segment model with the
// parameters of table, scaled to body, in posture.
//
// Model (2-D sagittal projection, left and right limbs superposed):
//   - Segment lengths are LengthFraction·stature. The head, thighs, shanks,
//     arms and feet are straight rigid segments; each c.m. lies on its
//     segment line at COMFraction from the end nearer the trunk.
//   - The trunk is a circular arc of central angle TrunkArchDeg and arc
//     length L_t, convex towards the belly. Its mass is spread along the arc
//     with the linear density ρ(u) ∝ 1 + 12(p − ½)(u − ½), u = 0 at the
//     upper end, which puts the straight trunk's c.m. at the table's
//     fraction p. The arc's c.m. is then, in closed form, with α = θ/2 and
//     the axis of symmetry vertical:
//     below the arc's midpoint: L_t·(1 − sin α/α)/(2α) (as in ArcDrop);
//     along the chord from the midpoint: L_t·12(p − ½)·(sin α − α cos α)/(4α³).
//   - The shoulder joint sits on the trunk arc at ShoulderFraction from the
//     upper end; the neck at the upper end; both hip joints at the lower end.
//     The feet hang below the ankle joints so the sole is AnkleHeight below
//     them, with the heel HeelFraction of the foot length behind.
//   - The whole body is turned by TrunkElevationDeg. The apex is the highest
//     midline point of head, trunk, thighs and shanks (ties go to the
//     trunk). Each segment is a slab of its depth (sagittal thickness),
//     with discs at the joints; the trunk's slab is the annular sector
//     between radii R ∓ depth/2 about its arc's centre. The underside over the bar is where the vertical line
//     through the apex leaves the body going down (d below the apex).
//
// Whole-body c.m. = Σ mᵢ rᵢ / Σ mᵢ (the table's fractions, which may sum to
// 0.9999). Limits: a rigid-segment, symmetric, planar model; real trunks
// bend mostly in the lumbar spine, and the depths are estimates unless the
// profile gives them.
func BodyCOM(body Body, posture Posture, table SegmentTable) (COMResult, error) {
	if err := checkStature(body.StatureM); err != nil {
		return COMResult{}, err
	}
	if body.MassKG != 0 {
		if err := inRange(FieldMass, body.MassKG, minMassKG, maxMassKG, "kg"); err != nil {
			return COMResult{}, err
		}
	}
	if err := posture.Validate(); err != nil {
		return COMResult{}, err
	}
	if err := table.validate(); err != nil {
		return COMResult{}, err
	}
	h := body.StatureM
	depth := body.Depths.kinds()
	defaults := defaultDepthFractions()
	for k := range depth {
		if depth[k] == 0 {
			depth[k] = defaults[k] * h
			continue
		}
		if err := positiveUpTo(FieldDepth, depth[k], 0.5*h, "m (half the stature)"); err != nil {
			err.(*InputError).Reason = SegmentKind(k).String() + " depth: " + err.(*InputError).Reason
			return COMResult{}, err
		}
	}
	var half [NumKinds]float64
	var length [NumKinds]float64
	for k := range half {
		half[k] = depth[k] / 2
		length[k] = table.Params[k].LengthFraction * h
	}

	m := buildModel(posture, table, length, half, h)
	return m.result(body, table, length)
}

// vec is a 2-D vector in metres.
type vec struct{ x, z float64 }

func (a vec) add(b vec) vec        { return vec{a.x + b.x, a.z + b.z} }
func (a vec) sub(b vec) vec        { return vec{a.x - b.x, a.z - b.z} }
func (a vec) scale(k float64) vec  { return vec{a.x * k, a.z * k} }
func dir(psi float64) vec          { return vec{math.Cos(psi), math.Sin(psi)} }
func lerp(a, b vec, t float64) vec { return a.add(b.sub(a).scale(t)) }
func rotateSC(a vec, s, c float64) vec {
	return vec{a.x*c - a.z*s, a.x*s + a.z*c}
}

// model holds the posed body in world coordinates (before the apex shift).
type model struct {
	com      [NumSegments]vec
	neck     vec // trunk upper end
	vertex   vec
	hip      vec
	knee     vec
	ankle    vec
	shoulder vec
	elbow    vec
	wrist    vec
	handTip  vec
	heel     vec     // foot midline, heel end
	toe      vec     // foot midline, toe end
	theta    float64 // trunk arch, rad
	radius   float64 // trunk arc radius (0 when straight)
	centre   vec     // trunk arc centre (when not straight)
	psi1     float64 // directions from the centre to the trunk's ends,
	psi2     float64 // psi1 < psi2, psi2 − psi1 = theta ≤ π
	apex     vec
	apexSeg  Segment
	half     [NumKinds]float64
}

// trunkAt returns the trunk-frame point at arc fraction u from the upper end
// of a trunk of length l bent to central angle theta, relative to the arc's
// midpoint, x along the chord towards the hips, z towards the belly:
// x = l·v·sinc(φ), z = −l·θ·v²·sinc²(φ/2)/2 with v = u − ½, φ = θv.
func trunkAt(u, l, theta float64) vec {
	v := u - 0.5
	phi := theta * v
	sh := sinc(phi / 2)
	return vec{l * v * sinc(phi), -l * theta * v * v * sh * sh / 2}
}

// trunkCOMShift returns g(α) = (sin α − α cos α)/(4α³), series below 0.25.
func trunkCOMShift(alpha float64) float64 {
	if alpha < smallAngle {
		// Σ_{k≥1} (−1)^{k+1}·2k·α^{2k−2}/(4·(2k+1)!)
		a2 := alpha * alpha
		pow, fact, sign := 1.0, 6.0, 1.0
		sum := 2.0 / (4 * 6)
		for k := 2; k <= 9; k++ {
			pow *= a2
			fact *= float64((2 * k) * (2*k + 1))
			sign = -sign
			sum += sign * float64(2*k) * pow / (4 * fact)
		}
		return sum
	}
	return (math.Sin(alpha) - alpha*math.Cos(alpha)) / (4 * alpha * alpha * alpha)
}

func buildModel(p Posture, t SegmentTable, length, half [NumKinds]float64, statureM float64) model {
	var m model
	m.half = half
	theta := Radians(p.TrunkArchDeg)
	alpha := theta / 2
	lt := length[KindTrunk]
	beta := -Radians(p.TrunkElevationDeg)
	sb, cb := math.Sincos(beta)
	world := func(a vec) vec { return rotateSC(a, sb, cb) }
	pt := func(k SegmentKind) SegmentParams { return t.Params[k] }

	// Trunk, in the trunk frame, then turned.
	neckT := trunkAt(0, lt, theta)
	hipT := trunkAt(1, lt, theta)
	shoulderT := trunkAt(t.ShoulderFraction, lt, theta)
	b := 12 * (pt(KindTrunk).COMFraction - 0.5)
	trunkCOMT := vec{lt * b * trunkCOMShift(alpha), -lt * arcDropFactor(alpha)}
	m.neck, m.hip, m.shoulder = world(neckT), world(hipT), world(shoulderT)
	m.com[Trunk] = world(trunkCOMT)

	// Directions in the world frame: trunk-frame angle + beta.
	cranial := math.Pi + alpha + beta // leaving the neck end
	caudal := -alpha + beta           // leaving the hip end

	headDir := cranial - Radians(p.NeckFlexDeg)
	m.vertex = m.neck.add(dir(headDir).scale(length[KindHead]))
	m.com[Head] = lerp(m.neck, m.vertex, pt(KindHead).COMFraction)

	thighDir := caudal - Radians(p.HipExtDeg)
	m.knee = m.hip.add(dir(thighDir).scale(length[KindThigh]))
	shankDir := thighDir - Radians(p.KneeFlexDeg)
	m.ankle = m.knee.add(dir(shankDir).scale(length[KindShank]))
	footDir := shankDir + math.Pi/2 - Radians(p.AnklePlantarDeg)
	soleDir := footDir - math.Pi/2
	ankleH := t.AnkleHeightFraction * statureM
	m.heel = m.ankle.add(dir(soleDir).scale(ankleH - half[KindFoot])).sub(dir(footDir).scale(t.HeelFraction * length[KindFoot]))
	m.toe = m.heel.add(dir(footDir).scale(length[KindFoot]))
	thighCOM := lerp(m.hip, m.knee, pt(KindThigh).COMFraction)
	shankCOM := lerp(m.knee, m.ankle, pt(KindShank).COMFraction)
	footCOM := lerp(m.heel, m.toe, pt(KindFoot).COMFraction)

	chord := m.hip.sub(m.shoulder)
	armRef := math.Atan2(chord.z, chord.x)
	if chord.x == 0 && chord.z == 0 { // shoulder at the hip: cannot happen with valid tables
		armRef = caudal
	}
	upperDir := armRef + Radians(p.ShoulderFlexDeg)
	m.elbow = m.shoulder.add(dir(upperDir).scale(length[KindUpperArm]))
	foreDir := upperDir + Radians(p.ElbowFlexDeg)
	m.wrist = m.elbow.add(dir(foreDir).scale(length[KindForearm]))
	m.handTip = m.wrist.add(dir(foreDir).scale(length[KindHand]))
	upperCOM := lerp(m.shoulder, m.elbow, pt(KindUpperArm).COMFraction)
	foreCOM := lerp(m.elbow, m.wrist, pt(KindForearm).COMFraction)
	handCOM := lerp(m.wrist, m.handTip, pt(KindHand).COMFraction)
	for _, s := range [2]Segment{UpperArmLeft, UpperArmRight} {
		m.com[s] = upperCOM
	}
	for _, s := range [2]Segment{ForearmLeft, ForearmRight} {
		m.com[s] = foreCOM
	}
	for _, s := range [2]Segment{HandLeft, HandRight} {
		m.com[s] = handCOM
	}
	for _, s := range [2]Segment{ThighLeft, ThighRight} {
		m.com[s] = thighCOM
	}
	for _, s := range [2]Segment{ShankLeft, ShankRight} {
		m.com[s] = shankCOM
	}
	for _, s := range [2]Segment{FootLeft, FootRight} {
		m.com[s] = footCOM
	}

	// Highest point of the trunk arc. In the trunk frame the arc point at
	// angle φ from its midpoint has outward normal at angle π/2 − φ; turned
	// by β it points straight up where φ = β, clamped to the arc.
	var uTop float64
	switch {
	case theta > 0:
		phi := math.Max(-alpha, math.Min(alpha, beta))
		uTop = 0.5 + phi/theta
	case math.Abs(sb) < 1e-12:
		uTop = 0.5
	case sb > 0: // straight trunk tilted hips-up
		uTop = 1
	default:
		uTop = 0
	}
	top := world(trunkAt(uTop, lt, theta))

	// The trunk's slab is an annular sector about the arc's centre, which
	// lies R below the arc's midpoint in the trunk frame.
	m.theta = theta
	if theta > straightTrunkRad {
		m.radius = lt / theta
		m.centre = world(vec{0, -m.radius})
		m.psi1 = math.Pi/2 + beta - alpha
		m.psi2 = math.Pi/2 + beta + alpha
	}

	m.apex, m.apexSeg = top, Trunk
	const tie = 1e-9 // m; a level chain keeps the apex on the trunk
	for _, c := range [3]struct {
		p vec
		s Segment
	}{{m.vertex, Head}, {m.knee, ThighLeft}, {m.ankle, ShankLeft}} {
		if c.p.z > m.apex.z+tie {
			m.apex, m.apexSeg = c.p, c.s
		}
	}
	return m
}

// interval is [lo, hi] of z along a vertical line.
type interval struct{ lo, hi float64 }

// maxPieces bounds the number of surface pieces the model has.
const maxPieces = 32

// surface collects, for the vertical line x = x0, the intervals of z covered
// by each piece of the body, and tracks the lowest surface point overall.
type surface struct {
	x0     float64
	iv     [maxPieces]interval
	n      int
	lowest float64
}

func (s *surface) add(lo, hi float64) {
	if s.n < len(s.iv) {
		s.iv[s.n] = interval{lo, hi}
		s.n++
	}
}

// slab adds the rectangle of half-thickness r around segment p→q.
func (s *surface) slab(p, q vec, r float64) {
	d := q.sub(p)
	l := math.Hypot(d.x, d.z)
	if l == 0 {
		s.disc(p, r)
		return
	}
	nrm := vec{-d.z / l, d.x / l}.scale(r)
	c := [4]vec{p.add(nrm), q.add(nrm), q.sub(nrm), p.sub(nrm)}
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range c {
		s.lowest = math.Min(s.lowest, c[i].z)
		a, b := c[i], c[(i+1)%4]
		if (a.x-s.x0)*(b.x-s.x0) > 0 {
			continue
		}
		var z0, z1 float64
		if a.x == b.x {
			z0, z1 = a.z, b.z
		} else {
			t := (s.x0 - a.x) / (b.x - a.x)
			z0 = a.z + t*(b.z-a.z)
			z1 = z0
		}
		lo = math.Min(lo, math.Min(z0, z1))
		hi = math.Max(hi, math.Max(z0, z1))
	}
	if lo <= hi {
		s.add(lo, hi)
	}
}

// sector adds the annular sector about c between radii rad ∓ r and between
// the directions psi1 and psi2 (counter-clockwise, psi2 − psi1 ≤ π, so the
// wedge is convex).
func (s *surface) sector(c vec, rad, r, psi1, psi2 float64) {
	d1, d2 := dir(psi1), dir(psi2)
	inner := math.Max(rad-r, 0)
	outer := rad + r
	// Lowest point: the four corners, or straight down if the wedge holds it.
	for _, p := range [4]vec{c.add(d1.scale(inner)), c.add(d1.scale(outer)), c.add(d2.scale(inner)), c.add(d2.scale(outer))} {
		s.lowest = math.Min(s.lowest, p.z)
	}
	down := vec{0, -1}
	if cross(d1, down) >= 0 && cross(down, d2) >= 0 {
		s.lowest = math.Min(s.lowest, c.z-outer)
	}
	dx := s.x0 - c.x
	if math.Abs(dx) > outer {
		return
	}
	// The wedge, cross(d1, w) ≥ 0 and cross(w, d2) ≥ 0 for w = (dx, z − c.z),
	// cut the line to zlo..zhi.
	zlo, zhi := math.Inf(-1), math.Inf(1)
	cut := func(a, b float64) bool { // a·(z − c.z) + b ≥ 0
		switch {
		case a > 0:
			zlo = math.Max(zlo, c.z-b/a)
		case a < 0:
			zhi = math.Min(zhi, c.z-b/a)
		default:
			return b >= 0
		}
		return true
	}
	if !cut(d1.x, -d1.z*dx) || !cut(-d2.x, dx*d2.z) {
		return
	}
	ho := math.Sqrt(outer*outer - dx*dx)
	clip := func(lo, hi float64) {
		lo, hi = math.Max(lo, zlo), math.Min(hi, zhi)
		if lo <= hi {
			s.add(lo, hi)
		}
	}
	if math.Abs(dx) >= inner {
		clip(c.z-ho, c.z+ho)
		return
	}
	hi := math.Sqrt(inner*inner - dx*dx)
	clip(c.z+hi, c.z+ho)
	clip(c.z-ho, c.z-hi)
}

func cross(a, b vec) float64 { return a.x*b.z - a.z*b.x }

// disc adds the disc of radius r at c.
func (s *surface) disc(c vec, r float64) {
	s.lowest = math.Min(s.lowest, c.z-r)
	dx := s.x0 - c.x
	if math.Abs(dx) > r {
		return
	}
	hz := math.Sqrt(r*r - dx*dx)
	s.add(c.z-hz, c.z+hz)
}

// underside returns the z where the line x = x0 leaves the body going down
// from z0 (which lies inside the body).
func (s *surface) underside(z0 float64) float64 {
	bottom := z0
	for changed := true; changed; {
		changed = false
		for _, v := range s.iv[:s.n] {
			if v.lo < bottom && v.hi >= bottom-1e-12 {
				bottom = v.lo
				changed = true
			}
		}
	}
	return bottom
}

func (m *model) surface() *surface {
	s := &surface{x0: m.apex.x, lowest: math.Inf(1)}
	h := m.half
	jr := func(a, b SegmentKind) float64 { return math.Min(h[a], h[b]) }
	if m.radius == 0 {
		s.slab(m.neck, m.hip, h[KindTrunk])
	} else {
		s.sector(m.centre, m.radius, h[KindTrunk], m.psi1, m.psi2)
	}
	s.slab(m.neck, m.vertex, h[KindHead])
	s.disc(m.neck, jr(KindHead, KindTrunk))
	s.slab(m.hip, m.knee, h[KindThigh])
	s.disc(m.hip, jr(KindTrunk, KindThigh))
	s.slab(m.knee, m.ankle, h[KindShank])
	s.disc(m.knee, jr(KindThigh, KindShank))
	s.slab(m.heel, m.toe, h[KindFoot])
	s.disc(m.ankle, jr(KindShank, KindFoot))
	s.slab(m.shoulder, m.elbow, h[KindUpperArm])
	s.disc(m.shoulder, h[KindUpperArm])
	s.slab(m.elbow, m.wrist, h[KindForearm])
	s.disc(m.elbow, jr(KindUpperArm, KindForearm))
	s.slab(m.wrist, m.handTip, h[KindHand])
	s.disc(m.wrist, jr(KindForearm, KindHand))
	return s
}

func (m *model) result(body Body, t SegmentTable, length [NumKinds]float64) (COMResult, error) {
	var r COMResult
	var sum vec
	var mass float64
	for s := Head; s < NumSegments; s++ {
		k := s.Kind()
		f := t.Params[k].MassFraction
		sum = sum.add(m.com[s].scale(f))
		mass += f
		c := m.com[s].sub(m.apex)
		r.Segments[s] = SegmentCOM{Segment: s, MassFraction: f, MassKG: f * body.MassKG, LengthM: length[k], COM: Point{c.x, c.z}}
	}
	com := sum.scale(1 / mass).sub(m.apex)
	surf := m.surface()
	under := surf.underside(m.apex.z)
	r.COM = Point{com.x, com.z}
	r.ApexSegment = m.apexSeg
	r.DropM = -com.z
	r.UndersideDepthM = m.apex.z - under
	r.BelowUndersideM = r.DropM - r.UndersideDepthM
	r.NeedM = -r.BelowUndersideM
	r.COMHeightM = com.z + m.apex.z - surf.lowest
	r.MassKG = body.MassKG
	for _, v := range []float64{r.COM.XM, r.COM.ZM, r.UndersideDepthM, r.COMHeightM} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return COMResult{}, &InputError{Field: FieldPosture, Value: v, Reason: "the posture gives no finite geometry"}
		}
	}
	return r, nil
}
