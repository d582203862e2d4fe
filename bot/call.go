package bot

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"slices"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// errDuplicate means the message was already handled: a re-delivery.
var errDuplicate = errors.New("message already handled")

// call is one command being run: the request, the speaker and the engine.
type call struct {
	ctx  context.Context
	e    *Engine
	req  Request
	cmd  command
	args []token
	now  time.Time
	user record.User // the speaker, with the role in force
}

// loadSpeaker reads the speaker's stored role and link. A configured head
// coach is a head coach whatever the store says.
func (c *call) loadSpeaker() error {
	c.user = record.User{ID: c.req.UserID, Name: c.req.UserName}
	err := c.e.store.View(c.ctx, func(tx Tx) error {
		u, ok, err := tx.User(c.req.UserID)
		if err != nil || !ok {
			return err
		}
		c.user = u
		if c.req.UserName != "" {
			c.user.Name = c.req.UserName // the chat's current display name
		}
		return nil
	})
	if err != nil {
		return fmt.Errorf("load speaker %q: %w", c.req.UserID, err)
	}
	if slices.Contains(c.e.headCoaches, c.req.UserID) {
		c.user.Role = record.RoleHeadCoach
	}
	return nil
}

// roleName is how replies name a role.
func roleName(r record.Role) string {
	switch r {
	case record.RoleHeadCoach:
		return "head coach"
	case record.RoleCoach:
		return "coach"
	case record.RoleAthlete:
		return "athlete"
	default:
		return "workspace member"
	}
}

// withArticle puts "a" or "an" before a role name.
func withArticle(s string) string {
	if s != "" && strings.ContainsRune("aeiou", rune(s[0])) {
		return "an " + s
	}
	return "a " + s
}

// rank orders roles: a higher rank may do everything a lower one may.
func rank(r record.Role) int {
	switch r {
	case record.RoleHeadCoach:
		return 3
	case record.RoleCoach:
		return 2
	case record.RoleAthlete:
		return 1
	default:
		return 0
	}
}

// allowed checks the speaker's role against a command's access.
func (c *call) allowed(a access) error {
	need := record.RoleNone
	switch a {
	case selfOrCoach:
		need = record.RoleAthlete
	case coachOnly:
		need = record.RoleCoach
	case headOnly:
		need = record.RoleHeadCoach
	}
	if rank(c.user.Role) >= rank(need) {
		return nil
	}
	return forbiddenErr("whoami", "%q needs the role %s; you are %s. A head coach can grant roles with `role coach @user` or `role athlete @user`.",
		c.cmd.name, roleName(need), withArticle(roleName(c.user.Role)))
}

// mayActFor checks that the speaker may log for or read an athlete: coaches
// for anyone, athletes only for the athlete linked to them.
func (c *call) mayActFor(a record.Athlete) error {
	if rank(c.user.Role) >= rank(record.RoleCoach) {
		return nil
	}
	if c.user.Role == record.RoleAthlete && c.user.AthleteID == a.ID && a.ID != 0 {
		return nil
	}
	// The athlete is not named: reached by a line number (drop #5), the
	// refusal must not tell an athlete whose line it is.
	return forbiddenErr("history me", "only that athlete themself or a coach may do that; you are %s. A head coach can link you with `athlete link NAME @you`.",
		withArticle(roleName(c.user.Role)))
}

// athleteFor finds the named athlete and checks that the speaker may log
// for or read them (mayActFor): the opening of every per-athlete command.
// Below coach only the speaker's own athlete resolves, and any other name
// gets one refusal, existing or not (ownAthlete, bot/privacy.go).
func (c *call) athleteFor(tx Tx, name string) (record.Athlete, error) {
	if rank(c.user.Role) < rank(record.RoleCoach) {
		return c.ownAthlete(tx, name)
	}
	ath, err := c.findAthlete(tx, name)
	if err != nil {
		return record.Athlete{}, err
	}
	if err := c.mayActFor(ath); err != nil {
		return record.Athlete{}, err
	}
	return ath, nil
}

// view runs fn in a read-only transaction.
func (c *call) view(fn func(Tx) error) error {
	return c.e.store.View(c.ctx, fn)
}

// update runs fn in one read-write transaction. When the request carries a
// message id, the id is checked and recorded in the same transaction, so a
// re-delivered message changes nothing the second time (errDuplicate).
func (c *call) update(fn func(Tx) error) error {
	return c.e.store.Update(c.ctx, c.once(fn))
}

// updateBatched is update through the store's group commit, for the hot
// write path (logging from many phones at once). fn may run more than once
// and must build its results afresh each time.
func (c *call) updateBatched(fn func(Tx) error) error {
	return c.e.store.Batch(c.ctx, c.once(fn))
}

