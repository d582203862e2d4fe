package mechanics

import (
	"errors"
	"math"
	"slices"
	"testing"
)

// numericVzForRise finds by bisection the vz whose numerically integrated
// flight (integrateFlight) rises riseM: independent of vz²/2g.
func numericVzForRise(riseM, g float64) float64 {
	lo, hi := 0.0, 8.0
	for range 50 {
		mid := (lo + hi) / 2
		if _, _, top := numericPeak(0, mid, 0, g); top < riseM {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// Hay's decomposition: bar = H1 + H2 − H3 (reference.md; Hay, as used by
// Dapena for the flop), with H2 the c.m. rise in flight. The rise and the
// vz of each case come from a numerically integrated flight
// (integrateFlight), not from vz²/2g.
func TestDecompose(t *testing.T) {
	g := StandardGravity
	_, _, h2 := numericPeak(0, 4.2, 0, g)
	for _, tc := range []struct {
		name     string
		in       HayMeasured
		want     Hay
		derived  []string
		complete bool
	}{
		{"bar, H1 and vz", HayMeasured{BarM: Some(2.00), H1M: Some(1.25), VzMS: Some(4.2)},
			Hay{BarM: 2.00, H1M: 1.25, H2M: h2, PeakM: 1.25 + h2, H3M: 1.25 + h2 - 2.00, VzMS: 4.2},
			[]string{FieldH2, FieldPeak, FieldH3}, true},
		{"bar and peak and H1", HayMeasured{BarM: Some(1.80), PeakM: Some(1.86), H1M: Some(1.12)},
			Hay{BarM: 1.80, H1M: 1.12, H2M: 0.74, PeakM: 1.86, H3M: 0.06, VzMS: numericVzForRise(0.74, g)},
			[]string{FieldH2, FieldH3, FieldVz}, true},
		{"H1, H2, H3 give the bar", HayMeasured{H1M: Some(1.30), H2M: Some(0.95), H3M: Some(0.05)},
			Hay{BarM: 2.20, H1M: 1.30, H2M: 0.95, PeakM: 2.25, H3M: 0.05, VzMS: numericVzForRise(0.95, g)},
			[]string{FieldVz, FieldPeak, FieldBar}, true},
		{"consistent over-determined", HayMeasured{BarM: Some(2.00), H1M: Some(1.25), VzMS: Some(4.2), PeakM: Some(1.25 + h2 + 0.003)},
			Hay{BarM: 2.00, H1M: 1.25, H2M: h2, PeakM: 1.25 + h2 + 0.003, H3M: 1.25 + h2 + 0.003 - 2.00, VzMS: 4.2},
			[]string{FieldH2, FieldH3}, true},
	} {
		got, err := Decompose(tc.in)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		for _, p := range [][2]float64{{got.BarM, tc.want.BarM}, {got.H1M, tc.want.H1M}, {got.H2M, tc.want.H2M},
			{got.H3M, tc.want.H3M}, {got.PeakM, tc.want.PeakM}, {got.VzMS, tc.want.VzMS}} {
			if math.Abs(p[0]-p[1]) > 1e-6 {
				t.Errorf("%s: got %+v, want %+v", tc.name, got, tc.want)
				break
			}
		}
		if !slices.Equal(got.Derived, tc.derived) || (len(got.Missing) == 0) != tc.complete {
			t.Errorf("%s: derived %v missing %v, want derived %v", tc.name, got.Derived, got.Missing, tc.derived)
		}
		// Property: measurements may disagree by up to HayTolerance; derived values close the identity.
		if tc.complete && math.Abs(got.H1M+got.H2M-got.H3M-got.BarM) > HayTolerance {
			t.Errorf("%s: H1 + H2 − H3 = %v, bar %v", tc.name, got.H1M+got.H2M-got.H3M, got.BarM)
		}
	}
}

func TestDecomposePartial(t *testing.T) {
	got, err := Decompose(HayMeasured{BarM: Some(1.95), VzMS: Some(4.0)})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(got.Missing, []string{FieldH1, FieldH3, FieldPeak}) || got.H2M == 0 {
		t.Errorf("partial: %+v", got)
	}
}

func TestDecomposeRejects(t *testing.T) {
	for _, tc := range []struct {
		name  string
		in    HayMeasured
		field string
	}{
		{"peak disagrees with H1 + H2", HayMeasured{H1M: Some(1.2), H2M: Some(0.8), PeakM: Some(2.1)}, FieldPeak},
		{"H2 disagrees with vz", HayMeasured{H2M: Some(0.8), VzMS: Some(4.5)}, FieldH2},
		{"H3 disagrees", HayMeasured{BarM: Some(2), PeakM: Some(2.05), H3M: Some(0.2)}, FieldH3},
		{"peak below H1", HayMeasured{H1M: Some(1.3), PeakM: Some(1.2)}, FieldH2},
		{"vz above 7", HayMeasured{VzMS: Some(7.2)}, FieldVz},
		{"NaN bar", HayMeasured{BarM: Some(math.NaN())}, FieldBar},
		{"derived bar not positive", HayMeasured{PeakM: Some(0.5), H3M: Some(0.6)}, FieldBar},
		{"bad gravity", HayMeasured{BarM: Some(2), GMS2: 3}, FieldGravity},
	} {
		_, err := Decompose(tc.in)
		var ie *InputError
		if !errors.As(err, &ie) || ie.Field != tc.field {
			t.Errorf("%s: %v, want *InputError on %q", tc.name, err, tc.field)
		}
	}
}
