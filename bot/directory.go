package bot

import (
	"context"
	"fmt"
	"regexp"
	"slices"
	"strings"

	"github.com/lathmark-team/lathmark/internal/record"
)

// Directory lists the people of the chat workspace, so that a name typed
// in `role coach sam` resolves to one user id. The Slack front end
// implements it (users.list, cached); the terminal has none.
type Directory interface {
	// Members lists the workspace's people (no bots, no deactivated
	// accounts). ok is false when there is no workspace (the terminal):
	// names then resolve among the users the bot already knows.
	Members(ctx context.Context) (members []Member, ok bool, err error)
}

// Member is one person of the workspace.
type Member struct {
	ID       string // chat user id, as in <@U123>
	Name     string // display name
	RealName string
	Handle   string // account name
}

// label is how a reply names a member: "Sam Okafor (@sam.o)".
func (m Member) label() string {
	name := m.Name
	if name == "" {
		name = m.RealName
	}
	if name == "" {
		name = m.ID
	}
	if m.Handle != "" && !strings.EqualFold(m.Handle, name) {
		return name + " (@" + m.Handle + ")"
	}
	return name
}

// matches reports whether the member answers to a typed name.
func (m Member) matches(w string) bool {
	return m.ID == w || strings.EqualFold(m.Name, w) || strings.EqualFold(m.RealName, w) || strings.EqualFold(m.Handle, w)
}

// plainUserID is a word the terminal accepts as a new chat user id.
var plainUserID = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$`)

// resolveMember turns the word naming a person (an @mention, "me", a
// display name with or without @) into one chat user id and a name for
// replies ("" when none is known). With a workspace directory the name must
// match exactly one member, or the refusal lists the candidates; without
// one (the terminal) it matches the known users, else it is taken as a new
// user id, so `sam` and `@sam` are the same user.
func (c *call) resolveMember(word, example string) (Member, error) {
	switch {
	case strings.EqualFold(word, "me"):
		return Member{ID: c.user.ID, Name: c.user.Name}, nil
	case isMention(word):
		m := Member{ID: mentionID(word)}
		if _, label, ok := strings.Cut(strings.TrimSuffix(strings.TrimPrefix(word, "<@"), ">"), "|"); ok {
			m.Name = label
		}
		if m.ID == "" {
			return Member{}, usageErr(example, "I can't tell who %q is; use an @mention", word)
		}
		return m, nil
	}
	w := strings.TrimPrefix(word, "@")
	if w == "" {
		return Member{}, usageErr(example, "give the person after the role: an @mention or their display name")
	}
	if c.e.directory != nil {
		ms, ok, err := c.e.directory.Members(c.ctx)
		if err != nil {
			c.e.log.Warn("listing workspace members failed", "err", err)
			return Member{}, usageErr(example, "I could not look up the workspace's members just now; use an @mention (type @ and pick the person)")
		}
		if ok {
			return pickMember(ms, w, word, example, "no one in the workspace is called %q; use an @mention (type @ and pick the person)")
		}
	}
	var known []Member
	err := c.view(func(tx Tx) error {
		us, err := tx.Users()
		for _, u := range us {
			known = append(known, Member{ID: u.ID, Name: u.Name})
		}
		return err
	})
	if err != nil {
		return Member{}, err
	}
	if m, err := pickMember(known, w, word, example, "%q"); err == nil || !isNotFound(err) {
		return m, err
	}
	if !plainUserID.MatchString(w) {
		return Member{}, usageErr(example, "I can't tell who %q is; use an @mention or a user id", word)
	}
	return Member{ID: w}, nil
}

// pickMember finds the one member answering to w, or refuses: not found
// (notFoundMsg, with the word), or several candidates named.
func pickMember(ms []Member, w, word, example, notFoundMsg string) (Member, error) {
	var found []Member
	for _, m := range ms {
		if m.matches(w) && !slices.ContainsFunc(found, func(f Member) bool { return f.ID == m.ID }) {
			found = append(found, m)
		}
	}
	switch len(found) {
	case 1:
		return found[0], nil
	case 0:
		return Member{}, notFoundErr(example, notFoundMsg, word)
	}
	labels := make([]string, len(found))
	for i, m := range found {
		labels[i] = m.label()
	}
	return Member{}, conflictErr(example, "%q could be %s; use an @mention to say which", word, joinOr(labels))
}

// joinOr writes "a, b or c".
func joinOr(s []string) string {
	if len(s) < 2 {
		return strings.Join(s, "")
	}
	return strings.Join(s[:len(s)-1], ", ") + " or " + s[len(s)-1]
}

// isNotFound reports whether err is a not-found refusal.
func isNotFound(err error) bool {
	ue, ok := err.(*UserError)
	return ok && ue.Kind == KindNotFound
}

// memberLabel is how a role reply names the user: "Sam (U123)", or the id.
func memberLabel(m Member) string {
	if m.Name == "" || m.Name == m.ID {
		return m.ID
	}
	return fmt.Sprintf("%s (%s)", m.Name, m.ID)
}

// userOf keeps a resolved member's name on its stored user record.
func userOf(cur record.User, m Member) record.User {
	if m.Name != "" {
		cur.Name = m.Name
	}
	return cur
}
