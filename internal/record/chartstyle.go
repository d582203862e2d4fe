package record

// ChartStyleSlots is how many distinct colour-and-marker pairs charts
// offer: 7 colours × 6 markers, paired by cycling both (7 and 6 share no
// factor, so the first 42 slots are all different pairs).
const ChartStyleSlots = 42

// FreeChartStyle picks the slot for a new athlete: the lowest slot in
// 1..ChartStyleSlots that no athlete in used holds, or, when all are taken,
// the lowest of the least-used. Zero entries (not chosen yet) are ignored.
// Chosen once and stored with the profile, a slot never changes, so an
// athlete keeps one colour and one marker in every chart.
func FreeChartStyle(used []int) int {
	var count [ChartStyleSlots + 1]int
	for _, s := range used {
		if s >= 1 && s <= ChartStyleSlots {
			count[s]++
		}
	}
	best := 1
	for s := 1; s <= ChartStyleSlots; s++ {
		if count[s] < count[best] {
			best = s
		}
	}
	return best
}
