package bot

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/lathmark-team/lathmark/internal/record"
)

// The CSV form of attempts, one row each, RFC 4180 as encoding/csv writes
// it. Times are RFC 3339 (ISO 8601) to the second with the team's offset;
// the bar in metres to the precision it was typed with (1.80, 1.785, or the
// exact metres of feet-inches), other lengths in metres, speeds in m/s,
// empty cells for values not measured. The columns, in export order:
//
//	athlete, time, bar_m, outcome, attempt, meet, approach_ms, takeoff_m,
//	peak_m, vz_ms, coach_margin_m, model_margin_m, logged_by, message_id, note,
//	rule_breach (the rule a confirmed meet line broke; empty for most)
//
// An import needs athlete, time, bar_m and outcome; the other columns may
// be missing or in any order. Rows whose message id was already handled by
// this bot (a chat message, or an earlier import) are duplicates: they are
// skipped and counted, never stored twice. So is a row that repeats an
// attempt already stored (same athlete, time, bar and outcome).

// CSV limits.
const (
	csvMaxBytes      = 64 << 20 // largest file import reads
	csvMaxErrors     = 10       // row errors listed before "and N more"
	csvChunk         = 500      // rows written between progress reports
	csvMaxIDRunes    = 200
	csvMaxModelM     = 1.0 // |model margin| accepted on import
	csvFutureAllowed = 24 * time.Hour
)

// csvColumns is the export header, in order.
func csvColumns() []string {
	return []string{"athlete", "time", "bar_m", "outcome", "attempt", "meet", "approach_ms", "takeoff_m",
		"peak_m", "vz_ms", "coach_margin_m", "model_margin_m", "logged_by", "message_id", "note", "rule_breach"}
}

// csvGuard keeps a spreadsheet from reading a text cell as a formula: a
// cell starting with = + - @ a tab, a carriage return or ' gets a leading '.
// csvUnguard reverses it.
func csvGuard(s string) string {
	if s != "" && strings.ContainsRune("=+-@\t\r'", rune(s[0])) {
		return "'" + s
	}
	return s
}

func csvUnguard(s string) string {
	if len(s) >= 2 && s[0] == '\'' && strings.ContainsRune("=+-@\t\r'", rune(s[1])) {
		return s[1:]
	}
	return s
}

// csvNum writes a number exactly (shortest form that reads back the same).
func csvNum(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// csvClock writes an attempt's time to the second with the team's offset,
// RFC 3339 ("2026-11-25T18:30:05+01:00"), the form spreadsheets read.
func csvClock(t time.Time, loc *time.Location) string {
	return t.In(loc).Truncate(time.Second).Format(time.RFC3339)
}

// csvBar writes the bar in metres to the precision it was typed with
// ("1.80", "1.785", "1.63195" for 5-4¼), or exactly when not known.
func csvBar(a record.Attempt) string {
	if a.BarDecimals > 0 {
		return strconv.FormatFloat(a.BarM, 'f', a.BarDecimals, 64)
	}
	return csvNum(a.BarM)
}

// csvOptional writes a measurement, empty when not given.
func csvOptional(v float64) string {
	if v == 0 {
		return ""
	}
	return csvNum(v)
}

// writeAttemptsCSV writes the header and one row per attempt.
func writeAttemptsCSV(w io.Writer, names map[uint64]string, as []record.Attempt, loc *time.Location) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(csvColumns()); err != nil {
		return fmt.Errorf("write csv header: %w", err)
	}
	for _, a := range as {
		coach, model, number := "", "", ""
		if a.HasCoachMargin {
			coach = csvNum(a.CoachMarginM)
		}
		if a.HasModelMargin {
			model = csvNum(a.ModelMarginM)
		}
		if a.Number > 0 {
			number = strconv.Itoa(a.Number)
		}
		row := []string{csvGuard(names[a.AthleteID]), csvClock(a.Time, loc), csvBar(a), a.Outcome.String(),
			number, strconv.FormatBool(a.Meet), csvOptional(a.ApproachMS), csvOptional(a.TakeoffDistM), csvOptional(a.PeakM),
			csvOptional(a.VzMS), coach, model, csvGuard(a.LoggedBy), csvGuard(a.MessageID), csvGuard(a.Note), csvGuard(a.RuleBreach)}
		if err := cw.Write(row); err != nil {
			return fmt.Errorf("write csv row: %w", err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("write csv: %w", err)
	}
	return nil
}

// parseSince reads an export's start: an ISO 8601 date (local midnight), an
// RFC 3339 time, or Nw (the last N weeks, as history counts them).
func parseSince(word string, now time.Time, loc *time.Location) (time.Time, bool) {
	w := strings.ToLower(word)
	if n, err := strconv.Atoi(strings.TrimSuffix(w, "w")); err == nil && strings.HasSuffix(w, "w") && n >= 1 && n <= historyMaxWeeks*10 {
		return localDay(now, loc).AddDate(0, 0, 1-7*n), true
	}
	if t, err := time.ParseInLocation("2006-01-02", word, loc); err == nil {
		return t, true
	}
	if t, err := time.Parse(time.RFC3339, word); err == nil {
		return t, true
	}
	return time.Time{}, false
}

// fileSafe keeps letters, digits and dashes, for attachment names.
func fileSafe(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '-':
			b.WriteRune(r)
		case r == ' ' || r == '_' || r == '.':
			b.WriteByte('-')
		}
	}
	return b.String()
}

