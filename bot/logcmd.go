package bot

import (
	"fmt"
	"hash/fnv"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
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
	auditFix       = "fix"
	auditDrop      = "drop"
	// auditLineNo is the key under which line changes keep the line's
	// number in the audit trail (a leading _ keeps it out of audit's
	// change column).
	auditLineNo = "_no"
)

// logCommands log jumps and read them back.
func logCommands() []command {
	return append([]command{
		{name: "log", topic: "log", access: selfOrCoach, details: true,
			usage:   "log ATHLETE|me BAR ATTEMPTS... [meet] [by M] [approach V] [takeoff D] [peak P] [vz V] [yesterday|on DATE] [at HH:MM] [confirm] [note TEXT] [more]",
			example: "log Kai 1.95 o 2.00 xo 2.04 xxx",
			summary: "o cleared, x failed, - passed. Measurements go with the jump written just before them; meet, the day and time go with the line; a meet line must keep the rules (confirm stores it marked); more at the end shows the model's details",
			run:     runLog},
		{name: "line", topic: "log", access: selfOrCoach, details: true,
			usage: "line N [more]", example: "line 1",
			summary: "show logged line #N again: model margin, range flags; more for every value and assumption", run: runLine},
		{name: "undo", topic: "log", access: selfOrCoach, usage: "undo [confirm] | undo line N", example: "undo",
			summary: "take back your own last change of any kind (24 hours); undo line N removes line #N", run: runUndo},
		{name: "history", aliases: []string{"hist"}, topic: "log", access: selfOrCoach,
			usage: "history ATHLETE|me [Nw|since DATE]", example: "history Kai 6w",
			summary: "a row per day's meet or practice, lines numbered (#12), best, make rate; 4 weeks unless Nw (at most 104)", run: runHistory},
		{name: "best", aliases: []string{"bests"}, topic: "log", access: selfOrCoach,
			usage: "best ATHLETE|me", example: "best Kai",
			summary: "personal best, season best and practice best, with dates", run: runBest},
		{name: "export csv", aliases: []string{"csv export"}, topic: "log", access: selfOrCoach,
			usage: "export csv [ATHLETE] [since DATE|Nw]", example: "export csv Kai since 2026-01-01",
			summary: "a CSV file of attempts, one row each (all athletes for coaches)", run: runExportCSV},
		{name: "import csv", aliases: []string{"csv import"}, topic: "log", access: headOnly,
			usage: "import csv PATH", example: "import csv /home/coach/attempts.csv",
			summary: "attempts from a CSV file on the bot's computer or sent in chat (2 MiB): all rows or none", run: runImportCSV},
	}, lineChangeCommands()...)
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
	flags []rangeNote // measured values outside their published ranges
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
	typed := "log " + joinRaw(c.args)
	at, err := resolveWhen(ln.When, c.now, loc, ln.Confirm, typed)
	if err != nil {
		return Reply{}, err
	}
	day := localDay(at, loc)
	// The day's attempts: those up to the session's time come before the
	// line (a line logged for an earlier hour goes before later ones).
	today, sameKind, later, err := dayAround(tx, ath.ID, day, at, ln.Meet, nil)
	if err != nil {
		return Reply{}, err
	}

	lineID := c.lineID("log")
	add := ln.attempts(ath.ID, at, c.lineOwner(), c.req.MessageID, lineID)
	numberAttempts(sameKind, add, ln.Meet)

	// Checks that ask for confirm: the competition rules at a meet, then
	// what is implausible for this athlete.
	why, breach, state := lineChecks(ath, add, today, later, ln.Meet, team)
	if len(why) > 0 && !ln.Confirm {
		return Reply{}, conflictErr(typed+" confirm", "%s; nothing was logged (if it is right, add confirm).", whyText(why))
	}
	if breach != nil {
		for i := range add {
			add[i].RuleBreach = breachMark(breach)
		}
	}

	no, err := tx.NextLineNumber()
	if err != nil {
		return Reply{}, err
	}
	jumps := make([]loggedJump, len(add))
	for i := range add {
		add[i].LineNo = no
		add[i] = withPrediction(add[i], ath, team)
		m := modelMargin(add[i], ath, team)
		if m.ok {
			add[i].HasModelMargin, add[i].ModelMarginM = true, m.marginM
		}
		jumps[i] = loggedJump{rec: add[i], model: m, flags: attemptFlags(add[i], ath, team)}
	}

	var notes []string
	if ln.Meet {
		notes = meetNotes(state, breach, ath.Name)
	}
	bestLines, newPB, err := c.announceBests(tx, ath, add, at, loc, imp, ln.Meet, breach != nil)
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
	line := record.Line{ID: lineID, LoggedBy: c.lineOwner(), Time: c.now, AthleteID: ath.ID, Text: typed, Number: no, Seeded: c.req.Seed}
	for _, a := range add {
		line.Attempts = append(line.Attempts, a.Key())
	}
	if err := tx.PutLine(line); err != nil {
		return Reply{}, err
	}
	// The attempts themselves are in the store; the trail keeps what was typed.
	logged := map[string]any{"line": line.Text, "attempts": len(add), "meet": ln.Meet, auditLineNo: no}
	if breach != nil {
		logged["breach"] = breachMark(breach)
	}
	if err := c.audit(tx, auditLog, ath.Name, nil, logged); err != nil {
		return Reply{}, err
	}
	r, sh := logReply(ath, ln, no, jumps, today, sameKind, add, bestLines, notes, imp)
	if w := whenText(ln.When, at, loc); w != "" {
		r.Title += w
	}
	if breach != nil {
		r.Lines = append(r.Lines, "Stored as breaking the rules: "+breachMark(breach)+"; it never counts for a best.")
	} else if len(why) > 0 {
		r.Lines = append(r.Lines, "Stored after confirm: "+strings.Join(why, "; ")+".")
	}
	r.Actions = []Action{{Label: "Undo", Command: fmt.Sprintf("drop #%d", no)}}
	// The open meet sheet takes today's lines that keep the rules; a past
	// session or a line stored as breaking them stays off it.
	if breach == nil && !ln.When.given() {
		if err := c.onMeetSheet(tx, ath, add, &r); err != nil { // meet sheet (bot/meethook.go)
			return Reply{}, err
		}
	}
	return c.shortLogReply(tx, r, sh, no), nil
}

