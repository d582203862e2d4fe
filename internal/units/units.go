// Package units reads and writes the lengths, masses and speeds that coaches
// type on a phone, and converts them to and from SI. Inside lathmark every
// length is metres and every mass kilograms; this package is the edge.
//
// Conversion factors are the international ones, exact by definition
// (NIST Handbook 44, Appendix C; NIST SP 811):
//
//	1 in = 0.0254 m, 1 ft = 12 in = 0.3048 m, 1 lb = 0.45359237 kg.
package units

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Exact conversion factors (international yard and pound agreement, 1959).
const (
	MetresPerInch  = 0.0254
	MetresPerFoot  = 12 * MetresPerInch
	KilogramsPerLb = 0.45359237
)

// Error says why a value could not be read. Word is the text that was typed.
type Error struct {
	Word   string
	Reason string
}

func (e *Error) Error() string { return fmt.Sprintf("%q: %s", e.Word, e.Reason) }

// ParseLength reads a length and returns metres. Accepted forms:
//
//	1.78  1.78m  178cm  1780mm  5-10  5'10"  5'10  5ft10  5ft10in  70in  6ft
//	5-4½  5-4.5  5-4 1/2  5' 4"  5’ 4½”  (quarter and half inches, any quotes or none)
//
// A bare number is metres below 100 and centimetres from 100 to under 300
// (a phone user typing "178" means centimetres); larger bare numbers are
// refused. Callers check the plausible range, so "9" reads as 9 m and is
// then refused as out of range with the range shown.
// A comma decimal separator ("1,78") is accepted.
func ParseLength(word string) (float64, error) {
	s := strings.ToLower(strings.TrimSpace(word))
	s = strings.ReplaceAll(s, ",", ".")
	s = strings.NewReplacer("’", "'", "‘", "'", "′", "'", "″", `"`, "”", `"`, "“", `"`, "''", `"`).Replace(s)
	s = normaliseFractions(s)
	if s == "" {
		return 0, &Error{word, "empty length"}
	}
	if m, ok, err := parseFeetInches(s); ok || err != nil {
		if err != nil {
			return 0, &Error{word, err.Error()}
		}
		return m, nil
	}
	for _, u := range []struct {
		suffix string
		factor float64
	}{{"mm", 0.001}, {"cm", 0.01}, {"in", MetresPerInch}, {`"`, MetresPerInch}, {"ft", MetresPerFoot}, {"'", MetresPerFoot}, {"m", 1}} {
		if strings.HasSuffix(s, u.suffix) {
			v, err := number(strings.TrimSpace(strings.TrimSuffix(s, u.suffix)))
			if err != nil {
				return 0, &Error{word, "not a length"}
			}
			return v * u.factor, nil
		}
	}
	v, err := number(s)
	if err != nil {
		return 0, &Error{word, "not a length"}
	}
	switch {
	case v < 100:
		return v, nil
	case v < 300:
		return v / 100, nil
	default:
		return 0, &Error{word, "give a unit, e.g. 1.78m or 178cm"}
	}
}

// ParseSignedLength is ParseLength for values that may be negative, such as
// a clearance margin "by -2cm". A bare number is centimetres when its size is
// 1 or more, metres below ("by 3" = 3 cm, "by 0.03" = 3 cm).
func ParseSignedLength(word string) (float64, error) {
	s := strings.TrimSpace(word)
	sign := 1.0
	switch {
	case strings.HasPrefix(s, "-"), strings.HasPrefix(s, "−"):
		sign = -1
		s = strings.TrimLeft(s, "-−")
	case strings.HasPrefix(s, "+"):
		s = s[1:]
	}
	if v, err := number(s); err == nil {
		if v >= 1 {
			return sign * v / 100, nil
		}
		return sign * v, nil
	}
	if strings.ContainsAny(s, "-'\"") {
		return 0, &Error{word, "give a margin in cm or m, e.g. 3cm or -2cm"}
	}
	m, err := ParseLength(s)
	if err != nil {
		return 0, &Error{word, "not a margin; e.g. 3cm or -2cm"}
	}
	return sign * m, nil
}

