package bot_test

import (
	"os"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/record"
)

// fix and drop by line number, audited with old → new, and the personal
// best recomputed from valid meet series each time.
func TestFixAndDropByLineNumber(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logKai()) // PB 2.01
	te.must("log Kai 1.95 o 2.00 xo meet")
	r := te.must("log Kai 2.04 o meet")
	contains(t, r, "line #2", "New personal best: 2.04 m")
	h := te.must("history Kai")
	contains(t, h, "#1 1.95 o, 2.00 xo; #2 2.04 o")

	f := te.must("fix #2 2.04 xxx")
	golden(t, "log-fix", plain(f))
	contains(t, f, "Fixed line #2 for Kai", "2.04 o → 2.04 xxx", "Personal best back to 2.01 m")
	if pb := logProfile(t, te.DB, "Kai").PersonalBestM; pb != 2.01 {
		t.Errorf("PB after fix %v, want 2.01", pb)
	}
	if as := logAttempts(t, te.DB, "Kai"); notation(as) != "oxoxxx" || !as[5].Meet || as[5].LineNo != 2 {
		t.Errorf("after fix: %q %+v", notation(as), as)
	}
	a := te.must("audit Kai")
	contains(t, a, "#2 2.04 o (meet) → #2 2.04 xxx (meet)")

	u := te.must("undo")
	contains(t, u, "Took back your fix of line #2", "Personal best up to 2.04 m")
	if pb := logProfile(t, te.DB, "Kai").PersonalBestM; pb != 2.04 {
		t.Errorf("PB after undoing the fix %v, want 2.04", pb)
	}

	d := te.must("drop #2")
	golden(t, "log-drop", plain(d))
	contains(t, d, "Dropped line #2", "Personal best back to 2.01 m")
	contains(t, te.run("drop #2"), "line #2 was already removed")
	contains(t, te.run("drop #9"), "there is no line #9")
	contains(t, te.must("audit Kai"), "removed: line #2 2.04 o (meet)")
	u = te.must("undo")
	contains(t, u, "Took back your drop of line #2")
	if got := notation(logAttempts(t, te.DB, "Kai")); got != "oxoo" {
		t.Errorf("after undoing the drop: %q", got)
	}
	// A fix keeps the competition rules: 1.99 after 2.00 at that meet.
	contains(t, mustRefuse(t, te, "fix #2 1.99 o", bot.KindConflict), "the bar never goes down", "fix #2 1.99 o confirm")
}

// The Undo button under a log reply carries its line: pressed by someone
// with the right it removes exactly that line, without it is refused, and
// a second press says the line is gone.
func TestUndoButtonCarriesItsLine(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logAddAthlete(t, te.DB, logKai())
	kai := logProfile(t, te.DB, "Kai")
	logUser(t, te.DB, record.User{ID: "U_COACH", Name: "Sam", Role: record.RoleCoach})
	logUser(t, te.DB, record.User{ID: "U_KAI", Name: "Kai", Role: record.RoleAthlete, AthleteID: kai.ID})
	first := te.must("log Mira 1.65 o")
	te.must("log Mira 1.70 xo") // a later line by the same coach
	if len(first.Actions) != 1 || first.Actions[0].Command != "drop #1" {
		t.Fatalf("actions %+v", first.Actions)
	}
	press := first.Actions[0].Command
	if r := te.as("U_KAI", press); r.Kind != bot.KindForbidden {
		t.Errorf("an athlete pressed another athlete's Undo: %s", plain(r))
	}
	r := te.as("U_COACH", press)
	if !r.OK() {
		t.Fatal(plain(r))
	}
	contains(t, r, "Dropped line #1", "#1 1.65 o (practice)")
	if got := notation(logAttempts(t, te.DB, "Mira")); got != "xo" {
		t.Errorf("left %q, want the later line only", got)
	}
	contains(t, te.as("U_COACH", press), "line #1 was already removed")
	contains(t, te.as("U_COACH", "undo line 2"), "Dropped line #2")
}

