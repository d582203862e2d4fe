package digest

import (
	"cmp"
	"fmt"
	"slices"
	"strings"

	"github.com/lathmark-team/lathmark/internal/record"
)

// KnockTally counts an athlete's failures by the body part the coach saw
// touch the bar, and sets them beside the crossing model's forecasts
// stored with the same attempts.
type KnockTally struct {
	ByPart    map[string]int // knocks by part as logged
	Total     int            // failures with a part logged
	Predicted int            // of those, attempts with a stored forecast
	Agreed    int            // of Predicted, the forecast named the part seen
}

// Knocks tallies the logged knocks among as (any order; passes and
// clearances are ignored, as are failures with no part logged).
func Knocks(as []record.Attempt) KnockTally {
	k := KnockTally{ByPart: map[string]int{}}
	for _, a := range as {
		if a.Outcome != record.Failed || a.Knock == "" {
			continue
		}
		k.ByPart[a.Knock]++
		k.Total++
		if a.HasPrediction {
			k.Predicted++
			if a.PredictedPart == a.Knock {
				k.Agreed++
			}
		}
	}
	return k
}

// Parts lists the knocked parts, most often first, ties by name.
func (k KnockTally) Parts() []string {
	ps := make([]string, 0, len(k.ByPart))
	for p := range k.ByPart {
		ps = append(ps, p)
	}
	slices.SortFunc(ps, func(a, b string) int {
		if c := cmp.Compare(k.ByPart[b], k.ByPart[a]); c != 0 {
			return c
		}
		return cmp.Compare(a, b)
	})
	return ps
}

// Text is the tally in a few words: "calves 3, hips 1 (the model named
// the same part 2 of 3 times)"; "" when nothing was knocked.
func (k KnockTally) Text() string {
	if k.Total == 0 {
		return ""
	}
	var parts []string
	for _, p := range k.Parts() {
		parts = append(parts, fmt.Sprintf("%s %d", p, k.ByPart[p]))
	}
	s := strings.Join(parts, ", ")
	if k.Predicted > 0 {
		s += fmt.Sprintf(" (the model named the same part %d of %d %s)", k.Agreed, k.Predicted, plural(k.Predicted, "time", "times"))
	}
	return s
}
