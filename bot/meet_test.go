package bot_test

import (
	"context"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
)

// workedExampleLines enter the four-competitor example of World Athletics
// Technical Rule 26.8 (placed by hand in internal/standings; rule numbers
// from memory) round by round, as the officials call it. The README shows
// the same lines.
var workedExampleLines = []string{
	"meet open Harbour Open 2026-11-25 steps 1.70 1.75 1.78",
	"meet add Ada Bea Cleo Dora guest",
	"meet log Ada 1.70 o", "meet log Bea 1.70 o", "meet log Cleo 1.70 xo", "meet log Dora 1.70 xo",
	"meet log Ada 1.75 xo", "meet log Bea 1.75 o", "meet log Cleo 1.75 xo", "meet log Dora 1.75 xo",
	"meet log Ada 1.78 xxx", "meet log Bea 1.78 xxx", "meet log Cleo 1.78 xxx", "meet log Dora 1.78 xx-",
}

// TestMeetWorkedExample: the standings name each tie's rule beside it.
// Checked against the hand placing from the rule text: TR 26.8.1 (fewest
// jumps at the height of the tie) puts Bea first, TR 26.8.2 (fewest
// failures up to and including the last height cleared) puts Ada second,
// and Cleo and Dora share third (TR 26.8.3). Dora passed at 1.78 with two
// failures: one attempt left at the next height, which she chooses alone
// (TR 26.2, TR 26.4 (a)).
func TestMeetWorkedExample(t *testing.T) {
	te := newTestEngine(t)
	for _, l := range workedExampleLines {
		te.must(l)
	}
	r := te.must("standings")
	golden(t, "meet-standings-worked", plain(r))
	p := plain(r)
	for _, want := range []string{
		"Bea leads at 1.75",
		"1      Bea", "2      Ada", "3=     Cleo", "3=     Dora",
		"Bea ahead of Ada at 1.75: fewest jumps at the height of the tie (TR 26.8.1)",
		"Ada ahead of Cleo at 1.75: fewest failures up to and including the last height cleared (TR 26.8.2)",
		"Cleo and Dora share 3rd at 1.75: still tied: equal place (TR 26.8.3)",
		"to jump Dora 1 (attempts left)",
	} {
		if !strings.Contains(p, want) {
			t.Errorf("standings lack %q:\n%s", want, p)
		}
	}
	if strings.Contains(p, "4  ") {
		t.Errorf("nobody is fourth after a shared third (TR 26.8.3):\n%s", p)
	}
	golden(t, "meet-log-out", plain(te.must("meet log Dora 1.79 x")))
	contains(t, te.must("standings"), "Bea wins at 1.75", "competition is over")
}

// TestMeetRefusesRuleBreaks: an entry that breaks a rule of the series is
// refused with the rule (series engine; TR numbers from memory) and the
// store is unchanged.
func TestMeetRefusesRuleBreaks(t *testing.T) {
	te := newTestEngine(t)
	for _, l := range workedExampleLines[:8] {
		te.must(l)
	}
	cases := []struct{ line, want string }{
		{"meet log Ada 1.76 o", "TR 26.4 (a): the bar rises at least 2 cm"},
		{"meet log Ada 1.70 o", "TR 26.4: the bar never goes down"},
		{"meet log Bea 1.75 x", "TR 26.2: nothing more at a height cleared"},
		{"meet log Ada 1.78 xxxo", "TR 26.2: out after three consecutive failures (1.78 x, 1.78 x, 1.78 x)"},
		{"meet log Zed 1.70 o", "not on the sheet"},
		{"meet log Ada 1.78 xq", "I don't understand"},
		{"meet log Ada xo", "give the bar before"},
		{"meet log Ada 3.10 o", "not a bar height"},
	}
	for i, c := range cases {
		before := te.checksum()
		r := te.run(c.line)
		if r.OK() || !strings.Contains(plain(r), c.want) || r.Example == "" {
			t.Errorf("%q: want a refusal with %q and an example, got:\n%s", c.line, c.want, plain(r))
		}
		if i == 0 {
			golden(t, "meet-err-rise", plain(r))
		}
		if te.checksum() != before {
			t.Errorf("%q changed the store", c.line)
		}
	}
}