func runExportCSV(c *call) (Reply, error) {
	const example = "export csv Kai since 2026-01-01"
	args := c.args
	sinceWord := ""
	for i, t := range args {
		if t.Lower == "since" || t.Lower == "from" {
			if i+2 != len(args) {
				return Reply{}, usageErr(example, "%q needs one date after it (ISO 8601, e.g. 2026-01-01, or 8w)", t.Raw)
			}
			sinceWord, args = args[i+1].Raw, args[:i]
			break
		}
	}
	var r Reply
	err := c.view(func(tx Tx) error {
		_, loc, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		since := time.Unix(0, 0)
		if sinceWord != "" {
			t, ok := parseSince(sinceWord, c.now, loc)
			if !ok {
				return usageErr(example, "%q is not a date I can read; use ISO 8601 (2026-01-01) or a number of weeks (8w)", sinceWord)
			}
			since = t
		}
		var athletes []record.Athlete
		if len(args) > 0 {
			a, err := c.athleteFor(tx, joinRaw(args))
			if err != nil {
				return err
			}
			athletes = []record.Athlete{a}
		} else {
			if rank(c.user.Role) < rank(record.RoleCoach) {
				return forbiddenErr("export csv me", "exporting every athlete needs the role coach (yours: %s); a head coach can grant it. Your own jumps: export csv me", roleName(c.user.Role))
			}
			if athletes, err = tx.Athletes(); err != nil {
				return err
			}
		}
		names := map[uint64]string{}
		var as []record.Attempt
		with := 0
		for _, a := range athletes {
			names[a.ID] = a.Name
			n := len(as)
			if err := tx.Attempts(a.ID, since, farFuture(), func(x record.Attempt) error { as = append(as, x); return nil }); err != nil {
				return err
			}
			if len(as) > n {
				with++
			}
		}
		var buf bytes.Buffer
		if err := writeAttemptsCSV(&buf, names, as, loc); err != nil {
			return err
		}
		day := c.now.In(loc).Format("2006-01-02")
		name := "lathmark-attempts-" + day + ".csv"
		if len(args) > 0 {
			name = "lathmark-attempts-" + fileSafe(athletes[0].Name) + "-" + day + ".csv"
		}
		from := "all logged"
		if sinceWord != "" {
			from = "since " + since.In(loc).Format("2006-01-02")
		}
		r = Reply{
			Title:     "CSV export",
			Lines:     []string{fmt.Sprintf("%s of %s, %s; one row per attempt, times in ISO 8601 with the team's offset, lengths in metres.", plural(len(as), "attempt"), plural(with, "athlete"), from)},
			Files:     []File{{Name: name, MIME: "text/csv", Title: "lathmark attempts " + day, Data: buf.Bytes()}},
			Caution:   "The file holds personal data about athletes, some of whom may be minors: share it only with the people who need it.",
			Ephemeral: true,
		}
		return nil
	})
	return r, err
}

