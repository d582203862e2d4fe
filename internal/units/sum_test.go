package units

import (
	"math"
	"strings"
	"testing"
)

// The shown terms of a sum must add up to the shown total when a reader
// adds them by hand. The check reads the shown strings back with
// ParseLength (the parser, not the formatter) and adds those.
// The first case is worked by hand: 53.4 + 26.425 − 0.05 = 79.775 in =
// 319.1 quarters → 319 = 6-7¾. Rounded alone the terms would show
// 4-5½ + 2-2½ − 0-0 = 6-8 (214 + 106 − 0 quarters), which does not match the
// total; by largest remainder the floors 213 + 105 − 1 = 317 get the two
// missing quarters at the remainders 0.8 (third term) and 0.7 (second):
// 4-5¼ + 2-2½ − 0-0 = 6-7¾.
func TestTermsAddUp(t *testing.T) {
	in := MetresPerInch
	tests := []struct {
		name     string
		terms    []float64
		imperial bool
		want     string // "a + b − c = total", hand-worked
	}{
		{"hand", []float64{53.4 * in, 26.425 * in, -0.05 * in}, true, "4-5¼ + 2-2½ − 0-0 = 6-7¾"},
		{"metric", []float64{1.256, 0.943, -0.392}, false, "1.26 m + 0.94 m − 0.39 m = 1.81 m"},
		{"exact", []float64{47.25 * in, 37 * in, -13.25 * in}, true, "3-11¼ + 3-1 − 1-1¼ = 5-11"},
	}
	for _, tt := range tests {
		shown, total, err := Terms(tt.terms, tt.imperial)
		if err != nil {
			t.Fatalf("%s: %v", tt.name, err)
		}
		got := shown[0]
		for i, s := range shown[1:] {
			op := " + "
			if tt.terms[i+1] < 0 {
				op = " − "
			}
			got += op + s
		}
		got += " = " + total
		if got != tt.want {
			t.Errorf("%s: %s, want %s", tt.name, got, tt.want)
		}
		sum := 0.0
		for i, s := range shown {
			v, err := ParseLength(strings.TrimSuffix(s, " m"))
			if err != nil {
				t.Fatalf("%s: shown term %q does not parse: %v", tt.name, s, err)
			}
			if tt.terms[i] < 0 {
				v = -v
			}
			sum += v
		}
		tv, err := ParseLength(strings.TrimSuffix(total, " m"))
		if err != nil {
			t.Fatalf("%s: total %q: %v", tt.name, total, err)
		}
		if math.Abs(sum-tv) > 1e-9 {
			t.Errorf("%s: shown terms add to %.4f m, shown total %.4f m", tt.name, sum, tv)
		}
	}
}
