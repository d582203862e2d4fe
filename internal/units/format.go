package units

import (
	"fmt"
	"math"
	"strings"
)

// FeetInches splits metres into whole feet and whole inches, rounding to the
// nearest inch (6-1 for 1.854 m).
func FeetInches(m float64) (ft, in int) {
	total := int(math.Round(m / MetresPerInch))
	return total / 12, total % 12
}

// Length formats metres for a reply: "1.78 m" (metric) or "5-10½" (imperial,
// feet-inches to the quarter inch, the trade's own notation).
func Length(m float64, imperial bool) string {
	if imperial {
		return FeetInchesQuarter(m)
	}
	return fmt.Sprintf("%.2f m", m)
}

// Bar formats a bar height compactly for tables: "1.78" or "5-10¼".
func Bar(m float64, imperial bool) string {
	if imperial {
		return FeetInchesQuarter(m)
	}
	return fmt.Sprintf("%.2f", m)
}

// Small formats a small signed length such as a margin: "+3.0 cm" or
// "−1.2 in" (tenths, for model outputs with an uncertainty; InchesQuarter
// writes a length set or measured to the quarter inch). A negative value
// leads with the minus sign U+2212, as FeetInchesQuarter does, so every
// negative length in a reply reads the same; a value that rounds to zero
// is "+0.0".
func Small(m float64, imperial bool) string {
	v, unit := m*100, "cm"
	if imperial {
		v, unit = m/MetresPerInch, "in"
	}
	s := fmt.Sprintf("%+.1f %s", v, unit)
	if strings.HasPrefix(s, "-0.0 ") {
		return "+" + s[1:]
	}
	if s[0] == '-' {
		return Minus + s[1:]
	}
	return s
}

// SmallAbs is Small without a sign: "3.0 cm" or "1.2 in".
func SmallAbs(m float64, imperial bool) string {
	if imperial {
		return fmt.Sprintf("%.1f in", math.Abs(m)/MetresPerInch)
	}
	return fmt.Sprintf("%.1f cm", math.Abs(m)*100)
}

// Mass formats kilograms: "63.0 kg" or "139 lb".
func Mass(kg float64, imperial bool) string {
	if imperial {
		return fmt.Sprintf("%.0f lb", kg/KilogramsPerLb)
	}
	return fmt.Sprintf("%.1f kg", kg)
}
