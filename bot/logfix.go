package bot

import (
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
)

// Corrections by line number: `fix #12 1.60 xo` replaces the attempts of
// line #12 (history shows the numbers), `drop #12` removes the line. Both
// are audited with the old and the new value, recompute the personal best
// and can be undone.

// savedMaxAttempts bounds the attempts a fix or drop keeps in the audit
// trail for undo (a line of a large import is dropped without that copy).
const savedMaxAttempts = 500

// savedLine is a line with its attempts, kept in the audit trail so that
// undo can put it back.
type savedLine struct {
	Line     record.Line      `json:"line"`
	Attempts []record.Attempt `json:"attempts"`
}

// lineNumberArg reads "#12", "12", "line 12" or "line #12" at the start
// of args.
func lineNumberArg(args []token) (uint64, []token, bool) {
	if len(args) == 0 {
		return 0, nil, false
	}
	i := 0
	if args[0].Lower == "line" {
		i = 1
	}
	if i >= len(args) {
		return 0, nil, false
	}
	w := strings.TrimPrefix(args[i].Lower, "#")
	if i == 0 && !strings.HasPrefix(args[i].Lower, "#") {
		return 0, nil, false
	}
	n, err := strconv.ParseUint(w, 10, 64)
	if err != nil || n == 0 {
		return 0, nil, false
	}
	return n, args[i+1:], true
}

// lineChangeCommands are fix and drop.
func lineChangeCommands() []command {
	return []command{
		{name: "fix", topic: "log", access: selfOrCoach,
			usage: "fix #N BAR ATTEMPTS... [meet|practice] [confirm]", example: "fix #1 1.60 xo",
			summary: "replace line #N's attempts (same athlete, day, time; log's checks apply)", run: runFix},
		{name: "drop", topic: "log", access: selfOrCoach,
			usage: "drop #N [confirm]", example: "drop #1",
			summary: "remove line #N (the Undo button under a log reply)", run: runDrop},
	}
}

func runDrop(c *call) (Reply, error) {
	n, rest, ok := lineNumberArg(c.args)
	if !ok || len(rest) > 1 || len(rest) == 1 && rest[0].Lower != "confirm" {
		return Reply{}, usageErr("drop #12", "name the line by its number from history, e.g. drop #12")
	}
	return c.dropLine(n)
}