// once wraps fn with the message-id check: a message already handled
// changes nothing (errDuplicate); otherwise its id is recorded in the same
// transaction as its changes.
func (c *call) once(fn func(Tx) error) func(Tx) error {
	return func(tx Tx) error {
		if id := c.req.MessageID; id != "" {
			seen, err := tx.Seen(id)
			if err != nil {
				return err
			}
			if seen {
				return errDuplicate
			}
			if err := tx.MarkSeen(id, c.now); err != nil {
				return err
			}
		}
		if err := c.forgetDelivery(tx); err != nil {
			return err
		}
		return fn(tx)
	}
}

// audit appends who changed what, with the record before and after as JSON.
// before or after may be nil.
func (c *call) audit(tx Tx, action, subject string, before, after any) error {
	id, err := auditAthlete(tx, subject, before, after)
	if err != nil {
		return fmt.Errorf("audit %s: %w", action, err)
	}
	return c.auditFor(tx, id, action, subject, before, after)
}

// auditFor is audit for a change to a known athlete (0: none), for a
// change after which the athlete can no longer be looked up.
func (c *call) auditFor(tx Tx, athleteID uint64, action, subject string, before, after any) error {
	enc := func(v any) (string, error) {
		if v == nil {
			return "", nil
		}
		b, err := json.Marshal(v)
		return string(b), err
	}
	b, err := enc(before)
	if err != nil {
		return fmt.Errorf("audit %s: %w", action, err)
	}
	a, err := enc(after)
	if err != nil {
		return fmt.Errorf("audit %s: %w", action, err)
	}
	actor := c.user.ID
	if c.user.Name != "" {
		actor = c.user.Name + " (" + c.user.ID + ")"
	}
	return tx.Audit(record.AuditEntry{Time: c.now, Actor: actor, Action: action, Subject: subject, AthleteID: athleteID, Before: b, After: a, Seeded: c.req.Seed})
}

// findAthlete resolves a name typed by the speaker: "me" is the speaker's
// linked athlete; an unknown name gets a did-you-mean.
func (c *call) findAthlete(tx Tx, name string) (record.Athlete, error) {
	if strings.EqualFold(name, "me") || isMention(name) && mentionID(name) == c.user.ID {
		if c.user.AthleteID == 0 {
			if rank(c.user.Role) < rank(record.RoleCoach) {
				// athlete link is a coach's command: name who can run it.
				return record.Athlete{}, notFoundErr("whoami", "you are not linked to an athlete yet; a coach links you with `athlete link NAME @you`, or name the athlete instead of me")
			}
			return record.Athlete{}, notFoundErr("athlete link Mira me", "you are not linked to an athlete yet")
		}
		a, ok, err := tx.AthleteByID(c.user.AthleteID)
		if err != nil {
			return a, err
		}
		if !ok {
			return a, notFoundErr("athlete link Mira me", "the athlete linked to you no longer exists")
		}
		return a, nil
	}
	if isMention(name) {
		u, ok, err := tx.User(mentionID(name))
		if err != nil {
			return record.Athlete{}, err
		}
		if !ok || u.AthleteID == 0 {
			return record.Athlete{}, notFoundErr("athlete link Mira @mira", "%s is not linked to an athlete", name)
		}
		a, ok, err := tx.AthleteByID(u.AthleteID)
		if err != nil || ok {
			return a, err
		}
		return a, notFoundErr("athletes", "the athlete linked to %s no longer exists", name)
	}
	name = nfc(name)
	a, ok, err := tx.AthleteByName(name)
	if err != nil || ok {
		return a, err
	}
	all, err := tx.Athletes()
	if err != nil {
		return a, err
	}
	if a, ok := athleteByFoldedName(all, name); ok {
		return a, nil // a name stored before names were normalised
	}
	if s, ok := nearest(name, c.suggestable(all)); ok {
		return a, notFoundErr(replaceWord(c.req.Text, name, s), "no athlete called %q. Did you mean %s?", name, s)
	}
	example := "athletes"
	if checkName(name, "") == nil {
		example = "athlete add " + name + " height 1.80"
	}
	return a, notFoundErr(example, "no athlete called %q. `athletes` lists the squad.", name)
}

// isMention reports whether a word is a Slack user mention, <@U123> or <@U123|name>.
func isMention(w string) bool { return strings.HasPrefix(w, "<@") && strings.HasSuffix(w, ">") }

// mentionID extracts the user id from a mention.
func mentionID(w string) string {
	id := strings.TrimSuffix(strings.TrimPrefix(w, "<@"), ">")
	id, _, _ = strings.Cut(id, "|")
	return id
}

// imperial reports whether replies use feet and inches.
func imperial(t record.Team) bool { return t.Units == record.Imperial }

// replaceWord swaps the first whole-word occurrence of old in line for new,
// to turn a typo into a ready-to-send example.
func replaceWord(line, old, repl string) string {
	ts := tokenize(line)
	for i, t := range ts {
		if t.Raw == old {
			ts[i].Raw = repl
			return joinRaw(ts)
		}
	}
	return line
}