// importRefusal lists what is wrong with a CSV; nothing was stored.
type importRefusal struct {
	lines   []string
	example string // what to type next; "" shows the export as the model file
}

func (e *importRefusal) Error() string { return strings.Join(e.lines, "; ") }

// csvRow is one parsed data row of an import.
type csvRow struct {
	row     int // record number, the header being row 1
	athlete string
	a       record.Attempt // without AthleteID
	model   bool           // model_margin_m was given
}

// parseAttemptsCSV reads an import file. Header problems and CSV syntax
// errors end the reading; row problems are collected, each prefixed with its
// row number (the header is row 1). Pure: no store, no clock but now.
func parseAttemptsCSV(data []byte, now time.Time, loc *time.Location) (rows []csvRow, problems []string) {
	data = bytes.TrimPrefix(data, []byte("\uFEFF"))
	if !utf8.Valid(data) {
		return nil, []string{"the file is not UTF-8 text; save it from the spreadsheet as CSV UTF-8"}
	}
	cr := csv.NewReader(bytes.NewReader(data))
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if errors.Is(err, io.EOF) {
		return nil, []string{"the file is empty; it needs a header row: " + strings.Join(csvColumns(), ",")}
	}
	if err != nil {
		return nil, []string{"row 1: " + csvErrText(err)}
	}
	col := map[string]int{}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(h))
		switch {
		case h == "":
			problems = append(problems, fmt.Sprintf("row 1: column %d has no name", i+1))
		case !slices.Contains(csvColumns(), h):
			if s, ok := nearest(h, csvColumns()); ok {
				problems = append(problems, fmt.Sprintf("row 1: unknown column %q; did you mean %q?", h, s))
			} else {
				problems = append(problems, fmt.Sprintf("row 1: unknown column %q; the columns are %s", h, strings.Join(csvColumns(), ", ")))
			}
		default:
			if _, dup := col[h]; dup {
				problems = append(problems, fmt.Sprintf("row 1: column %q appears twice", h))
			}
			col[h] = i
		}
	}
	for _, need := range []string{"athlete", "time", "bar_m", "outcome"} {
		if _, ok := col[need]; !ok {
			problems = append(problems, fmt.Sprintf("row 1: the header lacks the column %q (needed: athlete, time, bar_m, outcome)", need))
		}
	}
	if len(problems) > 0 {
		return nil, problems
	}
	for n := 2; ; n++ {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			problems = append(problems, fmt.Sprintf("row %d: %s; reading stopped there", n, csvErrText(err)))
			break
		}
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue // a blank line
		}
		if len(rec) != len(header) {
			problems = append(problems, fmt.Sprintf("row %d: has %d cells, the header has %d", n, len(rec), len(header)))
			continue
		}
		row, errs := parseCSVRecord(n, rec, col, now, loc)
		problems = append(problems, errs...)
		if len(errs) == 0 {
			rows = append(rows, row)
		}
	}
	return rows, problems
}

func csvErrText(err error) string {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return pe.Err.Error()
	}
	return err.Error()
}

// csvTime reads an ISO 8601 time: RFC 3339 with an offset, or a local time
// of the team's zone (2026-11-25T10:00, 2026-11-25 10:00:00, 2026-11-25).
func csvTime(s string, loc *time.Location) (time.Time, bool) {
	if t, err := time.Parse(time.RFC3339Nano, s); err == nil {
		return t, true
	}
	if t, err := time.Parse("2006-01-02T15:04Z07:00", s); err == nil {
		return t, true
	}
	for _, layout := range []string{"2006-01-02T15:04:05.999999999", "2006-01-02T15:04", "2006-01-02 15:04:05.999999999", "2006-01-02 15:04", "2006-01-02"} {
		if t, err := time.ParseInLocation(layout, s, loc); err == nil {
			return t, true
		}
	}
	return time.Time{}, false
}