// parseFeetInches recognises 5-10, 5'10", 5'10, 5ft10, 5ft10in and 5'.
// ok is false when s is not in a feet-inches form at all.
func parseFeetInches(s string) (float64, bool, error) {
	var ftPart, inPart string
	switch {
	case strings.Contains(s, "ft"):
		ftPart, inPart, _ = strings.Cut(s, "ft")
		inPart = strings.TrimSuffix(strings.TrimSpace(inPart), "in")
	case strings.Contains(s, "'"):
		ftPart, inPart, _ = strings.Cut(s, "'")
		inPart = strings.TrimSuffix(inPart, `"`)
	case strings.Count(s, "-") == 1 && !strings.HasPrefix(s, "-"):
		ftPart, inPart, _ = strings.Cut(s, "-")
		if inPart == "" {
			return 0, false, nil
		}
	default:
		return 0, false, nil
	}
	ftPart, inPart = strings.TrimSpace(ftPart), strings.TrimSpace(inPart)
	ft, err := strconv.Atoi(ftPart)
	if err != nil || ft < 0 || ft > 9 {
		return 0, true, fmt.Errorf("feet must be a whole number 0-9")
	}
	in := 0.0
	if inPart != "" {
		in, err = number(inPart)
		if err != nil || in < 0 || in >= 12 {
			return 0, true, fmt.Errorf("inches must be 0 to under 12")
		}
	}
	return float64(ft)*MetresPerFoot + in*MetresPerInch, true, nil
}

// ParseMass reads a mass and returns kilograms: 63, 63kg, 139lb, 139lbs.
func ParseMass(word string) (float64, error) {
	s := strings.ToLower(strings.TrimSpace(word))
	s = strings.ReplaceAll(s, ",", ".")
	factor := 1.0
	switch {
	case strings.HasSuffix(s, "kg"):
		s = strings.TrimSuffix(s, "kg")
	case strings.HasSuffix(s, "lbs"):
		s, factor = strings.TrimSuffix(s, "lbs"), KilogramsPerLb
	case strings.HasSuffix(s, "lb"):
		s, factor = strings.TrimSuffix(s, "lb"), KilogramsPerLb
	}
	v, err := number(strings.TrimSpace(s))
	if err != nil {
		return 0, &Error{word, "not a mass; e.g. 63kg or 139lb"}
	}
	return v * factor, nil
}

// ParseSpeed reads a speed in metres per second: 4.3, 4.3m/s, 4.3ms.
func ParseSpeed(word string) (float64, error) {
	s := strings.ToLower(strings.TrimSpace(word))
	s = strings.ReplaceAll(s, ",", ".")
	for _, suf := range []string{"m/s", "mps", "ms"} {
		if strings.HasSuffix(s, suf) {
			s = strings.TrimSuffix(s, suf)
			break
		}
	}
	v, err := number(strings.TrimSpace(s))
	if err != nil {
		return 0, &Error{word, "not a speed in m/s; e.g. 4.3"}
	}
	return v, nil
}

// ParseAngle reads an angle in degrees: 90, 90deg, 90°.
func ParseAngle(word string) (float64, error) {
	s := strings.ToLower(strings.TrimSpace(word))
	s = strings.TrimSuffix(strings.TrimSuffix(strings.TrimSuffix(s, "°"), "deg"), "degrees")
	v, err := number(strings.TrimSpace(s))
	if err != nil {
		return 0, &Error{word, "not an angle in degrees; e.g. 90"}
	}
	return v, nil
}

// ParseSeconds reads a duration in seconds: 0.58, 0.58s, 580ms.
func ParseSeconds(word string) (float64, error) {
	s := strings.ToLower(strings.TrimSpace(word))
	factor := 1.0
	switch {
	case strings.HasSuffix(s, "ms"):
		s, factor = strings.TrimSuffix(s, "ms"), 0.001
	case strings.HasSuffix(s, "s"):
		s = strings.TrimSuffix(s, "s")
	}
	v, err := number(strings.TrimSpace(s))
	if err != nil {
		return 0, &Error{word, "not a time in seconds; e.g. 0.58"}
	}
	return v * factor, nil
}

// number parses a finite decimal number.
func number(s string) (float64, error) {
	if s == "" || strings.ContainsAny(s, "xXpP_") {
		return 0, fmt.Errorf("not a number")
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("not a number")
	}
	return v, nil
}
