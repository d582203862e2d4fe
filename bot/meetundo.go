package bot

import (
	"fmt"
)

// runMeetUndo takes the open sheet's last entry off; an entry from a log
// line is refused with undo, which takes it off the log and the sheet.
func runMeetUndo(c *call) (Reply, error) {
	if len(c.args) > 0 {
		return Reply{}, usageErr(meetUndoExample, "meet undo takes no words after it (%q is extra); it takes the sheet's last entry off", joinRaw(c.args))
	}
	var r Reply
	err := c.update(func(tx Tx) error {
		sc, err := openSheetIn(tx)
		if err != nil {
			return err
		}
		s := sc.s
		e, ok := s.Undo()
		if !ok {
			return notFoundErr(meetLogExample, "the sheet of %s has no entry to take off", s.Name)
		}
		if e.LineID != "" {
			return conflictErr("undo", "the sheet's last entry (%s) came from a log line; undo, by whoever logged it, takes it off the log and the sheet together", e.Name)
		}
		if err := putSheet(tx, s); err != nil {
			return err
		}
		comp, _ := s.Find(e.Name)
		if err := c.auditFor(tx, comp.AthleteID, auditMeetUndo, "meet "+s.Name, e, nil); err != nil {
			return err
		}
		hide, err := c.hiddenOnSheet(tx, s)
		if err != nil {
			return err
		}
		imp := sc.imp
		title := fmt.Sprintf("Taken off the sheet: %s %s.", e.Name, jumpsText(e.Jumps, imp))
		if e.Retire {
			title = fmt.Sprintf("Taken back: %s's retirement; %s is still in.", e.Name, e.Name)
		}
		r = Reply{Title: title,
			Lines: []string{roundLine(s.Now(), imp, hide)}, Ephemeral: hide[e.Name]}
		return nil
	})
	return r, err
}