// parseCSVRecord validates one data row.
func parseCSVRecord(n int, rec []string, col map[string]int, now time.Time, loc *time.Location) (csvRow, []string) {
	var errs []string
	bad := func(format string, args ...any) {
		errs = append(errs, fmt.Sprintf("row %d: ", n)+fmt.Sprintf(format, args...))
	}
	cell := func(name string) string {
		if i, ok := col[name]; ok {
			return strings.TrimSpace(rec[i])
		}
		return ""
	}
	short := func(s string) string {
		if utf8.RuneCountInString(s) > 40 {
			return string([]rune(s)[:40]) + "…"
		}
		return s
	}
	row := csvRow{row: n, athlete: csvUnguard(cell("athlete"))}
	if row.athlete == "" {
		bad("the athlete is empty")
	}
	ts := cell("time")
	switch t, ok := csvTime(ts, loc); {
	case ts == "":
		bad("the time is empty; use ISO 8601, e.g. 2026-11-25T17:30:00+01:00")
	case !ok:
		bad("time %q is not ISO 8601; e.g. 2026-11-25T17:30:00+01:00 or 2026-11-25 17:30", short(ts))
	case t.Before(time.Unix(0, 0)) || t.After(now.Add(csvFutureAllowed)):
		bad("time %q is before 1970 or in the future", short(ts))
	default:
		row.a.Time = t
	}
	bs := cell("bar_m")
	if bar, err := strconv.ParseFloat(bs, 64); err != nil || math.IsNaN(bar) || bar < logMinBarM-logBarTolM || bar > logMaxBarM+logBarTolM {
		bad("bar_m %q is not a bar height in metres within %s", short(bs), barRangeText())
	} else {
		row.a.BarM = bar
		if _, frac, ok := strings.Cut(bs, "."); ok {
			row.a.BarDecimals = len(frac)
		}
	}
	oc := cell("outcome")
	if outs, ok := notationWord(strings.ToLower(oc)); ok && len(outs) == 1 {
		row.a.Outcome = outs[0]
	} else {
		bad("outcome %q is not o (cleared), x (failed) or - (passed)", short(oc))
	}
	if s := cell("attempt"); s != "" {
		if k, err := strconv.Atoi(s); err != nil || k < 1 || k > 20 {
			bad("attempt %q is not a whole number from 1 to 20", short(s))
		} else {
			row.a.Number = k
		}
	}
	switch s := strings.ToLower(cell("meet")); s {
	case "", "false", "no", "0", "practice", "n":
	case "true", "yes", "1", "meet", "y":
		row.a.Meet = true
	default:
		bad("meet %q is not true or false", short(s))
	}
	num := func(name string, lo, hi float64, set func(float64)) {
		s := cell(name)
		if s == "" {
			return
		}
		v, err := strconv.ParseFloat(s, 64)
		if err != nil || math.IsNaN(v) || v < lo || v > hi {
			bad("%s %q is not a number from %g to %g", name, short(s), lo, hi)
			return
		}
		set(v)
	}
	spec := func(k logWordKind) (float64, float64) { s := jumpMeasureFor(k); return s.lo, s.hi }
	lo, hi := spec(logApproach)
	num("approach_ms", lo, hi, func(v float64) { row.a.ApproachMS = v })
	lo, hi = spec(logTakeoff)
	num("takeoff_m", lo, hi, func(v float64) { row.a.TakeoffDistM = v })
	lo, hi = spec(logPeak)
	num("peak_m", lo, hi, func(v float64) { row.a.PeakM = v })
	lo, hi = spec(logVz)
	num("vz_ms", lo, hi, func(v float64) { row.a.VzMS = v })
	lo, hi = spec(logMargin)
	num("coach_margin_m", lo, hi, func(v float64) { row.a.HasCoachMargin, row.a.CoachMarginM = true, v })
	num("model_margin_m", -csvMaxModelM, csvMaxModelM, func(v float64) { row.a.HasModelMargin, row.a.ModelMarginM = true, v; row.model = true })
	text := func(name string, maxRunes int) string {
		s := csvUnguard(cell(name))
		if utf8.RuneCountInString(s) > maxRunes || strings.ContainsRune(s, 0) {
			bad("%s is longer than %d characters or holds a NUL", name, maxRunes)
			return ""
		}
		return s
	}
	row.a.LoggedBy = text("logged_by", csvMaxIDRunes)
	row.a.MessageID = text("message_id", csvMaxIDRunes)
	row.a.Note = text("note", logMaxNoteRunes)
	// A meet attempt stored after confirm as breaking a rule keeps its mark
	// (and is left out of the import's rule check, as out of every best).
	row.a.RuleBreach = text("rule_breach", csvMaxIDRunes)
	return row, errs
}

