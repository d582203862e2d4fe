package bot_test

import (
	"context"
	"math"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// athleteByName reads a profile straight from the store.
func (te *testEngine) athleteByName(name string) (record.Athlete, bool) {
	te.t.Helper()
	var (
		a  record.Athlete
		ok bool
	)
	err := te.DB.View(context.Background(), func(tx *store.Tx) error {
		var err error
		a, ok, err = tx.AthleteByName(name)
		return err
	})
	if err != nil {
		te.t.Fatal(err)
	}
	return a, ok
}

func TestAthleteAddShow(t *testing.T) {
	te := newTestEngine(t)
	r := te.must("athlete add Mira height 1.78 mass 63 sex f pb 1.81")
	golden(t, "athlete-add", plain(r))
	golden(t, "athlete-show", plain(te.must("athlete mira")))
	a, ok := te.athleteByName("MIRA")
	if !ok || a.StatureM != 1.78 || a.MassKg != 63 || a.Sex != record.SexFemale || a.PersonalBestM != 1.81 {
		t.Fatalf("stored %+v, %v", a, ok)
	}
}

// Refusals change nothing: the store's checksum is the same before and after.
func TestAthleteRefusals(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78 mass 63 sex f pb 1.81")
	te.must("athlete add Kai height 1.86")
	tests := []struct {
		name, line string
		kind       bot.Kind
		want       string
	}{
		{"duplicate", "athlete add mira height 1.70", bot.KindConflict, "already an athlete called Mira"},
		{"height-range", "athlete add Zed height 9", bot.KindUsage, "outside 1.20–2.30 m"},
		{"mass-range", "athlete add Zed height 1.80 mass 300", bot.KindUsage, "outside 30–150 kg"},
		{"pb-range", "athlete add Zed height 1.80 pb 3.1", bot.KindUsage, "outside 0.50–2.60 m"},
		// World records from memory: men 2.45 m (1993), women 2.10 m (2024).
		{"pb-above-men-record", "athlete add Zed height 1.80 pb 2.50", bot.KindConflict, "above the world record 2.45 m"},
		{"pb-above-women-record", "athlete add Zoe height 1.80 sex f pb 2.11", bot.KindConflict, "above the world record 2.10 m"},
		{"set-pb-above-record", "athlete set Kai pb 2.47", bot.KindConflict, "add confirm"},
		{"no-height", "athlete add Zed mass 60", bot.KindUsage, "give the athlete's height"},
		{"typo", "athlete Mria", bot.KindNotFound, "Did you mean Mira?"},
		{"bad-sex", "athlete add Zed height 1.80 sex q", bot.KindUsage, `sex "q"`},
		{"unknown-word", "athlete add Zed height 1.80 wings 2", bot.KindUsage, `"wings"`},
		{"twice", "athlete add Zed height 1.80 height 1.81", bot.KindUsage, "given twice"},
		{"bad-name", "athlete add 9lives height 1.80", bot.KindUsage, "must start with a letter"},
		{"reserved-name", "athlete add me height 1.80", bot.KindUsage, "command word"},
		{"born-future", "athlete add Zed height 1.80 born 2031", bot.KindUsage, "birth year"},
		{"set-range", "athlete set Mira mass 12", bot.KindUsage, "outside 30–150 kg"},
		{"rename-taken", "athlete rename Kai mira", bot.KindConflict, "already an athlete called Mira"},
		{"remove-no-confirm-word", "athlete remove Mira please", bot.KindUsage, "must be confirm"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			before := te.checksum()
			r := te.run(tt.line)
			if r.Kind != tt.kind {
				t.Errorf("%q: kind %v, want %v:\n%s", tt.line, r.Kind, tt.kind, plain(r))
			}
			contains(t, r, tt.want)
			if r.Example == "" {
				t.Errorf("%q: refusal without an example", tt.line)
			}
			if te.checksum() != before {
				t.Errorf("%q changed the store", tt.line)
			}
		})
	}
	golden(t, "athlete-typo", plain(te.run("athlete Mria")))
}

