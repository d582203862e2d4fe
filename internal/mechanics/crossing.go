package mechanics

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// Crossing defaults. Each is marked with where it comes from.
const (
	// DefaultCrossingArchDeg is the trunk arch of the layout over the bar,
	// the central angle of the trunk arc: the illustrative layout of
	// FlopLayout (common practice).
	DefaultCrossingArchDeg = 60.0
	// DefaultTakeoffTrunkDeg is the trunk's angle above the horizontal at
	// the end of the take-off, leaning back 5° from upright towards the bar
	// (from memory: the body is near vertical at the end of a flop take-off,
	// Dapena's reports).
	DefaultTakeoffTrunkDeg = 85.0
	// DefaultKickDelayS is how long after the c.m. crosses the bar plane the
	// leg lift starts, once the hips have passed (from memory: the hips pass
	// about 0.1 s after the c.m. plane crossing in descriptions of the
	// technique; assumed).
	DefaultKickDelayS = 0.09
	// LegLiftS is how long the leg lift (hip flexion, knee extension) takes
	// (assumed, from memory of video timing).
	LegLiftS = 0.15
	// CrossingStepS is the sweep's time step, 1 ms.
	CrossingStepS = 0.001
	// crossingAfterS is how long after the c.m. crosses the bar plane the
	// sweep runs at most; the body has passed long before.
	crossingAfterS = 0.9
	// maxSpinDegS bounds the rotation rate; published flop somersault rates
	// are a few hundred degrees a second (from memory).
	maxSpinDegS = 720.0
)

// Input fields of the crossing, for errors.
const (
	FieldSpin = "spin"
	FieldKick = "kick"
)

// BodyPart names a part of the body that can touch the bar, in the words a
// coach uses when logging a knock.
type BodyPart string

// The body parts of the crossing model. Head: neck to vertex. Shoulders: the
// upper quarter of the trunk and the upper arms. Back: the middle half of
// the trunk. Hips: the lower quarter of the trunk. Thighs, calves (shanks),
// heels (feet). Hand: forearm and hand.
const (
	PartHead      BodyPart = "head"
	PartShoulders BodyPart = "shoulders"
	PartBack      BodyPart = "back"
	PartHips      BodyPart = "hips"
	PartThighs    BodyPart = "thighs"
	PartCalves    BodyPart = "calves"
	PartHeels     BodyPart = "heels"
	PartHand      BodyPart = "hand"
)

// BodyParts returns the parts in head-to-foot order.
func BodyParts() []BodyPart {
	return []BodyPart{PartHead, PartShoulders, PartBack, PartHips, PartThighs, PartCalves, PartHeels, PartHand}
}

// CrossingPostures are the three key postures of the pass. Their
// TrunkElevationDeg is ignored: the rotation sets it.
type CrossingPostures struct {
	Takeoff Posture // at the end of the take-off
	Layout  Posture // reached when the c.m. crosses the bar plane
	Lifted  Posture // after the leg lift
}

// DefaultCrossingPostures returns the postures used when none are given,
// with the layout's trunk arched by archDeg:
//   - take-off: straight, feet pointed 30° (near upright; assumed);
//   - layout: FlopLayout with the given arch (head back 30°, hips extended
//     20°, knees bent 60°; common practice);
//   - lifted: chin towards the chest (neck flexed 30°), arch down to a third,
//     hips flexed 60°, knees straight (the legs lift after the hips pass;
//     common practice, angles assumed).
//
// Arms stay along the trunk throughout (assumed).
func DefaultCrossingPostures(archDeg float64) CrossingPostures {
	layout := FlopLayout()
	layout.TrunkArchDeg = archDeg
	return CrossingPostures{
		Takeoff: Posture{Name: "take-off", AnklePlantarDeg: 30},
		Layout:  layout,
		Lifted:  Posture{Name: "legs lifted", NeckFlexDeg: 30, TrunkArchDeg: archDeg / 3, HipExtDeg: -60, AnklePlantarDeg: 30},
	}
}

