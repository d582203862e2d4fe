package meetsheet

import (
	"errors"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/series"
	"github.com/lathmark-team/lathmark/internal/standings"
)

// Errors of Retire (and of Log for a competitor who retired).
var (
	// ErrRetired means the competitor has retired from the competition.
	ErrRetired = errors.New("meetsheet: retired from the competition")
	// ErrOut means the competitor is out already (three consecutive
	// failures): there is nothing left to retire from.
	ErrOut = errors.New("meetsheet: already out of the competition")
	// ErrInJumpOff means the competitor is in a jump-off for first, which
	// the sheet leaves to the officials.
	ErrInJumpOff = errors.New("meetsheet: in a jump-off")
)

// Retired reports whether the competitor retired (an entry with Retire).
func (s *Sheet) Retired(name string) bool {
	for _, e := range s.Entries {
		if e.Retire && strings.EqualFold(e.Name, name) {
			return true
		}
	}
	return false
}

// Retire records that a competitor withdraws from the competition: an
// athlete may retire at any time, and the place stands on the heights
// cleared until then (World Athletics Technical Rules, the general
// conditions for field events, TR 25; rule number from memory). From then
// on the competitor is no longer still in, is not called at any height,
// and the sheet takes no more attempts for them. It is an entry like any
// other, so Undo takes it back.
func (s *Sheet) Retire(name, by string, at time.Time) error {
	c, ok := s.Find(name)
	switch {
	case !ok:
		return ErrNotOn
	case s.Retired(c.Name):
		return ErrRetired
	case len(s.Entries) >= MaxEntries:
		return ErrFull
	}
	sm := series.Summarize(s.Series(c.Name))
	switch {
	case len(sm.JumpOff) > 0:
		return ErrInJumpOff
	case sm.Out:
		return ErrOut
	}
	s.Entries = append(s.Entries, Entry{Name: c.Name, By: by, Time: at, Retire: true})
	return nil
}

// ErrNoJumpOff means a jump-off entry on a sheet where a competitor tied
// for first has retired: the sheet holds no jump-off then (Now).
var ErrNoJumpOff = errors.New("meetsheet: a competitor tied for first retired; no jump-off on the sheet")

// retiredTiedForFirst reports a retired competitor among those tied for
// first whom a jump-off would decide.
func (s *Sheet) retiredTiedForFirst() bool {
	if !s.JumpOff {
		return false
	}
	cs := make([]standings.Competitor, len(s.Competitors))
	for i, c := range s.Competitors {
		cs[i] = standings.Competitor{Name: c.Name, Series: series.Summarize(s.Series(c.Name)), Retired: s.Retired(c.Name)}
	}
	for _, x := range standings.Place(cs, 0, true) {
		if x.JumpOff && x.Retired {
			return true
		}
	}
	return false
}

// ErrNotOn means the name is not on the sheet.
var ErrNotOn = errors.New("meetsheet: not on the sheet")
