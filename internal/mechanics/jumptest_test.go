package mechanics

import (
	"errors"
	"math"
	"testing"
)

// Bosco, Luhtanen and Komi (1983): h = g·t²/8. With t = 0.5 s and
// g = 9.81 m/s², h = 0.3065625 m.
func TestJumpTestBosco(t *testing.T) {
	h, err := JumpTestHeight(0.5, 9.81)
	if err != nil || !near(h, 0.3065625, 1e-14) {
		t.Errorf("JumpTestHeight(0.5 s) = %v, %v; want 0.3065625", h, err)
	}
	// Against a numerically integrated vertical flight (integrateFlight):
	// taking off at JumpTestVz(t), the c.m. is back at its take-off height
	// after t and rose JumpTestHeight(t) on the way.
	for _, ft := range []float64{0.3, 0.55, 0.7} {
		vz, _ := JumpTestVz(ft, 0)
		h, _ := JumpTestHeight(ft, 0)
		if back := numericLanding(0, vz, StandardGravity, 0); math.Abs(back-ft) > 1e-5 {
			t.Errorf("t=%v: the integrated flight from vz %v lands after %v s", ft, vz, back)
		}
		if _, _, top := numericPeak(0, vz, 0, StandardGravity); math.Abs(top-h) > 1e-6 {
			t.Errorf("t=%v: g t²/8 = %v, integrated rise %v", ft, h, top)
		}
	}
}

func TestJumpTestRejects(t *testing.T) {
	for _, ft := range []float64{0, -0.4, 1.5, math.NaN(), math.Inf(1)} {
		_, err := JumpTestHeight(ft, 0)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != FieldFlightTime {
			t.Errorf("JumpTestHeight(%v): %v", ft, err)
		}
		if _, err := JumpTestVz(ft, 0); err == nil {
			t.Errorf("JumpTestVz(%v) accepted", ft)
		}
	}
	if _, err := JumpTestHeight(0.5, 30); err == nil {
		t.Error("JumpTestHeight accepted g = 30")
	}
}
