package bot_test

import (
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/record"
)

// TestLogShortReply: a measured line answers verdict first inside the
// confirmation budget (DEVELOPERS.md: 8 lines, 700 characters) with room to
// spare, keeps the caution, names the assumptions in one line that ends in
// "say `more` for the details", and keeps the full read-out in Details;
// `more` at the end of the line gives the full read-out and is not taken
// into a note.
func TestLogShortReply(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logKai())
	r := te.must("log Kai 1.90 o vz 4.3 takeoff 1.0")
	if !strings.HasPrefix(r.Title, "Logged for Kai") {
		t.Errorf("title %q: the verdict comes first", r.Title)
	}
	p := plain(r)
	lines := 0
	for _, l := range strings.Split(strings.TrimRight(p, "\n"), "\n") {
		if !strings.Contains(l, "] type: ") {
			lines++
		}
	}
	if lines > 7 || len([]rune(p)) > 550 {
		t.Errorf("short log reply takes %d lines, %d characters; want at most 7 and 550:\n%s", lines, len([]rune(p)), p)
	}
	if r.Caution == "" {
		t.Error("the caution line is gone")
	}
	if n := r.Notes[len(r.Notes)-1]; !strings.HasPrefix(n, "assumed ") || !strings.HasSuffix(n, "say `more` for the details") {
		t.Errorf("assumptions line %q", n)
	}
	if len(r.Assumptions) != 0 {
		t.Errorf("the short reply carries the long assumptions: %q", r.Assumptions)
	}
	if r.Details == nil || len(r.Details.Assumptions) == 0 || r.DetailsCommand != "line 1 more" {
		t.Fatalf("details %+v, command %q", r.Details, r.DetailsCommand)
	}
	contains(t, *r.Details, "vz 4.30 m/s", "take-off 1.00 m", "take-off c.m. height assumed 1.30 m = 0.70 × stature")
	if !strings.Contains(r.Fields[0].Value, "model margin +") || !strings.Contains(r.Fields[0].Value, " ± ") || !strings.Contains(r.Fields[0].Value, " lowest ") {
		t.Errorf("per-attempt line %q: model margin with ± and the lowest part", r.Fields[0].Value)
	}

	m := te.must("log Kai 1.92 o vz 4.3 takeoff 1.0 note quick last step more")
	golden(t, "log-measured-note-more", plain(m))
	contains(t, m, "take-off c.m. height assumed", "quick last step")
	as := logAttempts(t, te.DB, "Kai")
	if len(as) != 2 {
		t.Fatalf("%d attempts, want 2 (more logs once)", len(as))
	}
	if got := as[1].Note; got != "quick last step" {
		t.Errorf("note %q: more was taken into the note", got)
	}

	// The Details button's command shows the same read-out without logging.
	d := te.must("line 1 more")
	contains(t, d, "Line #1 for Kai", "vz 4.30 m/s", "take-off c.m. height assumed")
	s := te.must("line #2")
	golden(t, "log-line-show", plain(s))
	if len(logAttempts(t, te.DB, "Kai")) != 2 {
		t.Error("line N logged something")
	}
	// An unmeasured line stays as it was: no details, no assumed line.
	if u := te.must("log Kai 1.95 xo"); u.Details != nil || len(u.Notes) != 0 {
		t.Errorf("unmeasured line got details or notes:\n%s", plain(u))
	}
}

// TestLineRefusals: line N refuses what is not a line number, a line that
// does not exist, and an athlete asking for another athlete's line.
func TestLineRefusals(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logKai())
	mira := logAddAthlete(t, te.DB, logMira())
	logUser(t, te.DB, record.User{ID: "U_MIRA", Role: record.RoleAthlete, AthleteID: mira.ID})
	te.must("log Kai 1.90 o vz 4.3")
	mustRefuse(t, te, "line", bot.KindUsage)
	mustRefuse(t, te, "line twelve", bot.KindUsage)
	mustRefuse(t, te, "line 9", bot.KindNotFound)
	if r := te.as("U_MIRA", "line 1"); r.Kind != bot.KindForbidden || strings.Contains(plain(r), "Kai") {
		t.Errorf("an athlete asking for another athlete's line: %v (the refusal must not name whose line it is)\n%s", r.Kind, plain(r))
	}
}
