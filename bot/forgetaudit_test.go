package bot_test

import (
	"context"
	"encoding/json"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// storedAudit reads the whole audit trail straight from the store.
func storedAudit(t *testing.T, db *store.DB) []record.AuditEntry {
	t.Helper()
	var out []record.AuditEntry
	err := db.View(context.Background(), func(tx *store.Tx) error {
		return tx.AuditEntries(time.Unix(0, 0), func(e record.AuditEntry) error {
			out = append(out, e)
			return nil
		})
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// forget takes the athlete out of the audit trail: read straight from the
// store afterwards, no entry holds either name she bore, her notes, her
// birth year or her id, and no entry her own chat account made names that
// account; the entries stay (time, actor, action), another athlete's
// entries are untouched, the reply counts the entries, and a coach whose
// last change was about her gets undo's refusal with the reason.
func TestForgetPseudonymisesTheAuditTrail(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mirela height 1.78 mass 63 sex f pb 1.70")
	te.must("athlete add Ren height 1.80 mass 66 sex m pb 1.78")
	te.must("athlete rename Mirela Mira")
	te.must("athlete set Mira born 1999")
	te.must("athlete set Mira note sprains-left-ankle")
	te.must("athlete link Mira <@U_MIRA>")
	if r := te.as("U_MIRA", "log me 1.60 o"); !r.OK() {
		t.Fatal(plain(r))
	}
	te.must("log Ren 1.65 o")
	logUser(t, te.DB, record.User{ID: "U_COACH", Name: "Sam", Role: record.RoleCoach})
	if r := te.as("U_COACH", "log Mira 1.62 xo"); !r.OK() {
		t.Fatal(plain(r))
	}
	before := storedAudit(t, te.DB)
	id := logProfile(t, te.DB, "Mira").ID

	r := te.must("forget Mira confirm")
	contains(t, r, "Took the name and values out of")
	after := storedAudit(t, te.DB)
	if len(after) != len(before)+1 {
		t.Fatalf("%d audit entries after forget, want the %d before and the forget itself", len(after), len(before))
	}
	var renEntries int
	for i, e := range after {
		b, _ := json.Marshal(e)
		s := strings.ToLower(string(b))
		for _, gone := range []string{"mirela", "mira", "1999", "sprains", "u_mira"} {
			if strings.Contains(s, gone) {
				t.Errorf("entry %d still holds %q after forget: %s", i, gone, b)
			}
		}
		if e.AthleteID == id {
			t.Errorf("entry %d still carries the forgotten id: %s", i, b)
		}
		if i < len(before) {
			if !e.Time.Equal(before[i].Time) || e.Action != before[i].Action {
				t.Errorf("entry %d changed its time or action: %+v → %+v", i, before[i], e)
			}
			if strings.EqualFold(before[i].Subject, "Ren") {
				renEntries++
				if e != before[i] {
					t.Errorf("another athlete's entry changed: %+v → %+v", before[i], e)
				}
			}
		}
	}
	if renEntries == 0 {
		t.Fatal("the test holds no entry about Ren to compare")
	}
	u := te.as("U_COACH", "undo")
	if u.Kind != bot.KindConflict || !strings.Contains(plain(u), "about an athlete since forgotten") {
		t.Errorf("undo of a change about a forgotten athlete:\n%s", plain(u))
	}
	// The forget itself cannot be undone either.
	contains(t, te.run("undo"), "cannot be undone")
}
