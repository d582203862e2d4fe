package bot_test

import (
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
)

// mustRefuse runs a line as the head coach, checks that it is refused with
// the given kind and that the store did not change.
func mustRefuse(t *testing.T, te *testEngine, line string, kind bot.Kind) bot.Reply {
	t.Helper()
	sum := te.checksum()
	r := te.run(line)
	if r.Kind != kind {
		t.Fatalf("%q: kind %v, want %v:\n%s", line, r.Kind, kind, plain(r))
	}
	if te.checksum() != sum {
		t.Errorf("%q was refused but changed the store", line)
	}
	return r
}

// anaSquad adds invented athletes for the rule tests (no profile PB for
// Ana, so her best comes from the log alone).
func anaSquad(t *testing.T, te *testEngine) {
	t.Helper()
	for _, l := range []string{
		"athlete add Ana height 1.75 sex f",
		"athlete add Bo height 1.80 sex m pb 1.75",
		"athlete add Lea height 1.70 sex f pb 1.65",
		"athlete add Sam height 1.85 sex m pb 1.95",
	} {
		te.must(l)
	}
}

// World Athletics TR 26.2: three consecutive failures end the competition
// whatever the heights, across lines of the same day. The second line is
// refused with the rule, best keeps the valid best (1.70), and a confirmed
// line is stored marked and never counts.
func TestMeetLineAfterOutRefusedBestKept(t *testing.T) {
	te := newTestEngine(t)
	anaSquad(t, te)
	r := te.must("log Ana 1.70 o 1.75 x- 1.78 xx meet")
	contains(t, r, "Out: Ana's competition is over after three consecutive failures (TR 26.2).", "4 jumps and 1 pass")
	w := mustRefuse(t, te, "log Ana 1.81 xxo meet", bot.KindConflict)
	contains(t, w, "already out", "(1.75, 1.78, 1.78)", "TR 26.2", "log Ana 1.81 xxo meet confirm")
	contains(t, te.must("best Ana"), "Personal best:       1.70 m (meet, 2026-11-25)")
	c := te.must("log Ana 1.81 xxo meet confirm")
	contains(t, c, "Stored as breaking the rules", "never counts for a best")
	if strings.Contains(plain(c), "personal best") || strings.Contains(plain(c), "Season best") {
		t.Errorf("a rule-breaking line announced a best:\n%s", plain(c))
	}
	b := te.must("best Ana")
	contains(t, b, "Personal best:       1.70 m (meet, 2026-11-25)", "Season best 2026:    1.70 m")
	if pb := logProfile(t, te.DB, "Ana").PersonalBestM; pb != 1.70 {
		t.Errorf("profile PB %v, want 1.70", pb)
	}
	h := te.must("history Ana")
	contains(t, h, "(breaks the rules)")
}

// TR 26.2, effect of a pass: after x- at 1.65 only two tries remain at
// 1.70, so "1.65 x- 1.70 xxx" names that fault (not "series over" and "had
// already ended" both), and a line within one message that jumps on after
// xxx is refused too.
func TestPassCarriesFailures(t *testing.T) {
	te := newTestEngine(t)
	anaSquad(t, te)
	w := mustRefuse(t, te, "log Bo 1.65 x- 1.70 xxx meet", bot.KindConflict)
	golden(t, "log-err-pass-carries", plain(w))
	contains(t, w, "Bo had only two tries left at 1.70 m", "the failure at 1.65 carries over", "TR 26.2")
	if p := plain(w); strings.Contains(p, "Series over") || strings.Contains(p, "had already ended") {
		t.Errorf("contradictory reply:\n%s", p)
	}
	r := te.must("log Bo 1.65 x- 1.70 x meet")
	contains(t, r, "Bo has one try left: two failures in a row")
	mustRefuse(t, te, "log Sam 1.65 xxx 1.70 o meet", bot.KindConflict)
	// TR 26.4: the bar never goes down across lines.
	te.must("log Sam 1.80 o meet")
	contains(t, mustRefuse(t, te, "log Sam 1.75 o meet", bot.KindConflict), "the bar never goes down", "TR 26.4")
	// TR 26.4 (a): at least 2 cm between heights.
	contains(t, mustRefuse(t, te, "log Sam 1.81 o meet", bot.KindConflict), "at least 2 cm", "TR 26.4 (a)")
	// Practice keeps no competition rules, but notation stays checked.
	te.must("log Lea 1.55 xxx 1.60 o")
	mustRefuse(t, te, "log Lea 1.60 ox", bot.KindUsage)
}

