package mechanics

import "testing"

// BenchmarkCrossingVsMargin times one crossing sweep end to end (1 ms steps,
// every part's outline) and reports it as a multiple of one c.m.-based
// Margin of the same jump timed in the same run ("x-margin").
func BenchmarkCrossingVsMargin(b *testing.B) {
	tab, err := DeLeva1996(Male)
	if err != nil {
		b.Fatal(err)
	}
	vx := StandardGravity * 1.1 / 4.4
	in := CrossingInput{Body: Body{StatureM: 1.86}, Table: tab, BarM: 2.00, H0M: 1.25, VzMS: 4.4, DM: 1.1, VxAcrossMS: vx}
	mi := MarginInput{BarM: 2.00, H0M: 1.25, VzMS: 4.4, DM: 1.1, VxMS: vx, StatureM: 1.86, ArchDeg: 90, Sigma: DefaultUncertainty()}
	margin := floorNs(1000, func() {
		if _, err := Margin(mi); err != nil {
			b.Fatal(err)
		}
	})
	b.ResetTimer()
	for b.Loop() {
		if _, err := Crossing(in); err != nil {
			b.Fatal(err)
		}
	}
	b.StopTimer()
	per := float64(b.Elapsed().Nanoseconds()) / float64(b.N)
	b.ReportMetric(margin, "margin-ns/op")
	b.ReportMetric(per/margin, "x-margin")
}
