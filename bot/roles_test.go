package bot_test

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
)

// The roles of the matrix: the configured head coach, a granted coach, an
// athlete linked to Mira, and anyone else in the workspace.
const (
	head    = "U_HEAD"
	coach   = "U_COACH"
	athlete = "U_MIRA"
	nobody  = "U_ANY"
)

// roleTemplate prepares a store with Mira (linked to U_MIRA), Kai, a coach
// and a few logs, and returns the path of its file; each case runs on a copy.
func roleTemplate(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	te := newTestEngineAt(t, filepath.Join(dir, "template.db"))
	for _, line := range []string{
		"athlete add Mira height 1.78 mass 63 sex f pb 1.81",
		"athlete add Kai height 1.86 mass 74 sex m pb 2.01",
		"athlete link Mira <@U_MIRA>",
		"role coach <@U_COACH>",
		"log Mira 1.70 o 1.75 xo vz 3.2",
		"log Kai 1.90 o 1.95 xxo",
	} {
		te.must(line)
	}
	return filepath.Join(dir, "template.db") // every write is committed and synced, so a copy is whole
}

func copyFile(t *testing.T, from, to string) {
	t.Helper()
	b, err := os.ReadFile(from)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(to, b, 0o600); err != nil {
		t.Fatal(err)
	}
}

// TestRoleMatrix runs every command against every role and checks that it
// is allowed or refused as the roles say: athletes for themselves, coaches
// for any athlete, head coaches for removals, settings and roles, anyone
// else for the calculations only. A refusal names the role it needs and
// who can grant it.
func TestRoleMatrix(t *testing.T) {
	tmpl := roleTemplate(t)
	all := []string{head, coach, athlete, nobody}
	staff := []string{head, coach}
	members := []string{head, coach, athlete}
	self := []string{head, coach, athlete} // the line names Mira, the athlete's own
	headOnly := []string{head}
	tests := []struct {
		line    string
		allowed []string
	}{
		{"help", all},
		{"help safety", all},
		{"whoami", all},
		{"cancel", all},
		{"team", all},
		{"margin 1.80 v 4.3 h0 1.22 arch 90 height 1.78", all},
		{"flight v 4.4 h0 1.25", all},
		{"flight time 0.60", all},
		{"com arch 90 height 1.80", all},
		{"margin 1.80 for Mira v 4.3", self},
		{"margin 1.80 for Kai v 4.3", staff},
		{"com for Kai model segments", staff},
		{"athletes", members},
		{"athlete Mira", self},
		{"chart Mira", self},
		{"chart Kai", staff},
		{"athlete Kai", staff},
		{"athlete add Zed height 1.80", staff},
		{"athlete set Kai pb 2.02", staff},
		{"athlete rename Kai Kai-B", staff},
		{"athlete link Kai <@U_KAI>", staff},
		{"athlete unlink Mira", staff},
		{"athlete remove Kai confirm", headOnly},
		{"log Mira 1.78 xo", self},
		{"log Kai 2.00 xo", staff},
		{"undo", members},
		{"fix #1 1.70 o 1.75 xxo", self}, // Mira's line
		{"fix #2 1.90 o", staff},         // Kai's line
		{"drop #1", self},
		{"drop #2", staff},
		{"undo line 2", staff},
		{"history Mira", self},
		{"history Kai 6w", staff},
		{"best Mira", self},
		{"best Kai", staff},
		{"export csv Mira", self},
		{"export csv", staff},
		{"import csv /nonexistent/attempts.csv", headOnly},
		{"digest", members},
		{"digest now", members},
		{"digest week 2026-W47", members},
		{"digest schedule mon 07:00", headOnly},
		{"digest channel #jumps", headOnly},
		{"digest off", headOnly},
		{"digest on", headOnly},
		{"team units imperial", headOnly},
		{"team tz Europe/Madrid", headOnly},
		{"team location lat 40.4 alt 650", headOnly},
		{"team name Test Club", headOnly},
		{"team backup /tmp/lathmark-backups keep 3", headOnly},
		{"role coach <@U_NEW>", headOnly},
		{"roles", staff},
		{"audit 30d", staff},
		{"forget Kai confirm", headOnly},
		{"plan Mira", self},
		{"plan Kai meet steps 1.80 1.85 1.90", staff},
		{"team jumps 25", headOnly},
		{"season Mira", staff},
		{"compare Mira Kai 12w", staff},
	}
	for _, tt := range tests {
		for _, who := range all {
			want := contains2(tt.allowed, who)
			t.Run(who+"/"+tt.line, func(t *testing.T) {
				path := filepath.Join(t.TempDir(), "case.db")
				copyFile(t, tmpl, path)
				te := newTestEngineAt(t, path)
				te.idPrefix = "case-" // the template used m1, m2, ...
				before := te.checksum()
				r := te.as(who, tt.line)
				forbidden := r.Kind == bot.KindForbidden
				if want && forbidden {
					t.Fatalf("%s should be allowed %q:\n%s", who, tt.line, plain(r))
				}
				if !want {
					if !forbidden {
						t.Fatalf("%s should be refused %q, got %v:\n%s", who, tt.line, r.Kind, plain(r))
					}
					p := plain(r)
					if !(strings.Contains(p, "needs the role") || strings.Contains(p, "themself or a coach")) || !strings.Contains(p, "head coach") {
						t.Errorf("refusal does not name the role needed and who grants it:\n%s", p)
					}
					if te.checksum() != before {
						t.Errorf("a refused command changed the store")
					}
				}
				if r.Kind == bot.KindInternal {
					t.Fatalf("internal failure:\n%s", plain(r))
				}
			})
		}
	}
}