// Plausibility against the athlete: a bar over 15 cm above the PB, a
// clearance above the world record (2.45 m men, 2.10 m women; from
// memory), a peak that contradicts vz (mechanics.ComparePeakVz) each ask
// for confirm and store nothing until then.
func TestPlausibilityNeedsConfirm(t *testing.T) {
	te := newTestEngine(t)
	anaSquad(t, te)
	w := mustRefuse(t, te, "log Lea 2.40 o", bot.KindConflict)
	contains(t, w, "75.0 cm above Lea's personal best 1.65 m", "above the world record 2.10 m", "log Lea 2.40 o confirm")
	golden(t, "log-err-implausible", plain(w))
	contains(t, te.must("history Lea"), "No jumps logged")
	te.must("log Lea 1.80 x") // exactly 15 cm above: no question
	te.must("log Lea 1.81 x confirm")
	// Mira-like profile: h0 = 0.70 × 1.78 = 1.246 m; vz 3.9 m/s gives a peak
	// of 1.246 + 3.9²/(2 × 9.80665) = 2.0215 m (projectile rise).
	te.must("athlete add Mia height 1.78 sex f pb 1.80")
	contains(t, mustRefuse(t, te, "log Mia 1.72 xo peak 1.95 vz 3.9", bot.KindConflict), "Peak 1.95 m and vz 3.90 m/s disagree", "2.02 m")
	a := te.must("log Mia 1.72 xo peak 2.01 vz 3.9 more")
	contains(t, a, "so vz was used")
	b := te.must("log Mia 1.72 xo vz 3.9")
	as := logAttempts(t, te.DB, "Mia")
	if len(as) != 4 || !as[1].HasModelMargin || as[1].ModelMarginM != as[3].ModelMarginM {
		t.Errorf("agreeing peak and vz should give the margin of vz alone: %+v", as)
	}
	_ = b
	c := te.must("log Mia 1.72 xo peak 1.95 vz 3.9 confirm")
	contains(t, c, "No model margin: the measured peak and vz disagree", "Stored after confirm")
}

// One vocabulary of counts: jumps are o and x, passes apart.
func TestJumpsAndPassesCounted(t *testing.T) {
	te := newTestEngine(t)
	anaSquad(t, te)
	r := te.must("log Sam 1.80 o 1.85 - 1.90 xo")
	contains(t, r, "3 jumps and 1 pass", "made 2/3 (67%)")
	h := te.must("history Sam")
	if row := h.Table.Rows[0]; row[1] != "practice, 1 pass" || row[4] != "2/3 (67%)" {
		t.Errorf("history row %q", row)
	}
	u := te.must("undo")
	contains(t, u, "3 jumps and 1 pass")
}

// History keeps a day's meet and practice apart, each with its make rate.
func TestHistorySeparatesMeetAndPractice(t *testing.T) {
	te := newTestEngine(t)
	anaSquad(t, te)
	te.must("log Bo 1.60 o 1.65 xo")
	te.must("log Bo 1.70 o 1.75 xxx meet")
	te.must("log Bo 1.60 x")
	h := te.must("history Bo")
	golden(t, "log-history-split", plain(h))
	if len(h.Table.Rows) != 2 {
		t.Fatalf("rows %q", h.Table.Rows)
	}
	p, m := h.Table.Rows[0], h.Table.Rows[1]
	if p[1] != "practice" || p[2] != "#1 1.60 o, 1.65 xo; #3 1.60 x" || p[4] != "2/4 (50%)" {
		t.Errorf("practice row %q", p)
	}
	if m[1] != "meet" || m[2] != "#2 1.70 o, 1.75 xxx" || m[4] != "1/4 (25%)" {
		t.Errorf("meet row %q", m)
	}
}

// One peak-vs-vz rule: the same jump gets the same model margin from log,
// from margin typed with both values, and from margin reading the logged
// attempt (the issue found +12.2 cm in one and +20.3 cm in the other).
func TestPeakVzSameInLogAndMargin(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mia height 1.78 sex f pb 1.80")
	marginOf := func(r bot.Reply) string {
		for _, f := range r.Fields {
			// The central value: the ± is each command's own budget.
			if f.Label == "Margin" {
				return strings.SplitN(f.Value, " ±", 2)[0]
			}
			if i := strings.Index(f.Value, "model margin "); i >= 0 {
				return strings.SplitN(f.Value[i+len("model margin "):], " ±", 2)[0]
			}
		}
		t.Fatalf("no margin in:\n%s", plain(r))
		return ""
	}
	l := marginOf(te.must("log Mia 1.72 xo peak 2.01 vz 3.9 more"))
	m1 := marginOf(te.must("margin 1.72 for Mia v 3.9 peak 2.01 arch 90 more"))
	m2 := marginOf(te.must("margin 1.72 for Mia arch 90 more"))
	if !strings.HasPrefix(l, "+") || l != m1 || l != m2 {
		t.Errorf("log %q, margin typed %q, margin from the log %q", l, m1, m2)
	}
}
