// Package meetsheet is the sheet of one vertical-jump competition kept in
// chat: its competitors (from the squad and from outside it), the attempts
// entered in order, and what the sheet says at any moment: standings by the
// tie rules, who is still in with how many attempts at the current height,
// and the next height.
//
// Every entry is checked by the series engine (internal/series) against the
// competitor's series so far, and placing is internal/standings over the
// same series: the package adds the competition around them (who is alone
// in the competition, the current and next heights), nothing of the rules
// of a series. It is pure: values in, values out; the bot stores the sheet.
package meetsheet

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
)

// MaxCompetitors and MaxEntries bound a sheet (a club meet, not a
// championship).
const (
	MaxCompetitors = 40
	MaxEntries     = 1000
)

// Sheet is one competition's sheet, stored as JSON.
type Sheet struct {
	ID       string    `json:"id"`
	Name     string    `json:"name"`
	Date     string    `json:"date"` // the meet's local date, 2006-01-02
	StepsM   []float64 `json:"steps_m,omitempty"`
	JumpOff  bool      `json:"jump_off,omitempty"` // a tie for first goes to a jump-off (TR 26.9)
	OpenedBy string    `json:"opened_by,omitempty"`
	Opened   time.Time `json:"opened"`
	// Competitors in the order added.
	Competitors []Competitor `json:"competitors"`
	// Entries in the order typed; undo takes the last off.
	Entries []Entry `json:"entries"`
}

// Competitor is one name on the sheet: a squad athlete (AthleteID set) or
// an outsider, named only as typed.
type Competitor struct {
	Name      string `json:"name"`
	AthleteID uint64 `json:"athlete,omitempty"`
}

// Outsider reports a competitor from outside the squad.
func (c Competitor) Outsider() bool { return c.AthleteID == 0 }

// Jump is one attempt on the sheet.
type Jump struct {
	BarM    float64        `json:"bar_m"`
	Outcome record.Outcome `json:"outcome"`
	// Alone: the competitor was the only one still in when the jump was
	// entered, so the 2 cm least rise does not bind (TR 26.4 (a)).
	Alone   bool `json:"alone,omitempty"`
	JumpOff bool `json:"jump_off,omitempty"`
	// Decimals is how the bar was typed (for filing, see record.Attempt).
	Decimals int `json:"dp,omitempty"`
}

// Entry is one line typed onto the sheet for one competitor.
type Entry struct {
	Name  string    `json:"name"`
	Jumps []Jump    `json:"jumps"`
	By    string    `json:"by,omitempty"`
	Time  time.Time `json:"time"`
	// LineID and Keys are set when the entry came from a log line (`log
	// NAME ... meet`): its attempts are already in the log, so closing the
	// sheet files nothing more for it.
	LineID string       `json:"line,omitempty"`
	Keys   []record.Key `json:"keys,omitempty"`
	// Retire: the competitor retires from the competition here (no jumps;
	// see Retire). Undo takes it back like any entry.
	Retire bool `json:"retire,omitempty"`
}

// Find returns the competitor of a name (case-insensitive).
func (s *Sheet) Find(name string) (Competitor, bool) {
	for _, c := range s.Competitors {
		if strings.EqualFold(c.Name, name) {
			return c, true
		}
	}
	return Competitor{}, false
}

// FindAthlete returns the competitor who is the squad athlete id.
func (s *Sheet) FindAthlete(id uint64) (Competitor, bool) {
	for _, c := range s.Competitors {
		if id != 0 && c.AthleteID == id {
			return c, true
		}
	}
	return Competitor{}, false
}

// Rename gives a competitor a new name on the sheet and in its entries
// (a squad athlete renamed, or removed from the squad before filing).
func (s *Sheet) Rename(old, name string) {
	for i := range s.Competitors {
		if strings.EqualFold(s.Competitors[i].Name, old) {
			s.Competitors[i].Name = name
		}
	}
	for i := range s.Entries {
		if strings.EqualFold(s.Entries[i].Name, old) {
			s.Entries[i].Name = name
		}
	}
}

// ErrFull means the sheet already holds MaxCompetitors (Add) or
// MaxEntries (Log).
var ErrFull = errors.New("meetsheet: the sheet is full")

// ErrTaken means the name is already on the sheet.
var ErrTaken = errors.New("meetsheet: already on the sheet")

// Add puts a competitor on the sheet.
func (s *Sheet) Add(c Competitor) error {
	if _, ok := s.Find(c.Name); ok {
		return ErrTaken
	}
	for _, o := range s.Competitors {
		if c.AthleteID != 0 && o.AthleteID == c.AthleteID {
			return ErrTaken
		}
	}
	if len(s.Competitors) >= MaxCompetitors {
		return ErrFull
	}
	s.Competitors = append(s.Competitors, c)
	return nil
}