// undo takes back the speaker's own last change of any kind, says what,
// never another person's change, and never seeded demo data.
func TestUndoAnyOwnChange(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logUser(t, te.DB, record.User{ID: "U_COACH", Name: "Sam", Role: record.RoleCoach})
	te.must("log Mira 1.65 o")
	te.must("athlete set Mira pb 1.83")
	if r := te.as("U_COACH", "log Mira 1.60 o"); !r.OK() {
		t.Fatal(plain(r))
	}
	u := te.must("undo")
	contains(t, u, "Took back your athlete set of Mira", "pb 1.83 → 1.81")
	if pb := logProfile(t, te.DB, "Mira").PersonalBestM; pb != 1.81 {
		t.Errorf("PB %v after undo, want 1.81", pb)
	}
	u = te.must("undo")
	contains(t, u, "Removed Mira's line #1")
	if got := notation(logAttempts(t, te.DB, "Mira")); got != "o" || logAttempts(t, te.DB, "Mira")[0].BarM != 1.60 {
		t.Errorf("left %q; the coach's 1.60 must stay", got)
	}
	contains(t, te.run("undo"), "you have no change of your own to undo")

	te.must("team units imperial")
	contains(t, te.must("undo"), "Took back your team units")

	// Seeded demo data is never undone.
	seed := bot.Request{UserID: "U_HEAD", Text: "log Mira 1.75 o", Time: te.now, MessageID: "demo-1", Seed: true}
	te.advance(time.Second)
	if r := te.E.Handle(t.Context(), seed); !r.OK() {
		t.Fatal(plain(r))
	}
	if r := te.run("undo"); r.OK() || !strings.Contains(plain(r), "no change of your own") {
		t.Errorf("undo reached seeded data: %s", plain(r))
	}

	// A removal cannot be undone, and undo does not reach past it.
	te.must("athlete add Zed height 1.80")
	te.must("log Zed 1.60 o")
	te.must("athlete remove Zed confirm")
	contains(t, mustRefuse(t, te, "undo", bot.KindConflict), "cannot be undone")
}

// More than 20 attempts in one line: undo asks for confirm.
func TestUndoLargeLineNeedsConfirm(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	te.must("log Mira " + strings.Repeat("1.50 o ", 21))
	mustRefuse(t, te, "undo", bot.KindConflict)
	contains(t, te.must("undo confirm"), "21 jumps")
}

// Past sessions: yesterday, on DATE, at HH:MM in the team's zone; the
// future refused; more than a season back only with confirm.
func TestLogPastSessions(t *testing.T) {
	te := newTestEngine(t) // Wed 2026-11-25 10:00 UTC
	logAddAthlete(t, te.DB, logMira())
	r := te.must("log Mira 1.70 o yesterday")
	golden(t, "log-yesterday", plain(r))
	contains(t, r, "on Tue 2026-11-24 10:00", "That day: best 1.70 m")
	te.must("log Mira 1.72 xo on 2026-11-20 at 18:30")
	h := te.must("history Mira")
	if len(h.Table.Rows) != 2 || h.Table.Rows[0][0] != "Fri 2026-11-20" || h.Table.Rows[1][0] != "Tue 2026-11-24" {
		t.Errorf("rows %q", h.Table.Rows)
	}
	as := logAttempts(t, te.DB, "Mira")
	if want := time.Date(2026, 11, 20, 18, 30, 0, 0, time.UTC); !as[0].Time.Equal(want) {
		t.Errorf("time %v, want %v", as[0].Time, want)
	}
	contains(t, mustRefuse(t, te, "log Mira 1.70 o at 23:00", bot.KindUsage), "still to come")
	mustRefuse(t, te, "log Mira 1.70 o on 2026-12-01", bot.KindUsage)
	contains(t, mustRefuse(t, te, "log Mira 1.70 o on 2025-06-01", bot.KindConflict), "more than a season")
	te.must("log Mira 1.70 o on 2025-06-01 confirm")
	contains(t, te.must("history Mira since 2026-11-21"), "History of Mira since 2026-11-21", "Tue 2026-11-24")
	mustRefuse(t, te, "log Mira 1.70 o on 2026-02-30", bot.KindUsage)
	mustRefuse(t, te, "log Mira 1.70 o at 25:00", bot.KindUsage)

	// In the team's zone: 18:30 in Chicago is 00:30 UTC the next day.
	te.must("team tz America/Chicago")
	te.now = time.Date(2026, 11, 26, 12, 0, 0, 0, time.UTC)
	te.must("log Mira 1.60 o yesterday at 18:30")
	as = logAttempts(t, te.DB, "Mira")
	if want := time.Date(2026, 11, 26, 0, 30, 0, 0, time.UTC); !as[len(as)-1].Time.Equal(want) {
		t.Errorf("Chicago time %v, want %v", as[len(as)-1].Time, want)
	}
}

// A CSV whose meet series breaks the rules is refused with its row
// numbers (TR 26.2: x x x, then o o at higher bars).
func TestImportRefusesInvalidMeetSeries(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	path := t.TempDir() + "/bad.csv"
	data := "athlete,time,bar_m,outcome,meet\n" +
		"Mira,2026-11-21T14:00:00Z,1.60,x,true\n" +
		"Mira,2026-11-21T14:01:00Z,1.60,x,true\n" +
		"Mira,2026-11-21T14:02:00Z,1.60,x,true\n" +
		"Mira,2026-11-21T14:03:00Z,1.65,o,true\n" +
		"Mira,2026-11-21T14:04:00Z,1.70,o,true\n" +
		"Mira,2026-11-21T16:00:00Z,1.80,o,false\n"
	writeFile(t, path, data)
	r := mustRefuse(t, te, "import csv "+path, bot.KindUsage)
	golden(t, "log-import-breach", strings.ReplaceAll(plain(r), path, "FILE"))
	contains(t, r, "row 5: a meet attempt that breaks the rules", "row 6:", "TR 26.2")
	if strings.Contains(plain(r), "row 7") {
		t.Errorf("a practice row was flagged:\n%s", plain(r))
	}
}

