package bot_test

import (
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
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

// roleCase is one line of the role matrix and the roles that may run it.
type roleCase struct {
	line    string
	allowed []string
	// terminal marks a line that reads the bot's own files (import csv
	// PATH): from chat it is refused for everyone, for the head coach with
	// the reason that it works only at the terminal.
	terminal bool
}

var (
	staff    = []string{head, coach}
	members  = []string{head, coach, athlete}
	headOnly = []string{head}
)

// roleCases builds the matrix from the command table itself, so that a new
// command is covered the day it is added: each command's help example, and
// when it names an athlete, once for Mira (the athlete's own) and once for
// Kai (another athlete's). Who may run it follows from the command's
// declared access and the athlete named: anyone for calculations and help;
// athletes for themselves; coaches for anyone; head coaches for removals,
// settings and roles. Lines whose rule is not the declared access alone
// are listed with their own roles.
func roleCases(cmds []bot.CommandInfo) []roleCase {
	var out []roleCase
	for _, c := range cmds {
		for _, v := range athleteVariants(c.Example) {
			out = append(out, roleCase{line: v.line, allowed: rolesFor(c.Access, v.subject), terminal: strings.HasPrefix(v.line, "import csv /")})
		}
	}
	return append(out, []roleCase{
		{line: "import csv /nonexistent/attempts.csv", allowed: headOnly, terminal: true},
		{line: "help safety", allowed: everyRole},
		{line: "flight time 0.60", allowed: everyRole},
		{line: "margin 1.80 for Mira v 4.3", allowed: members},
		{line: "margin 1.80 for Kai v 4.3", allowed: staff},
		{line: "com for Kai model segments", allowed: staff},
		{line: "crossing 2.05 for Kai v 4.4 from 1.1", allowed: staff},
		{line: "athlete me", allowed: members},
		{line: "history me", allowed: members},
		{line: "best Mira", allowed: members},
		{line: "export csv", allowed: staff}, // every athlete
		{line: "export csv Mira", allowed: members},
		{line: "chart Kai", allowed: staff},
		{line: "audit 30d", allowed: staff},
		{line: "audit Kai 30d", allowed: staff},
		{line: "plan Kai", allowed: staff},
		{line: "season Kai", allowed: staff},
		{line: "compare Kai Lena 12w", allowed: staff},
		{line: "athlete set Mira consent yes", allowed: headOnly}, // a guardian's consent: head coaches only
		{line: "athlete set Kai private yes", allowed: staff},
		{line: "athlete add Zed height 1.80 born 2012 consent yes", allowed: headOnly},
		{line: "athletes juniors", allowed: members},
		{line: "fix #2 1.90 o", allowed: staff}, // line #1 is Mira's, #2 Kai's
		{line: "drop #2", allowed: staff},
		{line: "undo line 2", allowed: staff},
		{line: "undo line 1", allowed: members},
		{line: "standings last", allowed: members}, // a filed sheet: read like the open one
		{line: "meets", allowed: members},
	}...)
}

// subjects of a matrix line: no athlete, the athlete's own, another's.
const (
	noSubject = iota
	ownSubject
	otherSubject
)

type variant struct {
	line    string
	subject int
}

var (
	miraWord = regexp.MustCompile(`\bMira\b`)
	kaiWord  = regexp.MustCompile(`\bKai\b`)
)

// athleteVariants is the line as it is when it names no athlete, else once
// about Mira and once about Kai.
func athleteVariants(line string) []variant {
	if !miraWord.MatchString(line) && !kaiWord.MatchString(line) {
		return []variant{{line, noSubject}}
	}
	return []variant{
		{kaiWord.ReplaceAllString(line, "Mira"), ownSubject},
		{miraWord.ReplaceAllString(line, "Kai"), otherSubject},
	}
}

// rolesFor is who may run a line by its command's declared access
// (bot.CommandInfo.Access) and the athlete it names.
func rolesFor(access string, subject int) []string {
	switch {
	case access == "head coach":
		return headOnly
	case access == "coach", subject == otherSubject:
		return staff
	case access == "self or coach", subject == ownSubject:
		return members
	}
	return everyRole
}

// TestRoleMatrix runs every command of the command table against every
// role, in a shared channel and in a direct message, and checks that it is
// allowed or refused as the README's role table says; a refusal names the
// role it needs and who can grant it and writes nothing; no reply posted
// in the channel shows a hidden athlete or profile details. Under -short
// each line runs once per role, in a channel or a direct message by turns
// (sampled); the long form runs both.
func TestRoleMatrix(t *testing.T) {
	f := newPrivacyFixture(t)
	cases := roleCases(f.e.Commands())
	if len(cases) < len(f.e.Commands()) {
		t.Fatalf("%d cases for %d commands", len(cases), len(f.e.Commands()))
	}
	runs, all := 0, 0
	defer func() {
		t.Logf("%d of %d runs (%d lines x %d roles x channel/DM)", runs, all, len(cases), len(everyRole))
	}()
	for k, tt := range cases {
		for ri, who := range everyRole {
			for _, inChannel := range []bool{true, false} {
				all++
				if testing.Short() && sampled(k, ri) != inChannel {
					continue
				}
				runs++
				place := "dm"
				if inChannel {
					place = "channel"
				}
				r := f.run(who, tt.line, inChannel)
				want := slices.Contains(tt.allowed, who)
				forbidden := r.Kind == bot.KindForbidden
				if tt.terminal && want {
					if !forbidden || !strings.Contains(plain(r), "terminal") {
						t.Errorf("%s %s %q: from chat it should be refused as a terminal-only command:\n%s", who, place, tt.line, plain(r))
					}
					continue
				}
				switch {
				case r.Kind == bot.KindInternal:
					t.Errorf("%s %s %q: internal failure:\n%s", who, place, tt.line, plain(r))
				case want && forbidden:
					t.Errorf("%s %s should be allowed %q:\n%s", who, place, tt.line, plain(r))
				case !want && !forbidden:
					t.Errorf("%s %s should be refused %q, got %v:\n%s", who, place, tt.line, r.Kind, plain(r))
				case !want:
					p := plain(r)
					if !(strings.Contains(p, "needs the role") || strings.Contains(p, "themself or a coach")) || !strings.Contains(p, "head coach") {
						t.Errorf("%s %q: the refusal does not name the role needed and who grants it:\n%s", who, tt.line, p)
					}
					if f.st.wrote.Load() {
						t.Errorf("%s %q: a refused command wrote to the store", who, tt.line)
					}
				}
				if inChannel {
					if leaks := channelLeaks(r); len(leaks) > 0 {
						t.Errorf("%s %q in a channel shows %s:\n%s", who, tt.line, strings.Join(leaks, ", "), plain(r))
					}
				}
			}
		}
	}
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