// attempts builds the line's attempts at time at, for the athlete.
func (ln logLine) attempts(athleteID uint64, at time.Time, by, msg, lineID string) []record.Attempt {
	var add []record.Attempt
	for _, g := range ln.Groups {
		for _, j := range g.Jumps {
			add = append(add, record.Attempt{
				AthleteID: athleteID, Time: at, BarM: g.BarM, BarDecimals: units.MetreDecimals(g.Word, g.BarM), Outcome: j.Outcome, Meet: ln.Meet,
				ApproachMS: j.Meas.ApproachMS, TakeoffDistM: j.Meas.TakeoffDistM, PeakM: j.Meas.PeakM, VzMS: j.Meas.VzMS,
				HasCoachMargin: j.Meas.HasCoachMargin, CoachMarginM: j.Meas.CoachMarginM,
				Knock: j.Knock, Short: ln.Short,
				LoggedBy: by, MessageID: msg, LineID: lineID,
			})
		}
	}
	add[len(add)-1].Note = ln.Note
	return add
}

// meetNotes says where the series stands after a meet line: out, or how
// many attempts remain at the next height (a pass carries the failures
// before it, TR 26.2).
func meetNotes(s series.State, breach *series.Breach, name string) []string {
	if breach != nil {
		return nil
	}
	if s.Out() {
		return []string{fmt.Sprintf("Out: %s's competition is over after three consecutive failures (TR 26.2).", name)}
	}
	if r := s.Remaining(); r < series.MaxFailures {
		carried := series.MaxFailures - r
		verb := "carries"
		return []string{fmt.Sprintf("%s has %s left: %s in a row, and a pass %s %s over to the next height (TR 26.2).", name, countWords(r, "try", "tries"), countWords(carried, "failure", "failures"), verb, map[bool]string{true: "it", false: "them"}[carried == 1])}
	}
	return nil
}