func contains2(xs []string, x string) bool {
	for _, v := range xs {
		if v == x {
			return true
		}
	}
	return false
}

// As an athlete, removing an athlete is refused with the role it needs; as
// the head coach it works, and the audit trail lists it.
func TestRemoveNeedsHeadCoachAndIsAudited(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Kai height 1.86")
	te.must("athlete add Mira height 1.78")
	te.must("athlete link Mira <@U_MIRA>")
	r := te.as("U_MIRA", "athlete remove Kai confirm")
	if r.Kind != bot.KindForbidden || !strings.Contains(plain(r), "needs the role head coach") {
		t.Fatalf("athlete removing Kai:\n%s", plain(r))
	}
	te.must("athlete remove Kai confirm")
	contains(t, te.must("audit"), "athlete remove", "Kai")
}

// TestRoleWordsAsTyped: "head coach" as two words, in either place, and
// each reply with its right article.
func TestRoleWordsAsTyped(t *testing.T) {
	te := newTestEngine(t)
	for _, tt := range []struct{ line, want string }{
		{"role head coach <@U_A>", "U_A is now a head coach."},
		{"role <@U_B> head coach", "U_B is now a head coach."},
		{"role athlete <@U_C>", "U_C is now an athlete."},
		{"role coach <@U_D>", "U_D is now a coach."},
	} {
		contains(t, te.must(tt.line), tt.want)
	}
	if r := te.run("role head coach"); r.Kind != bot.KindUsage {
		t.Errorf("no user: %s", plain(r))
	}
}

// TestNotLinkedHintFitsTheRole: the hint for `me` without a link names a
// command the speaker may run.
func TestNotLinkedHintFitsTheRole(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Mira height 1.78")
	te.must("role coach <@U_COACH>")
	if r := te.as("U_COACH", "history me"); r.Example != "athlete link Mira me" {
		t.Errorf("coach: %s", plain(r))
	}
	r := te.as("U_ANYONE", "margin 1.80 for me v 4.3")
	if r.Example != "whoami" {
		t.Errorf("member: %s", plain(r))
	}
	contains(t, r, "a coach links you")
}
