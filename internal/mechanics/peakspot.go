package mechanics

import (
	"fmt"
	"math"
)

// PeakSpotSpread is what judging the c.m. at its peak hides when the
// take-off distance is not known: the c.m. crosses the bar plane, not
// necessarily at its peak, so its height there is lower by
//
//	L = g·x² / (2v²),  x = D − v·vz/g        [m]
//
// (the parabola's fall over the horizontal gap x between the peak and the
// bar plane; v the speed across the bar, D the take-off distance). It uses
// the same assumption as ResolveAcross with nothing typed: the c.m. peaks
// close to the bar plane (Dapena 1980), v = g·D/vz + ε, with D spread
// evenly over the published take-off distances of the sex (RangeFor
// QTakeoffDist, elite) and ε evenly over ±√3·σ of the speed-across row
// (QAcrossSpeed, elite), so x = −ε·vz/g. It returns the mean and the
// standard deviation of L, E[L] and √(E[L²] − E[L]²), by the midpoint rule
// on a k × k grid (k 10..1000).
func PeakSpotSpread(vzMS, gMS2 float64, sex Sex, k int) (meanM, sdM float64, err error) {
	g, err := gravityOrStandard(gMS2)
	if err != nil {
		return 0, 0, err
	}
	if err := checkVz(vzMS); err != nil {
		return 0, 0, err
	}
	if vzMS == 0 {
		return 0, 0, inputErr(FieldVz, 0, "needs the take-off vz")
	}
	if k < 10 || k > 1000 {
		return 0, 0, fmt.Errorf("peak spot spread: %d nodes a side (want 10..1000)", k)
	}
	dR, _ := RangeFor(QTakeoffDist, sex, Elite)
	vR, _ := RangeFor(QAcrossSpeed, sex, Elite)
	half := math.Sqrt(3) * vR.Sigma() // half-width of ε
	var m1, m2 float64
	w := 1 / float64(k*k)
	for i := range k {
		d := dR.Lo + (float64(i)+0.5)/float64(k)*(dR.Hi-dR.Lo)
		for j := range k {
			eps := -half + (float64(j)+0.5)/float64(k)*2*half
			v := g*d/vzMS + eps
			x := -eps * vzMS / g
			l := g * x * x / (2 * v * v)
			m1 += w * l
			m2 += w * l * l
		}
	}
	return m1, math.Sqrt(math.Max(0, m2-m1*m1)), nil
}