// dropLine removes line #n: the Undo button's command.
func (c *call) dropLine(n uint64) (Reply, error) {
	confirm := len(c.args) > 0 && c.args[len(c.args)-1].Lower == "confirm"
	var r Reply
	err := c.update(func(tx Tx) error {
		var err error
		r, err = c.dropInTx(tx, n, confirm)
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	return r, nil
}

// findLineNo reads line #n and checks the speaker may change it; a line
// already removed says so.
func (c *call) findLineNo(tx Tx, n uint64, verb string) (record.Line, record.Athlete, error) {
	l, ok, err := tx.LineByNumber(n)
	if err != nil {
		return l, record.Athlete{}, err
	}
	if rank(c.user.Role) < rank(record.RoleCoach) {
		return c.ownLineNo(tx, l, ok, n, verb)
	}
	if !ok {
		last, err := tx.LastLineNumber()
		if err != nil {
			return l, record.Athlete{}, err
		}
		if n <= last {
			return l, record.Athlete{}, conflictErr("history me", "line #%d was already removed (undone or dropped); nothing was changed", n)
		}
		return l, record.Athlete{}, notFoundErr("history Kai", "there is no line #%d; history shows each line's number", n)
	}
	if l.AthleteID == 0 {
		if rank(c.user.Role) < rank(record.RoleHeadCoach) {
			return l, record.Athlete{}, forbiddenErr("history me", "line #%d is an import of several athletes; only a head coach may %s it", n, verb)
		}
		return l, record.Athlete{}, nil
	}
	ath, ok, err := tx.AthleteByID(l.AthleteID)
	if err != nil {
		return l, ath, err
	}
	if !ok {
		return l, ath, notFoundErr("history Kai", "the athlete of line #%d no longer exists", n)
	}
	if err := c.mayActFor(ath); err != nil {
		return l, ath, err
	}
	return l, ath, nil
}

// ownLineNo is findLineNo below coach: the speaker's own line, or one
// refusal whatever else line #n is (missing, removed, another athlete's, an
// import), so that trying numbers tells an athlete nothing about other
// athletes' lines.
func (c *call) ownLineNo(tx Tx, l record.Line, found bool, n uint64, verb string) (record.Line, record.Athlete, error) {
	refuse := forbiddenErr("history me", "line #%d is not one of your lines, or was already removed: nothing was changed. Only the athlete themself or a coach may %s a line; `history me` shows your lines' numbers, and a head coach links you with `athlete link NAME @you`.", n, verb)
	if !found || l.AthleteID == 0 || c.user.Role != record.RoleAthlete || l.AthleteID != c.user.AthleteID {
		return l, record.Athlete{}, refuse
	}
	ath, ok, err := tx.AthleteByID(l.AthleteID)
	if err != nil {
		return l, ath, err
	}
	if !ok {
		return l, ath, refuse
	}
	return l, ath, nil
}

// lineAttemptsAll reads a line's attempts, whatever athletes they belong to.
func lineAttemptsAll(tx Tx, l record.Line) ([]record.Attempt, error) {
	by := map[uint64]bool{}
	var out []record.Attempt
	for _, k := range l.Attempts {
		if by[k.AthleteID] {
			continue
		}
		by[k.AthleteID] = true
		one := l
		one.AthleteID = k.AthleteID
		as, err := lineAttempts(tx, one)
		if err != nil {
			return nil, err
		}
		out = append(out, as...)
	}
	return out, nil
}

func (c *call) dropInTx(tx Tx, n uint64, confirm bool) (Reply, error) {
	team, loc, err := teamAndZone(tx)
	if err != nil {
		return Reply{}, err
	}
	imp := imperial(team)
	l, ath, err := c.findLineNo(tx, n, "drop")
	if err != nil {
		return Reply{}, err
	}
	old, err := lineAttemptsAll(tx, l)
	if err != nil {
		return Reply{}, err
	}
	if len(old) > undoMaxAttempts && !confirm {
		return Reply{}, conflictErr(fmt.Sprintf("drop #%d confirm", n), "line #%d holds %s; to remove them all, send drop #%d confirm", n, jumpPassText(old), n)
	}
	if err := tx.DeleteAttempts(l.Attempts); err != nil {
		return Reply{}, err
	}
	if err := tx.DeleteLine(l); err != nil {
		return Reply{}, err
	}
	desc := lineDesc(l, old, imp)
	before := map[string]any{"line": desc, auditLineNo: n}
	if len(old) <= savedMaxAttempts {
		before["_saved"] = savedLine{Line: l, Attempts: old}
	}
	subject := ath.Name
	if subject == "" {
		subject = l.Text
	}
	if err := c.auditFor(tx, ath.ID, auditDrop, subject, before, nil); err != nil {
		return Reply{}, err
	}
	r := Reply{Title: fmt.Sprintf("Dropped line #%d", n), Lines: []string{
		fmt.Sprintf("Removed %s: %s, logged %s.", desc, jumpPassText(old), l.Time.In(loc).Format("2006-01-02 15:04")),
		"It had been typed: " + l.Text,
	}}
	if err := c.offMeetSheet(tx, l, &r); err != nil { // meet sheet (bot/meethook.go)
		return Reply{}, err
	}
	if ath.ID != 0 && len(old) > 0 && old[0].Meet {
		// Without this line, does a later line of that meet break a rule?
		day := localDay(old[0].Time, loc)
		var rest []record.Attempt
		if err := tx.Attempts(ath.ID, day, day.AddDate(0, 0, 1), func(a record.Attempt) error {
			rest = append(rest, a)
			return nil
		}); err != nil {
			return Reply{}, err
		}
		if n, why := laterBreachOf(series.State{}, rest, ath.Name, imp); why != "" {
			r.Lines = append(r.Lines, fmt.Sprintf("Note: without it, line #%d breaks the rules (%s), so it no longer counts for a best; fix #%d or drop #%d.", n, why, n, n))
		}
	}
	if ath.ID != 0 {
		s, err := c.settlePB(tx, &ath, l.Time, imp)
		if err != nil {
			return Reply{}, err
		}
		if s != "" {
			r.Lines = append(r.Lines, s)
		}
	}
	return r, nil
}

// lineDesc names a line: "#12 Mira 1.70 o, 1.75 xo (meet)".
func lineDesc(l record.Line, as []record.Attempt, imp bool) string {
	if strings.HasPrefix(l.ID, "import:") {
		return fmt.Sprintf("#%d, the import %q", l.Number, l.Text)
	}
	kind := "practice"
	if len(as) > 0 && as[0].Meet {
		kind = "meet"
	}
	return fmt.Sprintf("#%d %s (%s)", l.Number, runsText(heightRuns(as), imp), kind)
}

func runFix(c *call) (Reply, error) {
	n, rest, ok := lineNumberArg(c.args)
	if !ok {
		return Reply{}, usageErr("fix #12 1.60 xo", "name the line by its number from history, then the attempts as they were, e.g. fix #12 1.60 xo")
	}
	if len(rest) == 0 {
		return Reply{}, usageErr(fmt.Sprintf("fix #%d 1.60 xo", n), "give the attempts of line #%d as they were, e.g. fix #%d 1.60 xo", n, n)
	}
	var r Reply
	err := c.update(func(tx Tx) error {
		var err error
		r, err = c.fixInTx(tx, n, rest)
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	return r, nil
}

func (c *call) fixInTx(tx Tx, n uint64, rest []token) (Reply, error) {
	team, loc, err := teamAndZone(tx)
	if err != nil {
		return Reply{}, err
	}
	imp := imperial(team)
	l, ath, err := c.findLineNo(tx, n, "fix")
	if err != nil {
		return Reply{}, err
	}
	if ath.ID == 0 || !strings.HasPrefix(l.ID, "log:") && !strings.HasPrefix(l.ID, "fix:") {
		return Reply{}, conflictErr(fmt.Sprintf("drop #%d", n), "line #%d is an import; fix works on logged lines (drop #%d removes it)", n, n)
	}
	name := token{Raw: ath.Name, Lower: strings.ToLower(ath.Name)}
	ln, err := parseLogLine(append([]token{name}, rest...))
	if err != nil {
		if ue, ok := err.(*UserError); ok {
			ue.Example = strings.Replace(ue.Example, "log "+ath.Name, fmt.Sprintf("fix #%d", n), 1)
		}
		return Reply{}, err
	}
	if ln.When.given() {
		return Reply{}, usageErr(fmt.Sprintf("fix #%d %s", n, joinRaw(withoutWhen(rest))), "fix keeps the line's day and time; to move a session, drop #%d and log it again with the day", n)
	}
	old, err := lineAttempts(tx, l)
	if err != nil {
		return Reply{}, err
	}
	if len(old) == 0 {
		return Reply{}, conflictErr("history "+ath.Name, "line #%d has no attempts left to fix", n)
	}
	if !ln.Meet && !ln.Practice {
		ln.Meet = old[0].Meet
	}
	at := old[0].Time
	oldKeys := map[record.Key]bool{}
	for _, a := range old {
		k := a.Key()
		k.Time = k.Time.UTC()
		oldKeys[k] = true
	}
	day := localDay(at, loc)
	today, sameKind, later, err := dayAround(tx, ath.ID, day, at, ln.Meet, func(a record.Attempt) bool {
		k := a.Key()
		k.Time = k.Time.UTC()
		return oldKeys[k]
	})
	if err != nil {
		return Reply{}, err
	}
	add := ln.attempts(ath.ID, at, old[0].LoggedBy, old[0].MessageID, l.ID)
	numberAttempts(sameKind, add, ln.Meet)
	typed := fmt.Sprintf("fix #%d %s", n, joinRaw(rest))
	why, breach, _ := lineChecks(ath, add, today, later, ln.Meet, team)
	if len(why) > 0 && !ln.Confirm {
		return Reply{}, conflictErr(typed+" confirm", "%s; nothing was changed (if it is right, add confirm).", whyText(why))
	}
	for i := range add {
		add[i].LineNo = n
		if breach != nil {
			add[i].RuleBreach = breachMark(breach)
		}
		add[i] = withPrediction(add[i], ath, team)
		if m := modelMargin(add[i], ath, team); m.ok {
			add[i].HasModelMargin, add[i].ModelMarginM = true, m.marginM
		}
	}
	if err := tx.DeleteAttempts(l.Attempts); err != nil {
		return Reply{}, err
	}
	if err := tx.AddAttempts(add); err != nil {
		return Reply{}, err
	}
	nl := l
	nl.Text = "log " + ath.Name + " " + joinRaw(rest) + " (fix of line #" + strconv.FormatUint(n, 10) + ")"
	nl.Attempts = nil
	for _, a := range add {
		nl.Attempts = append(nl.Attempts, a.Key())
	}
	if err := tx.PutLine(nl); err != nil {
		return Reply{}, err
	}
	oldDesc, newDesc := lineDesc(l, old, imp), lineDesc(nl, add, imp)
	before := map[string]any{"line": oldDesc, auditLineNo: n, "_saved": savedLine{Line: l, Attempts: old}}
	after := map[string]any{"line": newDesc, auditLineNo: n}
	if err := c.auditFor(tx, ath.ID, auditFix, ath.Name, before, after); err != nil {
		return Reply{}, err
	}
	r := Reply{Title: fmt.Sprintf("Fixed line #%d for %s", n, ath.Name), Lines: []string{
		fmt.Sprintf("%s → %s: %s, %s.", runsText(heightRuns(old), imp), runsText(heightRuns(add), imp), jumpPassText(add), at.In(loc).Format("Mon 2006-01-02 15:04")),
	}}
	if breach != nil {
		r.Lines = append(r.Lines, "Stored as breaking the rules: "+breachMark(breach)+"; it never counts for a best.")
	}
	flagged := make([]loggedJump, len(add))
	for i, a := range add {
		flagged[i] = loggedJump{rec: a, flags: attemptFlags(a, ath, team)}
	}
	if l := logCheckLine(flagged, imp); l != "" {
		r.Lines = append(r.Lines, l) // range flags, as under a log line
	}
	s, err := c.settlePB(tx, &ath, l.Time, imp)
	if err != nil {
		return Reply{}, err
	}
	if s != "" {
		r.Lines = append(r.Lines, s)
	}
	r.Actions = []Action{{Label: "Undo", Command: "undo"}}
	return r, nil
}

// undoLineChange takes back a log, import, fix or drop.
func (c *call) undoLineChange(tx Tx, e record.AuditEntry, when string, confirm bool) (Reply, error) {
	team, loc, err := teamAndZone(tx)
	if err != nil {
		return Reply{}, err
	}
	imp := imperial(team)
	n := entryLineNo(e)
	var saved *savedLine
	if e.Action == auditFix || e.Action == auditDrop {
		var b struct {
			Saved *savedLine `json:"_saved"`
		}
		if json.Unmarshal([]byte(e.Before), &b) != nil || b.Saved == nil {
			return Reply{}, conflictErr("history", "your last change (%s of line #%d, %s) kept no copy to put back; nothing was changed", e.Action, n, when)
		}
		saved = b.Saved
	}
	var cur record.Line
	var curAtts []record.Attempt
	if e.Action != auditDrop {
		l, ok, err := tx.LineByNumber(n)
		if err != nil {
			return Reply{}, err
		}
		if !ok && n == 0 {
			l, ok, err = tx.LastLine(c.lineOwner())
			if err != nil {
				return Reply{}, err
			}
			ok = ok && l.Time.Equal(e.Time)
		}
		if !ok {
			return Reply{}, conflictErr("history", "your last change (%s, %s) was already removed; nothing was changed", e.Action, when)
		}
		cur = l
		if curAtts, err = lineAttemptsAll(tx, l); err != nil {
			return Reply{}, err
		}
	}
	removing := len(curAtts)
	if saved == nil && (removing > undoMaxAttempts || sessionCount(curAtts, loc) > 1) && !confirm {
		return Reply{}, conflictErr("undo confirm", "undo would remove %s (%s, %s); if that is what you want, send undo confirm", jumpPassText(curAtts), lineDesc(cur, curAtts, imp), when)
	}
	var lines []string
	var sheet Reply // what the meet sheet says when the line comes off it
	if e.Action != auditDrop {
		if err := tx.DeleteAttempts(cur.Attempts); err != nil {
			return Reply{}, err
		}
		if err := tx.DeleteLine(cur); err != nil {
			return Reply{}, err
		}
		if err := c.offMeetSheet(tx, cur, &sheet); err != nil { // meet sheet (bot/meethook.go)
			return Reply{}, err
		}
	}
	switch e.Action {
	case auditImportCSV:
		athletes := map[uint64]bool{}
		for _, k := range cur.Attempts {
			athletes[k.AthleteID] = true
		}
		lines = append(lines, fmt.Sprintf("Removed the import #%d of %s (%s) made at %s.", cur.Number, jumpPassText(curAtts), plural(len(athletes), "athlete"), when), "You had typed: "+cur.Text)
	case auditLog:
		kind := "practice"
		if len(curAtts) > 0 && curAtts[0].Meet {
			kind = "meet"
		}
		lines = append(lines, fmt.Sprintf("Removed %s's line #%d from %s: %s (%s, %s).", e.Subject, cur.Number, when, runsText(heightRuns(curAtts), imp), jumpPassText(curAtts), kind), "You had typed: "+cur.Text)
	case auditFix:
		lines = append(lines, fmt.Sprintf("Took back your fix of line #%d at %s: %s is back.", n, when, runsText(heightRuns(saved.Attempts), imp)))
	case auditDrop:
		lines = append(lines, fmt.Sprintf("Took back your drop of line #%d at %s: %s is back.", n, when, lineDesc(saved.Line, saved.Attempts, imp)))
	}
	if saved != nil {
		as := append([]record.Attempt(nil), saved.Attempts...)
		if err := tx.AddAttempts(as); err != nil {
			return Reply{}, err
		}
		l := saved.Line
		l.Attempts = nil
		for _, a := range as {
			l.Attempts = append(l.Attempts, a.Key())
		}
		if err := tx.PutLine(l); err != nil {
			return Reply{}, err
		}
		cur = l
	}
	if id := cur.AthleteID; id != 0 {
		ath, ok, err := tx.AthleteByID(id)
		if err != nil {
			return Reply{}, err
		}
		if ok {
			s, err := c.settlePB(tx, &ath, cur.Time, imp)
			if err != nil {
				return Reply{}, err
			}
			if s != "" {
				lines = append(lines, s)
			}
		}
	}
	return Reply{Title: "Undone", Lines: append(lines, sheet.Lines...)}, nil
}

// settlePB recomputes the profile's personal best after a line changed:
// a personal best a log wrote (audit "log personal best" since the line's
// time) that no valid meet series holds any more goes back to the value
// before it, or to the best valid meet clearance if that is higher; a
// valid meet clearance above the profile raises it. Returns a sentence for
// the reply, "" when nothing changed.
func (c *call) settlePB(tx Tx, ath *record.Athlete, since time.Time, imp bool) (string, error) {
	_, loc, err := teamAndZone(tx)
	if err != nil {
		return "", err
	}
	var meet []record.Attempt
	if err := tx.Attempts(ath.ID, time.Unix(0, 0), farFuture(), func(a record.Attempt) error {
		if a.Meet {
			meet = append(meet, a)
		}
		return nil
	}); err != nil {
		return "", err
	}
	best, hasBest := series.Best(meet, loc)
	validM := 0.0
	if hasBest {
		validM = best.BarM
	}
	old := *ath
	switch {
	case higherBar(validM, ath.PersonalBestM):
		ath.PersonalBestM = validM
		if err := tx.PutAthlete(ath); err != nil {
			return "", err
		}
		return fmt.Sprintf("Personal best up to %s (a valid meet series holds it).", barText(validM, imp)), c.audit(tx, auditLogPB, ath.Name, old, *ath)
	case !higherBar(ath.PersonalBestM, validM):
		return "", nil
	}
	// The profile is above every valid meet clearance: was it a log's doing?
	var from *record.Athlete
	err = tx.AuditEntries(since, func(e record.AuditEntry) error {
		if e.Action != auditLogPB || (e.AthleteID != ath.ID && e.Subject != ath.Name) {
			return nil
		}
		var b, a record.Athlete
		if json.Unmarshal([]byte(e.Before), &b) != nil || json.Unmarshal([]byte(e.After), &a) != nil {
			return nil
		}
		if math.Abs(a.PersonalBestM-ath.PersonalBestM) < logBarTolM {
			from = &b
		}
		return nil
	})
	if err != nil || from == nil {
		return "", err
	}
	ath.PersonalBestM = max(from.PersonalBestM, validM)
	if err := tx.PutAthlete(ath); err != nil {
		return "", err
	}
	if err := c.audit(tx, auditUndoPB, ath.Name, old, *ath); err != nil {
		return "", err
	}
	if ath.PersonalBestM > 0 {
		return "Personal best back to " + barText(ath.PersonalBestM, imp) + ".", nil
	}
	return "The personal best this line set is cleared from the profile.", nil
}

// sessionCount is how many sessions (one athlete on one day in the team's
// zone) the attempts span: an import that spans more than one is more than
// one line, and undoing it asks for confirm.
func sessionCount(atts []record.Attempt, loc *time.Location) int {
	type session struct {
		athleteID uint64
		day       string
	}
	seen := map[session]bool{}
	for _, a := range atts {
		seen[session{a.AthleteID, a.Time.In(loc).Format("2006-01-02")}] = true
	}
	return len(seen)
}