// Series is a competitor's attempts on the sheet, in order.
func (s *Sheet) Series(name string) []series.Attempt {
	var out []series.Attempt
	for _, e := range s.Entries {
		if strings.EqualFold(e.Name, name) {
			for _, j := range e.Jumps {
				out = append(out, series.Attempt{BarM: j.BarM, Outcome: j.Outcome, Alone: j.Alone, JumpOff: j.JumpOff})
			}
		}
	}
	return out
}

// BreachError is an entry refused by the series engine.
type BreachError struct {
	Name   string
	Breach series.Breach
	Jump   Jump // the attempt that breaks the rule
}

func (e *BreachError) Error() string {
	return fmt.Sprintf("meetsheet: %s %.2f %s: %v", e.Name, e.Jump.BarM, e.Jump.Outcome, e.Breach.Rule)
}

// Log checks an entry against the competitor's series so far and, when it
// keeps every rule, appends it. Each jump's Alone flag is set here: the
// competitor is alone when every other competitor is out (or has finished
// a jump-off). A refused entry leaves the sheet as it was and comes back
// as a *BreachError.
func (s *Sheet) Log(e Entry) error {
	c, ok := s.Find(e.Name)
	if !ok {
		return fmt.Errorf("meetsheet: %s is not on the sheet", e.Name)
	}
	if len(s.Entries) >= MaxEntries {
		return ErrFull
	}
	e.Name = c.Name
	if s.Retired(c.Name) {
		return ErrRetired
	}
	if len(e.Jumps) > 0 && e.Jumps[0].JumpOff && s.retiredTiedForFirst() {
		return ErrNoJumpOff
	}
	alone := s.aloneExcept(c.Name)
	for i := range e.Jumps {
		e.Jumps[i].Alone = alone && !e.Jumps[i].JumpOff
	}
	prior := s.Series(c.Name)
	next := make([]series.Attempt, len(e.Jumps))
	for i, j := range e.Jumps {
		next[i] = series.Attempt{BarM: j.BarM, Outcome: j.Outcome, Alone: j.Alone, JumpOff: j.JumpOff}
	}
	v := series.Extend(prior, next)
	if v.Breach != nil {
		k := v.Breach.Index - len(prior)
		if k < 0 || k >= len(e.Jumps) {
			return fmt.Errorf("meetsheet: the stored series of %s breaks %v", c.Name, v.Breach.Rule)
		}
		return &BreachError{Name: c.Name, Breach: *v.Breach, Jump: e.Jumps[k]}
	}
	for _, j := range e.Jumps {
		if !j.Alone && !j.JumpOff && !s.onSteps(j.BarM) {
			return &StepError{BarM: j.BarM, StepsM: s.StepsM}
		}
	}
	s.Entries = append(s.Entries, e)
	return nil
}

// StepError is an entry at a height the meet did not announce: while the
// announced heights last, the bar goes up only to them (TR 26.4; the
// progression is announced before the competition, from memory). Above
// the last one the rises are free (at least 2 cm, never larger than the
// one before).
type StepError struct {
	BarM   float64
	StepsM []float64
}

func (e *StepError) Error() string {
	return fmt.Sprintf("meetsheet: %.2f is not an announced height", e.BarM)
}

// onSteps reports whether a bar may be set: any bar without announced
// heights or above the last one, else one of them.
func (s *Sheet) onSteps(barM float64) bool {
	n := len(s.StepsM)
	if n == 0 || mm(barM) > mm(s.StepsM[n-1]) {
		return true
	}
	for _, b := range s.StepsM {
		if mm(b) == mm(barM) {
			return true
		}
	}
	return false
}

// aloneExcept reports whether every competitor but name is out.
func (s *Sheet) aloneExcept(name string) bool {
	if len(s.Competitors) < 2 {
		return false
	}
	for _, c := range s.Competitors {
		if strings.EqualFold(c.Name, name) {
			continue
		}
		if !series.Summarize(s.Series(c.Name)).Out && !s.Retired(c.Name) {
			return false
		}
	}
	return true
}

// Undo takes the last entry off the sheet and returns it.
func (s *Sheet) Undo() (Entry, bool) {
	if len(s.Entries) == 0 {
		return Entry{}, false
	}
	e := s.Entries[len(s.Entries)-1]
	s.Entries = s.Entries[:len(s.Entries)-1]
	return e, true
}

// ForgetLine takes off the entries that came from a log line (its `undo`).
func (s *Sheet) ForgetLine(lineID string) int {
	n := 0
	kept := s.Entries[:0]
	for _, e := range s.Entries {
		if lineID != "" && e.LineID == lineID {
			n++
			continue
		}
		kept = append(kept, e)
	}
	s.Entries = kept
	return n
}

func mm(m float64) int64 { return int64(math.Round(m * 1000)) }