// International foot and inch (NIST Handbook 44, Appendix C): 6 ft 1 in =
// 73 × 0.0254 m = 1.8542 m; shown back as 6-1 in imperial units.
func TestAthleteImperialRoundTrip(t *testing.T) {
	te := newTestEngine(t)
	te.must("team units imperial")
	r := te.must("athlete add Cole height 6-1")
	a, _ := te.athleteByName("Cole")
	if math.Abs(a.StatureM-1.8542) > 1e-9 {
		t.Errorf("stored stature %v m, want 1.8542", a.StatureM)
	}
	contains(t, r, "Height:  6-1")
	te.must("team units metric")
	contains(t, te.must("athlete Cole"), "1.85 m")
}

func TestAthleteSetRenameRemove(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78 mass 63 sex f pb 1.81")
	te.must("athlete set Mira pb 1.83 group seniors notes likes a long approach")
	a, _ := te.athleteByName("Mira")
	if a.PersonalBestM != 1.83 || a.Group != "seniors" || a.Notes != "likes a long approach" {
		t.Fatalf("after set: %+v", a)
	}
	te.must("athlete rename Mira Mira-L")
	if _, ok := te.athleteByName("Mira"); ok {
		t.Error("old name still found")
	}
	r := te.must("athlete remove Mira-L")
	if len(r.Actions) != 2 || r.Actions[0].Command != "athlete remove Mira-L confirm" {
		t.Errorf("remove without confirm should ask with buttons: %+v", r.Actions)
	}
	if _, ok := te.athleteByName("Mira-L"); !ok {
		t.Fatal("asking to confirm removed the athlete")
	}
	contains(t, te.must("athlete remove Mira-L confirm"), "Removed Mira-L")
	if _, ok := te.athleteByName("Mira-L"); ok {
		t.Error("athlete still there after confirmed removal")
	}
	contains(t, te.must("audit"), "athlete remove", "athlete rename", "athlete set")
}

func TestMinorCaution(t *testing.T) {
	te := newTestEngine(t) // test clock year 2026
	r := te.must("athlete add Ines height 1.69 born 2011")
	if !strings.Contains(r.Caution, "under 18") {
		t.Errorf("no minor caution: %q", r.Caution)
	}
	if r := te.must("athlete add Kai height 1.86 born 1999"); r.Caution != "" {
		t.Errorf("adult got a caution: %q", r.Caution)
	}
}

func TestLinkAndMe(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78")
	te.must("athlete link Mira <@U_MIRA>")
	r := te.as("U_MIRA", "athlete me")
	if !r.OK() || r.Title != "Mira" {
		t.Fatalf("athlete me as linked user:\n%s", plain(r))
	}
	te.must("athlete add Kai height 1.86")
	r = te.as("U_MIRA", "athlete Kai")
	if r.Kind != bot.KindForbidden {
		t.Errorf("athlete reading another's profile: %v", r.Kind)
	}
	te.must("athlete unlink Mira")
	if r := te.as("U_MIRA", "athlete me"); r.OK() {
		t.Error("unlinked user still resolves me")
	}
}

func TestTeamSettings(t *testing.T) {
	te := newTestEngine(t)
	te.must("team tz Europe/Madrid")
	te.must("team location lat 40.4 alt 650")
	te.must("team name Test Club")
	r := te.must("team")
	contains(t, r, "Europe/Madrid", "latitude 40.40", "Test Club")
	for _, bad := range []string{"team tz Mars/Olympus", "team units furlongs", "team location lat 95", "team backup relative/dir", "team backup /tmp keep 0"} {
		before := te.checksum()
		if r := te.run(bad); r.OK() || r.Example == "" {
			t.Errorf("%q accepted or no example:\n%s", bad, plain(r))
		}
		if te.checksum() != before {
			t.Errorf("%q changed the store", bad)
		}
	}
}

func TestUnknownCommand(t *testing.T) {
	te := newTestEngine(t)
	r := te.run("histroy Kai")
	if r.Kind != bot.KindUsage || !strings.Contains(plain(r), `Did you mean "history"?`) {
		t.Errorf("typo of a command:\n%s", plain(r))
	}
	golden(t, "help", plain(te.run("help")))
	golden(t, "help-safety", plain(te.run("help safety")))
	if r := te.run("help nonsense"); r.OK() {
		t.Error("help of an unknown topic answered OK")
	}
}