func writeFile(t *testing.T, path, data string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(data), 0o600); err != nil {
		t.Fatal(err)
	}
}

// A confirmed rule-breaking meet line survives export and import with its
// mark, and the import does not refuse it.
func TestRuleBreachRoundTripsThroughCSV(t *testing.T) {
	te1 := newTestEngine(t)
	logAddAthlete(t, te1.DB, logKai())
	te1.must("log Kai 2.00 xxx meet")
	te1.must("log Kai 2.04 o meet confirm")
	r := te1.must("export csv Kai")
	path := t.TempDir() + "/kai.csv"
	writeFile(t, path, string(r.Files[0].Data))
	te2 := newTestEngine(t)
	logAddAthlete(t, te2.DB, logKai())
	contains(t, te2.must("import csv "+path), "Imported 4 jumps for 1 athlete")
	as := logAttempts(t, te2.DB, "Kai")
	if len(as) != 4 || as[3].RuleBreach == "" || as[0].RuleBreach != "" {
		t.Errorf("imported %+v", as)
	}
	contains(t, te2.must("best Kai"), "no meet clearance logged in 2026")
}

// TR 26.4 across an inserted past line: a line logged for an earlier time
// of the same meet must not put a later line out of the rules.
func TestPastMeetLineKeepsLaterLinesValid(t *testing.T) {
	te := newTestEngine(t) // 10:00 UTC
	logAddAthlete(t, te.DB, logKai())
	te.must("log Kai 1.90 o meet at 09:00")
	contains(t, mustRefuse(t, te, "log Kai 1.95 o meet at 08:00", bot.KindConflict), "Placed before line #1", "the bar never goes down")
	te.must("log Kai 1.85 o meet at 08:00")
}

// A fix of an earlier meet line is checked against the later lines too.
func TestFixKeepsLaterLinesValid(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logKai())
	te.must("log Kai 1.90 o meet")
	te.must("log Kai 1.95 xxx meet")
	contains(t, mustRefuse(t, te, "fix #1 1.90 xxx", bot.KindConflict), "Placed before line #2", "already out")
	te.must("fix #1 1.90 xxo")
}

// Dropping a meet line that held a clearance between failures says which
// later line now breaks TR 26.2 (and that it no longer counts).
func TestDropSaysWhenALaterLineBreaks(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logKai())
	te.must("log Kai 1.90 xx meet")
	te.must("log Kai 1.90 o meet")
	te.must("log Kai 1.95 xx meet")
	contains(t, te.must("drop #2"), "Note: without it", "line #3", "no longer counts")
}

// An athlete trying line numbers learns nothing about other athletes'
// lines: another athlete's line, a removed line, an import and a number
// never used all get the same refusal, and nothing changes; their own line
// they may drop.
func TestLineNumbersTellAnAthleteNothing(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logAddAthlete(t, te.DB, logKai())
	kai := logProfile(t, te.DB, "Kai")
	logUser(t, te.DB, record.User{ID: "U_KAI", Name: "Kai", Role: record.RoleAthlete, AthleteID: kai.ID})
	te.must("log Mira 1.65 o") // #1, another athlete's
	te.must("log Mira 1.70 o") // #2, removed below
	te.must("drop #2")
	own := te.as("U_KAI", "log me 1.90 o") // #3, Kai's own
	if !own.OK() {
		t.Fatal(plain(own))
	}
	want := func(n string) string {
		return "line #" + n + " is not one of your lines, or was already removed: nothing was changed."
	}
	for _, probe := range []struct{ line, n string }{
		{"drop #1", "1"}, {"drop #2", "2"}, {"drop #99", "99"},
		{"fix #1 1.60 o", "1"}, {"fix #99 1.60 o", "99"}, {"undo line 1", "1"},
	} {
		sum := te.checksum()
		r := te.as("U_KAI", probe.line)
		if r.Kind != bot.KindForbidden {
			t.Errorf("%q as an athlete: kind %v\n%s", probe.line, r.Kind, plain(r))
		}
		if got := r.Lines[0]; !strings.HasPrefix(got, want(probe.n)) {
			t.Errorf("%q as an athlete: %q, want the one refusal %q", probe.line, got, want(probe.n))
		}
		if te.checksum() != sum {
			t.Errorf("%q was refused but changed the store", probe.line)
		}
	}
	contains(t, te.as("U_KAI", "drop #3"), "Dropped line #3")
}
