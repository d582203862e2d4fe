package bot

import (
	"fmt"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
	"github.com/lathmark-team/lathmark/internal/units"
)

// The competition rules and the plausibility checks a log line passes
// before it is stored. A line that fails one is refused with the reason;
// the same line ending in confirm is stored (a rule broken at a meet is
// then marked on its attempts, which never count for a best).

// Plausibility limits.
const (
	// logAbovePBM is how far above the athlete's personal best a bar may
	// be before the line asks for confirm (a typo such as 2.40 for 1.40).
	logAbovePBM = 0.15
)

// worldRecordM is the world record for the athlete's sex (the men's when the
// profile does not say).
func worldRecordM(s record.Sex) float64 {
	if s == record.SexFemale {
		return mechanics.WorldRecordM(mechanics.Female)
	}
	return mechanics.WorldRecordM(mechanics.Male)
}

// meetStateOf follows the day's stored meet attempts (time order) through
// the rule engine as series.Counting does: attempts stored as breaking a
// rule are left out, and one that breaks a rule is skipped.
func meetStateOf(day []record.Attempt) series.State {
	var s series.State
	for _, a := range day {
		if a.Meet && a.RuleBreach == "" {
			_ = s.Add(series.FromRecord(a))
		}
	}
	return s
}

// meetBreach runs a new meet line's attempts after the day's state and
// returns the first that breaks a rule (with its index in add) and the
// state after the valid ones.
func meetBreach(s series.State, add []record.Attempt) (*series.Breach, int, series.State) {
	for i, a := range add {
		if b := s.Add(series.FromRecord(a)); b != nil {
			return b, i, s
		}
	}
	return nil, -1, s
}

// laterBreach checks the day's meet attempts stored for later times after a
// line placed before them (a past session logged with at): the line must
// not make a later line break the rules. "" when it does not.
func laterBreach(s series.State, later []record.Attempt, name string, imp bool) string {
	if n, why := laterBreachOf(s, later, name, imp); why != "" {
		return fmt.Sprintf("placed before line #%d of the same meet, it makes that line break the rules: %s", n, why)
	}
	return ""
}

// laterBreachOf is the first later meet attempt that breaks a rule after s:
// its line number and the reason ("" none).
func laterBreachOf(s series.State, later []record.Attempt, name string, imp bool) (uint64, string) {
	for _, a := range later {
		if !a.Meet || a.RuleBreach != "" {
			continue
		}
		if b := s.Add(series.FromRecord(a)); b != nil {
			return a.LineNo, breachReason(b, name, imp)
		}
	}
	return 0, ""
}

// breachReason says in words which rule a meet line breaks, and which
// Technical Rule says so.
func breachReason(b *series.Breach, name string, imp bool) string {
	bar := barText(b.BarM, imp)
	tr := b.Rule.TR()
	switch b.Rule {
	case series.ThreeFailures:
		var bars []string
		for _, f := range b.FailureBarsM {
			bars = append(bars, units.Bar(f, imp))
		}
		if b.LeftAtBar > 0 && b.LeftAtBar < series.MaxFailures {
			var carried []string
			for _, f := range b.FailureBarsM {
				if !sameBar(f, b.BarM) {
					carried = append(carried, units.Bar(f, imp))
				}
			}
			verb := "carry"
			if len(carried) == 1 {
				verb = "carries"
			}
			return fmt.Sprintf("%s had only %s left at %s: the failure%s at %s %s over (TR 26.2), so a %s attempt at %s was never jumped",
				name, countWords(b.LeftAtBar, "try", "tries"), bar, pluralS(len(carried)), strings.Join(carried, ", "), verb, ordinalWord(b.LeftAtBar+1), bar)
		}
		return fmt.Sprintf("%s was already out: three consecutive failures (%s) end the competition whatever the heights (%s), so nothing at %s was jumped",
			name, strings.Join(bars, ", "), tr, bar)
	case series.BarDown:
		return fmt.Sprintf("%s is below %s, jumped earlier at this meet; the bar never goes down in a competition (%s)", bar, barText(b.PrevBarM, imp), tr)
	case series.HeightDone:
		return fmt.Sprintf("%s was already cleared or passed at this meet; nothing more is jumped at that height (%s)", bar, tr)
	case series.SmallRise:
		return fmt.Sprintf("%s is less than 2 cm above %s; the bar rises at least 2 cm while others remain (%s). If %s was the last one left, confirm", bar, barText(b.PrevBarM, imp), tr, name)
	}
	if tr != "" {
		return fmt.Sprintf("%s at %s: %s (%s)", name, bar, b.Rule, tr)
	}
	return fmt.Sprintf("%s at %s: %s", name, bar, b.Rule)
}

