package bot_test

import (
	"context"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/record"
)

// csvGolden compares data with testdata/csv/NAME, rewriting it under -update.
func csvGolden(t *testing.T, name string, got []byte) {
	t.Helper()
	path := filepath.Join("..", "testdata", "csv", name)
	if *update {
		if err := os.WriteFile(path, got, 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("read %s (run go test ./bot -update to create): %v", path, err)
	}
	if string(want) != string(got) {
		t.Errorf("csv differs from %s:\n--- got\n%s\n--- want\n%s", path, got, want)
	}
}

// logSquadLines logs a small history for Mira and Kai across November.
func logSquadLines(te *testEngine) {
	te.t.Helper()
	for _, step := range []struct {
		at   time.Time
		line string
	}{
		{time.Date(2026, 11, 10, 17, 0, 0, 0, time.UTC), "log Mira 1.65 o 1.70 xo 1.74 xxx"},
		{time.Date(2026, 11, 14, 10, 0, 0, 0, time.UTC), "log Kai 1.95 o 2.00 xo 2.04 xxx meet"},
		{time.Date(2026, 11, 20, 18, 0, 0, 0, time.UTC), `log Mira 1.70 o 1.75 xo peak 1.86 by 3cm note =cheeky, "quoted" note`},
		{time.Date(2026, 11, 25, 9, 30, 0, 0, time.UTC), "log Kai 2.00 o vz 4.3 approach 7.6 takeoff 1.05 by -1cm"},
	} {
		te.now = step.at
		te.must(step.line)
	}
	te.now = testClockStart
}

func TestExportCSV(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logAddAthlete(t, te.DB, logKai())
	logSquadLines(te)
	r := te.must("export csv")
	golden(t, "log-export", plain(r))
	if len(r.Files) != 1 || r.Files[0].Name != "lathmark-attempts-2026-11-25.csv" || r.Files[0].MIME != "text/csv" {
		t.Fatalf("files %+v", r.Files)
	}
	csvGolden(t, "log-export.csv", r.Files[0].Data)
	rows, err := csv.NewReader(strings.NewReader(string(r.Files[0].Data))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "athlete,time,bar_m,outcome,attempt,meet,approach_ms,takeoff_m,peak_m,vz_ms,coach_margin_m,model_margin_m,logged_by,message_id,note,rule_breach" {
		t.Errorf("header %q", rows[0])
	}
	if len(rows) != 1+6+3+6+1 {
		t.Errorf("%d rows, want a header and 16 attempts", len(rows))
	}
	for _, row := range rows[1:] {
		if _, err := time.Parse(time.RFC3339Nano, row[1]); err != nil {
			t.Errorf("time %q is not RFC 3339: %v", row[1], err)
		}
		if strings.HasPrefix(row[14], "=") || strings.HasPrefix(row[0], "=") {
			t.Errorf("a text cell starts a formula: %q", row)
		}
	}

	one := te.must("export csv Mira since 2026-11-15")
	if one.Files[0].Name != "lathmark-attempts-Mira-2026-11-25.csv" {
		t.Errorf("file name %q", one.Files[0].Name)
	}
	if n := strings.Count(string(one.Files[0].Data), "\n"); n != 1+3 {
		t.Errorf("Mira since 2026-11-15: %d lines, want header + 3", n)
	}
	contains(t, te.must("export csv Kai since 2w"), "7 attempts of 1 athlete, since 2026-11-12")

	// An athlete may export their own jumps, and only those.
	kai := logProfile(t, te.DB, "Kai")
	logUser(t, te.DB, record.User{ID: "U_KAI", Role: record.RoleAthlete, AthleteID: kai.ID})
	if r := te.as("U_KAI", "export csv me"); !r.OK() || len(r.Files) != 1 {
		t.Errorf("own export: %s", plain(r))
	}
	if r := te.as("U_KAI", "export csv Mira"); r.Kind != bot.KindForbidden {
		t.Errorf("an athlete exported someone else: %s", plain(r))
	}

	// Times carry the team's offset to the second (RFC 3339): Madrid is UTC+1 in
	// November (EU summer time ends the last Sunday of October, Directive
	// 2000/84/EC). The bar keeps the precision it was typed with: 1.70.
	if _, err := time.LoadLocation("Europe/Madrid"); err != nil {
		t.Skip("no time zone data:", err)
	}
	logSetTeam(t, te.DB, record.Team{TZ: "Europe/Madrid"})
	m := te.must("export csv Mira since 2026-11-20")
	if !strings.Contains(string(m.Files[0].Data), "Mira,2026-11-20T19:00:01+01:00,1.70,o,1,false") {
		t.Errorf("Madrid export:\n%s", m.Files[0].Data)
	}
}

// Export, then import into a fresh store: the same history and bests.
func TestCSVRoundTrip(t *testing.T) {
	te1 := newTestEngine(t)
	logAddAthlete(t, te1.DB, logMira())
	logAddAthlete(t, te1.DB, logKai())
	logSquadLines(te1)
	data := te1.must("export csv").Files[0].Data
	path := filepath.Join(t.TempDir(), "lathmark-attempts-2026-11-25.csv")
	if err := os.WriteFile(path, data, 0o600); err != nil {
		t.Fatal(err)
	}

	te2 := newTestEngine(t)
	logAddAthlete(t, te2.DB, logKai()) // other order: other ids
	logAddAthlete(t, te2.DB, logMira())
	te2.now, te2.seq = te1.now, 100
	r := te2.must("import csv " + path)
	golden(t, "log-import", strings.ReplaceAll(plain(r), path, "FILE"))
	contains(t, r, "Imported 16 jumps for 2 athletes")

	for _, name := range []string{"Mira", "Kai"} {
		a1, a2 := logAttempts(t, te1.DB, name), logAttempts(t, te2.DB, name)
		if len(a1) != len(a2) {
			t.Fatalf("%s: %d attempts exported, %d imported", name, len(a1), len(a2))
		}
		for i := range a1 {
			x, y := a1[i], a2[i]
			x.AthleteID, y.AthleteID, x.LineID, y.LineID, x.LineNo, y.LineNo = 0, 0, "", "", 0, 0
			if !x.Time.Equal(y.Time) {
				t.Errorf("%s attempt %d: time %v, imported %v", name, i, x.Time, y.Time)
			}
			x.Time, y.Time = time.Time{}, time.Time{}
			if x != y {
				t.Errorf("%s attempt %d differs:\n exported %+v\n imported %+v", name, i, x, y)
			}
		}
		for _, cmd := range []string{"history " + name + " 104w", "best " + name} {
			te1.now, te2.now = testClockStart, testClockStart
			// Line numbers differ (the import is one line of its own).
			if p1, p2 := stripLineNos(plain(te1.must(cmd))), stripLineNos(plain(te2.must(cmd))); p1 != p2 {
				t.Errorf("%q differs after the round trip:\n%s\n---\n%s", cmd, p1, p2)
			}
		}
	}

	// The same file again: every row is a duplicate; nothing changes.
	// It must not promise an undo: there is no line, and `undo` would take
	// back the previous one instead.
	again := te2.must("import csv " + path)
	contains(t, again, "Nothing new imported", "All 16 rows", "already stored", "nothing changed")
	if strings.Contains(plain(again), "undo") {
		t.Errorf("an import of nothing offers undo:\n%s", plain(again))
	}
	if n := len(logAttempts(t, te2.DB, "Mira")); n != 9 {
		t.Errorf("Mira has %d attempts after a second import, want 9", n)
	}
	// And into the store it came from: its message ids were handled there.
	contains(t, te1.must("import csv "+path), "Nothing new imported", "All 16 rows")
}

func TestImportRefusesBadRowsAllOrNothing(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	before := te.checksum()
	r := te.run("import csv ../testdata/csv/import-errors.csv")
	golden(t, "log-import-errors", plain(r))
	if r.Kind != bot.KindUsage {
		t.Errorf("kind %v", r.Kind)
	}
	contains(t, r, "Nothing was imported: 13 problems found.", "row 3: no athlete called \"Mria\" (did you mean Mira?)",
		"and 3 more.", "Unknown athletes: Mria, Bob.")
	if te.checksum() != before {
		t.Error("a refused import changed the store (the good row 2 must not be stored either)")
	}
	h := te.run("import csv ../testdata/csv/import-bad-header.csv")
	golden(t, "log-import-bad-header", plain(h))
	contains(t, h, `unknown column "when"`, `did you mean "outcome"?`, `lacks the column "time"`)
	if te.checksum() != before {
		t.Error("a refused import changed the store")
	}
	for name, content := range map[string]string{"empty": "", "binary": "\xff\xfe\x00", "quote": "athlete,time,bar_m,outcome\nMira,\"2026-11-20,1.70,o\n"} {
		p := filepath.Join(t.TempDir(), name+".csv")
		if err := os.WriteFile(p, []byte(content), 0o600); err != nil {
			t.Fatal(err)
		}
		if r := te.run("import csv " + p); r.Kind != bot.KindUsage || len(r.Lines) < 2 {
			t.Errorf("%s file: %s", name, plain(r))
		}
	}
	if r := te.run("import csv " + t.TempDir()); r.Kind != bot.KindUsage {
		t.Errorf("a directory: %s", plain(r))
	}
}

// A spreadsheet's CSV: byte-order mark, capitalised header, local times,
// words for outcomes, no attempt numbers.
func TestImportSpreadsheetCSV(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logAddAthlete(t, te.DB, logKai())
	r := te.must("import csv ../testdata/csv/import-spreadsheet.csv")
	contains(t, r, "Imported 5 jumps for 2 athletes")
	m := logAttempts(t, te.DB, "Mira")
	if notation(m) != "oxo" || m[1].Number != 1 || m[2].Number != 2 || m[2].Note != `felt "fast", good` {
		t.Errorf("Mira imported as %+v", m)
	}
	k := logAttempts(t, te.DB, "Kai")
	if notation(k) != "xo" || !k[0].Meet || k[1].Number != 2 || k[1].Note != "=not a formula" || k[0].LoggedBy != "U_HEAD" {
		t.Errorf("Kai imported as %+v", k)
	}
	if h := te.must("history Mira"); h.Table.Rows[0][2] != "#1 1.70 o, 1.75 xo" {
		t.Errorf("history %q", h.Table.Rows[0][2])
	}
	if pb := logProfile(t, te.DB, "Kai").PersonalBestM; pb != 2.01 {
		t.Errorf("an import changed the profile PB to %v", pb)
	}
}

func TestImportCSVFileProgressAndUndo(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	var b strings.Builder
	b.WriteString("athlete,time,bar_m,outcome,meet,message_id\n")
	start := time.Date(2026, 1, 5, 17, 0, 0, 0, time.UTC)
	const rows = 1200
	for i := 0; i < rows; i++ {
		at := start.Add(time.Duration(i/3) * 24 * time.Hour / 8).Add(time.Duration(i%3) * time.Minute)
		fmt.Fprintf(&b, "Mira,%s,%.2f,%s,false,gen-%d\n", at.Format(time.RFC3339), 1.60+float64(i%3)*0.05, []string{"o", "x", "o"}[i%3], i/3)
	}
	path := filepath.Join(t.TempDir(), "many.csv")
	if err := os.WriteFile(path, []byte(b.String()), 0o600); err != nil {
		t.Fatal(err)
	}
	var calls [][2]int
	progress := func(done, total int) { calls = append(calls, [2]int{done, total}) }
	req := bot.Request{UserID: "U_HEAD", Time: te.now, MessageID: "import-1"}
	r := te.E.ImportCSVFile(context.Background(), req, path, progress)
	if !r.OK() {
		t.Fatal(plain(r))
	}
	contains(t, r, "Imported 1200 jumps for 1 athlete")
	if len(calls) < 3 || calls[0] != [2]int{0, rows} || calls[len(calls)-1] != [2]int{rows, rows} {
		t.Errorf("progress calls %v", calls)
	}
	for i := 1; i < len(calls); i++ {
		if calls[i][0] < calls[i-1][0] || calls[i][1] != rows {
			t.Errorf("progress not monotonic: %v", calls)
		}
	}
	if n := len(logAttempts(t, te.DB, "Mira")); n != rows {
		t.Fatalf("%d attempts stored", n)
	}
	// The same request delivered again is handled once.
	if again := te.E.ImportCSVFile(context.Background(), req, path, nil); again.Title != "Already done" {
		t.Errorf("repeat: %s", plain(again))
	}
	// Coaches may not read files on the bot's computer.
	logUser(t, te.DB, record.User{ID: "U_COACH", Role: record.RoleCoach})
	if f := te.E.ImportCSVFile(context.Background(), bot.Request{UserID: "U_COACH", MessageID: "import-2"}, path, nil); f.Kind != bot.KindForbidden {
		t.Errorf("coach import: %s", plain(f))
	}
	te.advance(time.Minute)
	// More than 20 attempts: undo asks for confirm and removes nothing.
	if r := te.run("undo"); r.Kind != bot.KindConflict || !strings.Contains(plain(r), "undo confirm") {
		t.Errorf("undo of 1200 attempts without confirm: %s", plain(r))
	}
	if n := len(logAttempts(t, te.DB, "Mira")); n != rows {
		t.Fatalf("%d attempts after a refused undo", n)
	}
	u := te.must("undo confirm")
	golden(t, "log-undo-import", strings.ReplaceAll(plain(u), path, "FILE"))
	contains(t, u, "Removed the import #1 of 1200 jumps (1 athlete)")
	if n := len(logAttempts(t, te.DB, "Mira")); n != 0 {
		t.Errorf("%d attempts left after undoing the import", n)
	}
}

// From chat (not the bot's own terminal) import csv must not read the host's files.
func TestImportCSVOnlyLocal(t *testing.T) {
	te := newTestEngine(t)
	before := te.checksum()
	r := te.E.Handle(context.Background(), bot.Request{UserID: "U_HEAD", Text: "import csv /etc/passwd", Time: testClockStart, MessageID: "slack-1"})
	if r.Kind != bot.KindForbidden || !strings.Contains(plain(r), "only in the bot's terminal") {
		t.Fatalf("remote import not refused:\n%s", plain(r))
	}
	if te.checksum() != before {
		t.Error("refused import changed the store")
	}
}

// stripLineNos removes line numbers (#12) from a rendered reply, and the
// padding that goes with them.
func stripLineNos(s string) string {
	s = regexp.MustCompile(`#[0-9]+ `).ReplaceAllString(s, "")
	s = regexp.MustCompile(`; `).ReplaceAllString(s, ", ")
	return regexp.MustCompile(` +`).ReplaceAllString(s, " ")
}

// An import is one change but may hold more than one session: undoing one
// that spans two athletes (four attempts, well under the 20-attempt limit)
// asks for confirm and removes nothing until then (issue 15: more than one
// line needs confirm).
func TestUndoImportOfTwoSessionsAsksConfirm(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	te.must("athlete add Kai height 1.86")
	csv := "athlete,time,bar_m,outcome,meet,message_id\n" +
		"Mira,2026-01-05T17:00:00Z,1.60,o,false,a\n" +
		"Mira,2026-01-05T17:01:00Z,1.65,o,false,a\n" +
		"Kai,2026-01-05T17:02:00Z,1.80,o,false,b\n" +
		"Kai,2026-01-05T17:03:00Z,1.85,x,false,b\n"
	path := filepath.Join(t.TempDir(), "two.csv")
	if err := os.WriteFile(path, []byte(csv), 0o600); err != nil {
		t.Fatal(err)
	}
	if r := te.E.ImportCSVFile(context.Background(), bot.Request{UserID: "U_HEAD", Time: te.now, MessageID: "import-2s"}, path, nil); !r.OK() {
		t.Fatal(plain(r))
	}
	te.advance(time.Minute)
	if r := te.run("undo"); r.Kind != bot.KindConflict || !strings.Contains(plain(r), "undo confirm") {
		t.Fatalf("undo of an import of two sessions without confirm: %s", plain(r))
	}
	if n := len(logAttempts(t, te.DB, "Mira")) + len(logAttempts(t, te.DB, "Kai")); n != 4 {
		t.Fatalf("%d attempts after a refused undo, want 4", n)
	}
	te.must("undo confirm")
	if n := len(logAttempts(t, te.DB, "Mira")) + len(logAttempts(t, te.DB, "Kai")); n != 0 {
		t.Errorf("%d attempts after undo confirm, want 0", n)
	}
}

// An import is checked against the athlete as a log line is (issue 15's
// plausibility: a bar more than 15 cm over the personal best, a clearance
// above the world record, 2.10 m for women, from memory): such rows are
// refused by row number, nothing is stored, and the same import ending in
// confirm stores them.
func TestImportPlausibilityNeedsConfirm(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira()) // PB 1.81
	csv := "athlete,time,bar_m,outcome,meet,message_id\n" +
		"Mira,2026-01-05T17:00:00Z,1.70,o,false,a\n" +
		"Mira,2026-01-05T17:01:00Z,2.40,o,false,a\n"
	path := filepath.Join(t.TempDir(), "high.csv")
	if err := os.WriteFile(path, []byte(csv), 0o600); err != nil {
		t.Fatal(err)
	}
	r := te.E.ImportCSVFile(context.Background(), bot.Request{UserID: "U_HEAD", Time: te.now, MessageID: "imp-high"}, path, nil)
	if r.OK() {
		t.Fatalf("a 2.40 m clearance for a 1.81 m athlete was imported without confirm:\n%s", plain(r))
	}
	contains(t, r, "row 3:", "above Mira's personal best", "above the world record 2.10 m", "confirm")
	if strings.Contains(plain(r), "row 2:") {
		t.Errorf("the plausible row 2 is named:\n%s", plain(r))
	}
	if n := len(logAttempts(t, te.DB, "Mira")); n != 0 {
		t.Fatalf("%d attempts stored by a refused import", n)
	}
	te.advance(time.Minute)
	r = te.E.ImportCSVFile(context.Background(), bot.Request{UserID: "U_HEAD", Time: te.now, MessageID: "imp-high-2"}, path+" confirm", nil)
	if !r.OK() {
		t.Fatalf("import ... confirm refused:\n%s", plain(r))
	}
	if n := len(logAttempts(t, te.DB, "Mira")); n != 2 {
		t.Errorf("%d attempts after import ... confirm, want 2", n)
	}
}

// Imported rows get the range flags a log line gets: a vz of 6.0 m/s is
// above every published take-off vz (elite men 4.3–4.7 m/s, Dapena's
// reports, from memory) and a take-off 2.5 m out is beyond 0.9–1.3 m (same
// source); a row at vz 4.0 m/s, 1.0 m out (elite women 3.9–4.3 m/s, from
// memory) is not named. Flags never block the import.
func TestImportFlagsRowsOutsidePublishedRanges(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira()) // sex f
	csv := "athlete,time,bar_m,outcome,meet,vz_ms,takeoff_m,message_id\n" +
		"Mira,2026-01-05T17:00:00Z,1.70,o,false,4.0,1.0,a\n" +
		"Mira,2026-01-05T17:01:00Z,1.72,x,false,6.0,2.5,a\n"
	path := filepath.Join(t.TempDir(), "flags.csv")
	if err := os.WriteFile(path, []byte(csv), 0o600); err != nil {
		t.Fatal(err)
	}
	r := te.must("import csv " + path)
	contains(t, r, "Check 1 row against the published ranges", "row 3 vz 6.00 m/s", "take-off")
	if p := plain(r); strings.Contains(p, "row 2 ") {
		t.Errorf("the row inside the ranges is named:\n%s", p)
	}
	if n := len(logAttempts(t, te.DB, "Mira")); n != 2 {
		t.Errorf("%d attempts stored, want both rows", n)
	}
}
