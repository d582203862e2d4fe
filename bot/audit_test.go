package bot_test

import (
	"context"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// TestAuditFollowsAthleteAcrossRename: the trail is keyed by athlete id, so
// after a rename `audit NEWNAME` still lists what happened under the old
// name, with the old → new values and the speaker's chat display name.
func TestAuditFollowsAthleteAcrossRename(t *testing.T) {
	te := newTestEngine(t)
	say := func(text string) bot.Reply {
		t.Helper()
		te.seq++
		te.advance(time.Minute)
		r := te.E.Handle(context.Background(), bot.Request{UserID: "U_HEAD", UserName: "Coach Rui", Text: text, Time: te.now, MessageID: "a" + itoa(te.seq)})
		if !r.OK() {
			t.Fatalf("%q refused: %s", text, plain(r))
		}
		return r
	}
	say("athlete add Lea height 1.72 pb 1.65")
	say("athlete set Lea pb 1.70")
	say("athlete rename Lea Lena")
	say("athlete add Lea height 1.60") // a new athlete takes the old name
	r := say("audit Lena 30d")
	p := plain(r)
	for _, want := range []string{"athlete add", "pb 1.65 → 1.7", "name Lea → Lena", "Coach Rui (U_HEAD)"} {
		if !strings.Contains(p, want) {
			t.Errorf("audit Lena lacks %q:\n%s", want, p)
		}
	}
	if n := strings.Count(p, "athlete add"); n != 1 {
		t.Errorf("audit Lena shows %d additions, want 1 (the new Lea is someone else):\n%s", n, p)
	}
	if p := plain(say("audit Lea 30d")); strings.Contains(p, "pb 1.65") || !strings.Contains(p, "athlete add") {
		t.Errorf("audit Lea (the new one) shows Lena's trail:\n%s", p)
	}
}

// TestAuditReadsEntriesWithoutAthleteID: entries written before entries
// carried an athlete id (only the name) are matched to the athlete who
// bore that name at the time, read from the trail's renames.
func TestAuditReadsEntriesWithoutAthleteID(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Lea height 1.72")
	old := func(at time.Time, subject, line string) {
		t.Helper()
		err := te.DB.Update(context.Background(), func(tx *store.Tx) error {
			return tx.Audit(record.AuditEntry{Time: at, Actor: "old (U_OLD)", Action: "log", Subject: subject, After: `{"line":"` + line + `"}`})
		})
		if err != nil {
			t.Fatal(err)
		}
	}
	old(te.now.Add(time.Minute), "Lea", "log Lea 1.60 o")
	te.advance(2 * time.Minute)
	te.must("athlete rename Lea Lena")
	te.must("athlete add Lea height 1.60")
	old(te.now.Add(time.Minute), "Lea", "log Lea 1.50 o") // the new Lea's
	te.advance(2 * time.Minute)
	lena := plain(te.must("audit Lena"))
	if !strings.Contains(lena, "log Lea 1.60 o") || strings.Contains(lena, "log Lea 1.50 o") {
		t.Errorf("audit Lena:\n%s", lena)
	}
	lea := plain(te.must("audit Lea"))
	if strings.Contains(lea, "log Lea 1.60 o") || !strings.Contains(lea, "log Lea 1.50 o") {
		t.Errorf("audit Lea:\n%s", lea)
	}
}

// TestForgetCountsAddUp: the reply's parts add up to its total, counted by
// hand from what was typed: 1 profile, 3 + 2 attempts (1.60 o 1.65 xo;
// 1.70 x-), 2 logged lines, 1 chat link = 9 records; the linked user's
// athlete role goes with the link.
func TestForgetCountsAddUp(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Lea height 1.72")
	te.must("log Lea 1.60 o 1.65 xo")
	te.must("log Lea 1.70 x-")
	te.must("role athlete <@U_LEA>")
	te.must("athlete link Lea <@U_LEA>")
	r := te.must("forget Lea confirm")
	contains(t, r, "Deleted 9 records: 1 profile, 5 attempts, 2 logged lines and 1 chat link.", "1 athlete role withdrawn")
	if as := usersWithRole(t, te.DB, record.RoleAthlete); len(as) != 0 {
		t.Errorf("athlete roles left behind: %+v", as)
	}
	if w := te.as("U_LEA", "whoami"); !strings.HasPrefix(w.Title, "You are a workspace member") {
		t.Errorf("U_LEA after forget: %s", plain(w))
	}
}

// TestAthleteSetBornMinorCaution: setting a birth year that makes the
// athlete under 18 gives the reminder athlete add gives (consent for a
// minor's data: common practice, local law decides).
func TestAthleteSetBornMinorCaution(t *testing.T) {
	te := newTestEngine(t)
	add := te.must("athlete add Tia height 1.60 born 2012")
	te.must("athlete add Una height 1.60")
	set := te.must("athlete set Una born 2012")
	if add.Caution == "" || set.Caution != add.Caution {
		t.Errorf("set caution %q, add caution %q", set.Caution, add.Caution)
	}
	if again := te.must("athlete set Una group juniors"); again.Caution != "" {
		t.Errorf("an edit that does not set born repeats the reminder: %q", again.Caution)
	}
	if adult := te.must("athlete set Una born 1990"); adult.Caution != "" {
		t.Errorf("an adult got the minor caution: %q", adult.Caution)
	}
}
