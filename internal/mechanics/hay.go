package mechanics

import (
	"fmt"
	"math"
)

// HayTolerance is how far, in metres, measured values may disagree with
// bar = H1 + H2 − H3 (and H2 = vz²/2g) before Decompose calls them
// inconsistent: half a centimetre, the resolution of a bar measurement.
const HayTolerance = 0.005

// Some returns a pointer to v, for the optional fields of HayMeasured.
func Some(v float64) *float64 { return &v }

// HayMeasured holds whatever the coach measured of one jump; nil fields were
// not measured. GMS2 is gravity (0 = StandardGravity).
type HayMeasured struct {
	BarM  *float64 // bar height
	H1M   *float64 // c.m. height at the end of the take-off
	H2M   *float64 // c.m. rise in flight, peak − H1
	H3M   *float64 // peak c.m. height minus the bar (negative: peak below the bar)
	PeakM *float64 // peak c.m. height
	VzMS  *float64 // vertical velocity at the end of the take-off (gives H2 = vz²/2g)
	GMS2  float64
}

// Hay is Hay's decomposition of a jump, bar = H1 + H2 − H3, in metres:
// H1 the c.m. height at take-off, H2 = vz²/(2g) its rise in flight, H3 the
// peak c.m. height less the bar (Hay's decomposition, as used by Dapena for
// the flop; Hay's book The Biomechanics of Sports Techniques, from memory). Fields that could be
// neither measured nor derived are 0 and listed in Missing.
type Hay struct {
	BarM, H1M, H2M, H3M, PeakM, VzMS float64
	Derived                          []string // computed rather than measured, in the order derived
	Missing                          []string // could not be determined
}

// Decompose fills in Hay's decomposition from any subset of measurements,
// using peak = H1 + H2, H3 = peak − bar and H2 = vz²/(2g) as far as they
// reach. It checks every value's range, and returns an *InputError when
// over-determined measurements disagree by more than HayTolerance or a
// derived value is impossible (e.g. a peak below H1).
func Decompose(m HayMeasured) (Hay, error) {
	g, err := gravityOrStandard(m.GMS2)
	if err != nil {
		return Hay{}, err
	}
	type slot struct {
		name  string
		p     *float64
		v     float64
		known bool
		check func(float64) error
	}
	slots := []*slot{
		{name: FieldBar, p: m.BarM, check: checkBar},
		{name: FieldH1, p: m.H1M, check: func(v float64) error { return positiveUpTo(FieldH1, v, maxHeightM, "m") }},
		{name: FieldH2, p: m.H2M, check: func(v float64) error {
			if err := finite(FieldH2, v); err != nil {
				return err
			}
			if v < 0 {
				return inputErr(FieldH2, v, "the c.m. cannot rise a negative amount; is the peak below H1?")
			}
			if rmax := MaxVzMS * MaxVzMS / (2 * minGMS2); v > rmax {
				return inputErr(FieldH2, v, fmt.Sprintf("above %.2f m, which needs vz over %g m/s", rmax, MaxVzMS))
			}
			return nil
		}},
		{name: FieldH3, p: m.H3M, check: func(v float64) error { return inRange(FieldH3, v, -maxNeedM, maxNeedM, "m") }},
		{name: FieldPeak, p: m.PeakM, check: func(v float64) error { return positiveUpTo(FieldPeak, v, maxPeakM, "m") }},
		{name: FieldVz, p: m.VzMS, check: checkVz},
	}
	bar, h1, h2, h3, peak, vz := slots[0], slots[1], slots[2], slots[3], slots[4], slots[5]
	for _, s := range slots {
		if s.p != nil {
			if err := s.check(*s.p); err != nil {
				return Hay{}, err
			}
			s.v, s.known = *s.p, true
		}
	}
	var out Hay
	derive := func(s *slot, v float64) error {
		if err := s.check(v); err != nil {
			ie := err.(*InputError)
			ie.Reason = "derived from the other values: " + ie.Reason
			return ie
		}
		s.v, s.known = v, true
		out.Derived = append(out.Derived, s.name)
		return nil
	}
	for changed := true; changed; {
		changed = false
		step := func(s *slot, ok bool, v func() float64) error {
			if s.known || !ok {
				return nil
			}
			changed = true
			return derive(s, v())
		}
		for _, e := range []error{
			step(h2, vz.known, func() float64 { return vz.v * vz.v / (2 * g) }),
			step(vz, h2.known, func() float64 { return math.Sqrt(2 * g * h2.v) }),
			step(peak, h1.known && h2.known, func() float64 { return h1.v + h2.v }),
			step(h1, peak.known && h2.known, func() float64 { return peak.v - h2.v }),
			step(h2, peak.known && h1.known, func() float64 { return peak.v - h1.v }),
			step(h3, peak.known && bar.known, func() float64 { return peak.v - bar.v }),
			step(peak, h3.known && bar.known, func() float64 { return bar.v + h3.v }),
			step(bar, peak.known && h3.known, func() float64 { return peak.v - h3.v }),
		} {
			if e != nil {
				return Hay{}, e
			}
		}
	}
	disagree := func(field string, got, want float64, what string) error {
		if math.Abs(got-want) > HayTolerance {
			return inputErr(field, got, fmt.Sprintf("measurements disagree: %s gives %.3f m", what, want))
		}
		return nil
	}
	if h2.known && vz.known {
		if err := disagree(FieldH2, h2.v, vz.v*vz.v/(2*g), "vz²/2g"); err != nil {
			return Hay{}, err
		}
	}
	if peak.known && h1.known && h2.known {
		if err := disagree(FieldPeak, peak.v, h1.v+h2.v, "H1 + H2"); err != nil {
			return Hay{}, err
		}
	}
	if h3.known && peak.known && bar.known {
		if err := disagree(FieldH3, h3.v, peak.v-bar.v, "peak − bar"); err != nil {
			return Hay{}, err
		}
	}
	out.BarM, out.H1M, out.H2M, out.H3M, out.PeakM, out.VzMS = bar.v, h1.v, h2.v, h3.v, peak.v, vz.v
	for _, s := range slots {
		if !s.known {
			out.Missing = append(out.Missing, s.name)
		}
	}
	return out, nil
}
