package bot

import (
	"fmt"

	"github.com/lathmark-team/lathmark/internal/units"
)

// haySum writes Hay's decomposition of the bar, bar = H1 + H2 − H3 (H1 the
// take-off c.m. height, H2 the rise to the peak, H3 the peak above the bar),
// with the terms rounded together (units.Terms) so that the shown numbers
// add up to the shown bar. A negative H3 (the peak below the bar) is shown
// with its leading minus in brackets: "− H3 (−0-1¼)".
func haySum(h1M, h2M, h3M float64, imp bool) string {
	shown, total, err := units.Terms([]float64{h1M, h2M, -h3M}, imp)
	if err != nil { // NaN or infinite inputs; the model never returns them
		return fmt.Sprintf("H1 %s + H2 %s − H3 %s", units.Length(h1M, imp), units.Length(h2M, imp), units.Length(h3M, imp))
	}
	h3 := shown[2]
	if h3M < 0 && h3 != units.Length(0, imp) {
		h3 = "(" + units.Minus + h3 + ")"
	}
	return fmt.Sprintf("H1 %s + H2 %s − H3 %s = bar %s", shown[0], shown[1], h3, total)
}