// CrossingInput describes one pass over the bar. Zero fields marked so take
// their defaults.
type CrossingInput struct {
	Body  Body
	Table SegmentTable
	BarM  float64 // bar height, m
	H0M   float64 // c.m. height at take-off, m
	VzMS  float64 // vertical c.m. speed at take-off, m/s
	DM    float64 // take-off distance: c.m. to the bar plane at take-off, m
	// VxAcrossMS is the component of the horizontal c.m. speed across the
	// bar (perpendicular to the bar plane), m/s.
	VxAcrossMS float64
	GMS2       float64 // 0: StandardGravity
	// ArchDeg is the layout's trunk arch; with ArchGiven false,
	// DefaultCrossingArchDeg.
	ArchDeg   float64
	ArchGiven bool
	// KickS is the time after take-off when the leg lift starts; 0: the
	// c.m. plane crossing plus DefaultKickDelayS.
	KickS float64
	// SpinDegS is the rotation rate of the trunk, degrees per second,
	// positive head towards the bar; 0: the rate that turns the trunk from
	// its take-off angle to horizontal when the c.m. crosses the bar plane.
	SpinDegS float64
	// TakeoffTrunkDeg is the trunk chord's angle above the horizontal at
	// take-off (90 upright, back to the bar); 0: DefaultTakeoffTrunkDeg.
	TakeoffTrunkDeg float64
	// Postures overrides the key postures (nil: DefaultCrossingPostures).
	Postures *CrossingPostures
}

// PartClearance is one body part's closest pass.
type PartClearance struct {
	Part BodyPart
	// ClearanceM is the lowest height of the part's outline above the bar,
	// taken on the bar plane over the whole sweep; negative: below the bar
	// top, so the part would touch.
	ClearanceM float64
	TimeS      float64 // when, after take-off
	Touches    bool    // ClearanceM < 0
	Passed     bool    // the part reached the bar plane during the sweep
}

// PointCrossing is a midline point's height above the bar as it crosses the
// bar plane (first crossing; Crossed false if it never did in the sweep).
type PointCrossing struct {
	Name    string // "vertex", "neck", "shoulder", "elbow", "wrist", "hand tip", "hip", "knee", "ankle", "heel", "toe"
	HeightM float64
	TimeS   float64
	Crossed bool
}

// Pose is the body at one instant, in the plane across the bar: x from the
// take-off point towards the bar, z up from the ground, metres.
type Pose struct {
	TimeS                                         float64
	COM                                           Point
	Vertex, Neck, Shoulder, Elbow, Wrist, Hand    Point
	Hip, Knee, Ankle, Heel, Toe                   Point
	Trunk                                         [trunkPieces + 1]Point // midline of the trunk arc, neck to hip
	TrunkDeg                                      float64                // trunk chord angle above the horizontal, head towards the bar at 0
	HeadHalfM, TrunkHalfM, ThighHalfM, ShankHalfM float64                // half depths, for drawing
}

// CrossingResult is the sweep's answer.
type CrossingResult struct {
	Parts   []PartClearance // every part, lowest clearance first
	Touches bool            // some part's clearance is below 0
	Points  []PointCrossing // midline end points, head to toe
	// LowestPoint is where the lowest part's outline came closest: on the
	// bar plane, at Parts[0].TimeS.
	LowestPoint Point
	COMAtBarM   float64 // c.m. height when it crosses the bar plane
	TimeAtBarS  float64 // D / VxAcross
	PeakM       float64 // h0 + vz²/2g
	KickS       float64 // leg lift start used
	SpinDegS    float64 // rotation used
	ArchDeg     float64
	TakeoffDeg  float64 // trunk angle at take-off used
	EndS        float64 // end of the sweep
	Steps       int
	Assumptions []string
}

// Lowest returns the part with the least clearance.
func (r CrossingResult) Lowest() PartClearance { return r.Parts[0] }

// Part returns the named part's clearance.
func (r CrossingResult) Part(p BodyPart) (PartClearance, bool) {
	for _, c := range r.Parts {
		if c.Part == p {
			return c, true
		}
	}
	return PartClearance{}, false
}

// trunkPieces is how many chords stand for the trunk arc in the outline;
// for a 60° arc a chord sags 1.6 mm below the arc.
const trunkPieces = 8

// crossing is a validated input with its derived constants.
type crossing struct {
	in                      CrossingInput
	g, tb, kick, spin, phi0 float64
	length, half            [NumKinds]float64
	postures                CrossingPostures
	massSum                 float64
}