// TestMeetOpenRules: one open sheet at a time; announced steps must rise at
// least 2 cm and never by more than the rise before (TR 26.4, via
// planning.CheckSteps).
func TestMeetOpenRules(t *testing.T) {
	te := newTestEngine(t)
	for _, c := range []struct{ line, want string }{
		{"meet open Club steps 1.60 1.61", "under 2 cm"},
		{"meet open Club steps 1.60 1.63 1.67", "larger than the rise before"},
		{"meet open 2026-12-01", "name the meet"},
		{"meet open Club 2026-13-01", "not a date"},
		{"meet open Club 1.60 1.65", "put steps before"},
		{"meet add Bea guest", "no meet sheet is open"},
		{"standings", "no meet sheet is open"},
	} {
		if r := te.run(c.line); r.OK() || !strings.Contains(plain(r), c.want) {
			t.Errorf("%q: want %q, got:\n%s", c.line, c.want, plain(r))
		}
	}
	golden(t, "meet-open", plain(te.must("meet open Club night steps 1.60 1.65 1.70 1.73 1.75 jumpoff")))
	te.must("meet close")
	contains(t, te.must("meet open Champs 2026"), "Sheet open: Champs 2026") // a year is part of a name, not a bar
	if r := te.run("meet open Other"); r.Kind != bot.KindConflict || !strings.Contains(plain(r), "one sheet at a time") {
		t.Errorf("second sheet: %s", plain(r))
	}
}

// TestMeetSquadThroughLogAndClose: a coach's `log NAME ... meet` goes on
// the open sheet too (and is refused whole when the sheet refuses it);
// `undo` takes it off both; the sheet survives a restart; `meet close`
// files the sheet entries of squad athletes into their log, where history
// and best pick them up; guests stay off the log.
func TestMeetSquadThroughLogAndClose(t *testing.T) {
	path := filepath.Join(t.TempDir(), "meet.db")
	te := newTestEngineAt(t, path)
	te.must("athlete add Mira height 1.78 mass 63 sex f pb 1.70")
	te.must("athlete add Ren height 1.80 mass 66 sex m pb 1.78")
	te.must("meet open Club night")
	te.must("meet add Mira Ren")
	te.must("meet add Gus guest")
	if r := te.run("meet add Mria"); r.Kind != bot.KindNotFound || !strings.Contains(plain(r), "Did you mean Mira?") {
		t.Errorf("near a squad name: %s", plain(r))
	}
	if r := te.run("meet add Mira guest"); r.Kind != bot.KindConflict {
		t.Errorf("a guest with a squad name: %s", plain(r))
	}
	r := te.must("log Mira 1.60 o 1.65 xo meet")
	contains(t, r, "On the sheet of Club night")
	golden(t, "meet-via-log", plain(r))
	before := te.checksum()
	if r := te.run("log Mira 1.66 o meet"); r.OK() || !strings.Contains(plain(r), "TR 26.4 (a)") || !strings.Contains(plain(r), "nothing was logged") {
		t.Errorf("a log line the sheet refuses: %s", plain(r))
	}
	if te.checksum() != before {
		t.Error("a refused log line changed the store")
	}
	te.must("log Mira 1.70 x meet")
	contains(t, te.must("undo"), "Taken off the sheet of Club night too")
	te.advance(24 * 3600e9)
	contains(t, te.must("log Mira 1.60 o meet"), "The open sheet (Club night) is for 2026-11-25; this line is not on it.")
	te.must("undo")
	if r := te.run("meet log Ren 1.65 o 1.70 o 1.75 xo 1.80 xxo 1.83 xxx"); !r.OK() {
		t.Fatalf("Ren: %s", plain(r))
	}
	te.must("meet log Gus 1.65 o 1.70 xxx")
	te.must("meet log Mira 1.70 xxx")
	te.close()

	te = newTestEngineAt(t, path) // a restart: the sheet is still open
	te.idPrefix = "r"
	te.now = testClockStart.Add(10 * 60 * 1e9)
	contains(t, te.must("standings"), "Ren wins at 1.80", "2      Gus", "3      Mira",
		"Gus ahead of Mira at 1.65: fewest jumps at the height of the tie (TR 26.8.1)")
	r = te.must("meet close")
	golden(t, "meet-close", plain(r))
	contains(t, r, "Mira, Ren", "New personal best for Ren: 1.80 (was 1.78)")
	if strings.Contains(plain(r), "for Mira") {
		t.Errorf("Mira's 1.65 is under her 1.70: no new best:\n%s", plain(r))
	}
	// After close no sheet is open: standings says so and offers the one
	// just filed, its verdict first.
	contains(t, te.must("standings"), "No meet sheet is open. Last filed: Club night (2026-11-25): Ren wins at 1.80.", "standings last")
	contains(t, te.must("history Ren"), "meet", "1.65 o, 1.70 o, 1.75 xo, 1.80 xxo, 1.83 xxx")
	// The logged line #1, then the sheet's entry filed by meet close as a
	// numbered line of its own, which drop then reaches.
	contains(t, te.must("history Mira"), "#1 1.60 o, 1.65 xo; #5 1.70 xxx")
	contains(t, te.must("drop #5"), "1.70 xxx")
	if h := plain(te.must("history Mira")); strings.Contains(h, "#5") {
		t.Errorf("line #5 still in history after drop:\n%s", h)
	}
	contains(t, te.must("best Ren"), "1.80 m (meet")
	// o, o, xo, xxo, xxx: 10 take-offs (o and x, TR notation) in the week's digest.
	contains(t, te.must("digest now"), "Take-offs Ren: 10 (10 full, 0 short approach)")
	if r := te.run("history Gus"); r.OK() {
		t.Errorf("a guest has no history: %s", plain(r))
	}
}

