package units

import (
	"math"
	"testing"
)

// Exact factors: NIST Handbook 44 (2024), Appendix C, "1 inch = 2.54
// centimeters exactly" and "1 avoirdupois pound = 0.453 592 37 kilogram
// exactly" (international yard and pound agreement, 1959).
func TestExactFactors(t *testing.T) {
	if MetresPerInch != 0.0254 {
		t.Errorf("inch = %v m, NIST says 0.0254 exactly", MetresPerInch)
	}
	if MetresPerFoot != 0.3048 {
		t.Errorf("foot = %v m, NIST says 0.3048 exactly", MetresPerFoot)
	}
	if KilogramsPerLb != 0.45359237 {
		t.Errorf("pound = %v kg, NIST says 0.45359237 exactly", KilogramsPerLb)
	}
}

func TestParseLength(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"1.78", 1.78}, {"1.78m", 1.78}, {"178cm", 1.78}, {"178", 1.78}, {"1780mm", 1.78},
		{"1,78", 1.78}, {" 1.78 M ", 1.78},
		// 6 ft 1 in = 73 in = 73 x 0.0254 m = 1.8542 m (NIST factor above).
		{"6-1", 1.8542}, {"6'1\"", 1.8542}, {"6'1", 1.8542}, {"6ft1", 1.8542}, {"6ft1in", 1.8542}, {"6’1”", 1.8542},
		// 5 ft 10 in = 70 in = 1.778 m.
		{"5-10", 1.778}, {"5'10\"", 1.778}, {"70in", 1.778}, {`70"`, 1.778},
		{"9", 9}, {"6ft", 1.8288}, {"6'", 1.8288}, {"5-10.5", 1.7907},
	}
	for _, tt := range tests {
		got, err := ParseLength(tt.in)
		if err != nil {
			t.Errorf("ParseLength(%q): %v", tt.in, err)
			continue
		}
		if math.Abs(got-tt.want) > 1e-9 {
			t.Errorf("ParseLength(%q) = %v, want %v", tt.in, got, tt.want)
		}
	}
}

func TestParseLengthRejects(t *testing.T) {
	for _, in := range []string{"", "abc", "300", "5-13", "x'3", "NaN", "inf", "1e400", "0x10", "--3", "5-", "1.7.8"} {
		if v, err := ParseLength(in); err == nil {
			t.Errorf("ParseLength(%q) = %v, want an error", in, v)
		}
	}
}

func TestParseSignedLength(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"3cm", 0.03}, {"-2cm", -0.02}, {"3", 0.03}, {"-2", -0.02}, {"0.03", 0.03}, {"+5cm", 0.05}, {"1in", 0.0254}, {"0", 0},
	}
	for _, tt := range tests {
		got, err := ParseSignedLength(tt.in)
		if err != nil || math.Abs(got-tt.want) > 1e-12 {
			t.Errorf("ParseSignedLength(%q) = %v, %v; want %v", tt.in, got, err, tt.want)
		}
	}
}

func TestParseMass(t *testing.T) {
	tests := []struct {
		in   string
		want float64
	}{
		{"63", 63}, {"63kg", 63}, {"100lb", 45.359237}, {"100lbs", 45.359237}, {"63,5", 63.5},
	}
	for _, tt := range tests {
		got, err := ParseMass(tt.in)
		if err != nil || math.Abs(got-tt.want) > 1e-9 {
			t.Errorf("ParseMass(%q) = %v, %v; want %v", tt.in, got, err, tt.want)
		}
	}
	if _, err := ParseMass("heavy"); err == nil {
		t.Error("ParseMass(heavy) accepted")
	}
}

func TestOtherParsers(t *testing.T) {
	if v, err := ParseSpeed("4.3m/s"); err != nil || v != 4.3 {
		t.Errorf("ParseSpeed = %v, %v", v, err)
	}
	if v, err := ParseAngle("90°"); err != nil || v != 90 {
		t.Errorf("ParseAngle = %v, %v", v, err)
	}
	if v, err := ParseSeconds("580ms"); err != nil || math.Abs(v-0.58) > 1e-12 {
		t.Errorf("ParseSeconds = %v, %v", v, err)
	}
}

func TestFormatRoundTrip(t *testing.T) {
	// 1.854 m is 72.99 in, which rounds to 6 ft 1 in.
	if got := Length(1.854, true); got != "6-1" {
		t.Errorf("Length(1.854, imperial) = %q, want 6-1", got)
	}
	if got := Length(1.78, false); got != "1.78 m" {
		t.Errorf("Length(1.78) = %q", got)
	}
	for in := 48; in < 96; in++ {
		m := float64(in) * MetresPerInch
		ft, inch := FeetInches(m)
		back, err := ParseLength(Bar(m, true))
		if ft*12+inch != in || err != nil || math.Abs(back-m) > 1e-9 {
			t.Errorf("%d in: FeetInches %d-%d, reparsed %v %v", in, ft, inch, back, err)
		}
	}
	if got := Small(-0.02, false); got != "−2.0 cm" {
		t.Errorf("Small = %q", got)
	}
}
