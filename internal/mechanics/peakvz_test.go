package mechanics

import "testing"

// integratedPeak steps the c.m. as a projectile (velocity Verlet, 10 µs)
// until it stops rising: an independent computation of the peak, written
// differently from the closed form h0 + vz²/(2g).
func integratedPeak(h0, vz, g float64) float64 {
	const dt = 1e-5
	z, v := h0, vz
	for v > 0 {
		z += v*dt - g*dt*dt/2
		v -= g * dt
	}
	return z
}

// ComparePeakVz against a numerically integrated flight, and the agree /
// contradict boundary at PeakVzToleranceM on either side.
func TestComparePeakVz(t *testing.T) {
	cases := []struct {
		h0, vz, g float64
	}{
		{1.22, 4.3, 0},       // the README's margin example
		{1.30, 4.6, 9.7803},  // equator (WGS84 normal gravity, NIMA TR8350.2)
		{1.15, 3.9, 9.83218}, // pole
	}
	for _, c := range cases {
		g := c.g
		if g == 0 {
			g = StandardGravity
		}
		want := integratedPeak(c.h0, c.vz, g)
		for _, off := range []struct {
			d     float64
			agree bool
		}{{0, true}, {0.029, true}, {-0.029, true}, {0.031, false}, {-0.031, false}, {0.081, false}} {
			pv, err := ComparePeakVz(c.h0, c.vz, want+off.d, c.g)
			if err != nil {
				t.Fatal(err)
			}
			if d := pv.FromVzM - want; d > 1e-4 || d < -1e-4 {
				t.Errorf("h0 %v vz %v: peak from vz %.5f, integrated %.5f", c.h0, c.vz, pv.FromVzM, want)
			}
			if pv.Agree != off.agree {
				t.Errorf("h0 %v vz %v peak off by %+.3f: agree %v, want %v", c.h0, c.vz, off.d, pv.Agree, off.agree)
			}
		}
	}
	if _, err := ComparePeakVz(1.2, 40, 2, 0); err == nil {
		t.Error("vz 40 m/s accepted")
	}
}