// asIn runs a line as user in a shared channel (direct false) or a direct
// message.
func (te *testEngine) asIn(user, channel string, direct bool, text string) bot.Reply {
	te.t.Helper()
	te.seq++
	te.advance(1e9)
	return te.E.Handle(context.Background(), bot.Request{UserID: user, UserName: user, Channel: channel, Direct: direct,
		Text: text, Time: te.now, MessageID: te.idPrefix + itoa(te.seq)})
}

// TestMeetPrivacy: a private athlete and an athlete under 18 without a
// guardian's consent are never named in a channel's standings, nor to
// another athlete; a coach in a direct message sees them; guests are
// named as typed.
func TestMeetPrivacy(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78 private yes")
	te.must("athlete add Tia height 1.60 born 2012")
	te.must("athlete add Ren height 1.80")
	te.must("athlete link Ren <@U_REN>")
	te.must("role coach <@U_COACH>")
	te.must("meet open Club")
	te.must("meet add Mira Tia Ren")
	te.must("meet add Gus guest")
	te.must("meet log Mira 1.60 o")
	te.must("meet log Tia 1.60 xo")
	te.must("meet log Ren 1.60 xxo")
	te.must("meet log Gus 1.60 o")
	for _, who := range []struct {
		user, channel string
		direct        bool
	}{{"U_COACH", "C_JUMPS", false}, {"U_REN", "", true}} {
		r := te.asIn(who.user, who.channel, who.direct, "standings")
		p := plain(r)
		if !r.OK() || strings.Contains(p, "Mira") || strings.Contains(p, "Tia") || !strings.Contains(p, "Gus") || !strings.Contains(p, "Ren") || !strings.Contains(p, "2 squad athletes not shown here") {
			t.Errorf("%s in %q: private and minor athletes must not be named:\n%s", who.user, who.channel, p)
		}
		if who.channel != "" {
			golden(t, "meet-standings-channel", p)
		}
	}
	if p := plain(te.asIn("U_REN", "C_JUMPS", false, "meet log Ren 1.65 o")); !strings.Contains(p, "needs the role") {
		t.Errorf("an athlete may not enter on the sheet:\n%s", p)
	}
	te.must("athlete link Mira <@U_MIRA>")
	if p := plain(te.asIn("U_MIRA", "C_JUMPS", false, "standings")); strings.Contains(p, "Mira") {
		t.Errorf("a private athlete asking in a channel is not named there either:\n%s", p)
	}
	if p := plain(te.asIn("U_MIRA", "", true, "standings")); !strings.Contains(p, "Mira") || strings.Contains(p, "Tia") {
		t.Errorf("in a direct message a private athlete sees herself, not the minor:\n%s", p)
	}
	p := plain(te.asIn("U_COACH", "D_COACH", true, "standings"))
	if !strings.Contains(p, "Mira") || !strings.Contains(p, "Tia") {
		t.Errorf("a coach in a direct message sees everyone:\n%s", p)
	}
	if r := te.asIn("U_COACH", "C_JUMPS", false, "meet log Mira 1.65 o"); !r.OK() || !r.Ephemeral {
		t.Errorf("an entry for a private athlete in a channel goes to the asker only: %v %s", r.Ephemeral, plain(r))
	}
}

