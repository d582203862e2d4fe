package bot_test

import (
	"bytes"
	"context"
	"math"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/console"
	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// Demo athletes of the invented Harbour Lane Athletics Club.
func logMira() record.Athlete {
	return record.Athlete{Name: "Mira", StatureM: 1.78, MassKg: 63, Sex: record.SexFemale, PersonalBestM: 1.81}
}

func logKai() record.Athlete {
	return record.Athlete{Name: "Kai", StatureM: 1.86, MassKg: 74, Sex: record.SexMale, TakeoffLeg: record.LegLeft, PersonalBestM: 2.01}
}

// logAddAthlete stores a profile directly and returns it with its id.
func logAddAthlete(t testing.TB, db *store.DB, a record.Athlete) record.Athlete {
	t.Helper()
	if err := db.Update(context.Background(), func(tx *store.Tx) error { return tx.PutAthlete(&a) }); err != nil {
		t.Fatal(err)
	}
	return a
}

// logUser stores a chat user with a role and an optional linked athlete.
func logUser(t testing.TB, db *store.DB, u record.User) {
	t.Helper()
	if err := db.Update(context.Background(), func(tx *store.Tx) error { return tx.PutUser(u) }); err != nil {
		t.Fatal(err)
	}
}

func logSetTeam(t testing.TB, db *store.DB, team record.Team) {
	t.Helper()
	if err := db.Update(context.Background(), func(tx *store.Tx) error { return tx.PutTeam(team) }); err != nil {
		t.Fatal(err)
	}
}

// logAttempts reads every stored attempt of an athlete.
func logAttempts(t testing.TB, db *store.DB, name string) []record.Attempt {
	t.Helper()
	var out []record.Attempt
	err := db.View(context.Background(), func(tx *store.Tx) error {
		a, ok, err := tx.AthleteByName(name)
		if err != nil || !ok {
			return err
		}
		return tx.Attempts(a.ID, time.Unix(0, 0), time.Date(2200, 1, 1, 0, 0, 0, 0, time.UTC), func(x record.Attempt) error {
			out = append(out, x)
			return nil
		})
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func logProfile(t testing.TB, db *store.DB, name string) record.Athlete {
	t.Helper()
	var a record.Athlete
	err := db.View(context.Background(), func(tx *store.Tx) error {
		var err error
		a, _, err = tx.AthleteByName(name)
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return a
}

func notation(as []record.Attempt) string {
	var b strings.Builder
	for _, a := range as {
		b.WriteString(a.Outcome.String())
	}
	return b.String()
}

func TestLogHistoryUndo(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())

	r := te.must("log Mira 1.70 o 1.75 xo 1.78 xxx")
	golden(t, "log-line", plain(r))
	if len(r.Actions) != 1 || r.Actions[0].Label != "Undo" || r.Actions[0].Command != "drop #1" {
		t.Errorf("log reply actions = %+v, want one Undo button carrying the line: drop #1", r.Actions)
	}
	as := logAttempts(t, te.DB, "Mira")
	if notation(as) != "oxoxxx" {
		t.Fatalf("stored %q, want oxoxxx", notation(as))
	}
	wantBars := []float64{1.70, 1.75, 1.75, 1.78, 1.78, 1.78}
	wantN := []int{1, 1, 2, 1, 2, 3}
	for i, a := range as {
		if a.BarM != wantBars[i] || a.Number != wantN[i] || a.Meet || a.LoggedBy != "U_HEAD" || a.MessageID != "m1" || !a.Time.Equal(te.now) {
			t.Errorf("attempt %d = %+v", i, a)
		}
	}

	h := te.must("history Mira")
	golden(t, "log-history", plain(h))
	if h.Table == nil || len(h.Table.Rows) != 1 || h.Table.Rows[0][2] != "#1 1.70 o, 1.75 xo, 1.78 xxx" || h.Table.Rows[0][3] != "1.75" {
		t.Errorf("history table = %+v", h.Table)
	}

	u := te.must("undo")
	golden(t, "log-undo", plain(u))
	contains(t, u, "Removed Mira's line #1", "1.70 o, 1.75 xo, 1.78 xxx (6 jumps, practice)", "log Mira 1.70 o 1.75 xo 1.78 xxx")
	if n := len(logAttempts(t, te.DB, "Mira")); n != 0 {
		t.Errorf("%d attempts left after undo", n)
	}
	golden(t, "log-history-empty", plain(te.must("history Mira")))
	golden(t, "log-err-undo-nothing", plain(te.run("undo")))
}

// Undo takes back only the speaker's own last line.
func TestUndoRemovesOnlyTheLastLineOfTheSpeaker(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logUser(t, te.DB, record.User{ID: "U_COACH", Name: "Ana", Role: record.RoleCoach})
	te.must("log Mira 1.65 o")
	te.must("log Mira 1.70 xo")
	if r := te.as("U_COACH", "log Mira 1.60 o"); !r.OK() {
		t.Fatal(plain(r))
	}
	u := te.must("undo")
	contains(t, u, "1.70 xo (2 jumps, practice)")
	if got := notation(logAttempts(t, te.DB, "Mira")); got != "oo" {
		t.Errorf("left %q, want the 1.65 o and the coach's 1.60 o", got)
	}
	if r := te.must("history Mira"); r.Table.Rows[0][2] != "#1 1.65 o; #3 1.60 o" {
		t.Errorf("history after undo: %q", r.Table.Rows[0][2])
	}
}

// The terminal front end, piped: log, history, undo; a restart keeps what
// was logged.
func TestLogTerminalRestart(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "lathmark.db")
	at := testClockStart
	step := func() time.Time { at = at.Add(time.Second); return at }
	session := func(input string) string {
		db, err := store.Open(path, store.Options{})
		if err != nil {
			t.Fatal(err)
		}
		defer db.Close()
		if logProfile(t, db, "Mira").ID == 0 {
			logAddAthlete(t, db, logMira())
		}
		e, err := bot.New(bot.Config{Store: botstore.New(db), Clock: bot.ClockFunc(step), HeadCoaches: []string{"U_HEAD"}})
		if err != nil {
			t.Fatal(err)
		}
		var out bytes.Buffer
		term := &console.Terminal{Handler: e, In: strings.NewReader(input), Out: &out, UserID: "U_HEAD", UserName: "Head", FilesDir: dir, Now: step}
		if err := term.Run(context.Background()); err != nil {
			t.Fatal(err)
		}
		if err := db.Check(); err != nil {
			t.Error(err)
		}
		return out.String()
	}
	out := session("log Mira 1.70 o 1.75 xo 1.78 xxx\nhistory Mira\nundo\nhistory Mira\nlog Mira 1.70 o 1.75 xo 1.78 xxx\n")
	parts := strings.Split(out, "History of Mira")
	if len(parts) != 3 {
		t.Fatalf("want two history replies:\n%s", out)
	}
	first, _, _ := strings.Cut(parts[1], "Undone")
	if !strings.Contains(first, "1.70 o, 1.75 xo, 1.78 xxx  1.75") || strings.Count(first, "2026-11-25  practice") != 1 {
		t.Errorf("first history lacks the one session with best 1.75:\n%s", parts[1])
	}
	if !strings.Contains(parts[1], "Removed Mira's line") || !strings.Contains(parts[2], "No jumps logged") {
		t.Errorf("undo did not remove exactly that line:\n%s", out)
	}
	out = session("history Mira\n")
	if !strings.Contains(out, "1.70 o, 1.75 xo, 1.78 xxx  1.75") {
		t.Errorf("after a restart the history lacks the logged line:\n%s", out)
	}
}

func TestLogMeetPersonalBestAndUndo(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logKai())
	r := te.must("log Kai 1.95 o 2.00 xo 2.04 o meet")
	golden(t, "log-meet-pb", plain(r))
	contains(t, r, "New personal best: 2.04 m (was 2.01 m)")
	if pb := logProfile(t, te.DB, "Kai").PersonalBestM; pb != 2.04 {
		t.Errorf("profile PB = %v after a meet PB, want 2.04", pb)
	}
	var audited []string
	err := te.DB.View(context.Background(), func(tx *store.Tx) error {
		return tx.AuditEntries(time.Unix(0, 0), func(e record.AuditEntry) error {
			audited = append(audited, e.Action)
			return nil
		})
	})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(audited, ","), "log personal best") {
		t.Errorf("the PB change is not audited: %v", audited)
	}
	u := te.must("undo")
	golden(t, "log-undo-pb", plain(u))
	contains(t, u, "Personal best back to 2.01 m")
	if pb := logProfile(t, te.DB, "Kai").PersonalBestM; pb != 2.01 {
		t.Errorf("profile PB = %v after undo, want 2.01", pb)
	}
}

func TestLogSeasonAndPracticeBests(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logKai())
	// Last year's 2.00 does not count for this season.
	te.now = time.Date(2025, 7, 1, 18, 0, 0, 0, time.UTC)
	te.must("log Kai 2.00 o meet")
	te.now = time.Date(2026, 3, 14, 18, 0, 0, 0, time.UTC)
	contains(t, te.must("log Kai 1.90 o 1.95 o meet"), "Season best: 1.95 m, the first meet clearance of 2026.")
	te.now = time.Date(2026, 6, 1, 18, 0, 0, 0, time.UTC)
	r := te.must("log Kai 1.98 xo meet")
	golden(t, "log-season-best", plain(r))
	contains(t, r, "Season best: 1.98 m (previous 1.95 m on 2026-03-14).")
	te.now = time.Date(2026, 6, 2, 18, 0, 0, 0, time.UTC)
	if r := te.must("log Kai 1.93 o meet"); strings.Contains(plain(r), "best") && strings.Contains(plain(r), "Season") {
		t.Errorf("1.93 is not a season best:\n%s", plain(r))
	}
	te.now = time.Date(2026, 11, 25, 10, 0, 0, 0, time.UTC)
	p := te.must("log Kai 2.00 o 2.03 xo")
	golden(t, "log-practice-best", plain(p))
	contains(t, p, "Practice best: 2.03 m is above the personal best 2.01 m")
	if pb := logProfile(t, te.DB, "Kai").PersonalBestM; pb != 2.01 {
		t.Errorf("a practice height changed the profile PB to %v", pb)
	}
	b := te.must("best Kai")
	golden(t, "log-best", plain(b))
	contains(t, b, "Season best 2026", "1.98 m (meet, 2026-06-01)", "2.03 m (practice, 2026-11-25)")
}

func TestLogMeetSeriesAndNumbers(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logKai())
	te.must("log Kai 2.00 x meet")
	r := te.must("log Kai 2.00 o meet")
	contains(t, r, "The meet so far: 2.00 xo.")
	r = te.must("log Kai 2.04 xxx meet")
	contains(t, r, "Out: Kai's competition is over after three consecutive failures (TR 26.2).")
	// TR 26.2: a line after three consecutive failures is refused with the
	// rule, stores nothing, and is stored marked after confirm.
	sum := te.checksum()
	w := mustRefuse(t, te, "log Kai 2.06 o meet", bot.KindConflict)
	golden(t, "log-meet-refused", plain(w))
	contains(t, w, "Kai was already out: three consecutive failures (2.04, 2.04, 2.04)")
	contains(t, w, "TR 26.2")
	if te.checksum() != sum {
		t.Error("a refused meet line changed the store")
	}
	w = te.must("log Kai 2.06 o meet confirm")
	golden(t, "log-meet-confirm", plain(w))
	contains(t, w, "Stored as breaking the rules")
	if as := logAttempts(t, te.DB, "Kai"); as[len(as)-1].RuleBreach == "" {
		t.Error("the confirmed line is not marked as breaking the rules")
	}
	var got []int
	for _, a := range logAttempts(t, te.DB, "Kai") {
		got = append(got, a.Number)
	}
	if want := []int{1, 2, 1, 2, 3, 1}; !equalIntSlices(got, want) {
		t.Errorf("attempt numbers %v, want %v", got, want)
	}
}