// refuseRows turns problems into a refusal: at most csvMaxErrors listed.
func refuseRows(problems []string, extra ...string) *importRefusal {
	lines := []string{fmt.Sprintf("Nothing was imported: %s found.", plural(len(problems), "problem"))}
	for i, p := range problems {
		if i == csvMaxErrors {
			lines = append(lines, fmt.Sprintf("and %d more.", len(problems)-csvMaxErrors))
			break
		}
		lines = append(lines, p)
	}
	return &importRefusal{lines: append(lines, extra...)}
}

func runImportCSV(c *call) (Reply, error) {
	args := c.args
	if c.importConfirmed() {
		args = args[:len(args)-1]
	}
	if len(args) == 0 && c.req.Upload != nil {
		return c.importUpload()
	}
	if len(args) == 0 {
		return Reply{}, usageErr("import csv /home/coach/attempts.csv", "give the path of a CSV file on the bot's computer")
	}
	if !c.req.Local {
		return Reply{}, forbiddenErr("export csv", "import csv reads a file on the bot's own computer, so it works only in the bot's terminal (lathmark run there); from chat, send the CSV file itself to the bot in a direct message, or with the words import csv")
	}
	path := strings.Trim(joinRaw(args), `"'`)
	return c.importCSVFile(path, nil)
}

// importConfirmed reports whether the import command ends in confirm: rows
// that need a second look (plausibility) are then imported.
func (c *call) importConfirmed() bool {
	n := len(c.args)
	return n > 0 && c.args[n-1].Lower == "confirm"
}

// ImportCSVFile imports attempts from a CSV file on this computer as the
// `import csv PATH` command does, with the same role check (head coach),
// all-or-nothing validation and duplicate skipping, but calls progress(done,
// total) while rows are written: after each chunk of rows and once with done
// == total, where total is the number of data rows in the file. The calls
// come from inside the store's write transaction: progress must return
// quickly and must not call the engine. progress may be nil. Like Handle it
// never panics; the Reply carries the final counts or the row-numbered
// problems.
func (e *Engine) ImportCSVFile(ctx context.Context, req Request, path string, progress func(done, total int)) (reply Reply) {
	if req.Time.IsZero() {
		req.Time = e.clock.Now()
	}
	if req.Text == "" {
		req.Text = "import csv " + path
	}
	defer func() {
		if p := recover(); p != nil {
			e.log.Error("csv import panicked", "path", path, "panic", fmt.Sprint(p))
			reply = internalReply()
		}
	}()
	var cmd command
	for _, k := range e.commands {
		if k.name == "import csv" {
			cmd = k
		}
	}
	c := &call{ctx: ctx, e: e, req: req, cmd: cmd, now: req.Time}
	if n := len(path) - len(" confirm"); n > 0 && strings.EqualFold(path[n:], " confirm") {
		path, c.args = strings.Trim(strings.TrimSpace(path[:n]), `"'`), []token{{Raw: "confirm", Lower: "confirm"}}
	}
	if err := c.loadSpeaker(); err != nil {
		return e.refusal(req, err)
	}
	if err := c.allowed(cmd.access); err != nil {
		return e.refusal(req, err)
	}
	r, err := c.importCSVFile(path, progress)
	if err != nil {
		return e.refusal(req, err)
	}
	return r
}