// TestMeetRoles: coaches keep the sheet; athletes may read the standings;
// other workspace members may do neither.
func TestMeetRoles(t *testing.T) {
	for _, c := range []struct {
		line    string
		allowed []string
	}{
		{"meet open Club", []string{head, coach}},
		{"meet add Gus guest", []string{head, coach}},
		{"meet log Gus 1.60 o", []string{head, coach}},
		{"meet undo", []string{head, coach}},
		{"meet close", []string{head, coach}},
		{"standings", []string{head, coach, athlete}},
		{"meet retire Gus", []string{head, coach}},
		{"meet list", []string{head, coach, athlete}},
	} {
		for _, who := range []string{head, coach, athlete, nobody} {
			te := newTestEngine(t)
			te.must("athlete add Mira height 1.78")
			te.must("athlete link Mira <@U_MIRA>")
			te.must("role coach <@U_COACH>")
			if c.line != "meet open Club" {
				te.must("meet open Club")
				te.must("meet add Gus guest")
				te.must("meet log Gus 1.55 o")
			}
			r := te.as(who, c.line)
			if got, want := r.Kind != bot.KindForbidden, slices.Contains(c.allowed, who); got != want {
				t.Errorf("%s %q: allowed %v, want %v:\n%s", who, c.line, got, want, plain(r))
			}
		}
	}
}

// TestSeasonKeepsYouthFromChannel: season, compare and plan of an athlete
// under 18 without a guardian's consent go to the asker only, like a
// private athlete's; with consent on file they may be posted.
func TestSeasonKeepsYouthFromChannel(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Tia height 1.60 born 2012")
	te.must("athlete add Ren height 1.80")
	te.must("log Tia 1.40 o 1.45 xo meet")
	te.must("log Ren 1.60 o 1.65 xo meet")
	for _, line := range []string{"season Tia", "compare Ren Tia", "plan Tia"} {
		if r := te.asIn("U_HEAD", "C_JUMPS", false, line); !r.OK() || !r.Ephemeral {
			t.Errorf("%q in a channel: ephemeral %v\n%s", line, r.Ephemeral, plain(r))
		}
	}
	if r := te.asIn("U_HEAD", "C_JUMPS", false, "season Ren"); !r.OK() || r.Ephemeral {
		t.Errorf("an adult's season may be posted: %v", r.Ephemeral)
	}
}

