package bot

import (
	"fmt"
	"strings"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
	"github.com/lathmark-team/lathmark/internal/units"
)

func runMeetClose(c *call) (Reply, error) {
	if len(c.args) > 0 {
		return Reply{}, usageErr(meetCloseExample, "meet close takes no words after it (%q is extra)", joinRaw(c.args))
	}
	var r Reply
	err := c.update(func(tx Tx) error {
		sc, err := openSheetIn(tx)
		if err != nil {
			return err
		}
		loc, imp, s := sc.loc, sc.imp, sc.s
		hide, err := c.hiddenOnSheet(tx, s)
		if err != nil {
			return err
		}
		if err := forgetRemoved(tx, &s); err != nil {
			return err
		}
		filed := s.Filed(loc)
		if err := c.fileLines(tx, s, filed); err != nil {
			return err
		}
		pbs, err := c.meetBests(tx, s, imp, hide)
		if err != nil {
			return err
		}
		m, err := sheets(tx)
		if err != nil {
			return err
		}
		if err := m.FileMeet(s); err != nil {
			return err
		}
		st := s.Now()
		summary := map[string]any{"sheet": s.ID, "competitors": len(s.Competitors), "entries": len(s.Entries), "filed_attempts": len(filed)}
		if err := c.auditFor(tx, 0, auditMeetClose, "meet "+s.Name, nil, summary); err != nil {
			return err
		}
		r = Reply{Title: "Filed: " + standingsTitle(s, st, imp, hide), Caution: meetCaution}
		r.Lines = append(r.Lines, filedLine(s, filed, hide))
		r.Lines = append(r.Lines, pbs...)
		for _, x := range st.Standings {
			if x.JumpOff {
				r.Lines = append(r.Lines, "The tie for first was filed without a jump-off result: an equal first on this sheet.")
				break
			}
		}
		return nil
	})
	return r, err
}

// filedLine says whose results went into the log.
func filedLine(s meetsheet.Sheet, filed []record.Attempt, hide map[string]bool) string {
	var squad []string
	masked := 0
	for _, comp := range s.Competitors {
		if comp.Outsider() || len(s.Series(comp.Name)) == 0 {
			continue
		}
		if hide[comp.Name] {
			masked++
			continue
		}
		squad = append(squad, comp.Name)
	}
	if masked > 0 {
		squad = append(squad, plural(masked, "athlete")+" not shown here")
	}
	if len(squad) == 0 {
		return "No squad athlete jumped: the sheet is kept, nothing went into the log."
	}
	return fmt.Sprintf("In the log as meet jumps: %s (%s added by the sheet; lines logged with meet were in already). Guests stay on the filed sheet only.",
		strings.Join(squad, ", "), plural(len(filed), "attempt"))
}

// meetBests raises the profile's personal best of each squad athlete whose
// best on the sheet (a series that keeps the rules) is above it, audited,
// and says so.
func (c *call) meetBests(tx Tx, s meetsheet.Sheet, imp bool, hide map[string]bool) ([]string, error) {
	var lines []string
	for _, comp := range s.Competitors {
		if comp.Outsider() {
			continue
		}
		best := series.Summarize(s.Series(comp.Name)).BestM
		a, ok, err := tx.AthleteByID(comp.AthleteID)
		if err != nil {
			return nil, err
		}
		if !ok || best == 0 || !higherMeetBar(best, a.PersonalBestM) {
			continue
		}
		before := a
		a.PersonalBestM = best
		if err := tx.PutAthlete(&a); err != nil {
			return nil, err
		}
		if err := c.auditFor(tx, a.ID, auditMeetPB, a.Name, before, a); err != nil {
			return nil, err
		}
		if !hide[comp.Name] {
			lines = append(lines, fmt.Sprintf("New personal best for %s: %s (was %s).", a.Name, units.Bar(best, imp), barOrNone(before.PersonalBestM, imp)))
		}
	}
	return lines, nil
}

// higherMeetBar reports a > b by more than half a millimetre.
func higherMeetBar(a, b float64) bool { return a > b+5e-4 }

func barOrNone(m float64, imp bool) string {
	if m == 0 {
		return "none"
	}
	return units.Bar(m, imp)
}

// forgetRemoved takes the sheet's squad athletes whose profile is gone
// (removed before forget and athlete remove scrubbed sheets) off it as
// forget does (meetsheet.Sheet.Scrub), so that the filed sheet keeps their
// places but not their names, and nothing is filed for them.
func forgetRemoved(tx Tx, s *meetsheet.Sheet) error {
	var gone []uint64
	for _, comp := range s.Competitors {
		if comp.Outsider() {
			continue
		}
		_, ok, err := tx.AthleteByID(comp.AthleteID)
		if err != nil {
			return err
		}
		if !ok {
			gone = append(gone, comp.AthleteID)
		}
	}
	for _, id := range gone {
		s.Scrub(id)
	}
	return nil
}

// fileLines stores the squad's results of a closed sheet as one numbered
// line an athlete (so that history shows #N, and fix and drop reach them),
// in the order the sheet first names each athlete.
func (c *call) fileLines(tx Tx, s meetsheet.Sheet, filed []record.Attempt) error {
	if len(filed) == 0 {
		return nil
	}
	numbers := map[uint64]uint64{}
	var order []uint64
	for i := range filed {
		id := filed[i].AthleteID
		if _, ok := numbers[id]; !ok {
			no, err := tx.NextLineNumber()
			if err != nil {
				return err
			}
			numbers[id] = no
			order = append(order, id)
		}
		filed[i].LineNo = numbers[id]
	}
	if err := tx.AddAttempts(filed); err != nil {
		return err
	}
	for _, id := range order {
		line := record.Line{ID: fmt.Sprintf("meet-%s-%d", s.ID, id), LoggedBy: c.lineOwner(), Time: c.now, AthleteID: id,
			Text: "meet close (" + s.Name + ")", Number: numbers[id]}
		for _, a := range filed {
			if a.AthleteID == id {
				line.Attempts = append(line.Attempts, a.Key())
			}
		}
		if err := tx.PutLine(line); err != nil {
			return err
		}
	}
	return nil
}
