package mechanics

// JumpTestHeight returns the jump height of a vertical jump test from its
// flight time, h = g·t²/8, metres (Bosco C., Luhtanen P., Komi P.V., 1983,
// Eur J Appl Physiol 50:273-282): the flight is symmetric, so the c.m. rises
// for t/2 and h = g(t/2)²/2. flightS is the time from take-off to landing
// (0 < t ≤ 2·7/9.7 s); gMS2 0 means StandardGravity.
//
// Known bias: the formula assumes the c.m. lands at the height it took off
// from. Landing with bent knees or ankles, or tucking the legs, lengthens
// the flight and inflates h (by about 2.5 cm in one published comparison
// with force-plate take-off velocity); landing stiffer shortens it. It is
// for jump tests, never for a high jump, whose landing lies far below the
// take-off.
func JumpTestHeight(flightS, gMS2 float64) (float64, error) {
	g, err := gravityOrStandard(gMS2)
	if err != nil {
		return 0, err
	}
	if err := positiveUpTo(FieldFlightTime, flightS, maxFlightS, "s"); err != nil {
		return 0, err
	}
	return g * flightS * flightS / 8, nil
}

// JumpTestVz returns the take-off vertical velocity implied by a jump test's
// flight time, vz = g·t/2, m/s, with the same assumptions and bias as
// JumpTestHeight.
func JumpTestVz(flightS, gMS2 float64) (float64, error) {
	g, err := gravityOrStandard(gMS2)
	if err != nil {
		return 0, err
	}
	if err := positiveUpTo(FieldFlightTime, flightS, maxFlightS, "s"); err != nil {
		return 0, err
	}
	return g * flightS / 2, nil
}