// importCSVFile reads the file (the only I/O of the import) and imports it.
func (c *call) importCSVFile(path string, progress func(done, total int)) (Reply, error) {
	const example = "import csv /home/coach/attempts.csv"
	if strings.HasPrefix(path, "~/") {
		if home, err := os.UserHomeDir(); err == nil {
			path = filepath.Join(home, path[2:])
		}
	}
	fi, err := os.Stat(path)
	switch {
	case errors.Is(err, os.ErrNotExist):
		return Reply{}, notFoundErr(example, "there is no file %q on the bot's computer", path)
	case err != nil:
		return Reply{}, usageErr(example, "cannot read %q: %v", path, errors.Unwrap(err))
	case !fi.Mode().IsRegular():
		return Reply{}, usageErr(example, "%q is not a plain file", path)
	case fi.Size() > csvMaxBytes:
		return Reply{}, usageErr(example, "%q is %d MB; the import reads files up to %d MB", path, fi.Size()>>20, csvMaxBytes>>20)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return Reply{}, usageErr(example, "cannot read %q: %v", path, errors.Unwrap(err))
	}
	return c.importCSV(path, data, progress)
}

// importCSV validates every row, then stores all of them in one
// transaction, or none.
func (c *call) importCSV(source string, data []byte, progress func(done, total int)) (Reply, error) {
	var r Reply
	err := c.update(func(tx Tx) error {
		var err error
		r, err = c.importInTx(tx, source, data, progress)
		return err
	})
	var ir *importRefusal
	if errors.As(err, &ir) {
		ex := ir.example
		if ex == "" {
			ex = "export csv"
		}
		return Reply{Kind: KindUsage, Title: "Not imported", Lines: ir.lines, Example: ex, Ephemeral: true}, nil
	}
	if err != nil {
		return Reply{}, err
	}
	return r, nil
}

