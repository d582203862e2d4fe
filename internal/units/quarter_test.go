package units

import (
	"math"
	"testing"
)

// Hand-worked: 64.5 in = 5 ft 4½ in = 64.5 × 0.0254 m = 1.6383 m exactly
// (NIST Handbook 44, Appendix C: 1 in = 0.0254 m exactly).
func TestFeetInchesQuarter(t *testing.T) {
	tests := []struct {
		m    float64
		want string
	}{
		{64.5 * 0.0254, "5-4½"},
		{82.75 * 0.0254, "6-10¾"},
		{72 * 0.0254, "6-0"},
		{71.25 * 0.0254, "5-11¼"},
		{71.9 * 0.0254, "6-0"},    // 71.9 in is 287.6 quarters → 288 = 6 ft
		{71.85 * 0.0254, "5-11¾"}, // 287.4 quarters → 287
		{1.78, "5-10"},            // 1.78 m / 0.0254 = 70.079 in → 70 in (280.3 quarters)
		{2.00, "6-6¾"},            // 78.740 in → 315.0 quarters = 78¾ in
		{-1.25 * 0.0254, "−0-1¼"},
	}
	for _, tt := range tests {
		if got := FeetInchesQuarter(tt.m); got != tt.want {
			t.Errorf("FeetInchesQuarter(%v) = %q, want %q", tt.m, got, tt.want)
		}
	}
}

func TestInchesQuarter(t *testing.T) {
	tests := []struct {
		m      float64
		signed bool
		want   string
	}{
		{-1.25 * 0.0254, true, "−1¼ in"},
		{1.25 * 0.0254, true, "+1¼ in"},
		{-1.25 * 0.0254, false, "1¼ in"},
		{0.5 * 0.0254, true, "+½ in"},
		{0.03, true, "+1¼ in"}, // 3 cm = 1.181 in = 4.72 quarters → 5 quarters
		{0.001, true, "0 in"},
		{2 * 0.0254, false, "2 in"},
	}
	for _, tt := range tests {
		if got := InchesQuarter(tt.m, tt.signed); got != tt.want {
			t.Errorf("InchesQuarter(%v, %v) = %q, want %q", tt.m, tt.signed, got, tt.want)
		}
	}
}

// Every accepted way of typing five feet four and a half inches reads as
// 64.5 in = 1.6383 m (1 in = 0.0254 m exactly, NIST Handbook 44).
func TestParseQuarterInches(t *testing.T) {
	want := 64.5 * 0.0254
	for _, in := range []string{"5-4½", "5-4.5", "5-4 1/2", `5'4.5"`, `5' 4½"`, "5’ 4½”", `5'4 1/2"`, "5ft4.5", "5'4½"} {
		got, err := ParseLength(in)
		if err != nil {
			t.Errorf("ParseLength(%q): %v", in, err)
			continue
		}
		if math.Abs(got-want) > 1e-12 {
			t.Errorf("ParseLength(%q) = %v m, want %v m", in, got, want)
		}
	}
	for _, in := range []string{`5' 4"`, "5'4", `5’4”`, `5‘4“`, "5-4"} {
		got, err := ParseLength(in)
		if err != nil || math.Abs(got-64*0.0254) > 1e-12 {
			t.Errorf("ParseLength(%q) = %v, %v; want 64 in", in, got, err)
		}
	}
	if got, err := ParseLength("6-10¾"); err != nil || math.Abs(got-82.75*0.0254) > 1e-12 {
		t.Errorf("ParseLength(6-10¾) = %v, %v; want 82.75 in", got, err)
	}
	if _, err := ParseLength("5-12½"); err == nil {
		t.Error("5-12½ accepted; inches must be under 12")
	}
}

// Round trip: every quarter inch from 3 ft to 8 ft written and read back is
// the same length (an independent check of the writer against the reader).
func TestQuarterRoundTrip(t *testing.T) {
	for q := 36 * 4; q <= 96*4; q++ {
		m := float64(q) / 4 * 0.0254
		s := FeetInchesQuarter(m)
		back, err := ParseLength(s)
		if err != nil || math.Abs(back-m) > 1e-9 {
			t.Fatalf("%v m → %q → %v, %v", m, s, back, err)
		}
	}
}

func TestRoundParts(t *testing.T) {
	tests := []struct {
		name  string
		parts []float64
		step  float64
		want  []int
	}{
		// Worked by hand: 4.4 + 2.4 − 0.2 = 6.6 → 7. Floors 4, 2, −1;
		// remainders .4, .4, .8; two missing → third, then first (tie to earlier).
		{"hand inches", []float64{4.4, 2.4, -0.2}, 1, []int{5, 2, 0}},
		// Largest-remainder apportionment, 3 parts 1/3 each of 1 at step 0.1:
		// sum 10 steps, floors 3,3,3, one missing goes to the first (tie).
		{"thirds", []float64{1.0 / 3, 1.0 / 3, 1.0 / 3}, 0.1, []int{4, 3, 3}},
		// The example in inches: 4-5 (53.4) + 2-2 (26.4) − (−0.3) …
		// parts 53.4, 26.4, −0.3 = 79.5 → 80; floors 53, 26, −1 = 78;
		// remainders .4, .4, .7 → third then first.
		{"bars", []float64{53.4, 26.4, -0.3}, 1, []int{54, 26, 0}},
		{"exact", []float64{2, 3}, 1, []int{2, 3}},
	}
	for _, tt := range tests {
		got, err := RoundParts(tt.parts, tt.step)
		if err != nil {
			t.Fatalf("%s: %v", tt.name, err)
		}
		sum, exact := 0, 0.0
		for i, g := range got {
			sum += g
			exact += tt.parts[i] / tt.step
			if g != tt.want[i] {
				t.Errorf("%s: part %d = %d, want %d (all %v)", tt.name, i, g, tt.want[i], got)
			}
		}
		if sum != int(math.Round(exact)) {
			t.Errorf("%s: parts add to %d, total rounds to %v", tt.name, sum, math.Round(exact))
		}
	}
	if _, err := RoundParts([]float64{1}, 0); err == nil {
		t.Error("step 0 accepted")
	}
	if _, err := RoundParts([]float64{math.NaN()}, 1); err == nil {
		t.Error("NaN part accepted")
	}
}

func FuzzRoundParts(f *testing.F) {
	f.Add(1.3, 0.7, -0.05, 0.00635)
	f.Fuzz(func(t *testing.T, a, b, c, step float64) {
		if !(step > 1e-4 && step < 1) || math.Abs(a) > 10 || math.Abs(b) > 10 || math.Abs(c) > 10 || math.IsNaN(a+b+c) {
			return
		}
		got, err := RoundParts([]float64{a, b, c}, step)
		if err != nil {
			t.Fatal(err)
		}
		if got[0]+got[1]+got[2] != int(math.Round(a/step+b/step+c/step)) {
			t.Fatalf("%v do not add to the rounded total", got)
		}
		for i, p := range []float64{a, b, c} {
			if math.Abs(float64(got[i])-p/step) >= 1+1e-9 {
				t.Fatalf("part %d moved by a step or more: %v vs %v", i, got[i], p/step)
			}
		}
	})
}
