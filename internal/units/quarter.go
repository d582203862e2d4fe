package units

import (
	"fmt"
	"math"
	"strings"
)

// Minus is the typographic minus sign (U+2212) that leads a negative length
// in imperial replies ("−1¼ in"); a hyphen would read as the feet-inches
// separator.
const Minus = "−"

// quarterGlyphs are the vulgar fractions for 0, ¼, ½ and ¾ of an inch.
var quarterGlyphs = [4]string{"", "¼", "½", "¾"}

// Quarters rounds metres to the nearest quarter inch and returns the count of
// quarter inches (negative for negative lengths; halves round away from zero).
// 1 in = 0.0254 m exactly (NIST Handbook 44, Appendix C).
func Quarters(m float64) int {
	return int(math.Round(m / MetresPerInch * 4))
}

// FeetInchesQuarter writes metres as feet-inches to the quarter inch in the
// trade's style: 1.638 m → "5-4½", 2.0828 m → "6-10¾", 1.8288 m → "6-0".
// A negative length gets a leading minus: "−0-1¼".
func FeetInchesQuarter(m float64) string {
	q := Quarters(m)
	sign := ""
	if q < 0 {
		sign, q = Minus, -q
	}
	in := q / 4
	return fmt.Sprintf("%s%d-%d%s", sign, in/12, in%12, quarterGlyphs[q%4])
}

// InchesQuarter writes a small length in inches to the quarter inch with an
// explicit sign: +0.03175 m → "+1¼ in", −0.0127 m → "−½ in", 0 → "0 in".
// With signed false no sign is written (the absolute value).
func InchesQuarter(m float64, signed bool) string {
	q := Quarters(m)
	sign := ""
	switch {
	case q < 0 && signed:
		sign = Minus
	case q > 0 && signed:
		sign = "+"
	}
	if q < 0 {
		q = -q
	}
	whole, frac := q/4, quarterGlyphs[q%4]
	if q == 0 {
		return "0 in"
	}
	if whole == 0 {
		return sign + frac + " in"
	}
	return fmt.Sprintf("%s%d%s in", sign, whole, frac)
}

// fractionWords maps the fractions a phone keyboard gives to decimal inches.
var fractionWords = strings.NewReplacer(
	"¼", ".25", "½", ".5", "¾", ".75",
	" 1/4", ".25", " 1/2", ".5", " 3/4", ".75",
	"-1/4", ".25", "-1/2", ".5", "-3/4", ".75",
)

// normaliseFractions turns "5-4 1/2", "5-4½" and "5' 4 1/2\"" into a form
// with decimal inches ("5-4.5"), and drops spaces around the feet mark.
func normaliseFractions(s string) string {
	// "4 1/2" but also a bare "1/2" after the separator ("5-1/2" is 5 ft ½ in).
	for _, f := range []struct{ frac, dec string }{{"1/4", "0.25"}, {"1/2", "0.5"}, {"3/4", "0.75"}} {
		for _, sep := range []string{"-", "'"} {
			s = strings.Replace(s, sep+f.frac, sep+f.dec, 1)
		}
	}
	s = fractionWords.Replace(s)
	s = strings.ReplaceAll(s, "' ", "'")
	// "4.25" written after "-" or "'" may now read "-.25" when no whole inches were given.
	s = strings.Replace(s, "-.", "-0.", 1)
	s = strings.Replace(s, "'.", "'0.", 1)
	return strings.TrimSpace(s)
}