func prepareCrossing(in CrossingInput) (crossing, []string, error) {
	var notes []string
	note := func(f string, a ...any) { notes = append(notes, fmt.Sprintf(f, a...)) }
	c := crossing{in: in}
	var err error
	if c.g, err = gravityOrStandard(in.GMS2); err != nil {
		return c, nil, err
	}
	if err := checkStature(in.Body.StatureM); err != nil {
		return c, nil, err
	}
	if err := checkBar(in.BarM); err != nil {
		return c, nil, err
	}
	if err := checkH0(in.H0M); err != nil {
		return c, nil, err
	}
	if in.H0M > in.Body.StatureM {
		return c, nil, inputErr(FieldH0, in.H0M, fmt.Sprintf("above the stature %.2f m", in.Body.StatureM))
	}
	if err := checkVz(in.VzMS); err != nil {
		return c, nil, err
	}
	if in.VzMS <= 0 {
		return c, nil, inputErr(FieldVz, in.VzMS, "the crossing needs a take-off vz above 0")
	}
	if err := checkDist(in.DM); err != nil {
		return c, nil, err
	}
	if in.DM <= 0 {
		return c, nil, inputErr(FieldTakeoffDist, in.DM, "the crossing needs the take-off distance to the bar plane")
	}
	if err := checkVx(in.VxAcrossMS); err != nil {
		return c, nil, err
	}
	if in.VxAcrossMS <= 0 {
		return c, nil, inputErr(FieldVx, in.VxAcrossMS, "the crossing needs the horizontal speed across the bar")
	}
	if err := in.Table.validate(); err != nil {
		return c, nil, err
	}
	arch := DefaultCrossingArchDeg
	if in.ArchGiven {
		if err := inRange(FieldArch, in.ArchDeg, 0, 180, "degrees"); err != nil {
			return c, nil, err
		}
		arch = in.ArchDeg
	} else {
		note("trunk arch over the bar %.0f° (common practice layout)", arch)
	}
	if in.Postures != nil {
		c.postures = *in.Postures
	} else {
		c.postures = DefaultCrossingPostures(arch)
	}
	for _, p := range []Posture{c.postures.Takeoff, c.postures.Layout, c.postures.Lifted} {
		p.TrunkElevationDeg = 0
		if err := p.Validate(); err != nil {
			return c, nil, err
		}
	}
	c.tb = in.DM / in.VxAcrossMS
	c.phi0 = DefaultTakeoffTrunkDeg
	if in.TakeoffTrunkDeg != 0 {
		if err := inRange(FieldPosture, in.TakeoffTrunkDeg, -180, 180, "degrees (trunk at take-off)"); err != nil {
			return c, nil, err
		}
		c.phi0 = in.TakeoffTrunkDeg
	} else {
		note("trunk %.0f° above the horizontal at take-off (near upright, from memory)", c.phi0)
	}
	switch {
	case in.SpinDegS != 0:
		if err := inRange(FieldSpin, in.SpinDegS, -maxSpinDegS, maxSpinDegS, "deg/s"); err != nil {
			return c, nil, err
		}
		c.spin = in.SpinDegS
	default:
		c.spin = c.phi0 / c.tb
		note("rotation %.0f deg/s, trunk horizontal when the c.m. crosses the bar plane", c.spin)
	}
	c.kick = in.KickS
	if c.kick == 0 {
		c.kick = c.tb + DefaultKickDelayS
		note("legs lift %.2f s after take-off (%.2f s after the c.m. crosses the bar plane, from memory)", c.kick, DefaultKickDelayS)
	} else if err := inRange(FieldKick, c.kick, 0, c.tb+crossingAfterS, "s after take-off"); err != nil {
		return c, nil, err
	}
	h := in.Body.StatureM
	depth := in.Body.Depths.kinds()
	def := defaultDepthFractions()
	for k := range depth {
		if depth[k] == 0 {
			depth[k] = def[k] * h
		} else if err := positiveUpTo(FieldDepth, depth[k], 0.5*h, "m (half the stature)"); err != nil {
			return c, nil, err
		}
		c.half[k] = depth[k] / 2
		c.length[k] = in.Table.Params[k].LengthFraction * h
	}
	c.massSum = in.Table.MassSum()
	return c, notes, nil
}

// smoothstep is 0 before a, 1 after b, 3s² − 2s³ between.
func smoothstep(t, a, b float64) float64 {
	if t <= a {
		return 0
	}
	if t >= b {
		return 1
	}
	s := (t - a) / (b - a)
	return s * s * (3 - 2*s)
}

func mixPosture(a, b Posture, w float64) Posture {
	m := func(x, y float64) float64 { return x + (y-x)*w }
	return Posture{
		NeckFlexDeg:     m(a.NeckFlexDeg, b.NeckFlexDeg),
		TrunkArchDeg:    m(a.TrunkArchDeg, b.TrunkArchDeg),
		HipExtDeg:       m(a.HipExtDeg, b.HipExtDeg),
		KneeFlexDeg:     m(a.KneeFlexDeg, b.KneeFlexDeg),
		ShoulderFlexDeg: m(a.ShoulderFlexDeg, b.ShoulderFlexDeg),
		ElbowFlexDeg:    m(a.ElbowFlexDeg, b.ElbowFlexDeg),
		AnklePlantarDeg: m(a.AnklePlantarDeg, b.AnklePlantarDeg),
	}
}