// logReply is the full read-out of a log line (what `more` and the Details
// button show) and what its short default reply changes (logBrief).
func logReply(ath record.Athlete, ln logLine, no uint64, jumps []loggedJump, today, sameKind, add []record.Attempt, bests, notes []string, imp bool) (Reply, logBrief) {
	kind := "practice"
	if ln.Meet {
		kind = "meet"
	}
	r := Reply{
		Title: fmt.Sprintf("Logged for %s (%s), line #%d: %s", ath.Name, kind, no, jumpPassText(add)),
	}
	r.Lines = append(r.Lines, runsText(heightRuns(add), imp))
	all := append(append([]record.Attempt(nil), today...), add...)
	made, tried := madeCount(all)
	summary := "Today: "
	if ln.When.given() {
		summary = "That day: "
	}
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
	sh := logBrief{fields: map[string]string{}}
	measured := jumpDetails(&r, &sh, jumps, imp)
	if l := logCheckLine(jumps, imp); l != "" {
		sh.check = l
		for _, j := range jumps {
			sh.flagFull = append(sh.flagFull, fullFlags(j.flags)...)
		}
		r.Lines = append(r.Lines, sh.flagFull...)
	}
	if len(measured) > 0 {
		r.Lines = append(r.Lines, measuresHintPrefix+": "+strings.Join(measured, "; ")+".")
	}
	if ln.Note != "" {
		r.Fields = append(r.Fields, Field{Label: "Note", Value: ln.Note})
	}
	r.Lines = append(r.Lines, bests...)
	r.Lines = append(r.Lines, notes...)
	if len(r.Assumptions) > 0 {
		r.Caution = "The model margin is an estimate from a simple body model; the bar and the coach's eye decide."
	}
	return r, sh
}

// jumpDetails adds a field per measured jump (every value typed, the model
// margin, the lowest part), the model's notes and assumptions to r, and the
// jumps' short values and assumed names to sh; it returns the measured
// jumps' labels ("1.75 attempt 2").
func jumpDetails(r *Reply, sh *logBrief, jumps []loggedJump, imp bool) []string {
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
		if v := shortJumpValue(j, imp); v != "" {
			sh.fields[label] = v
		}
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
		for _, s := range j.model.assumed {
			if !slices.Contains(sh.assumed, s) {
				sh.assumed = append(sh.assumed, s)
			}
		}
	}
	return measured
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

// plural writes "1 jump", "3 jumps", "2 passes", "2 entries".
func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	switch {
	case strings.HasSuffix(word, "s"), strings.HasSuffix(word, "sh"), strings.HasSuffix(word, "ch"):
		word += "es"
	case strings.HasSuffix(word, "y") && len(word) > 1 && !strings.ContainsRune("aeiou", rune(word[len(word)-2])):
		word = word[:len(word)-1] + "ies"
	default:
		word += "s"
	}
	return strconv.Itoa(n) + " " + word
}

