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
	// The same height from the kinematics of a symmetric flight.
	for _, ft := range []float64{0.3, 0.55, 0.7} {
		vz, _ := JumpTestVz(ft, 0)
		rise, _ := Takeoff{H0M: 1, VzMS: vz}.Rise()
		h, _ := JumpTestHeight(ft, 0)
		if !near(h, rise, 1e-14) {
			t.Errorf("t=%v: g t²/8 = %v, vz²/2g = %v", ft, h, rise)
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
