package units

import (
	"math"
	"strings"
)

// maxMetreDecimals bounds MetreDecimals: a tenth of a micrometre is far
// below anything typed at a bar.
const maxMetreDecimals = 7

// MetreDecimals is how many decimals of a metre write the length m exactly
// as it was typed in word (as ParseLength reads it): "1.8" and "180cm" give
// 2 for centimetres typed (1.80), "1.785" 3, "1780mm" 3; a metric word keeps
// the digits that were typed, trailing zeros included ("1.80" → 2). Feet and
// inches are exact in metres (1 in = 0.0254 m): "5-4" gives 4 (1.6256),
// "5-4¼" 5 (1.63195). A word ParseLength refuses gives 0.
func MetreDecimals(word string, m float64) int {
	if _, err := ParseLength(word); err != nil {
		return 0
	}
	s := strings.ToLower(strings.TrimSpace(word))
	s = strings.ReplaceAll(s, ",", ".")
	if isImperialWord(s) {
		return exactDecimals(m)
	}
	shift := 0
	switch {
	case strings.HasSuffix(s, "mm"):
		s, shift = strings.TrimSuffix(s, "mm"), 3
	case strings.HasSuffix(s, "cm"):
		s, shift = strings.TrimSuffix(s, "cm"), 2
	case strings.HasSuffix(s, "m"):
		s = strings.TrimSuffix(s, "m")
	default:
		if numberAtLeast(s, 100) {
			shift = 2 // a bare 178 is centimetres
		}
	}
	d := 0
	if _, frac, ok := strings.Cut(strings.TrimSpace(s), "."); ok {
		d = len(frac)
	}
	return min(max(d+shift, 2), maxMetreDecimals)
}

// numberAtLeast reports whether the bare number s is at least v.
func numberAtLeast(s string, v float64) bool {
	n, err := number(strings.TrimSpace(s))
	return err == nil && n >= v
}

// isImperialWord reports whether a length word is written in feet or inches.
func isImperialWord(s string) bool {
	if strings.ContainsAny(s, "'\"’‘′″”“½¼¾/") || strings.Contains(s, "ft") || strings.HasSuffix(s, "in") {
		return true
	}
	return strings.Count(s, "-") == 1 && !strings.HasPrefix(s, "-")
}

// exactDecimals is the fewest decimals (at most maxMetreDecimals) that
// write m to within a nanometre.
func exactDecimals(m float64) int {
	for d := 0; d < maxMetreDecimals; d++ {
		p := math.Pow(10, float64(d))
		if math.Abs(math.Round(m*p)/p-m) < 1e-9 {
			return d
		}
	}
	return maxMetreDecimals
}
