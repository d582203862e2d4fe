package bot

import (
	"encoding/json"
	"fmt"
	"hash/fnv"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// undoWindow is how far back undo reaches.
const undoWindow = 24 * time.Hour

// History windows, in weeks.
const (
	historyDefaultWeeks = 4
	historyMaxWeeks     = 104
)

// Audit actions written by the log commands.
const (
	auditLog       = "log"
	auditLogPB     = "log personal best"
	auditUndo      = "undo"
	auditUndoPB    = "undo personal best"
	auditImportCSV = "import csv"
)

// logCommands log jumps and read them back.
func logCommands() []command {
	return []command{
		{name: "log", topic: "log", access: selfOrCoach,
			usage:   "log ATHLETE|me BAR ATTEMPTS [BAR ATTEMPTS]... [meet] [by MARGIN] [approach M/S] [takeoff D] [peak P] [vz M/S] [note TEXT]",
			example: "log Kai 1.95 o 2.00 xo 2.04 xxx",
			summary: "log jumps: o cleared, x failed, - passed (or clear, miss, knock, pass). " +
				"by, approach, takeoff, peak and vz go with the jump written just before them, so given once at the end they describe the line's last jump; " +
				"meet applies to the whole line, note takes the rest of the line",
			run: runLog},
		{name: "undo", topic: "log", access: selfOrCoach, usage: "undo", example: "undo",
			summary: "take back your last logged line or import (within 24 hours) and say what went", run: runUndo},
		{name: "history", aliases: []string{"hist"}, topic: "log", access: selfOrCoach,
			usage: "history ATHLETE|me [Nw]", example: "history Kai 6w",
			summary: "one row per session (a day): heights in notation, best, make rate; last 4 weeks unless Nw (at most 104)", run: runHistory},
		{name: "best", aliases: []string{"bests"}, topic: "log", access: selfOrCoach,
			usage: "best ATHLETE|me", example: "best Kai",
			summary: "personal best, season best and practice best, with dates", run: runBest},
		{name: "export csv", aliases: []string{"csv export"}, topic: "log", access: selfOrCoach,
			usage: "export csv [ATHLETE] [since DATE|Nw]", example: "export csv Kai since 2026-01-01",
			summary: "a CSV file of attempts, one row each (all athletes for coaches)", run: runExportCSV},
		{name: "import csv", aliases: []string{"csv import"}, topic: "log", access: headOnly,
			usage: "import csv PATH", example: "import csv /home/coach/attempts.csv",
			summary: "read attempts from a CSV file on the bot's computer, or sent to the bot in chat (up to 2 MiB): all rows or none; rows whose message id was already handled are skipped", run: runImportCSV},
	}
}

// farFuture bounds open-ended scans (the store's keys end in 2262).
func farFuture() time.Time { return time.Date(2262, 1, 1, 0, 0, 0, 0, time.UTC) }

// lineOwner is the chat user lines are filed under; the terminal's
// operator may have no user id.
func (c *call) lineOwner() string {
	if c.req.UserID == "" {
		return "terminal"
	}
	return c.req.UserID
}

// lineID names a logged line: from the message id when there is one, else
// from the time and the text typed.
func (c *call) lineID(kind string) string {
	if c.req.MessageID != "" {
		return kind + ":" + c.req.MessageID
	}
	h := fnv.New32a()
	h.Write([]byte(c.req.Text))
	return kind + ":" + strconv.FormatInt(c.now.UnixNano(), 36) + "-" + strconv.FormatUint(uint64(h.Sum32()), 36)
}

// barText is a bar for sentences: "1.75 m" or "5-9".
func barText(m float64, imp bool) string { return units.Length(m, imp) }

func runLog(c *call) (Reply, error) {
	ln, err := parseLogLine(c.args)
	if err != nil {
		return Reply{}, err
	}
	var r Reply
	err = c.updateBatched(func(tx Tx) error { // logInTx builds everything afresh: safe to re-run
		var err error
		r, err = c.logInTx(tx, ln)
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	return r, nil
}

// loggedJump is an attempt being logged with its model result.
type loggedJump struct {
	rec   record.Attempt
	model jumpModel
}

func (c *call) logInTx(tx Tx, ln logLine) (Reply, error) {
	team, loc, err := teamAndZone(tx)
	if err != nil {
		return Reply{}, err
	}
	imp := imperial(team)
	ath, err := c.athleteFor(tx, ln.Athlete)
	if err != nil {
		return Reply{}, err
	}
	day := localDay(c.now, loc)
	dayEnd := day.AddDate(0, 0, 1)
	var today, sameKind []record.Attempt
	if err := tx.Attempts(ath.ID, day, dayEnd, func(a record.Attempt) error {
		today = append(today, a)
		if a.Meet == ln.Meet {
			sameKind = append(sameKind, a)
		}
		return nil
	}); err != nil {
		return Reply{}, err
	}

	lineID := c.lineID("log")
	var add []record.Attempt
	for _, g := range ln.Groups {
		for _, j := range g.Jumps {
			add = append(add, record.Attempt{
				AthleteID: ath.ID, Time: c.now, BarM: g.BarM, BarDecimals: units.MetreDecimals(g.Word, g.BarM), Outcome: j.Outcome, Meet: ln.Meet,
				ApproachMS: j.Meas.ApproachMS, TakeoffDistM: j.Meas.TakeoffDistM, PeakM: j.Meas.PeakM, VzMS: j.Meas.VzMS,
				HasCoachMargin: j.Meas.HasCoachMargin, CoachMarginM: j.Meas.CoachMarginM,
				Knock: j.Knock, Short: ln.Short,
				LoggedBy: c.lineOwner(), MessageID: c.req.MessageID, LineID: lineID,
			})
		}
	}
	add[len(add)-1].Note = ln.Note
	numberAttempts(sameKind, add, ln.Meet)
	jumps := make([]loggedJump, len(add))
	for i := range add {
		add[i] = withPrediction(add[i], ath, team)
		m := modelMargin(add[i], ath, team)
		if m.ok {
			add[i].HasModelMargin, add[i].ModelMarginM = true, m.marginM
		}
		jumps[i] = loggedJump{rec: add[i], model: m}
	}

	var warnings, notes []string
	if ln.Meet {
		warnings, notes = meetReview(sameKind, add, ath.Name, imp)
	}
	bestLines, newPB, err := c.announceBests(tx, ath, add, loc, imp, ln.Meet, len(warnings) > 0)
	if err != nil {
		return Reply{}, err
	}
	if newPB > 0 {
		before := ath
		ath.PersonalBestM = newPB
		if err := tx.PutAthlete(&ath); err != nil {
			return Reply{}, err
		}
		if err := c.audit(tx, auditLogPB, ath.Name, before, ath); err != nil {
			return Reply{}, err
		}
	}

	if err := tx.AddAttempts(add); err != nil {
		return Reply{}, err
	}
	line := record.Line{ID: lineID, LoggedBy: c.lineOwner(), Time: c.now, AthleteID: ath.ID, Text: "log " + joinRaw(c.args)}
	for _, a := range add {
		line.Attempts = append(line.Attempts, a.Key())
	}
	if err := tx.PutLine(line); err != nil {
		return Reply{}, err
	}
	// The attempts themselves are in the store; the trail keeps what was typed.
	logged := map[string]any{"line": line.Text, "attempts": len(add), "meet": ln.Meet}
	if err := c.audit(tx, auditLog, ath.Name, nil, logged); err != nil {
		return Reply{}, err
	}
	r := logReply(ath, ln, jumps, today, sameKind, add, bestLines, warnings, notes, imp)
	if err := c.onMeetSheet(tx, ath, add, &r); err != nil { // meet sheet (bot/meethook.go)
		return Reply{}, err
	}
	return c.quietHint(tx, r, hintMeasures, measuresHintPrefix), nil
}

// logReply is what the coach sees after a log line.
func logReply(ath record.Athlete, ln logLine, jumps []loggedJump, today, sameKind, add []record.Attempt, bests, warnings, notes []string, imp bool) Reply {
	kind := "practice"
	if ln.Meet {
		kind = "meet"
	}
	heights := len(heightRuns(add))
	r := Reply{
		Title:   fmt.Sprintf("Logged for %s (%s): %s at %s", ath.Name, kind, plural(len(add), "jump"), plural(heights, "height")),
		Actions: []Action{{Label: "Undo", Command: "undo"}},
	}
	r.Lines = append(r.Lines, runsText(heightRuns(add), imp))
	all := append(append([]record.Attempt(nil), today...), add...)
	made, tried := madeCount(all)
	summary := "Today: "
	if b, ok := bestCleared(all); ok {
		summary += "best " + barText(b.BarM, imp) + ", "
	} else {
		summary += "nothing cleared yet, "
	}
	summary += "made " + madeText(made, tried) + "."
	if len(sameKind) > 0 {
		summary += " The " + kind + " so far: " + runsText(heightRuns(append(append([]record.Attempt(nil), sameKind...), add...)), imp) + "."
	}
	r.Lines = append(r.Lines, summary)
	var measured []string
	seen := map[string]bool{}
	for _, j := range jumps {
		a := j.rec
		if !(jumpMeasures{a.ApproachMS, a.TakeoffDistM, a.PeakM, a.VzMS, a.HasCoachMargin, a.CoachMarginM}).any() {
			continue
		}
		label := fmt.Sprintf("%s attempt %d", units.Bar(a.BarM, imp), a.Number)
		measured = append(measured, label)
		var parts []string
		if a.PeakM != 0 {
			parts = append(parts, "peak "+units.Length(a.PeakM, imp))
		}
		if a.VzMS != 0 {
			parts = append(parts, fmt.Sprintf("vz %.2f m/s", a.VzMS))
		}
		if a.ApproachMS != 0 {
			parts = append(parts, fmt.Sprintf("approach %.2f m/s", a.ApproachMS))
		}
		if a.TakeoffDistM != 0 {
			parts = append(parts, "take-off "+units.Length(a.TakeoffDistM, imp))
		}
		if a.HasCoachMargin {
			parts = append(parts, "coach's margin "+units.Small(a.CoachMarginM, imp))
			if n := marginSignNote(a, label, imp); n != "" {
				r.Lines = append(r.Lines, n)
			}
		}
		if j.model.ok {
			parts = append(parts, "model margin "+units.Small(j.model.marginM, imp)+" ± "+units.SmallAbs(j.model.sigmaM, imp))
		}
		if a.HasPrediction {
			parts = append(parts, a.PredictedPart+" lowest "+units.Small(a.PredictedClearanceM, imp))
		}
		r.Fields = append(r.Fields, Field{Label: label, Value: strings.Join(parts, ", ")})
		if j.model.why != "" && !seen[j.model.why] {
			seen[j.model.why] = true
			r.Lines = append(r.Lines, strings.ToUpper(j.model.why[:1])+j.model.why[1:]+".")
		}
		for _, s := range j.model.assumptions {
			if !seen[s] {
				seen[s] = true
				r.Assumptions = append(r.Assumptions, s)
			}
		}
	}
	if len(measured) > 0 {
		r.Lines = append(r.Lines, measuresHintPrefix+": "+strings.Join(measured, "; ")+".")
	}
	if ln.Note != "" {
		r.Fields = append(r.Fields, Field{Label: "Note", Value: ln.Note})
	}
	r.Lines = append(r.Lines, bests...)
	r.Lines = append(r.Lines, notes...)
	for _, w := range warnings {
		r.Lines = append(r.Lines, "Warning: "+w)
	}
	if len(r.Assumptions) > 0 {
		r.Caution = "The model margin is an estimate from a simple body model; the bar and the coach's eye decide."
	}
	return r
}

// marginSignNote flags a coach's margin whose sign disagrees with the
// attempt's outcome: a positive margin on a miss (x) or a negative one on a
// clearance (o). Both happen (the c.m. passed high enough but a heel or arm
// took the bar down; the bar was touched and stayed up), so the margin is
// kept as typed and the reply says how it was read and how to change it.
func marginSignNote(a record.Attempt, label string, imp bool) string {
	switch {
	case a.Outcome == record.Failed && a.CoachMarginM > 0:
		return fmt.Sprintf("Note: %s is a miss (x) but the coach's margin %s is positive. Kept as typed: read as the body passing high enough while a heel or arm brought the bar down. If the jump was short, `undo` and log the line again with by %s.",
			label, units.Small(a.CoachMarginM, imp), typedSmall(-a.CoachMarginM, imp))
	case a.Outcome == record.Cleared && a.CoachMarginM < 0:
		return fmt.Sprintf("Note: %s is a clearance (o) but the coach's margin %s is negative. Kept as typed: read as the bar touched and staying up. If it cleared with room, `undo` and log the line again with by %s.",
			label, units.Small(a.CoachMarginM, imp), typedSmall(-a.CoachMarginM, imp))
	}
	return ""
}

// typedSmall writes a small signed length the way it is typed after `by`:
// "-2cm", "3.5cm" or "-0.8in", to a tenth of the unit.
func typedSmall(m float64, imp bool) string {
	if imp {
		return strconv.FormatFloat(math.Round(m/units.MetresPerInch*10)/10, 'f', -1, 64) + "in"
	}
	return strconv.FormatFloat(math.Round(m*1000)/10, 'f', -1, 64) + "cm"
}

// plural writes "1 jump", "3 jumps".
func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return strconv.Itoa(n) + " " + word + "s"
}

// clearanceBefore finds the best clearance of one kind (meet or practice)
// from `from` up to `to`, by one range scan. The scan stops at the first clearance at or above
// stopAtM: then reached is true and best is that clearance.
func clearanceBefore(tx Tx, athleteID uint64, from, to time.Time, meet bool, stopAtM float64) (best record.Attempt, found, reached bool, err error) {
	err = tx.Attempts(athleteID, from, to, func(a record.Attempt) error {
		if a.Meet != meet || a.Outcome != record.Cleared {
			return nil
		}
		if !found || higherBar(a.BarM, best.BarM) {
			best, found = a, true
		}
		if !higherBar(stopAtM, a.BarM) {
			reached = true
			return record.ErrStop
		}
		return nil
	})
	return best, found, reached, err
}

// announceBests says whether the line's best clearance is a personal,
// season or practice best. At a meet, a height above the profile's
// personal best is returned as newPB for the caller to store, unless the
// line broke the competition's rules (irregular: the coach may be
// correcting something, so the profile waits for them).
func (c *call) announceBests(tx Tx, ath record.Athlete, add []record.Attempt, loc *time.Location, imp, meet, irregular bool) (lines []string, newPBM float64, err error) {
	top, ok := bestCleared(add)
	if !ok {
		return nil, 0, nil
	}
	bar := barText(top.BarM, imp)
	pb := ath.PersonalBestM
	if !meet {
		// Practice: only the profile's personal best is compared, so a
		// practice line needs no scan of the season.
		if pb > 0 && higherBar(top.BarM, pb) {
			lines = append(lines, fmt.Sprintf("Practice best: %s is above the personal best %s. Practice heights leave the profile as it is.", bar, barText(pb, imp)))
		}
		return lines, 0, nil
	}
	switch {
	case higherBar(top.BarM, pb) && irregular:
		lines = append(lines, fmt.Sprintf("%s would be a personal best, but this line breaks the competition rules (see the warning), so the profile is unchanged. If it stands: athlete set %s pb %.2f", bar, ath.Name, top.BarM))
		return lines, 0, nil
	case higherBar(top.BarM, pb) && pb > 0:
		lines = append(lines, fmt.Sprintf("New personal best: %s (was %s). The profile is updated.", bar, barText(pb, imp)))
		return lines, top.BarM, nil
	case higherBar(top.BarM, pb):
		lines = append(lines, fmt.Sprintf("Personal best: %s, the first on %s's profile. The profile is updated.", bar, ath.Name))
		return lines, top.BarM, nil
	}
	// Season best: the calendar year's meet clearances, in the team's zone.
	year := c.now.In(loc).Year()
	yearStart := time.Date(year, 1, 1, 0, 0, 0, 0, loc)
	prev, found, reached, err := clearanceBefore(tx, ath.ID, yearStart, farFuture(), true, top.BarM)
	if err != nil {
		return nil, 0, err
	}
	switch {
	case reached:
	case found:
		lines = append(lines, fmt.Sprintf("Season best: %s (previous %s on %s).", bar, barText(prev.BarM, imp), prev.Time.In(loc).Format("2006-01-02")))
	default:
		lines = append(lines, fmt.Sprintf("Season best: %s, the first meet clearance of %d.", bar, year))
	}
	return lines, 0, nil
}

func runUndo(c *call) (Reply, error) {
	if len(c.args) > 0 {
		return Reply{}, usageErr("undo", "undo takes no words after it; it takes back your own last line (%q is extra)", joinRaw(c.args))
	}
	var r Reply
	err := c.update(func(tx Tx) error {
		var err error
		r, err = c.undoInTx(tx)
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	return r, nil
}

func (c *call) undoInTx(tx Tx) (Reply, error) {
	team, loc, err := teamAndZone(tx)
	if err != nil {
		return Reply{}, err
	}
	imp := imperial(team)
	l, ok, err := tx.LastLine(c.lineOwner())
	if err != nil {
		return Reply{}, err
	}
	if !ok {
		return Reply{}, notFoundErr("log Kai 1.95 o", "you have no logged line to undo")
	}
	when := l.Time.In(loc).Format("2006-01-02 15:04")
	if c.now.Sub(l.Time) > undoWindow {
		example := "history"
		if a, ok, err := tx.AthleteByID(l.AthleteID); err == nil && ok {
			example = "history " + a.Name
		}
		return Reply{}, conflictErr(example, "your last line (%q, %s) is more than 24 hours old; undo only takes back lines from the last 24 hours, and nothing was removed", l.Text, when)
	}
	var removed []record.Attempt
	if !strings.HasPrefix(l.ID, "import:") {
		if removed, err = lineAttempts(tx, l); err != nil {
			return Reply{}, err
		}
	}
	if err := tx.DeleteAttempts(l.Attempts); err != nil {
		return Reply{}, err
	}
	if err := tx.DeleteLine(l); err != nil {
		return Reply{}, err
	}
	if strings.HasPrefix(l.ID, "import:") {
		athletes := map[uint64]bool{}
		for _, k := range l.Attempts {
			athletes[k.AthleteID] = true
		}
		if err := c.audit(tx, auditUndo, l.Text, l, nil); err != nil {
			return Reply{}, err
		}
		return Reply{Title: "Undone", Lines: []string{
			fmt.Sprintf("Removed the import of %s (%s) made at %s.", plural(len(l.Attempts), "attempt"), plural(len(athletes), "athlete"), when),
			"You had typed: " + l.Text,
		}}, nil
	}
	ath, ok, err := tx.AthleteByID(l.AthleteID)
	if err != nil {
		return Reply{}, err
	}
	if !ok {
		return Reply{}, notFoundErr("history Kai", "the athlete of your last line no longer exists; nothing to undo")
	}
	r := Reply{Title: "Undone"}
	kind := "practice"
	if len(removed) > 0 && removed[0].Meet {
		kind = "meet"
	}
	r.Lines = append(r.Lines,
		fmt.Sprintf("Removed %s's line from %s: %s (%s, %s).", ath.Name, when, runsText(heightRuns(removed), imp), plural(len(removed), "jump"), kind),
		"You had typed: "+l.Text)
	// A meet line that raised the profile's personal best gives it back.
	restored, err := c.restorePB(tx, &ath, l)
	if err != nil {
		return Reply{}, err
	}
	if restored {
		if ath.PersonalBestM > 0 {
			r.Lines = append(r.Lines, "Personal best back to "+barText(ath.PersonalBestM, imp)+".")
		} else {
			r.Lines = append(r.Lines, "The personal best this line set is cleared from the profile.")
		}
	}
	if err := c.audit(tx, auditUndo, ath.Name, removed, nil); err != nil {
		return Reply{}, err
	}
	if err := c.offMeetSheet(tx, l, &r); err != nil { // meet sheet (bot/meethook.go)
		return Reply{}, err
	}
	return r, nil
}

// lineAttempts reads the attempts a line refers to, in key order.
func lineAttempts(tx Tx, l record.Line) ([]record.Attempt, error) {
	want := map[record.Key]bool{}
	var times []time.Time
	for _, k := range l.Attempts {
		k.Time = k.Time.UTC()
		if !want[record.Key{AthleteID: k.AthleteID, Time: k.Time}] {
			times = append(times, k.Time)
		}
		want[record.Key{AthleteID: k.AthleteID, Time: k.Time}] = true
		want[k] = true
	}
	var out []record.Attempt
	for _, t := range times {
		err := tx.Attempts(l.AthleteID, t, t.Add(time.Nanosecond), func(a record.Attempt) error {
			k := a.Key()
			k.Time = k.Time.UTC()
			if want[k] {
				out = append(out, a)
			}
			return nil
		})
		if err != nil {
			return nil, err
		}
	}
	return out, nil
}

// restorePB undoes a personal best a line wrote, found in the audit trail
// at the line's time, as long as the profile still holds that value.
func (c *call) restorePB(tx Tx, ath *record.Athlete, l record.Line) (bool, error) {
	var entry record.AuditEntry
	found := false
	err := tx.AuditEntries(l.Time, func(e record.AuditEntry) error {
		if e.Time.After(l.Time) {
			return record.ErrStop
		}
		if e.Action == auditLogPB && e.Subject == ath.Name {
			entry, found = e, true
		}
		return nil
	})
	if err != nil || !found {
		return false, err
	}
	var before, after record.Athlete
	if err := json.Unmarshal([]byte(entry.Before), &before); err != nil {
		return false, fmt.Errorf("undo: audit entry of the personal best: %w", err)
	}
	if err := json.Unmarshal([]byte(entry.After), &after); err != nil {
		return false, fmt.Errorf("undo: audit entry of the personal best: %w", err)
	}
	if math.Abs(ath.PersonalBestM-after.PersonalBestM) >= logBarTolM {
		return false, nil
	}
	old := *ath
	ath.PersonalBestM = before.PersonalBestM
	if err := tx.PutAthlete(ath); err != nil {
		return false, err
	}
	return true, c.audit(tx, auditUndoPB, ath.Name, old, *ath)
}

// historyWeeks takes the window off the arguments wherever it stands:
// "6w", "6wk", "6weeks", "6 weeks", or a bare "6" after the name
// ("history Kai 6"). A number with another unit ("30d", "2m") is refused
// with the form to use; what is left is the athlete.
func historyWeeks(args []token, example string) ([]token, int, error) {
	for i, t := range args {
		digits := strings.TrimRightFunc(t.Lower, func(r rune) bool { return r < '0' || r > '9' })
		if digits == "" || strings.TrimLeft(digits, "0123456789") != "" {
			continue
		}
		suffix, span := t.Lower[len(digits):], 1
		if suffix == "" && i+1 < len(args) && isWeekWord(args[i+1].Lower) {
			suffix, span = args[i+1].Lower, 2
		}
		switch {
		case suffix == "" && i == 0:
			continue // a name that is a number; findAthlete answers it
		case suffix == "" || isWeekWord(suffix):
		default:
			return nil, 0, usageErr(example, "%q: give the window in weeks, e.g. 6w (for dates, export csv NAME since 2026-09-01)", t.Raw)
		}
		w, err := strconv.Atoi(digits)
		if err != nil || w < 1 || w > historyMaxWeeks {
			return nil, 0, usageErr(example, "%q: history covers 1 to %d weeks", joinRaw(args[i:i+span]), historyMaxWeeks)
		}
		rest := append(append([]token(nil), args[:i]...), args[i+span:]...)
		return rest, w, nil
	}
	return args, historyDefaultWeeks, nil
}

// isWeekWord is a unit word for weeks.
func isWeekWord(w string) bool {
	switch w {
	case "w", "wk", "wks", "week", "weeks":
		return true
	}
	return false
}

func runHistory(c *call) (Reply, error) {
	const example = "history Kai 6w"
	args, weeks, err := historyWeeks(c.args, example)
	if err != nil {
		return Reply{}, err
	}
	name := "me"
	switch {
	case len(args) == 1:
		name = args[0].Raw
	case len(args) > 1:
		if strings.EqualFold(args[1].Raw, "since") {
			return Reply{}, usageErr(example, "history counts back in weeks (6w); for attempts since a date, export csv %s since 2026-09-01", args[0].Raw)
		}
		return Reply{}, unknownWords(args[1:], example, "history takes one athlete (or me) and a window in weeks")
	}
	var r Reply
	err = c.view(func(tx Tx) error {
		team, loc, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		ath, err := c.athleteFor(tx, name)
		if err != nil {
			return err
		}
		to := localDay(c.now, loc).AddDate(0, 0, 1)
		from := to.AddDate(0, 0, -7*weeks)
		var as []record.Attempt
		if err := tx.Attempts(ath.ID, from, to, func(a record.Attempt) error { as = append(as, a); return nil }); err != nil {
			return err
		}
		r = historyReply(ath, as, weeks, from, loc, imperial(team))
		return nil
	})
	return r, err
}

// historyReply tabulates sessions, oldest first.
func historyReply(ath record.Athlete, as []record.Attempt, weeks int, from time.Time, loc *time.Location, imp bool) Reply {
	r := Reply{Title: fmt.Sprintf("History of %s: last %s", ath.Name, plural(weeks, "week"))}
	if len(as) == 0 {
		r.Lines = []string{fmt.Sprintf("No jumps logged for %s since %s.", ath.Name, from.Format("2006-01-02"))}
		r.Example = "log " + ath.Name + " 1.80 xo"
		return r
	}
	r.Table = &Table{Header: []string{"date", "kind", "heights", "best", "made"}}
	for _, s := range splitSessions(as, loc) {
		best := "none"
		if b, ok := bestCleared(s.Attempts); ok {
			best = units.Bar(b.BarM, imp)
		}
		made, tried := madeCount(s.Attempts)
		kind := s.kind()
		if s.short() {
			kind += ", short"
		}
		r.Table.Rows = append(r.Table.Rows, []string{s.Day.Format("Mon 2006-01-02"), kind, runsText(heightRuns(s.Attempts), imp), best, madeText(made, tried)})
		if k := knocksText(s.Attempts, imp); k != "" {
			r.Notes = append(r.Notes, fmt.Sprintf("Knocks %s: %s", s.Day.Format("Mon 2006-01-02"), k))
		}
	}
	made, tried := madeCount(as)
	best := "nothing cleared"
	if b, ok := bestCleared(as); ok {
		best = fmt.Sprintf("%s (%s, %s)", barText(b.BarM, imp), b.Time.In(loc).Format("2006-01-02"), kindName(b.Meet))
	}
	r.Fields = []Field{
		{Label: "Sessions", Value: strconv.Itoa(len(r.Table.Rows))},
		{Label: "Best", Value: best},
		{Label: "Made", Value: madeText(made, tried)},
	}
	return r
}

func kindName(meet bool) string {
	if meet {
		return "meet"
	}
	return "practice"
}

func runBest(c *call) (Reply, error) {
	name := "me"
	if len(c.args) > 0 {
		name = joinRaw(c.args)
	}
	var r Reply
	err := c.view(func(tx Tx) error {
		team, loc, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		imp := imperial(team)
		ath, err := c.athleteFor(tx, name)
		if err != nil {
			return err
		}
		year := c.now.In(loc).Year()
		yearStart := time.Date(year, 1, 1, 0, 0, 0, 0, loc)
		var meetEver, meetYear, practiceYear []record.Attempt
		err = tx.Attempts(ath.ID, time.Unix(0, 0), farFuture(), func(a record.Attempt) error {
			if a.Outcome != record.Cleared {
				return nil
			}
			thisYear := !a.Time.Before(yearStart)
			switch {
			case a.Meet:
				meetEver = append(meetEver, a)
				if thisYear {
					meetYear = append(meetYear, a)
				}
			case thisYear:
				practiceYear = append(practiceYear, a)
			}
			return nil
		})
		if err != nil {
			return err
		}
		r = bestReply(ath, meetEver, meetYear, practiceYear, year, loc, imp)
		return nil
	})
	return r, err
}

func bestReply(ath record.Athlete, meetEver, meetYear, practiceYear []record.Attempt, year int, loc *time.Location, imp bool) Reply {
	r := Reply{Title: "Bests of " + ath.Name}
	at := func(a record.Attempt) string {
		return fmt.Sprintf("%s (%s, %s)", barText(a.BarM, imp), kindName(a.Meet), a.Time.In(loc).Format("2006-01-02"))
	}
	pb := "none yet"
	top, logged := bestCleared(meetEver)
	switch {
	case logged && !higherBar(ath.PersonalBestM, top.BarM):
		pb = at(top)
		if higherBar(top.BarM, ath.PersonalBestM) {
			r.Lines = append(r.Lines, fmt.Sprintf("The profile says %s; `athlete set %s pb %.2f` brings it up to the logged meet best.", barText(ath.PersonalBestM, imp), ath.Name, top.BarM))
		}
	case ath.PersonalBestM > 0:
		pb = barText(ath.PersonalBestM, imp) + " (from the profile; no logged meet at that height)"
	}
	r.Fields = append(r.Fields, Field{Label: "Personal best", Value: pb})
	sb := fmt.Sprintf("no meet clearance logged in %d", year)
	if b, ok := bestCleared(meetYear); ok {
		sb = at(b)
	}
	r.Fields = append(r.Fields, Field{Label: fmt.Sprintf("Season best %d", year), Value: sb})
	prb := fmt.Sprintf("no practice clearance logged in %d", year)
	if b, ok := bestCleared(practiceYear); ok {
		prb = at(b)
	}
	r.Fields = append(r.Fields, Field{Label: fmt.Sprintf("Practice best %d", year), Value: prb})
	return r
}