// postureAt is the posture at time t: take-off to layout over [0, t_bar],
// layout to lifted over [kick, kick + LegLiftS], each with a smoothstep.
func (c *crossing) postureAt(t float64) Posture {
	p := mixPosture(c.postures.Takeoff, c.postures.Layout, smoothstep(t, 0, c.tb))
	if t > c.kick {
		p = mixPosture(p, c.postures.Lifted, smoothstep(t, c.kick, c.kick+LegLiftS))
	}
	return p
}

// trunkDegAt is φ(t) = φ0 − ω·t, the trunk chord's angle above the
// horizontal (0: lying on the back, head towards the bar).
func (c *crossing) trunkDegAt(t float64) float64 { return c.phi0 - c.spin*t }

// comAt is the c.m. on its parabola: x = vx·t, z = h0 + vz·t − g·t²/2.
func (c *crossing) comAt(t float64) vec {
	return vec{c.in.VxAcrossMS * t, c.in.H0M + c.in.VzMS*t - c.g*t*t/2}
}

// wrapDeg brings an angle into (−180, 180].
func wrapDeg(a float64) float64 {
	a = math.Mod(a, 360)
	if a > 180 {
		a -= 360
	} else if a <= -180 {
		a += 360
	}
	return a
}

// posed is the body at one instant in world coordinates.
type posed struct {
	m     model
	trunk [trunkPieces + 1]vec
	com   vec
	seg   [NumSegments]vec
}

// pose builds the segment model in the posture of time t, turned to the
// trunk angle φ(t), mirrored so the head leads towards +x (the bar), and
// shifted so the whole-body c.m. Σmᵢrᵢ/Σmᵢ lies on the parabola.
func (c *crossing) pose(t float64) posed {
	p := c.postureAt(t)
	// Posture's elevation runs 0 = head towards −x; the mirror x → −x makes
	// it head towards +x, so the elevation is φ itself.
	phi := wrapDeg(c.trunkDegAt(t))
	p.TrunkElevationDeg = phi
	m := buildModel(p, c.in.Table, c.length, c.half, c.in.Body.StatureM)
	var sum vec
	for s := Head; s < NumSegments; s++ {
		sum = sum.add(m.com[s].scale(c.in.Table.Params[s.Kind()].MassFraction))
	}
	own := sum.scale(1 / c.massSum)
	target := c.comAt(t)
	w := func(a vec) vec { return vec{target.x - (a.x - own.x), target.z + (a.z - own.z)} }
	var out posed
	out.m = m
	for _, f := range []*vec{&m.neck, &m.vertex, &m.hip, &m.knee, &m.ankle, &m.shoulder, &m.elbow, &m.wrist, &m.handTip, &m.heel, &m.toe} {
		*f = w(*f)
	}
	out.m = m
	for s := Head; s < NumSegments; s++ {
		out.seg[s] = w(m.com[s])
	}
	theta := Radians(p.TrunkArchDeg)
	sb, cb := math.Sincos(-Radians(phi))
	for i := range out.trunk {
		out.trunk[i] = w(rotateSC(trunkAt(float64(i)/trunkPieces, c.length[KindTrunk], theta), sb, cb))
	}
	out.com = target
	return out
}

// capsule is a segment swept by a disc: the outline of one piece of a part.
type capsule struct {
	p, q vec
	r    float64
}

// lowAt returns the lowest z of the capsule on the vertical line x = x0,
// and whether the line meets it. The capsule is the slab of half-width r
// around p→q plus discs of radius r at both ends; being convex, its lowest
// point on the line lies on a disc's lower arc or on the slab's lower edge.
func (k capsule) lowAt(x0 float64) (float64, bool) {
	low, ok := math.Inf(1), false
	for _, e := range [2]vec{k.p, k.q} {
		if dx := x0 - e.x; math.Abs(dx) <= k.r {
			low, ok = math.Min(low, e.z-math.Sqrt(k.r*k.r-dx*dx)), true
		}
	}
	d := k.q.sub(k.p)
	l := math.Hypot(d.x, d.z)
	if l == 0 || d.x == 0 {
		return low, ok
	}
	n := vec{-d.z / l, d.x / l}
	if n.z > 0 {
		n = n.scale(-1)
	}
	a, b := k.p.add(n.scale(k.r)), k.q.add(n.scale(k.r))
	if (a.x-x0)*(b.x-x0) <= 0 {
		s := (x0 - a.x) / (b.x - a.x)
		low, ok = math.Min(low, a.z+s*(b.z-a.z)), true
	}
	return low, ok
}