// TestMeetJumpOff: with jumpoff on the sheet, two athletes tied for first
// after the tie rules go to a jump-off (TR 26.9); one attempt a height, the
// bar down after both fail, and the first to clear where the other fails
// wins. Without jumpoff they share first (TR 26.8.3).
func TestMeetJumpOff(t *testing.T) {
	te := newTestEngine(t)
	te.must("meet open Final jumpoff")
	te.must("meet add Pia Quin guest")
	te.must("meet log Pia 1.80 xo 1.83 xxx")
	te.must("meet log Quin 1.80 xo 1.83 xxx")
	contains(t, te.must("standings"), "Pia and Quin tied for first at 1.80: jump-off (TR 26.9)")
	for _, line := range []string{"meet log Pia 1.83 x 1.85 o jumpoff", "meet log Pia 1.83 xo jumpoff"} {
		if r := te.run(line); r.OK() || !strings.Contains(plain(r), "TR 26.9") {
			t.Errorf("%q: the bar goes down after a miss, one attempt a height (TR 26.9): %s", line, plain(r))
		}
	}
	te.must("meet log Pia 1.83 x jumpoff")
	contains(t, te.must("standings"), "Jump-off at 1.83: to jump Quin (one attempt, TR 26.9)")
	te.must("meet log Quin 1.83 x jumpoff")
	contains(t, te.must("standings"), "Jump-off: both failed at 1.83, so the bar goes down to 1.81 (TR 26.9); to jump Pia, Quin")
	if r := te.run("meet log Pia 1.81 - jumpoff"); r.OK() || !strings.Contains(plain(r), "no passing in a jump-off") {
		t.Errorf("no pass in a jump-off (TR 26.9): %s", plain(r))
	}
	te.must("meet log Pia 1.81 o jumpoff")
	te.must("meet log Quin 1.81 x jumpoff")
	r := te.must("standings")
	contains(t, r, "Pia wins at 1.80", "Pia ahead of Quin at 1.80: the jump-off for first (TR 26.9)", "2      Quin", "competition is over")
}

// TestMeetUndo: meet undo takes the sheet's own entries off, last first;
// an entry that came from a log line is taken back by undo, which takes it
// off the log too.
func TestMeetUndo(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78")
	te.must("meet open Club")
	te.must("meet add Mira")
	te.must("meet add Gus guest")
	te.must("meet log Gus 1.60 o")
	te.must("log Mira 1.60 xo meet")
	if r := te.run("meet undo"); r.Kind != bot.KindConflict || r.Example != "undo" {
		t.Errorf("an entry from a log line: %s", plain(r))
	}
	te.must("undo")
	golden(t, "meet-undo", plain(te.must("meet undo")))
	if r := te.run("meet undo"); r.Kind != bot.KindNotFound {
		t.Errorf("nothing left: %s", plain(r))
	}
	contains(t, te.must("standings"), "no height cleared yet", "Gus", "not jumped yet")
	contains(t, te.must("history Mira"), "No jumps logged")
}

// TestMeetMalformed: bad meet lines on an open sheet are refused with what
// was wrong and a correct example, within the refusal budget, and change
// nothing stored.
func TestMeetMalformed(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78")
	te.must("meet open Club steps 1.60 1.65")
	te.must("meet add Mira")
	te.must("meet add Gus guest")
	te.must("meet log Gus 1.60 o")
	for _, line := range []string{
		"meet open Club", "meet open", "meet open Club steps", "meet open Club steps 1.60 9.00", "meet open Club steps 1.70 1.60",
		"meet add", "meet add Gus guest", "meet add Mira", "meet add 9lives guest", "meet add me guest", "meet add Mira guest",
		"meet log", "meet log Gus", "meet log Gus 1.65", "meet log Gus o", "meet log Gus 1.65 ooo", "meet log Gus 1.65 xz",
		"meet log Gus 1,65,3 o", "meet log Gus 1.60 o", "meet log Nobody 1.60 o", "meet log Gus -1.60 o", "meet log Gus 1.62 o",
		"meet undo now", "meet close now", "standings Gus",
		"meet log Gus " + strings.Repeat("1.70 x ", 2) + strings.Repeat("x", 80),
	} {
		before := te.checksum()
		r := te.run(line)
		p := plain(r)
		if r.OK() || r.Example == "" || r.Kind == bot.KindInternal {
			t.Errorf("%q: want a refusal with an example, got %v:\n%s", line, r.Kind, p)
		}
		if n := strings.Count(strings.TrimRight(p, "\n"), "\n") + 1; n > 4 || len([]rune(p)) > 350 {
			t.Errorf("%q: refusal over budget (%d lines, %d characters):\n%s", line, n, len([]rune(p)), p)
		}
		if te.checksum() != before {
			t.Errorf("%q changed the store", line)
		}
	}
}