// breachMark is what a confirmed rule-breaking attempt stores.
func breachMark(b *series.Breach) string {
	if tr := b.Rule.TR(); tr != "" {
		return b.Rule.String() + " (" + tr + ")"
	}
	return b.Rule.String()
}

// plausibility lists what about a line needs confirm besides the rules:
// a bar more than 15 cm above the personal best, a clearance above the
// world record, a measured peak that contradicts the measured vz.
func plausibility(ath record.Athlete, add []record.Attempt, team record.Team) []string {
	imp := imperial(team)
	var why []string
	top := 0.0
	for _, a := range add {
		top = max(top, a.BarM)
	}
	if pb := ath.PersonalBestM; pb > 0 && higherBar(top, pb+logAbovePBM) {
		why = append(why, fmt.Sprintf("%s is %s above %s's personal best %s (more than %s)",
			barText(top, imp), units.SmallAbs(top-pb, imp), ath.Name, barText(pb, imp), units.SmallAbs(logAbovePBM, imp)))
	}
	if b, ok := bestCleared(add); ok && higherBar(b.BarM, worldRecordM(ath.Sex)) {
		why = append(why, fmt.Sprintf("a clearance at %s is above the world record %s", barText(b.BarM, imp), barText(worldRecordM(ath.Sex), imp)))
	}
	for _, a := range add {
		if s := peakVzConflict(a, ath, team); s != "" {
			why = append(why, s)
			break
		}
	}
	return why
}

// pluralS is "s" unless n is 1.
func pluralS(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// ordinalWord writes 1 to 4 as first, second, third, fourth (then 5th...).
func ordinalWord(n int) string {
	if n >= 1 && n <= 4 {
		return []string{"first", "second", "third", "fourth"}[n-1]
	}
	return ordinal(n)
}

// countWords writes a small count in words: "two tries", "one pass",
// figures from ten up.
func countWords(n int, one, many string) string {
	words := []string{"no", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine"}
	w := fmt.Sprint(n)
	if n >= 0 && n < len(words) {
		w = words[n]
	}
	if n == 1 {
		return w + " " + one
	}
	return w + " " + many
}

// whyMaxRunes keeps a refusal inside the phone's budget for refusals
// (DEVELOPERS.md: 350 characters with its example).
const whyMaxRunes = 240

// whyText joins the reasons a line needs confirm, the first in full and
// the others while they fit.
func whyText(why []string) string {
	out := capitalize(why[0])
	for i, w := range why[1:] {
		if len([]rune(out))+len([]rune(w))+2 > whyMaxRunes {
			return out + fmt.Sprintf("; and %s more", countWords(len(why)-1-i, "reason", "reasons"))
		}
		out += "; " + w
	}
	return out
}

// dayAround reads an athlete's attempts of day around the moment at of a
// new or fixed line: today those up to at (they come before the line),
// sameKind those of today of the line's kind (meet or practice), later
// those after at. skip, if not nil, leaves attempts out (a fixed line's own).
func dayAround(tx Tx, athleteID uint64, day, at time.Time, meet bool, skip func(record.Attempt) bool) (today, sameKind, later []record.Attempt, err error) {
	err = tx.Attempts(athleteID, day, day.AddDate(0, 0, 1), func(a record.Attempt) error {
		switch {
		case skip != nil && skip(a):
		case a.Time.After(at):
			later = append(later, a)
		default:
			today = append(today, a)
			if a.Meet == meet {
				sameKind = append(sameKind, a)
			}
		}
		return nil
	})
	return today, sameKind, later, err
}

// lineChecks lists what about a new or fixed line needs confirm: at a meet
// the competition rules over the day's series (the line itself, then the
// later lines it would make break a rule), then what is implausible for
// the athlete. breach is the rule the line itself breaks (nil: none) and
// state the series after its valid attempts.
func lineChecks(ath record.Athlete, add, today, later []record.Attempt, meet bool, team record.Team) (why []string, breach *series.Breach, state series.State) {
	imp := imperial(team)
	if meet {
		breach, _, state = meetBreach(meetStateOf(today), add)
		if breach != nil {
			why = append(why, breachReason(breach, ath.Name, imp))
		} else if s := laterBreach(state, later, ath.Name, imp); s != "" {
			why = append(why, s)
		}
	}
	return append(why, plausibility(ath, add, team)...), breach, state
}