// partCapsules lists the outline pieces of each part.
func (c *crossing) partCapsules(b *posed, fn func(BodyPart, capsule)) {
	m, h := &b.m, c.half
	fn(PartHead, capsule{m.neck, m.vertex, h[KindHead]})
	for i := 0; i < trunkPieces; i++ {
		part := PartBack
		switch {
		case i < trunkPieces/4:
			part = PartShoulders
		case i >= trunkPieces*3/4:
			part = PartHips
		}
		fn(part, capsule{b.trunk[i], b.trunk[i+1], h[KindTrunk]})
	}
	fn(PartShoulders, capsule{m.shoulder, m.elbow, h[KindUpperArm]})
	fn(PartHand, capsule{m.elbow, m.wrist, h[KindForearm]})
	fn(PartHand, capsule{m.wrist, m.handTip, h[KindHand]})
	fn(PartThighs, capsule{m.hip, m.knee, h[KindThigh]})
	fn(PartCalves, capsule{m.knee, m.ankle, h[KindShank]})
	fn(PartHeels, capsule{m.heel, m.toe, h[KindFoot]})
}

func (b *posed) points() [11]vec {
	m := &b.m
	return [11]vec{m.vertex, m.neck, m.shoulder, m.elbow, m.wrist, m.handTip, m.hip, m.knee, m.ankle, m.heel, m.toe}
}

func pointNames() []string {
	return []string{"vertex", "neck", "shoulder", "elbow", "wrist", "hand tip", "hip", "knee", "ankle", "heel", "toe"}
}

// Crossing sweeps the pass over the bar in CrossingStepS steps.
//
// Model. In the vertical plane across the bar (x from the take-off point
// towards the bar, z up) the c.m. is a projectile: x = vx·t, z = h0 + vz·t −
// g·t²/2, crossing the bar plane x = D at t_b = D/vx. The body is the
// 14-segment model of table scaled to the athlete, in a posture that changes
// with time: from the take-off posture to the layout (trunk arched) over
// [0, t_b], then to the lifted posture (hips flexed, knees straight) over
// [kick, kick + LegLiftS], each blend a smoothstep of the joint angles. The
// trunk's chord turns at the rotation rate ω: φ(t) = φ0 − ω·t (by default
// ω = φ0/t_b, so the trunk is level at t_b). At each instant the whole-body
// c.m. Σmᵢrᵢ/Σmᵢ is computed from the segments and the body is placed so
// that it sits on the parabola; posture changes thus move the segments
// relative to the c.m.
//
// Sweep. Each part's outline is a chain of capsules (segment line ± half
// its sagittal depth, Depths); at every step the lowest point of each
// capsule on the bar plane is taken, and a part's clearance is the least of
// those heights above the bar over the sweep. Midline end points are
// reported at their first crossing of the plane (linear between steps).
//
// Limits: a planar, symmetric body (both legs together, the arms along the
// trunk); the rotation is prescribed, not derived from angular momentum
// (Dapena 1980: in flight a jumper redistributes a fixed angular momentum);
// the bar is a line, its sag and the twist about the long axis are ignored.
func Crossing(in CrossingInput) (CrossingResult, error) {
	c, notes, err := prepareCrossing(in)
	if err != nil {
		return CrossingResult{}, fmt.Errorf("crossing: %w", err)
	}
	return c.sweep(notes), nil
}