// TestMeetAfterForget: an athlete removed from the squad while on an open
// sheet is not named in the standings and is filed unnamed, and the close
// still works.
func TestMeetAfterForget(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78")
	te.must("athlete add Ren height 1.80")
	te.must("meet open Club")
	te.must("meet add Mira Ren")
	te.must("meet log Mira 1.60 o")
	te.must("meet log Ren 1.60 xo")
	te.must("forget Mira confirm")
	p := plain(te.must("standings"))
	if strings.Contains(p, "Mira") {
		t.Errorf("a removed athlete is named:\n%s", p)
	}
	r := te.must("meet close")
	if strings.Contains(plain(r), "Mira") {
		t.Errorf("close names a removed athlete:\n%s", plain(r))
	}
	contains(t, te.must("history Ren"), "1.60 xo")
}

// TestMeetStandingsBudget: a full club field keeps the short standings
// within the list budget (16 lines, 1600 characters; DEVELOPERS.md), with
// the rest behind `standings more`.
func TestMeetStandingsBudget(t *testing.T) {
	te := newTestEngine(t)
	te.must("meet open Big field steps 1.50 1.55 1.60 1.65 1.70 1.73 1.75")
	marks := []string{"o", "xo", "xxo", "o", "xo", "o", "xxo", "xo", "o", "xo", "xxo", "o"}
	for i, m := range marks {
		name := "G" + itoa(i+1)
		te.must("meet add " + name + " guest")
		te.must("meet log " + name + " 1.50 " + marks[(i+3)%len(marks)] + " 1.55 " + m + " 1.60 xxx")
	}
	p := plain(te.must("standings"))
	lines := strings.Count(strings.TrimRight(p, "\n"), "\n") + 1
	if lines > 16 || len([]rune(p)) > 1600 || !strings.Contains(p, "standings more") {
		t.Errorf("short standings: %d lines, %d characters:\n%s", lines, len([]rune(p)), p)
	}
	full := plain(te.must("standings more"))
	for i := range marks {
		if !strings.Contains(full, " G"+itoa(i+1)+" ") {
			t.Errorf("more lacks G%d:\n%s", i+1, full)
		}
	}
}

// An athlete's own meet line is logged but kept off the sheet, which the
// coach keeps as the scorer's record, and the reply says so; an athlete not
// on the sheet hears nothing about it.
func TestAthleteOwnMeetLineStaysOffTheSheet(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Ren height 1.80")
	te.must("athlete add Noor height 1.74")
	te.must("athlete link Ren <@U_REN>")
	te.must("athlete link Noor <@U_NOOR>")
	te.must("meet open Club")
	te.must("meet add Ren")
	before, _ := storedSheets(t, te)
	r := te.as("U_REN", "log me 1.60 o meet")
	if !r.OK() {
		t.Fatal(plain(r))
	}
	contains(t, r, "not on the sheet of Club: the coach keeping it enters attempts there")
	after, _ := storedSheets(t, te)
	if len(after.Entries) != len(before.Entries) {
		t.Errorf("an athlete's own line went on the sheet: %d entries, was %d", len(after.Entries), len(before.Entries))
	}
	if n := len(logAttempts(t, te.DB, "Ren")); n != 1 {
		t.Errorf("%d attempts logged, want 1", n)
	}
	if p := plain(te.as("U_NOOR", "log me 1.55 o meet")); strings.Contains(p, "sheet") {
		t.Errorf("an athlete off the sheet is told about it:\n%s", p)
	}
}
