package bot

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
)

// importSeriesProblems checks the meet rows of an import against the
// competition rules, as a log line is checked: the attempts of one athlete
// at one day's meet, the file's rows and the attempts already stored, in
// time order. Each row that breaks a rule is named by its row number with
// the reason. Rows already stored (same athlete, time, bar and outcome)
// are not counted twice. rows are sorted by athlete and time.
func importSeriesProblems(tx Tx, rows []csvRow, athletes map[uint64]record.Athlete, loc *time.Location, imp bool) ([]string, error) {
	type group struct {
		athlete uint64
		day     time.Time
	}
	groups := map[group][]int{}
	var order []group
	for i, r := range rows {
		if !r.a.Meet || r.a.RuleBreach != "" {
			continue
		}
		g := group{r.a.AthleteID, localDay(r.a.Time, loc)}
		if _, ok := groups[g]; !ok {
			order = append(order, g)
		}
		groups[g] = append(groups[g], i)
	}
	type item struct {
		a   record.Attempt
		row int // 0: stored
	}
	var problems []string
	for _, g := range order {
		var items []item
		stored := map[string]bool{}
		err := tx.Attempts(g.athlete, g.day, g.day.AddDate(0, 0, 1), func(a record.Attempt) error {
			if a.Meet && a.RuleBreach == "" {
				items = append(items, item{a: a})
				stored[sameAttemptKey(a)] = true
			}
			return nil
		})
		if err != nil {
			return nil, err
		}
		for _, i := range groups[g] {
			if !stored[sameAttemptKey(rows[i].a)] {
				items = append(items, item{a: rows[i].a, row: rows[i].row})
			}
		}
		slices.SortStableFunc(items, func(x, y item) int {
			return cmp.Or(x.a.Time.Compare(y.a.Time), cmp.Compare(min(x.row, 1), min(y.row, 1)), cmp.Compare(x.row, y.row))
		})
		var s series.State
		name := athletes[g.athlete].Name
		for _, it := range items {
			b := s.Add(series.FromRecord(it.a))
			if b != nil && it.row > 0 {
				problems = append(problems, fmt.Sprintf("row %d: a meet attempt that breaks the rules: %s", it.row, breachReason(b, name, imp)))
			}
		}
	}
	return problems, nil
}

// sameAttemptKey identifies an attempt by athlete, time, bar (mm) and outcome.
func sameAttemptKey(a record.Attempt) string {
	return fmt.Sprintf("%d/%d/%d/%c", a.AthleteID, a.Time.UnixNano(), int64(math.Round(a.BarM*1000)), a.Outcome)
}

// importPlausibility checks each row against its athlete as a log line is
// checked (plausibility: a bar far above the personal best, a clearance
// above the world record, a measured peak against the measured vz) and
// names each row that needs confirm by its row number.
func importPlausibility(rows []csvRow, athletes map[uint64]record.Athlete, team record.Team) []string {
	var problems []string
	for _, r := range rows {
		if why := plausibility(athletes[r.a.AthleteID], []record.Attempt{r.a}, team); len(why) > 0 {
			problems = append(problems, fmt.Sprintf("row %d: %s", r.row, whyText(why)))
		}
	}
	return problems
}
