package bot_test

import (
	"context"
	"errors"
	"path/filepath"
	"testing"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// fakeDirectory is a workspace of invented members.
type fakeDirectory struct {
	members []bot.Member
	err     error
	calls   int
}

func (d *fakeDirectory) Members(context.Context) ([]bot.Member, bool, error) {
	d.calls++
	return d.members, true, d.err
}

// dirEngine is a test engine whose engine has a workspace directory.
func dirEngine(t *testing.T, d bot.Directory) *testEngine {
	t.Helper()
	te := newTestEngineAt(t, filepath.Join(t.TempDir(), "lathmark.db"))
	e, err := bot.New(bot.Config{Store: botstore.New(te.DB), Clock: bot.ClockFunc(te.clock), HeadCoaches: []string{"U_HEAD"}, Directory: d})
	if err != nil {
		t.Fatal(err)
	}
	te.E = e
	return te
}

// usersWithRole lists the stored users holding a role.
func usersWithRole(t *testing.T, db *store.DB, r record.Role) []record.User {
	t.Helper()
	var out []record.User
	err := db.View(context.Background(), func(tx *store.Tx) error {
		us, err := tx.Users()
		for _, u := range us {
			if u.Role == r {
				out = append(out, u)
			}
		}
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// TestRoleByNameTerminal: in the terminal `role coach sam` and
// `role coach @sam` grant the role to the same user.
func TestRoleByNameTerminal(t *testing.T) {
	te := newTestEngine(t)
	te.must("role coach sam")
	te.must("role coach @sam")
	cs := usersWithRole(t, te.DB, record.RoleCoach)
	if len(cs) != 1 || cs[0].ID != "sam" {
		t.Fatalf("coaches %+v, want the one user sam", cs)
	}
	// A known user is found by the name the chat gave them.
	te.as("U_KAI", "whoami") // not stored: whoami writes nothing
	logUser(t, te.DB, record.User{ID: "U_KAI", Name: "Kai"})
	te.must("role athlete kai")
	if as := usersWithRole(t, te.DB, record.RoleAthlete); len(as) != 1 || as[0].ID != "U_KAI" {
		t.Fatalf("athletes %+v, want U_KAI", as)
	}
	if r := te.run("role coach <bad>"); r.OK() {
		t.Errorf("a word that is no user id was accepted: %s", plain(r))
	}
}

// TestRoleByNameWorkspace: with a workspace directory a display name (with
// or without @) or a mention ends as the same member id; a name two
// members answer to is refused with both named; an unknown name or a
// failed lookup is refused and nothing is stored.
func TestRoleByNameWorkspace(t *testing.T) {
	d := &fakeDirectory{members: []bot.Member{
		{ID: "U0SAM", Name: "sam", RealName: "Sam Okafor", Handle: "sam.o"},
		{ID: "U0LEE", Name: "Lee", RealName: "Lee Park", Handle: "lee"},
		{ID: "U0LEE2", Name: "Lee W", RealName: "Lee Wong", Handle: "Lee"},
	}}
	te := dirEngine(t, d)
	r := te.must("role coach sam")
	contains(t, r, "sam (U0SAM) is now a coach.")
	te.must("role coach @sam")
	te.must("role coach <@U0SAM>")
	te.must("role coach Sam.O")
	if cs := usersWithRole(t, te.DB, record.RoleCoach); len(cs) != 1 || cs[0].ID != "U0SAM" || cs[0].Name != "sam" {
		t.Fatalf("coaches %+v, want the one member U0SAM", cs)
	}
	before := te.checksum()
	amb := te.run("role coach lee")
	if amb.Kind != bot.KindConflict {
		t.Errorf("ambiguous: %v %s", amb.Kind, plain(amb))
	}
	contains(t, amb, `"lee" could be Lee or Lee W (@Lee)`, "use an @mention")
	if r := te.run("role coach zed"); r.Kind != bot.KindNotFound {
		t.Errorf("unknown name: %s", plain(r))
	}
	d.err = errors.New("users.list: connection refused")
	if r := te.run("role coach samira"); r.OK() || r.Kind == bot.KindInternal {
		t.Errorf("failed lookup: %v %s", r.Kind, plain(r))
	}
	if te.checksum() != before {
		t.Error("a refused role change changed the store")
	}
}

// TestLinkByNameSameUserAsRole: `athlete link Lea lea` links the user
// that `role athlete @lea` made, not a second one.
func TestLinkByNameSameUserAsRole(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Lea height 1.72")
	te.must("role athlete @lea")
	te.must("athlete link Lea lea")
	as := usersWithRole(t, te.DB, record.RoleAthlete)
	if len(as) != 1 || as[0].ID != "lea" || as[0].AthleteID == 0 {
		t.Fatalf("athlete users %+v, want the one user lea, linked", as)
	}
}
