package bot

import (
	"errors"
	"fmt"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/series"
	"github.com/lathmark-team/lathmark/internal/units"
)

// meetRetireExample works as typed in help (after Bea has jumped).
const meetRetireExample = "meet retire Bea"

// auditMeetRetire is the audit action of a retirement.
const auditMeetRetire = "meet retire"

// retireRule is where the sheet's retirement comes from.
const retireRule = "TR 25, from memory"

// runMeetRetire records that a competitor withdraws from the competition
// (meetsheet.Sheet.Retire): their place stands on what they cleared, and
// they are no longer still in or called. meet undo takes it back.
func runMeetRetire(c *call) (Reply, error) {
	if len(c.args) != 1 {
		return Reply{}, usageErr(meetRetireExample, "name the one competitor who retires")
	}
	name := c.args[0].Raw
	var r Reply
	err := c.update(func(tx Tx) error {
		sc, err := openSheetIn(tx)
		if err != nil {
			return err
		}
		imp, s := sc.imp, sc.s
		comp, ok := s.Find(name)
		if !ok {
			return notFoundErr(standingsExample, "%s is not on the sheet of %s; standings shows who is", name, s.Name)
		}
		switch err := s.Retire(comp.Name, c.lineOwner(), c.now); {
		case errors.Is(err, meetsheet.ErrRetired):
			return conflictErr(meetUndoExample, "%s has retired already; meet undo takes the last entry back if that was a mistake", comp.Name)
		case errors.Is(err, meetsheet.ErrOut):
			return conflictErr(standingsExample, "%s is out already (three consecutive failures, TR 26.2): there is nothing to retire from", comp.Name)
		case errors.Is(err, meetsheet.ErrInJumpOff):
			return conflictErr(standingsExample, "%s is in the jump-off for first: the officials decide a withdrawal there (TR 26.9)", comp.Name)
		case errors.Is(err, meetsheet.ErrFull):
			return conflictErr(meetCloseExample, "the sheet holds at most %d entries; file it with meet close", meetsheet.MaxEntries)
		case err != nil:
			return err
		}
		if err := putSheet(tx, s); err != nil {
			return err
		}
		if err := c.auditFor(tx, comp.AthleteID, auditMeetRetire, "meet "+s.Name, nil, s.Entries[len(s.Entries)-1]); err != nil {
			return err
		}
		hide, err := c.hiddenOnSheet(tx, s)
		if err != nil {
			return err
		}
		r = Reply{Title: fmt.Sprintf("Sheet: %s retires; %s.", comp.Name, retiredStands(s, comp.Name, imp)),
			Lines:   []string{roundLine(s.Now(), imp, hide)},
			Notes:   []string{"An athlete may retire at any time; the place stands on the heights cleared (" + retireRule + "). meet undo takes it back."},
			Actions: []Action{{Label: "Standings", Command: "standings"}},
			// A private or under-18 squad athlete is named only to the asker.
			Ephemeral: hide[comp.Name]}
		return nil
	})
	return r, err
}

// retiredStands says what a retired competitor's place stands on.
func retiredStands(s meetsheet.Sheet, name string, imp bool) string {
	best := series.Summarize(s.Series(name)).BestM
	if best == 0 {
		return "no height cleared, so no place"
	}
	return "the place stands on " + units.Bar(best, imp)
}
