package bot

import (
	"bytes"
	"encoding/json"
	"fmt"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// undo takes back the speaker's own last change of any kind within 24
// hours, found in the audit trail: a logged line, an import, a fix or a
// drop, a profile edit or rename, a new athlete, a role, a link, a team
// setting. Changes made by seeding the demo and changes of other people are
// never touched; a change already undone is passed over, so a second undo
// reaches the change before it. Removing more than one line or more than
// undoMaxAttempts attempts needs `undo confirm`.

// undoMaxAttempts is how many attempts undo removes without confirm.
const undoMaxAttempts = 20

// undoLookBack is how far back undo looks for the speaker's last change,
// to say when it is too old rather than that there is none.
const undoLookBack = 30 * 24 * time.Hour

// auditUndid is the key of an undo entry naming the entry it undid.
const auditUndid = "_undid"

// actions that are side effects of another change, never undone alone.
func undoSideEffect(action string) bool {
	switch action {
	case auditUndo, auditUndoPB, auditLogPB, "digest posted":
		return true
	}
	return false
}

// sheetEcho reports that mine[i] is the meet sheet's entry written by a log
// line, a drop or an undo in the same command (same time, after it): undo
// takes back the command, whose own hook takes the line off the sheet.
func sheetEcho(mine []record.AuditEntry, i int) bool {
	e := mine[i]
	if !isSheetEntry(e) {
		return false
	}
	for j := i - 1; j >= 0 && mine[j].Time.Equal(e.Time); j-- {
		switch mine[j].Action {
		case auditLog, auditDrop, auditFix:
			return true
		}
	}
	return false
}

// entryID identifies an audit entry for undo: its time, action, subject
// and, for a line change, the line's number.
func entryID(e record.AuditEntry) string {
	id := strconv.FormatInt(e.Time.UnixNano(), 36) + "|" + e.Action + "|" + e.Subject
	if n := entryLineNo(e); n > 0 {
		id += "|#" + strconv.FormatUint(n, 10)
	}
	return id
}

// entryLineNo reads the line number a line change keeps (0 none).
func entryLineNo(e record.AuditEntry) uint64 {
	for _, s := range []string{e.After, e.Before} {
		m := jsonObject(s)
		if v, ok := m[auditLineNo].(float64); ok && v > 0 {
			return uint64(v)
		}
	}
	return 0
}

// actorID is the chat user id in an entry's actor, "Name (U123)" or "U123".
func actorID(actor string) string {
	if i := strings.LastIndex(actor, " ("); i >= 0 && strings.HasSuffix(actor, ")") {
		return actor[i+2 : len(actor)-1]
	}
	return actor
}

// lastOwnChange finds the speaker's last change not yet undone within the
// undo window.
func (c *call) lastOwnChange(tx Tx) (record.AuditEntry, bool, error) {
	var (
		last  record.AuditEntry
		found bool
		mine  []record.AuditEntry
	)
	undone := map[string]bool{}
	undoAt := map[int64]bool{} // times of the speaker's undos (their sheet echoes are no change of their own)
	err := tx.AuditEntries(c.now.Add(-undoLookBack), func(e record.AuditEntry) error {
		if e.Time.After(c.now) {
			return nil
		}
		if e.Action == auditUndo {
			if id, ok := jsonObject(e.After)[auditUndid].(string); ok {
				undone[id] = true
			}
			if actorID(e.Actor) == c.user.ID {
				undoAt[e.Time.UnixNano()] = true
			}
			return nil
		}
		if e.Seeded || undoSideEffect(e.Action) || actorID(e.Actor) != c.user.ID {
			return nil
		}
		mine = append(mine, e)
		return nil
	})
	if err != nil {
		return last, false, err
	}
	for i := len(mine) - 1; i >= 0; i-- {
		if undone[entryID(mine[i])] || sheetEcho(mine, i) || isSheetEntry(mine[i]) && undoAt[mine[i].Time.UnixNano()] {
			continue
		}
		return mine[i], true, nil
	}
	return last, found, nil
}

func runUndo(c *call) (Reply, error) {
	args := c.args
	// `undo line 123` and `undo #123` are drop #123: the Undo button's form.
	if n, rest, ok := lineNumberArg(args); ok {
		if len(rest) > 0 && !(len(rest) == 1 && rest[0].Lower == "confirm") {
			return Reply{}, usageErr("undo line 12", "undo line N takes back line #N; %q is extra", joinRaw(rest))
		}
		return c.dropLine(n)
	}
	confirm := len(args) == 1 && args[0].Lower == "confirm"
	if len(args) > 0 && !confirm {
		return Reply{}, usageErr("undo", "undo takes back your own last change; add nothing but confirm, or line N for line #N (%q is extra)", joinRaw(args))
	}
	var r Reply
	err := c.update(func(tx Tx) error {
		var err error
		r, err = c.undoInTx(tx, confirm)
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	return r, nil
}

func (c *call) undoInTx(tx Tx, confirm bool) (Reply, error) {
	_, loc, err := teamAndZone(tx)
	if err != nil {
		return Reply{}, err
	}
	e, ok, err := c.lastOwnChange(tx)
	if err != nil {
		return Reply{}, err
	}
	if !ok {
		return Reply{}, notFoundErr("log Kai 1.95 o", "you have no change of your own to undo (undo never touches other people's changes or the demo's seeded data)")
	}
	when := e.Time.In(loc).Format("2006-01-02 15:04")
	if c.now.Sub(e.Time) > undoWindow {
		return Reply{}, conflictErr("history", "your last change (%s %s, %s) is more than 24 hours old; undo only takes back changes from the last 24 hours, and nothing was changed (fix #N and drop #N correct an older line)", e.Action, clip(e.Subject, 40), when)
	}
	if e.Forgotten {
		return Reply{}, conflictErr("audit", "your last change (%s, %s) was about an athlete since forgotten: what it changed is gone, and nothing was changed", e.Action, when)
	}
	var r Reply
	switch e.Action {
	case auditLog, auditImportCSV, auditFix, auditDrop:
		r, err = c.undoLineChange(tx, e, when, confirm)
	case "athlete set", "athlete rename":
		r, err = c.undoAthleteEdit(tx, e, when)
	case "athlete add":
		r, err = c.undoAthleteAdd(tx, e, when)
	case "role", "athlete link", "athlete unlink":
		r, err = c.undoUser(tx, e, when)
	default:
		if strings.HasPrefix(e.Action, "team") || strings.HasPrefix(e.Action, "digest") || e.Subject == "team" {
			r, err = c.undoTeam(tx, e, when)
			break
		}
		switch e.Action {
		case auditMeetAdd, auditMeetLog, auditMeetRetire:
			return Reply{}, conflictErr("meet undo", "your last change (%s, %s) is on the meet sheet: meet undo takes the sheet's last entry off. Nothing was changed", e.Action, when)
		}
		if e.After == "" && e.Before != "" || e.Action == "forget" {
			return Reply{}, conflictErr("audit", "your last change (%s %s, %s) cannot be undone: what it deleted is gone (a backup holds it); nothing was changed", e.Action, clip(e.Subject, 40), when)
		}
		return Reply{}, conflictErr("audit", "your last change (%s %s, %s) is not one undo can take back; change it back by hand. Nothing was changed", e.Action, clip(e.Subject, 40), when)
	}
	if err != nil {
		return Reply{}, err
	}
	undid := map[string]any{"line": "undid " + e.Action + " " + e.Subject + " of " + when, auditUndid: entryID(e)}
	if err := c.auditFor(tx, e.AthleteID, auditUndo, e.Subject, nil, undid); err != nil {
		return Reply{}, err
	}
	return r, nil
}

// undoAthleteEdit puts back the profile as it was, if nobody changed it since.
func (c *call) undoAthleteEdit(tx Tx, e record.AuditEntry, when string) (Reply, error) {
	var before, after record.Athlete
	if json.Unmarshal([]byte(e.Before), &before) != nil || json.Unmarshal([]byte(e.After), &after) != nil {
		return Reply{}, conflictErr("audit", "your last change (%s %s, %s) cannot be read back; nothing was changed", e.Action, e.Subject, when)
	}
	cur, ok, err := tx.AthleteByID(after.ID)
	if err != nil {
		return Reply{}, err
	}
	if !ok || !sameJSON(cur, after) {
		return Reply{}, conflictErr("audit "+after.Name, "%s's profile changed again after your %s of %s; undo would overwrite that, so nothing was changed", after.Name, e.Action, when)
	}
	if err := tx.PutAthlete(&before); err != nil {
		return Reply{}, err
	}
	return Reply{Title: "Undone", Lines: []string{
		fmt.Sprintf("Took back your %s of %s at %s: %s.", e.Action, after.Name, when, fieldList(jsonObject(e.Before), jsonObject(e.After))),
	}}, nil
}

// undoAthleteAdd removes a profile added by the speaker, if nothing was
// logged for it since.
func (c *call) undoAthleteAdd(tx Tx, e record.AuditEntry, when string) (Reply, error) {
	var a record.Athlete
	if json.Unmarshal([]byte(e.After), &a) != nil || a.ID == 0 {
		return Reply{}, conflictErr("audit", "your last change (athlete add %s, %s) cannot be read back; nothing was changed", e.Subject, when)
	}
	n := 0
	if err := tx.Attempts(a.ID, a.Created.AddDate(-100, 0, 0), farFuture(), func(record.Attempt) error { n++; return record.ErrStop }); err != nil {
		return Reply{}, err
	}
	if n > 0 {
		return Reply{}, conflictErr("athlete remove "+a.Name+" confirm", "%s has jumps logged since you added the profile; undo would delete them, so nothing was changed (a head coach can remove the athlete)", a.Name)
	}
	if _, err := tx.DeleteAthlete(a.ID); err != nil {
		return Reply{}, err
	}
	return Reply{Title: "Undone", Lines: []string{fmt.Sprintf("Took back your athlete add of %s at %s: the profile is removed.", a.Name, when)}}, nil
}

// undoUser puts back a chat user's role or link as it was.
func (c *call) undoUser(tx Tx, e record.AuditEntry, when string) (Reply, error) {
	var before, after record.User
	if json.Unmarshal([]byte(e.Before), &before) != nil || json.Unmarshal([]byte(e.After), &after) != nil || after.ID == "" {
		return Reply{}, conflictErr("audit", "your last change (%s %s, %s) cannot be read back; nothing was changed", e.Action, e.Subject, when)
	}
	cur, _, err := tx.User(after.ID)
	if err != nil {
		return Reply{}, err
	}
	if !sameJSON(cur, after) {
		return Reply{}, conflictErr("roles", "the user changed again after your %s of %s; nothing was changed", e.Action, when)
	}
	before.ID = after.ID
	if err := tx.PutUser(before); err != nil {
		return Reply{}, err
	}
	return Reply{Title: "Undone", Lines: []string{fmt.Sprintf("Took back your %s %s at %s: %s.", e.Action, e.Subject, when, fieldList(jsonObject(e.Before), jsonObject(e.After)))}}, nil
}

// undoTeam puts back the team settings as they were.
func (c *call) undoTeam(tx Tx, e record.AuditEntry, when string) (Reply, error) {
	var before, after record.Team
	if json.Unmarshal([]byte(e.Before), &before) != nil || json.Unmarshal([]byte(e.After), &after) != nil {
		return Reply{}, conflictErr("audit", "your last change (%s, %s) cannot be read back; nothing was changed", e.Action, when)
	}
	cur, err := tx.Team()
	if err != nil {
		return Reply{}, err
	}
	if !sameJSON(cur, after) {
		return Reply{}, conflictErr("audit", "the team settings changed again after your %s of %s; nothing was changed", e.Action, when)
	}
	if err := tx.PutTeam(before); err != nil {
		return Reply{}, err
	}
	return Reply{Title: "Undone", Lines: []string{fmt.Sprintf("Took back your %s at %s: %s.", e.Action, when, fieldList(jsonObject(e.Before), jsonObject(e.After)))}}, nil
}

// sameJSON compares two records by their stored form.
func sameJSON(a, b any) bool {
	x, err1 := json.Marshal(a)
	y, err2 := json.Marshal(b)
	return err1 == nil && err2 == nil && bytes.Equal(x, y)
}

// isSheetEntry is an audit entry the meet sheet writes for a log line.
func isSheetEntry(e record.AuditEntry) bool {
	return e.Action == auditMeetLog || e.Action == auditMeetUndo
}