func (c *crossing) sweep(notes []string) CrossingResult {
	r := CrossingResult{TimeAtBarS: c.tb, KickS: c.kick, SpinDegS: c.spin, TakeoffDeg: c.phi0, Assumptions: notes,
		ArchDeg: c.postures.Layout.TrunkArchDeg}
	r.COMAtBarM = c.comAt(c.tb).z
	r.PeakM = c.in.H0M + c.in.VzMS*c.in.VzMS/(2*c.g)
	end := c.tb + crossingAfterS
	if tg := (c.in.VzMS + math.Sqrt(c.in.VzMS*c.in.VzMS+2*c.g*c.in.H0M)) / c.g; tg < end {
		end = tg
	}
	r.EndS = end
	parts := BodyParts()
	best := make(map[BodyPart]*PartClearance, len(parts))
	for _, p := range parts {
		best[p] = &PartClearance{Part: p, ClearanceM: math.Inf(1)}
	}
	lowest := map[BodyPart]Point{}
	names := pointNames()
	r.Points = make([]PointCrossing, len(names))
	for i, n := range names {
		r.Points[i].Name = n
	}
	x0, bar := c.in.DM, c.in.BarM
	var prev [11]vec
	n := int(math.Floor(end/CrossingStepS + 1e-9))
	for i := 0; i <= n; i++ {
		t := float64(i) * CrossingStepS
		b := c.pose(t)
		c.partCapsules(&b, func(part BodyPart, k capsule) {
			z, ok := k.lowAt(x0)
			if !ok {
				return
			}
			pc := best[part]
			pc.Passed = true
			if z-bar < pc.ClearanceM {
				pc.ClearanceM, pc.TimeS = z-bar, t
				lowest[part] = Point{x0, z}
			}
		})
		pts := b.points()
		if i > 0 {
			for j, p := range pts {
				q := prev[j]
				if r.Points[j].Crossed || q.x >= x0 || p.x < x0 {
					continue
				}
				s := (x0 - q.x) / (p.x - q.x)
				r.Points[j] = PointCrossing{Name: names[j], HeightM: q.z + s*(p.z-q.z) - bar, TimeS: t - CrossingStepS*(1-s), Crossed: true}
			}
		}
		prev = pts
		r.Steps++
	}
	for _, p := range parts {
		pc := best[p]
		if !pc.Passed {
			pc.ClearanceM = math.NaN()
		}
		pc.Touches = pc.Passed && pc.ClearanceM < 0
		r.Touches = r.Touches || pc.Touches
		r.Parts = append(r.Parts, *pc)
	}
	slices.SortStableFunc(r.Parts, func(a, b PartClearance) int {
		switch {
		case a.Passed != b.Passed:
			if a.Passed {
				return -1
			}
			return 1
		case !a.Passed:
			return 0
		}
		return cmp.Compare(a.ClearanceM, b.ClearanceM)
	})
	r.LowestPoint = lowest[r.Parts[0].Part]
	return r
}

// CrossingPoses returns the body at the given times after take-off, for a
// picture of the pass.
func CrossingPoses(in CrossingInput, timesS []float64) ([]Pose, error) {
	c, _, err := prepareCrossing(in)
	if err != nil {
		return nil, fmt.Errorf("crossing: %w", err)
	}
	out := make([]Pose, 0, len(timesS))
	for _, t := range timesS {
		if err := inRange(FieldTime, t, 0, maxFlightTimeS, "s"); err != nil {
			return nil, fmt.Errorf("crossing: %w", err)
		}
		b := c.pose(t)
		pt := func(v vec) Point { return Point{v.x, v.z} }
		m := &b.m
		p := Pose{TimeS: t, COM: pt(b.com), Vertex: pt(m.vertex), Neck: pt(m.neck), Shoulder: pt(m.shoulder),
			Elbow: pt(m.elbow), Wrist: pt(m.wrist), Hand: pt(m.handTip), Hip: pt(m.hip), Knee: pt(m.knee),
			Ankle: pt(m.ankle), Heel: pt(m.heel), Toe: pt(m.toe), TrunkDeg: c.trunkDegAt(t),
			HeadHalfM: c.half[KindHead], TrunkHalfM: c.half[KindTrunk], ThighHalfM: c.half[KindThigh], ShankHalfM: c.half[KindShank]}
		for i, v := range b.trunk {
			p.Trunk[i] = pt(v)
		}
		out = append(out, p)
	}
	return out, nil
}

// SegmentCentres returns each segment's c.m. at time t after take-off, in
// the crossing's world frame, so a caller can recompute the whole-body c.m.
func SegmentCentres(in CrossingInput, tS float64) ([NumSegments]Point, error) {
	var out [NumSegments]Point
	c, _, err := prepareCrossing(in)
	if err != nil {
		return out, fmt.Errorf("crossing: %w", err)
	}
	if err := inRange(FieldTime, tS, 0, maxFlightTimeS, "s"); err != nil {
		return out, fmt.Errorf("crossing: %w", err)
	}
	b := c.pose(tS)
	for s := range b.seg {
		out[s] = Point{b.seg[s].x, b.seg[s].z}
	}
	return out, nil
}