// clearanceBefore finds the best clearance of one kind (meet or practice)
// from `from` up to `to`, by one range scan. The scan stops at the first clearance at or above
// stopAtM: then reached is true and best is that clearance.
func clearanceBefore(tx Tx, athleteID uint64, from, to time.Time, meet bool, stopAtM float64) (best record.Attempt, found, reached bool, err error) {
	err = tx.Attempts(athleteID, from, to, func(a record.Attempt) error {
		if a.Meet != meet || a.Outcome != record.Cleared || a.RuleBreach != "" {
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
// personal best is returned as newPB for the caller to store. A line
// stored as breaking the competition's rules (irregular, after confirm)
// never counts for a best, so it announces none. at is the session's time
// (its season is the calendar year of at, in the team's zone).
func (c *call) announceBests(tx Tx, ath record.Athlete, add []record.Attempt, at time.Time, loc *time.Location, imp, meet, irregular bool) (lines []string, newPBM float64, err error) {
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
	case irregular:
		return nil, 0, nil // a line that breaks the rules never counts for a best
	case higherBar(top.BarM, pb) && pb > 0:
		lines = append(lines, fmt.Sprintf("New personal best: %s (was %s). The profile is updated.", bar, barText(pb, imp)))
		return lines, top.BarM, nil
	case higherBar(top.BarM, pb):
		lines = append(lines, fmt.Sprintf("Personal best: %s, the first on %s's profile. The profile is updated.", bar, ath.Name))
		return lines, top.BarM, nil
	}
	// Season best: the calendar year's meet clearances, in the team's zone.
	year := at.In(loc).Year()
	yearStart := time.Date(year, 1, 1, 0, 0, 0, 0, loc)
	prev, found, reached, err := clearanceBefore(tx, ath.ID, yearStart, time.Date(year+1, 1, 1, 0, 0, 0, 0, loc), true, top.BarM)
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
	var sinceWord string
	for i := 0; i < len(args); i++ {
		if args[i].Lower != "since" {
			continue
		}
		if i+1 >= len(args) {
			return Reply{}, usageErr("history Kai since 2026-11-01", "since needs a date after it, e.g. history Kai since 2026-11-01")
		}
		sinceWord = args[i+1].Raw
		args = append(append([]token(nil), args[:i]...), args[i+2:]...)
		break
	}
	name := "me"
	switch {
	case len(args) == 1:
		name = args[0].Raw
	case len(args) > 1:
		return Reply{}, unknownWords(args[1:], example, "history takes one athlete (or me) and a window in weeks or since DATE")
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
		if sinceWord != "" {
			t, ok := parseSince(sinceWord, c.now, loc)
			if !ok {
				return usageErr("history "+name+" since 2026-11-01", "%q is not a date; write it as YYYY-MM-DD, e.g. since 2026-11-01", sinceWord)
			}
			if t.Before(to.AddDate(0, 0, -7*historyMaxWeeks)) || !t.Before(to) {
				return usageErr("history "+name+" since 2026-11-01", "since %s: history covers the last %d weeks up to today", sinceWord, historyMaxWeeks)
			}
			from = t
		}
		var as []record.Attempt
		if err := tx.Attempts(ath.ID, from, to, func(a record.Attempt) error { as = append(as, a); return nil }); err != nil {
			return err
		}
		r = historyReply(ath, as, weeks, from, loc, imperial(team))
		if sinceWord != "" {
			r.Title = fmt.Sprintf("History of %s since %s", ath.Name, from.In(loc).Format("2006-01-02"))
		}
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
		if _, p := jumpCounts(s.Attempts); p > 0 {
			kind += ", " + plural(p, "pass")
		}
		r.Table.Rows = append(r.Table.Rows, []string{s.Day.Format("Mon 2006-01-02"), kind, linesText(s.Attempts, imp), best, madeText(made, tried)})
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
		var meetAll, meetEver, meetYear, practiceYear []record.Attempt
		err = tx.Attempts(ath.ID, time.Unix(0, 0), farFuture(), func(a record.Attempt) error {
			switch {
			case a.Meet:
				meetAll = append(meetAll, a)
			case a.Outcome == record.Cleared && !a.Time.Before(yearStart):
				practiceYear = append(practiceYear, a)
			}
			return nil
		})
		if err != nil {
			return err
		}
		// Bests come from valid meet series only (series.Counting).
		for i, ok := range series.Counting(meetAll, loc) {
			if ok {
				meetEver = append(meetEver, meetAll[i])
				if !meetAll[i].Time.Before(yearStart) {
					meetYear = append(meetYear, meetAll[i])
				}
			}
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

// capitalize upper-cases the first letter of a sentence.
func capitalize(s string) string {
	for i, r := range s {
		return strings.ToUpper(string(r)) + s[i+len(string(r)):]
	}
	return s
}
