// Package mechanics computes the centre of mass (c.m.) of an arched high
// jumper and the flight of the jump: the arc and segment models of the body,
// the c.m. as a projectile, Hay's decomposition of bar height, jump-test
// height from flight time, local gravity, and the clearance margin with its
// uncertainty. It is pure computation: no chat, storage, clock or I/O.
//
// # Units and errors
//
// SI units throughout, carried in the names: metres (…M), seconds (…S),
// metres per second (…MS), m/s² (…MS2), kilograms (…KG). Angles are radians
// where a name ends in Rad and degrees where it ends in Deg; a coach's
// "arch 90" is 90 degrees (Radians converts). Every function checks its
// input and returns an *InputError{Field, Value, Reason} for NaN, ±Inf or a
// value outside its range (negative speeds, vz above 7 m/s, h0 above the
// stature, an arch outside 0–180°, …), never a NaN result. Errors passed on
// are wrapped with %w; use errors.As.
//
// # Arc model
//
// A uniform body of length L (default: stature) bent into a circular arc of
// central angle θ (0 ≤ θ ≤ π), apex up as in the back layout:
//
//	R  = L/θ                          radius                          [m]
//	OG = R·sin(θ/2)/(θ/2)             centre to c.m.                   [m]
//	s  = R − OG = L·(1 − sin α/α)/(2α),  α = θ/2   c.m. below the apex  [m]
//
// Source: centroid of a circular arc, r·sin α/α from the centre (Beer and
// Johnston, Vector Mechanics for Engineers: Statics; Meriam and Kraige).
// θ = 90° gives OG = 2√2/π·R; θ → 0 is the straight body, s = 0. Below
// α = 0.25 the series s = L(α/12 − α³/240 + α⁵/10080 − …) replaces the
// closed form, which would lose digits to cancellation. ArcNumeric and
// ArcDropQuad integrate the same quantity over the arc length with gonum
// (Simpson's rule; Gauss–Legendre) and agree with it. Limits: a uniform
// body of constant curvature; a real body is thicker at the trunk and bends
// mostly in the lumbar spine and at the hips.
//
// # Segment model
//
// Fourteen segments (head+neck, trunk, and left and right upper arm,
// forearm, hand, thigh, shank, foot) in the sagittal plane. Parameters:
// de Leva (1996), J Biomech 29:1223-1230, Table 4, male or female (mass
// fractions, c.m. locations, mean lengths scaled by stature/1741 mm or
// /1735 mm), or Dempster (1955) as tabulated by Winter (Table 4.1) with
// Drillis and Contini's length fractions (Winter Fig. 4.1). A Posture gives
// joint angles in degrees (neck, trunk arch, hip extension, knee, shoulder,
// elbow, ankle) and the trunk's elevation; Standing, StraightHorizontal and
// FlopLayout are named postures. The trunk is a circular arc of central
// angle TrunkArchDeg with a linear mass density along it that keeps the
// table's c.m. fraction p for the straight trunk; its c.m. is in closed form
// (see BodyCOM). Whole-body c.m. = Σ mᵢrᵢ / Σ mᵢ.
//
// The apex is the highest midline point of head, trunk, thighs and shanks;
// the bar is taken to lie directly below it. Each segment is a slab of its
// sagittal depth (Depths; defaults are fractions of stature, from memory,
// overridable per athlete) with discs at the joints, the trunk an annular
// sector. BodyCOM reports s (c.m. below the apex), d (apex to the underside
// directly below it), s − d (c.m. below the underside over the bar) and the
// need d − s. In the standing posture the apex is the vertex and the
// vertical through it runs through the whole body, so d is the stature:
// "over the bar" has no meaning there, and COMHeightM is the c.m. height.
//
// Limits: rigid straight limb segments, left and right alike, a single
// plane; de Leva's lengths are stretched or shrunk by ChainFit (0.983 male,
// 1.005 female) so the standing vertex meets the stature; the ankle height
// (0.039 of stature) and the shoulder's place on the trunk come from other
// sources (see the tables). With joint angles held fixed, arching the trunk
// past about 160° swings the hanging head or bent shanks beyond straight
// down, after which more arch lifts them again; below that, and always in
// the arc model, more arch never raises the c.m. relative to the apex.
// The standing c.m. falls at 0.563 (male) and 0.553 (female) of stature
// with de Leva, inside the usual 0.55–0.57 (common practice), and at 0.577
// with Dempster/Winter, whose trunk c.m. lies mid-way up the trunk.
//
// # Flight
//
// After take-off the c.m. is a projectile (constant-acceleration kinematics;
// air resistance neglected):
//
//	z(t) = h0 + vz·t − g·t²/2,  x(t) = vx·t                    [m]
//	peak time vz/g [s], rise H2 = vz²/(2g) [m], peak h0 + vz²/(2g) [m]
//	bar plane at t = D/vx: z = h0 + vz·D/vx − g·D²/(2vx²)       [m]
//	take-off distance that puts the peak over the bar: vx·vz/g  [m]
//	time down to a landing height hl: (vz + √(vz² + 2g(h0 − hl)))/g [s]
//
// with inverses VzForPeak, VzForBar, VzForBarAt and Takeoff.BestBar.
//
// # Hay's decomposition
//
// bar = H1 + H2 − H3: H1 the c.m. height at take-off, H2 = vz²/(2g) the rise,
// H3 the peak c.m. height minus the bar (Hay's decomposition; its use for
// the flop in Dapena's reports is from memory).
// Decompose fills in whatever the measurements determine and flags
// measurements that disagree by more than HayTolerance (5 mm).
//
// # Jump test
//
// h = g·t²/8 from the flight time t (Bosco, Luhtanen and Komi 1983, Eur J
// Appl Physiol 50:273-282). It assumes take-off and landing in the same
// posture; landing with bent knees lengthens the flight and inflates h
// (about 2.5 cm in one published comparison). Not for a high jump.
//
// # Gravity
//
// WGS84 normal gravity (NIMA TR8350.2): Somigliana's formula
// γ0 = γe(1 + k sin²φ)/√(1 − e² sin²φ) with γe = 9.7803253359 m/s²,
// k = 0.00193185265241, e² = 0.00669437999013, and the second-order
// free-air correction γh = γ0[1 − (2/a)(1 + f + m − 2f sin²φ)h + 3h²/a²]
// (about −3.086e-6 m/s² per metre). StandardGravity 9.80665 m/s² (exact)
// applies when no venue is set. RiseChange gives how much the same take-off
// rises more or less at another venue: vz²/2·(1/g₂ − 1/g₁), about 5 mm for
// vz = 4.4 m/s between pole and equator.
//
// # Clearance margin
//
// M = C − (bar + d − s): C is the c.m. height at the bar plane (take-off
// distance D and vx given) or at the peak (from vz, or measured), s the
// c.m. drop below the apex (arc model, or given from BodyCOM), d the depth
// from the midline to the underside. Positive clears, negative knocks. The
// uncertainty is first order, σ_M = √Σ(∂M/∂xᵢ·σᵢ)², with analytic partial
// derivatives of every input (independent inputs assumed), and the
// dominant input named. The model assumes the apex is over the bar when the
// c.m. crosses the bar plane and the posture is held; a positive margin is
// no promise that the bar stays up, and what an athlete should attempt is
// for the coach, within the competition rules.
package mechanics