func TestDuplicateMessageLogsOnce(t *testing.T) {
	te := newTestEngine(t)
	req := bot.Request{UserID: "U_HEAD", Text: "athlete add Mira height 1.78", Time: testClockStart, MessageID: "ev:C1:1700000000.000100"}
	first := te.E.Handle(context.Background(), req)
	second := te.E.Handle(context.Background(), req)
	if !first.OK() || second.Title != "Already done" {
		t.Fatalf("first %q, second %q", first.Title, second.Title)
	}
}

// TestLinkWordOrderAndReplace: the chat user may come first, and moving a
// chat user to another athlete says which link went.
func TestLinkWordOrderAndReplace(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Lu height 1.70")
	te.must("athlete add Ren height 1.80")
	r := te.must("athlete link <@U_LU> Lu")
	if r.Title != "Linked Lu" {
		t.Errorf("mention first: %s", plain(r))
	}
	if r := te.must("athlete link me Ren"); r.Title != "Linked Ren" {
		t.Errorf("me first: %s", plain(r))
	}
	if strings.Contains(plain(r), "until now") {
		t.Errorf("a first link claims to replace one:\n%s", plain(r))
	}
	r = te.must("athlete link Ren <@U_LU>")
	contains(t, r, "was linked to Lu until now", "athlete link Lu <@U_LU>")
	if got := te.as("U_LU", "athlete me"); got.Title != "Ren" {
		t.Errorf("me after the move is %q", got.Title)
	}
}

// TestTeamZoneAndAltitudeAsTyped: zone names in any case, a city alone
// gets a suggestion (never applied silently), and the venue altitude may be
// typed in feet (1 ft = 0.3048 m exactly, NIST Handbook 44, Appendix C).
func TestTeamZoneAndAltitudeAsTyped(t *testing.T) {
	if _, err := time.LoadLocation("Europe/Madrid"); err != nil {
		t.Skip("no time zone data:", err)
	}
	te := newTestEngine(t)
	for _, tt := range []struct{ line, want string }{
		{"team tz europe/madrid", "Europe/Madrid"},
		{"team tz AMERICA/NEW_YORK", "America/New_York"},
		{"team tz utc", "UTC"},
		{"team tz cet", "CET"},
	} {
		contains(t, te.must(tt.line), "Time zone:  "+tt.want)
	}
	before := te.checksum()
	r := te.run("team tz Madrid")
	if r.OK() || r.Example != "team tz Europe/Madrid" {
		t.Errorf("city alone: %s", plain(r))
	}
	contains(t, r, "did you mean Europe/Madrid?")
	if te.checksum() != before {
		t.Error("a refused zone changed the store")
	}

	// 2133 ft = 650.1 m.
	contains(t, te.must("team location lat 40.4 alt 2133ft"), "altitude 650 m")
	te.must("team units imperial")
	contains(t, te.must("team location lat 40.4 alt 650"), "altitude 2133 ft = 650 m")
	for _, bad := range []string{"team location lat 40.4 alt high", "team location lat 40.4 alt 20000ft"} {
		if r := te.run(bad); r.Kind != bot.KindUsage || r.Example == "" {
			t.Errorf("%q: %s", bad, plain(r))
		}
	}
}

// A personal best above the world record (from memory: men 2.45 m, women
// 2.10 m) is stored only with confirm; one at the record is not questioned.
func TestAthletePBWorldRecordConfirm(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Una height 1.70 sex f pb 2.10")
	te.must("athlete add Zed height 1.80 pb 2.50 confirm")
	for name, want := range map[string]float64{"Una": 2.10, "Zed": 2.50} {
		if a, ok := te.athleteByName(name); !ok || a.PersonalBestM != want {
			t.Errorf("%s stored %+v, %v; want pb %.2f", name, a, ok, want)
		}
	}
}
