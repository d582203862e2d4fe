package units

import (
	"fmt"
	"math"
)

// Terms formats the terms of a sum so that the shown values add up to the
// shown total, as a reader checks them: each term is rounded to the
// display step (a centimetre in metric, a quarter inch in imperial) by
// largest-remainder rounding (RoundParts), so the rounded terms sum to the
// rounded total even where rounding each one alone would not (4.4 + 2.4 =
// 6.8 shows as 5 + 2 = 7, not 4 + 2 = 7). terms are signed: a term that is
// subtracted is passed negative and shown as its magnitude, the caller
// writing the "−" between terms. It returns the formatted magnitudes and
// the formatted total, in Length's style ("1.25 m", "4-1¼").
func Terms(terms []float64, imperial bool) (shown []string, total string, err error) {
	step := 0.01 // metres: Length shows centimetres
	if imperial {
		step = MetresPerInch / 4
	}
	sum := 0.0
	for _, t := range terms {
		sum += t
	}
	ns, err := RoundParts(terms, step)
	if err != nil {
		return nil, "", fmt.Errorf("units: terms of a sum: %w", err)
	}
	shown = make([]string, len(ns))
	for i, n := range ns {
		shown[i] = Length(math.Abs(float64(n))*step, imperial)
	}
	return shown, Length(math.Round(sum/step)*step, imperial), nil
}
