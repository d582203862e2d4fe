package bot

import (
	"errors"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/record"
)

// onMeetSheet is the log command's hook into the meet sheet: a coach's
// meet line (log NAME ... meet) for a squad athlete on the open sheet goes
// on the sheet too, checked there by the competition rules; a line the
// sheet refuses is refused whole (nothing is logged). add holds the line's
// stored attempts (keys assigned). Practice lines, athletes' own lines
// (the reply says so when they are on today's sheet), athletes not on the
// sheet and days other than the sheet's leave the sheet alone.
func (c *call) onMeetSheet(tx Tx, ath record.Athlete, add []record.Attempt, r *Reply) error {
	if len(add) == 0 || !add[0].Meet {
		return nil
	}
	s, ok, err := openSheet(tx)
	if err != nil || !ok {
		return err
	}
	team, loc, err := teamAndZone(tx)
	if err != nil {
		return err
	}
	imp := imperial(team)
	today := c.now.In(loc).Format("2006-01-02")
	if rank(c.user.Role) < rank(record.RoleCoach) {
		// The sheet is the coaches' (the scorer's) record: an athlete's own
		// line is logged, and the athlete told it is not on the sheet.
		if _, on := s.FindAthlete(ath.ID); on && s.Date == today {
			r.Lines = append(r.Lines, "Logged for you; not on the sheet of "+s.Name+": the coach keeping it enters attempts there.")
		}
		return nil
	}
	if s.Date != today {
		r.Lines = append(r.Lines, "The open sheet ("+s.Name+") is for "+s.Date+"; this line is not on it.")
		return nil
	}
	comp, ok := s.FindAthlete(ath.ID)
	if !ok {
		r.Lines = append(r.Lines, "Not on the open sheet of "+s.Name+": meet add "+ath.Name+" puts them on it.")
		return nil
	}
	e := meetsheet.Entry{Name: comp.Name, By: c.lineOwner(), Time: c.now, LineID: add[0].LineID}
	for _, a := range add {
		e.Jumps = append(e.Jumps, meetsheet.Jump{BarM: a.BarM, Outcome: a.Outcome, Decimals: a.BarDecimals})
		e.Keys = append(e.Keys, a.Key())
	}
	if err := c.logOnSheet(&s, e, imp); err != nil {
		var ue *UserError
		if errors.As(err, &ue) {
			ue.Msg += "; nothing was logged"
		}
		return err
	}
	if err := putSheet(tx, s); err != nil {
		return err
	}
	if err := c.auditFor(tx, ath.ID, auditMeetLog, "meet "+s.Name, nil, s.Entries[len(s.Entries)-1]); err != nil {
		return err
	}
	hide, err := c.hiddenOnSheet(tx, s)
	if err != nil {
		return err
	}
	r.Lines = append(r.Lines, "On the sheet of "+s.Name+". "+roundLine(s.Now(), imp, hide))
	return nil
}

// offMeetSheet is the undo command's hook: the sheet entries of an undone
// log line come off the open sheet too.
func (c *call) offMeetSheet(tx Tx, l record.Line, r *Reply) error {
	s, ok, err := openSheet(tx)
	if err != nil || !ok {
		return err
	}
	if s.ForgetLine(l.ID) == 0 {
		return nil
	}
	if err := putSheet(tx, s); err != nil {
		return err
	}
	if err := c.auditFor(tx, l.AthleteID, auditMeetUndo, "meet "+s.Name, l.Text, nil); err != nil {
		return err
	}
	r.Lines = append(r.Lines, "Taken off the sheet of "+s.Name+" too.")
	return nil
}