func (c *call) importInTx(tx Tx, source string, data []byte, progress func(done, total int)) (Reply, error) {
	team, loc, err := teamAndZone(tx)
	if err != nil {
		return Reply{}, err
	}
	rows, problems := parseAttemptsCSV(data, c.now, loc)
	// Athletes: every name must exist.
	type known struct {
		a  record.Athlete
		ok bool
	}
	cache := map[string]known{}
	var all []string
	var unknown []string
	toAdd := "" // the first unknown name that is not a typo of a known one
	for i, row := range rows {
		key := strings.ToLower(strings.Join(strings.Fields(row.athlete), " "))
		k, done := cache[key]
		if !done {
			a, ok, err := tx.AthleteByName(row.athlete)
			if err != nil {
				return Reply{}, err
			}
			k = known{a, ok}
			cache[key] = k
			if !ok {
				unknown = append(unknown, row.athlete)
			}
		}
		if !k.ok {
			if all == nil {
				as, err := tx.Athletes()
				if err != nil {
					return Reply{}, err
				}
				for _, a := range as {
					all = append(all, a.Name)
				}
			}
			msg := fmt.Sprintf("row %d: no athlete called %q", row.row, row.athlete)
			if s, ok := nearest(row.athlete, all); ok {
				msg += fmt.Sprintf(" (did you mean %s?)", s)
			} else if toAdd == "" {
				toAdd = row.athlete
			}
			problems = append(problems, msg)
			continue
		}
		rows[i].a.AthleteID = k.a.ID
	}
	if len(problems) > 0 {
		slices.SortStableFunc(problems, func(a, b string) int { return rowNumber(a) - rowNumber(b) })
		var extra []string
		if len(unknown) > 0 {
			extra = append(extra, fmt.Sprintf("Unknown athletes: %s. Add them first (athlete add NAME height H) or correct the names.", strings.Join(unknown, ", ")))
		}
		ir := refuseRows(problems, extra...)
		if toAdd != "" {
			ir.example = "athlete add " + strings.Join(strings.Fields(toAdd), "-") + " height 1.80"
		}
		return Reply{}, ir
	}
	total := len(rows)
	if progress != nil {
		progress(0, total)
	}
	// Time order per athlete; the file's order breaks ties.
	slices.SortStableFunc(rows, func(x, y csvRow) int {
		if x.a.AthleteID != y.a.AthleteID {
			if x.a.AthleteID < y.a.AthleteID {
				return -1
			}
			return 1
		}
		return x.a.Time.Compare(y.a.Time)
	})
	numberImported(rows, loc)
	athletes := map[uint64]record.Athlete{}
	for _, k := range cache {
		athletes[k.a.ID] = k.a
	}
	if probs, err := importSeriesProblems(tx, rows, athletes, loc, imperial(team)); err != nil {
		return Reply{}, err
	} else if len(probs) > 0 {
		return Reply{}, refuseRows(probs, "A meet series must keep the competition rules (World Athletics TR 26): correct the rows, or mark practice rows meet=false.")
	}
	if probs := importPlausibility(rows, athletes, team); len(probs) > 0 && !c.importConfirmed() {
		ir := refuseRows(probs, "These rows need a second look, as a log line would: correct them, or send the import again ending in confirm.")
		ir.example = "import csv confirm"
		if typed := strings.TrimSpace(c.req.Text); strings.HasPrefix(strings.ToLower(typed), "import csv") {
			ir.example = typed + " confirm"
		}
		return Reply{}, ir
	}
	no, err := tx.NextLineNumber()
	if err != nil {
		return Reply{}, err
	}
	lineID := c.lineID("import")
	seenMsg := map[string]bool{}
	isSeen := func(id string) (bool, error) {
		if id == "" || id == c.req.MessageID {
			return false, nil
		}
		if v, ok := seenMsg[id]; ok {
			return v, nil
		}
		v, err := tx.Seen(id)
		seenMsg[id] = v
		return v, err
	}
	var (
		batch   []record.Attempt
		keys    []record.Key
		newMsgs []string
		dups    int
		done    int
		per     = map[uint64]int{}
		passes  = map[uint64]int{}
		inFile  = map[csvSame]bool{}
		flagged []rowFlags
	)
	flush := func() error {
		if len(batch) == 0 {
			return nil
		}
		if err := tx.AddAttempts(batch); err != nil {
			return err
		}
		for _, a := range batch {
			keys = append(keys, a.Key())
		}
		batch = batch[:0]
		return nil
	}
	for _, row := range rows {
		done++
		a := row.a
		dup, err := isSeen(a.MessageID)
		if err != nil {
			return Reply{}, err
		}
		if !dup {
			dup, err = storedSame(tx, a)
			if err != nil {
				return Reply{}, err
			}
		}
		same := csvSame{a.AthleteID, a.Time.UnixNano(), int(math.Round(a.BarM * 1000)), a.Outcome, a.Number, a.MessageID}
		dup = dup || inFile[same]
		inFile[same] = true
		if dup {
			dups++
		} else {
			if a.LoggedBy == "" {
				a.LoggedBy = c.lineOwner()
			}
			a.LineID, a.LineNo = lineID, no
			a = withPrediction(a, athletes[a.AthleteID], team)
			if !row.model {
				if m := modelMargin(a, athletes[a.AthleteID], team); m.ok {
					a.HasModelMargin, a.ModelMarginM = true, m.marginM
				}
			}
			if a.MessageID != "" && !slices.Contains(newMsgs, a.MessageID) {
				newMsgs = append(newMsgs, a.MessageID)
			}
			if f, ok := importRowFlags(row.row, a, athletes[a.AthleteID], team); ok {
				flagged = append(flagged, f)
			}
			per[a.AthleteID]++
			if a.Outcome == record.Passed {
				passes[a.AthleteID]++
			}
			batch = append(batch, a)
		}
		if len(batch) >= csvChunk {
			if err := flush(); err != nil {
				return Reply{}, err
			}
			if progress != nil {
				progress(done, total)
			}
		}
	}
	if err := flush(); err != nil {
		return Reply{}, err
	}
	for _, id := range newMsgs {
		if err := tx.MarkSeen(id, c.now); err != nil {
			return Reply{}, err
		}
	}
	if len(keys) > 0 {
		line := record.Line{ID: lineID, LoggedBy: c.lineOwner(), Time: c.now, Attempts: keys, Text: "import csv " + source, Number: no, Seeded: c.req.Seed}
		if len(per) == 1 {
			for id := range per {
				line.AthleteID = id
			}
		}
		if err := tx.PutLine(line); err != nil {
			return Reply{}, err
		}
	}
	summary := map[string]any{"file": source, "rows": total, "imported": len(keys), "duplicates": dups}
	if len(keys) > 0 {
		summary[auditLineNo] = no
	}
	if err := c.audit(tx, auditImportCSV, source, nil, summary); err != nil {
		return Reply{}, err
	}
	if progress != nil {
		progress(total, total)
	}
	if len(keys) == 0 {
		// Nothing stored, so no line to undo: saying `undo` here would
		// take back the coach's previous line instead.
		line := fmt.Sprintf("All %s in %s are already stored (the message id was handled before, or the same attempt is logged); nothing changed.", plural(dups, "row"), source)
		if dups == 0 {
			line = fmt.Sprintf("%s holds no attempt rows; nothing changed.", source)
		}
		return Reply{Title: "Nothing new imported", Lines: []string{line}}, nil
	}
	r := Reply{Title: "Imported", Lines: []string{
		fmt.Sprintf("Imported %s for %s from %s.", countsText(len(keys)-sum(passes), sum(passes)), plural(len(per), "athlete"), source),
	}}
	if dups > 0 {
		r.Lines = append(r.Lines, fmt.Sprintf("Skipped %s already stored: the message id was handled before, or the same attempt is logged.", plural(dups, "duplicate row")))
	}
	if l := importCheckLine(flagged); l != "" {
		r.Lines = append(r.Lines, l)
	}
	r.Lines = append(r.Lines, "Rows keep their own times and message ids. An import never changes a profile's personal best; `undo` takes the whole import back within 24 hours.")
	var names []string
	for id := range per {
		names = append(names, athletes[id].Name)
	}
	slices.Sort(names)
	for _, n := range names {
		for id, a := range athletes {
			if a.Name == n {
				r.Fields = append(r.Fields, Field{Label: n, Value: countsText(per[id]-passes[id], passes[id])})
			}
		}
	}
	return r, nil
}

