package mechanics

import (
	"fmt"
	"math"
)

// PeakSpotSpread is what judging the c.m. at its peak hides when the
// take-off distance is not known: the c.m. crosses the bar plane, not
// necessarily at its peak, so its height there is lower by
//
//	L = g·(D − v·vz/g)² / (2v²)        [m]
//
// (the parabola's fall over the horizontal distance between the peak and
// the bar plane; v the speed across the bar, D the take-off distance). For
// D and v spread evenly over the published elite rows of the sex
// (RangeFor QTakeoffDist and QAcrossSpeed), it returns the mean and the
// standard deviation of L, the moments E[L] and √(E[L²] − E[L]²) taken by
// the midpoint rule on a k × k grid (k 10..1000; 100 gives them to about
// 0.1 %): the spread an honest ± carries for "judged at its peak".
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
	var m1, m2 float64
	w := 1 / float64(k*k)
	for i := range k {
		d := dR.Lo + (float64(i)+0.5)/float64(k)*(dR.Hi-dR.Lo)
		for j := range k {
			v := vR.Lo + (float64(j)+0.5)/float64(k)*(vR.Hi-vR.Lo)
			x := d - v*vzMS/g
			l := g * x * x / (2 * v * v)
			m1 += w * l
			m2 += w * l * l
		}
	}
	return m1, math.Sqrt(math.Max(0, m2-m1*m1)), nil
}
