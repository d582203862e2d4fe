package bot

import (
	"fmt"
	"slices"
	"strings"

	"github.com/lathmark-team/lathmark/internal/record"
)

// Range flags of imported rows: each stored row is checked as a logged
// attempt is (attemptFlags: vz, approach speed, take-off distance and a
// measured peak against the published ranges by the athlete's sex). As with
// a log line a flag never blocks the import; the reply names the rows to
// look at, the first few in file order.

// importFlagsShown bounds the flagged rows named in the import reply; the
// rest are counted.
const importFlagsShown = 5

// rowFlags is one imported row's range flags.
type rowFlags struct {
	row   int
	flags []rangeNote
}

// importRowFlags returns the flags of row a (the stored attempt of file
// row n), or false when its numbers sit inside the published ranges.
func importRowFlags(n int, a record.Attempt, ath record.Athlete, team record.Team) (rowFlags, bool) {
	fl := attemptFlags(a, ath, team)
	if len(fl) == 0 {
		return rowFlags{}, false
	}
	return rowFlags{row: n, flags: fl}, true
}

// importCheckLine is the import reply's flag line: "Check 2 rows against
// the published ranges: row 4 vz 5.50 m/s far above 4.3–4.7 m/s; row 9 …",
// at most importFlagsShown rows named, in file order; "" without flags.
func importCheckLine(rs []rowFlags) string {
	if len(rs) == 0 {
		return ""
	}
	slices.SortFunc(rs, func(x, y rowFlags) int { return x.row - y.row })
	var ss []string
	for i, r := range rs {
		if i == importFlagsShown {
			ss = append(ss, fmt.Sprintf("and %s more", plural(len(rs)-i, "row")))
			break
		}
		var fs []string
		for _, f := range r.flags {
			fs = append(fs, f.short)
		}
		ss = append(ss, fmt.Sprintf("row %d %s", r.row, strings.Join(fs, ", ")))
	}
	return fmt.Sprintf("Check %s against the published ranges (stored as given): %s.", plural(len(rs), "row"), strings.Join(ss, "; "))
}
