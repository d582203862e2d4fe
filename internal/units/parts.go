package units

import (
	"fmt"
	"math"
	"slices"
)

// RoundParts rounds the signed parts of a sum to multiples of step so that
// the rounded parts add up exactly to the rounded total, by largest-remainder
// rounding (Hamilton's method, as used to apportion seats; see Balinski and
// Young, Fair Representation, 1982): every part is first rounded down to a
// multiple of step, then the units still missing from round(Σ parts / step)
// go one each to the parts with the largest remainders (taken away from the
// smallest remainders when the floors overshoot, which cannot happen for a
// floor but is handled for completeness). Ties go to the earlier part.
//
// parts and step are in the same unit (metres with step = MetresPerInch/4
// for quarter inches, or 0.01 for centimetres). The result holds whole
// numbers of steps (multiply by step for the length) and its sum equals
// round(Σ parts / step). Worked by hand, in inches with step 1:
// 4.4 + 2.4 − 0.2 = 6.6 → 7; floors 4, 2, −1 (sum 5), remainders 0.4, 0.4,
// 0.8, so the two missing inches go to the third part and then the first:
// 5 + 2 + 0 = 7, where rounding each part alone would show 4 + 2 + 0 = 7.
func RoundParts(parts []float64, step float64) ([]int, error) {
	if !(step > 0) || math.IsInf(step, 0) {
		return nil, fmt.Errorf("units: rounding step %v (want a positive number)", step)
	}
	out := make([]int, len(parts))
	rem := make([]float64, len(parts))
	sum, floors := 0.0, 0
	for i, p := range parts {
		if math.IsNaN(p) || math.IsInf(p, 0) {
			return nil, fmt.Errorf("units: part %d is %v", i+1, p)
		}
		v := p / step
		sum += v
		f := math.Floor(v)
		out[i] = int(f)
		rem[i] = v - f
		floors += int(f)
	}
	missing := int(math.Round(sum)) - floors
	order := make([]int, len(parts))
	for i := range order {
		order[i] = i
	}
	// Largest remainder first; ties to the earlier part (stable sort).
	slices.SortStableFunc(order, func(a, b int) int {
		switch {
		case rem[a] > rem[b]:
			return -1
		case rem[a] < rem[b]:
			return 1
		}
		return 0
	})
	for k := 0; missing > 0 && len(order) > 0; k++ {
		out[order[k%len(order)]]++
		missing--
	}
	for k := 0; missing < 0 && len(order) > 0; k++ {
		out[order[len(order)-1-k%len(order)]]--
		missing++
	}
	return out, nil
}