// rowNumber reads the N of a "row N: ..." problem, for sorting.
func rowNumber(p string) int {
	rest, ok := strings.CutPrefix(p, "row ")
	if !ok {
		return 0
	}
	num, _, _ := strings.Cut(rest, ":")
	n, _ := strconv.Atoi(num)
	return n
}

// csvSame identifies an attempt within one file: a row equal to an earlier
// one in all of these is the same attempt written twice.
type csvSame struct {
	athlete uint64
	nanos   int64
	barMM   int
	outcome record.Outcome
	number  int
	msg     string
}

// storedSame reports whether the store already holds this attempt: same
// athlete and time, same bar and outcome.
func storedSame(tx Tx, a record.Attempt) (bool, error) {
	found := false
	to := a.Time.Add(time.Nanosecond)
	if a.Time.Nanosecond() == 0 {
		to = a.Time.Add(time.Second) // an export writes times to the second
	}
	err := tx.Attempts(a.AthleteID, a.Time, to, func(s record.Attempt) error {
		if sameBar(s.BarM, a.BarM) && s.Outcome == a.Outcome && (a.Number == 0 || s.Number == a.Number) {
			found = true
			return record.ErrStop
		}
		return nil
	})
	return found, err
}

// numberImported fills missing attempt numbers the way a log line does,
// within each athlete's day and kind (rows sorted by athlete and time).
func numberImported(rows []csvRow, loc *time.Location) {
	type kindDay struct {
		athlete uint64
		day     time.Time
		meet    bool
	}
	last := map[kindDay]record.Attempt{}
	for i := range rows {
		a := &rows[i].a
		k := kindDay{a.AthleteID, localDay(a.Time, loc), a.Meet}
		if a.Number == 0 {
			var prev []record.Attempt
			if l, ok := last[k]; ok {
				prev = []record.Attempt{l}
			}
			one := []record.Attempt{*a}
			numberAttempts(prev, one, a.Meet)
			a.Number = one[0].Number
		}
		last[k] = *a
	}
}

// sum adds the counts of a map.
func sum(m map[uint64]int) int {
	n := 0
	for _, v := range m {
		n += v
	}
	return n
}