func equalIntSlices(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// arcDrop is the c.m. of a uniform arc below its apex: with R = L/θ the
// centroid lies R·sin(θ/2)/(θ/2) from the centre (Beer and Johnston, Vector
// Mechanics for Engineers: Statics, centroids of common shapes), so
// s = R − R·sin(θ/2)/(θ/2).
func arcDrop(lengthM, thetaRad float64) float64 {
	r := lengthM / thetaRad
	return r - r*math.Sin(thetaRad/2)/(thetaRad/2)
}

func TestLogMeasurementsAndModelMargin(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logAddAthlete(t, te.DB, record.Athlete{Name: "Noor", PersonalBestM: 1.60})
	r := te.must("log Mira 1.70 o 1.75 xo peak 1.86 by 3cm approach 6.8 takeoff 1.1")
	golden(t, "log-measured", plain(r))
	contains(t, r, "Measurements go with the jump written just before them: 1.75 attempt 2.")
	as := logAttempts(t, te.DB, "Mira")
	last := as[len(as)-1]
	if last.PeakM != 1.86 || !last.HasCoachMargin || math.Abs(last.CoachMarginM-0.03) > 1e-12 || last.ApproachMS != 6.8 || last.TakeoffDistM != 1.1 {
		t.Errorf("measurements not on the last jump: %+v", last)
	}
	for _, a := range as[:len(as)-1] {
		if a.PeakM != 0 || a.HasCoachMargin || a.HasModelMargin {
			t.Errorf("measurement on an earlier jump: %+v", a)
		}
	}
	// margin = peak − (bar + d − s): the design's margin, with s from the arc
	// centroid above (90° arch, length = stature) and d the library's default
	// underside depth.
	d, err := mechanics.DefaultUndersideDepth(1.78)
	if err != nil {
		t.Fatal(err)
	}
	want := 1.86 - (1.75 + d - arcDrop(1.78, math.Pi/2))
	if !last.HasModelMargin || math.Abs(last.ModelMarginM-want) > 1e-9 {
		t.Errorf("model margin %v (has %v), want %v", last.ModelMarginM, last.HasModelMargin, want)
	}

	// From vz alone: peak = h0 + vz²/(2g) with h0 = 0.70 × stature (flight of
	// the c.m. as a projectile; standard gravity 9.80665 m/s², exact by
	// definition, CGPM 1901).
	te.must("log Mira 1.72 o vz 4.0")
	as = logAttempts(t, te.DB, "Mira")
	v := as[len(as)-1]
	peak := 0.70*1.78 + 4.0*4.0/(2*9.80665)
	want = peak - (1.72 + d - arcDrop(1.78, math.Pi/2))
	if !v.HasModelMargin || math.Abs(v.ModelMarginM-want) > 1e-9 {
		t.Errorf("model margin from vz %v, want %v", v.ModelMarginM, want)
	}

	n := te.must("log Noor 1.50 o peak 1.55")
	contains(t, n, "No model margin: Noor's profile has no height")
	if a := logAttempts(t, te.DB, "Noor")[0]; a.HasModelMargin || a.PeakM != 1.55 {
		t.Errorf("Noor's attempt %+v", a)
	}
}

func TestLogRefusalsChangeNothing(t *testing.T) {
	te := newTestEngine(t)
	mira := logAddAthlete(t, te.DB, logMira())
	kai := logAddAthlete(t, te.DB, logKai())
	_ = mira
	logUser(t, te.DB, record.User{ID: "U_KAI", Name: "Kai", Role: record.RoleAthlete, AthleteID: kai.ID})
	logUser(t, te.DB, record.User{ID: "U_COACH", Name: "Ana", Role: record.RoleCoach})
	te.must("log Mira 1.60 o")
	tests := []struct {
		name, user, line string
		kind             bot.Kind
	}{
		{"unknown-athlete", "U_HEAD", "log Mria 1.70 o", bot.KindNotFound},
		{"bar-high", "U_HEAD", "log Mira 3.20 o", bot.KindUsage},
		{"bar-low", "U_HEAD", "log Mira 0.2 o", bot.KindUsage},
		{"notation-ox", "U_HEAD", "log Mira 1.80 ox", bot.KindUsage},
		{"notation-xxxx", "U_HEAD", "log Mira 1.80 xxxx", bot.KindUsage},
		{"meet-lower", "U_HEAD", "log Mira 1.80 o 1.75 o meet", bot.KindUsage},
		{"no-attempts", "U_HEAD", "log Mira 1.80", bot.KindUsage},
		{"measure-range", "U_HEAD", "log Mira 1.80 o vz 9", bot.KindUsage},
		{"measure-first", "U_HEAD", "log Mira peak 1.90 1.80 o", bot.KindUsage},
		{"unknown-word", "U_HEAD", "log Mira 1.80 claer", bot.KindUsage},
		{"forbidden", "U_KAI", "log Mira 1.70 o", bot.KindForbidden},
		{"me-unlinked", "U_HEAD", "log me 1.70 o", bot.KindNotFound},
		{"nobody", "U_STRANGER", "log Mira 1.70 o", bot.KindForbidden},
		{"history-weeks", "U_HEAD", "history Mira 200w", bot.KindUsage},
		{"history-forbidden", "U_KAI", "history Mira", bot.KindForbidden},
		{"export-forbidden", "U_KAI", "export csv", bot.KindForbidden},
		{"export-since", "U_HEAD", "export csv since yesterday", bot.KindUsage},
		{"import-missing", "U_HEAD", "import csv /nonexistent/attempts.csv", bot.KindNotFound},
		{"import-coach", "U_COACH", "import csv /nonexistent/attempts.csv", bot.KindForbidden},
		{"undo-words", "U_HEAD", "undo Mira", bot.KindUsage},
	}
	before := te.checksum()
	for _, tt := range tests {
		r := te.as(tt.user, tt.line)
		if r.Kind != tt.kind {
			t.Errorf("%s: %q gave kind %v, want %v:\n%s", tt.name, tt.line, r.Kind, tt.kind, plain(r))
		}
		golden(t, "log-err-"+tt.name, plain(r))
	}
	if te.checksum() != before {
		t.Error("a refused command changed the store")
	}
	if r := te.as("U_KAI", "log me 1.90 o"); !r.OK() {
		t.Errorf("an athlete may log for themself: %s", plain(r))
	}
	if r := te.as("U_KAI", "history me"); !r.OK() || r.Table == nil {
		t.Errorf("an athlete may read their own history: %s", plain(r))
	}
}

func TestLogSameMessageTwiceLogsOnce(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	req := bot.Request{UserID: "U_HEAD", Text: "log Mira 1.70 o 1.75 xo", Time: te.now, MessageID: "slack-1700000000.000100"}
	if r := te.E.Handle(context.Background(), req); !r.OK() {
		t.Fatal(plain(r))
	}
	r := te.E.Handle(context.Background(), req)
	if r.Title != "Already done" {
		t.Errorf("re-delivery: %s", plain(r))
	}
	if n := len(logAttempts(t, te.DB, "Mira")); n != 3 {
		t.Errorf("%d attempts after a re-delivered message, want 3", n)
	}
}

func TestUndoOnlyWithin24Hours(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	te.must("log Mira 1.70 o")
	te.advance(25 * time.Hour)
	before := te.checksum()
	r := te.run("undo")
	golden(t, "log-err-undo-old", plain(r))
	if r.Kind != bot.KindConflict || te.checksum() != before {
		t.Errorf("undo of a day-old line: kind %v, changed %v", r.Kind, te.checksum() != before)
	}
}

func TestHistoryWindowsAndTimeZone(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	start := te.now
	for _, days := range []int{40, 10, 0} {
		te.now = start.AddDate(0, 0, -days)
		te.must("log Mira 1.70 o 1.74 xxo")
	}
	te.now = start.Add(time.Minute)
	if r := te.must("history Mira"); len(r.Table.Rows) != 2 {
		t.Errorf("4 weeks: %d sessions, want 2", len(r.Table.Rows))
	}
	for _, line := range []string{"history Mira 6w", "history Mira 6 weeks", "history Mira 6"} {
		if r := te.must(line); len(r.Table.Rows) != 3 {
			t.Errorf("%q: %d sessions, want 3", line, len(r.Table.Rows))
		}
	}
	for _, line := range []string{"history Mira 0w", "history Mira 105w", "history Mira 6d"} {
		if r := te.run(line); r.Kind != bot.KindUsage {
			t.Errorf("%q accepted: %s", line, plain(r))
		}
	}

	// Sessions are local days: with the team in Chicago (UTC−6 in
	// November), 03:00 UTC on the 26th is the evening of the 25th.
	if _, err := time.LoadLocation("America/Chicago"); err != nil {
		t.Skip("no time zone data:", err)
	}
	logSetTeam(t, te.DB, record.Team{TZ: "America/Chicago"})
	logAddAthlete(t, te.DB, record.Athlete{Name: "Ines", StatureM: 1.70})
	te.now = time.Date(2026, 11, 26, 3, 0, 0, 0, time.UTC)
	te.must("log Ines 1.50 o")
	te.now = time.Date(2026, 11, 26, 15, 0, 0, 0, time.UTC)
	te.must("log Ines 1.55 o")
	r := te.must("history Ines")
	golden(t, "log-history-tz", plain(r))
	if len(r.Table.Rows) != 2 || !strings.HasSuffix(r.Table.Rows[0][0], "2026-11-25") {
		t.Errorf("Chicago sessions: %+v", r.Table.Rows)
	}
}

func TestLogImperialTeam(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logSetTeam(t, te.DB, record.Team{Units: record.Imperial})
	// 5-7 = 67 in = 1.7018 m, 5-9 = 69 in = 1.7526 m (NIST Handbook 44,
	// Appendix C: 1 in = 0.0254 m exactly).
	r := te.must("log Mira 5-7 o 5-9 xo by 1in")
	golden(t, "log-line-imperial", plain(r))
	as := logAttempts(t, te.DB, "Mira")
	if math.Abs(as[0].BarM-1.7018) > 1e-9 || math.Abs(as[2].BarM-1.7526) > 1e-9 || math.Abs(as[2].CoachMarginM-0.0254) > 1e-12 {
		t.Errorf("imperial bars stored as %v, %v; margin %v", as[0].BarM, as[2].BarM, as[2].CoachMarginM)
	}
	h := te.must("history Mira")
	if h.Table.Rows[0][2] != "#1 5-7 o, 5-9 xo" {
		t.Errorf("imperial history %q", h.Table.Rows[0][2])
	}
}

func TestHelpLogDescribesMeasurements(t *testing.T) {
	te := newTestEngine(t)
	r := te.must("help log")
	golden(t, "log-help", plain(r))
	contains(t, r, "go with the jump written just before them", "history", "export csv", "import csv", "undo")
}

// TestCoachMarginAgainstOutcome: a positive coach's margin on a miss, or a
// negative one on a clearance, is kept as typed but the reply says how it
// was read and what to type instead; agreeing signs get no note. (A bar can
// come down after the c.m. passed high enough, knocked by a heel or an arm,
// and a touched bar can stay up: common practice.)
func TestCoachMarginAgainstOutcome(t *testing.T) {
	tests := []struct {
		line    string
		imp     bool
		note    bool
		wants   []string
		marginM float64
	}{
		{"log Mira 1.70 x by 2cm", false, true, []string{"1.70 attempt 1 is a miss (x)", "+2.0 cm is positive", "heel or arm", "by -2cm"}, 0.02},
		{"log Mira 1.70 xo by -1.5cm", false, true, []string{"1.70 attempt 2 is a clearance (o)", "−1.5 cm is negative", "by 1.5cm"}, -0.015},
		{"log Mira 5-7 x by 1in", true, true, []string{"5-7 attempt 1 is a miss (x)", "+1.0 in is positive", "by -1in"}, 0.0254},
		{"log Mira 1.70 o by 3cm", false, false, nil, 0.03},
		{"log Mira 1.70 x by -2cm", false, false, nil, -0.02},
	}
	for _, tt := range tests {
		t.Run(tt.line, func(t *testing.T) {
			te := newTestEngine(t)
			logAddAthlete(t, te.DB, logMira())
			if tt.imp {
				logSetTeam(t, te.DB, record.Team{Units: record.Imperial})
			}
			r := te.must(tt.line)
			p := plain(r)
			if got := strings.Contains(p, "Note: "); got != tt.note {
				t.Fatalf("note shown %v, want %v:\n%s", got, tt.note, p)
			}
			contains(t, r, tt.wants...)
			as := logAttempts(t, te.DB, "Mira")
			if last := as[len(as)-1]; !last.HasCoachMargin || math.Abs(last.CoachMarginM-tt.marginM) > 1e-12 {
				t.Errorf("stored margin %v, want %v as typed", last.CoachMarginM, tt.marginM)
			}
			if tt.imp && strings.Contains(p, " cm") {
				t.Errorf("imperial reply shows centimetres:\n%s", p)
			}
		})
	}
	// The suggested correction is itself a working log line.
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	te.must("log Mira 1.70 x by 2cm")
	te.must("undo")
	if r := te.must("log Mira 1.70 x by -2cm"); strings.Contains(plain(r), "Note: ") {
		t.Errorf("the suggested line still gets the note:\n%s", plain(r))
	}
}

// TestLogZeroForO: a zero typed for the letter o is refused with the
// notation spelled right, and nothing is stored.
func TestLogZeroForO(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	for _, tt := range []struct{ line, want string }{
		{"log Mira 1.70 0", "write o"},
		{"log Mira 1.70 x0", "write xo"},
		{"log Mira 1.70 xx0", "write xxo"},
	} {
		before := te.checksum()
		r := te.run(tt.line)
		if r.Kind != bot.KindUsage {
			t.Errorf("%q: kind %v:\n%s", tt.line, r.Kind, plain(r))
		}
		contains(t, r, "zero (0)", tt.want)
		if te.checksum() != before {
			t.Errorf("%q changed the store", tt.line)
		}
	}
}

// TestHistoryWordOrder: the window may stand before or after the name;
// extra words and date windows are refused with the form to use.
func TestHistoryWordOrder(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logAddAthlete(t, te.DB, logKai())
	te.must("log Mira 1.70 o")
	for _, line := range []string{"history 6w Mira", "history 6 weeks Mira", "history Mira 6w", "History MIRA 6W"} {
		r := te.must(line)
		if r.Title != "History of Mira: last 6 weeks" {
			t.Errorf("%q: title %q", line, r.Title)
		}
	}
	for _, tt := range []struct{ line, want string }{
		{"history Mira since 2026-13-01", "not a date"},
		{"history Mira Kai", `"Kai"`},
		{"history Mira 30d", "in weeks"},
	} {
		r := te.run(tt.line)
		if r.Kind != bot.KindUsage {
			t.Errorf("%q: kind %v:\n%s", tt.line, r.Kind, plain(r))
		}
		contains(t, r, tt.want)
	}
}

// TestLogModelAssumptionsInTeamUnits: the model margin's defaults are
// stated in the team's units (h0 = 0.70 × stature: 0.70 × 1.78 m = 1.246 m
// = 49.1 in, shown 4-1; NIST Handbook 44, Appendix C for 1 in = 0.0254 m).
func TestLogModelAssumptionsInTeamUnits(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	r := te.must("log Mira 1.70 o vz 4.0 more")
	contains(t, r, "take-off c.m. height assumed 1.25 m = 0.70 × stature", "assumed 11.1 cm = half a typical trunk depth")
	logSetTeam(t, te.DB, record.Team{Units: record.Imperial})
	r = te.must("log Mira 5-7 o vz 4.0 more")
	contains(t, r, "take-off c.m. height assumed 4-1 = 0.70 × stature", "stature 5-10", "in = half a typical trunk depth")
	p := plain(r)
	for _, metric := range []string{" m ", " m;", " m,", " cm"} {
		if strings.Contains(strings.ReplaceAll(p, "m/s", ""), metric) {
			t.Errorf("imperial log reply shows metric %q:\n%s", metric, p)
		}
	}
}

// TestLogKnockAndShort: the body part the coach saw bring the bar down and a
// short approach are stored with the attempts and shown by history.
func TestLogKnockAndShort(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78 mass 63 sex f pb 1.81")
	te.must("log Mira 1.70 o 1.75 x knock calves o short")
	as := logAttempts(t, te.DB, "Mira")
	if notation(as) != "oxo" {
		t.Fatalf("stored %q, want oxo", notation(as))
	}
	for i, a := range as {
		if wantKnock := map[int]string{1: "calves"}[i]; a.Knock != wantKnock || !a.Short {
			t.Errorf("attempt %d: knock %q short %v, want knock %q, short", i, a.Knock, a.Short, wantKnock)
		}
	}
	h := te.must("history Mira")
	if h.Table == nil || len(h.Table.Rows) != 1 || h.Table.Rows[0][1] != "practice, short" {
		t.Errorf("history table = %+v", h.Table)
	}
	if len(h.Notes) != 1 || !strings.Contains(h.Notes[0], "1.75 calves") {
		t.Errorf("history notes = %q, want the knock at 1.75", h.Notes)
	}
}

// TestLogImperialQuarterInches: a bar typed 5-4.5 is 64.5 in = 1.6383 m
// (NIST SP 811: 1 in = 0.0254 m exactly) and history writes it in the
// trade's style, 5-4½.
func TestLogImperialQuarterInches(t *testing.T) {
	te := newTestEngine(t)
	te.must("team units imperial")
	te.must("athlete add Lea height 5-6 pb 5-5")
	te.must("log Lea 5-4.5 o")
	as := logAttempts(t, te.DB, "Lea")
	if len(as) != 1 || math.Abs(as[0].BarM-64.5*0.0254) > 1e-9 {
		t.Fatalf("stored %+v, want one attempt at 1.6383 m", as)
	}
	h := te.must("history Lea")
	if h.Table == nil || len(h.Table.Rows) != 1 || h.Table.Rows[0][2] != "#1 5-4½ o" {
		t.Errorf("history table = %+v, want 5-4½ o", h.Table)
	}
}
