package bot

import (
	"context"
	"strings"
	"unicode"

	"golang.org/x/text/unicode/norm"

	"github.com/lathmark-team/lathmark/internal/record"
)

// hiddenInChannel reports whether an athlete must appear in no reply seen
// in a shared channel: marked private, or under 18 this year with no
// parent's or guardian's consent recorded (`athlete set NAME consent yes`).
// Such an athlete is shown only in direct messages and in replies to the
// asker alone.
func hiddenInChannel(a record.Athlete, year int) bool {
	return a.Private || (isMinor(a, year) && !a.Consent)
}

// hiddenReason says in a few words why an athlete is kept out of channels.
func hiddenReason(a record.Athlete) string {
	if a.Private {
		return "private"
	}
	return "under 18, no consent recorded"
}

// hidden reports whether the athlete is kept out of channel replies this
// year (the request's year).
func (c *call) hidden(a record.Athlete) bool { return hiddenInChannel(a, c.now.Year()) }

// keepHiddenOutOfChannel is the engine's last check on every reply: a reply
// that would be posted in a shared channel and names an athlete kept out of
// channels (in its text, a table, a button or a text attachment) goes to
// the asker alone instead. Commands filter their own lists first; this
// catches whatever a command (a new one, say) did not. If the athletes
// cannot be read the reply goes to the asker alone too.
func (e *Engine) keepHiddenOutOfChannel(ctx context.Context, req Request, r Reply) Reply {
	if req.Channel == "" || req.Direct || r.Ephemeral {
		return r
	}
	var names []string
	err := e.store.View(ctx, func(tx Tx) error {
		all, err := tx.Athletes()
		for _, a := range all {
			if hiddenInChannel(a, req.Time.Year()) {
				names = append(names, a.Name)
			}
		}
		return err
	})
	if err != nil {
		e.log.Error("privacy check could not read the athletes; the reply goes to the asker only", "err", err)
		return toAskerOnly(r)
	}
	if len(names) > 0 && replyNames(r, names) {
		return toAskerOnly(r)
	}
	return r
}

// toAskerOnly marks a reply, and the details behind it, as shown to the
// asker only.
func toAskerOnly(r Reply) Reply {
	r.Ephemeral = true
	if r.Details != nil {
		d := *r.Details
		d.Ephemeral = true
		r.Details = &d
	}
	return r
}

// replyNames reports whether any of names appears as a word anywhere in
// what a reply shows (its details included). Text attachments (CSV, JSON)
// are searched too; pictures are the command's own business (chart).
func replyNames(r Reply, names []string) bool {
	found := false
	look := func(s string) {
		if !found && s != "" && textNames(s, names) {
			found = true
		}
	}
	var walk func(r Reply)
	walk = func(r Reply) {
		look(r.Title)
		for _, s := range r.Lines {
			look(s)
		}
		for _, f := range r.Fields {
			look(f.Label)
			look(f.Value)
		}
		if r.Table != nil {
			for _, row := range append([][]string{r.Table.Header}, r.Table.Rows...) {
				for _, cell := range row {
					look(cell)
				}
			}
		}
		for _, s := range r.Notes {
			look(s)
		}
		for _, s := range r.Assumptions {
			look(s)
		}
		look(r.Caution)
		look(r.Example)
		for _, a := range r.Actions {
			look(a.Label)
			look(a.Command)
		}
		for _, f := range r.Files {
			look(f.Name)
			look(f.Title)
			if strings.HasPrefix(f.MIME, "text/") || f.MIME == "application/json" {
				look(string(f.Data))
			}
		}
		if r.Details != nil {
			walk(*r.Details)
		}
	}
	walk(r)
	return found
}

// textNames reports whether any name occurs in s as a whole word, compared
// case-insensitively after Unicode NFC normalisation: the letters or digits
// just before and after it (if any) are not letters or digits.
func textNames(s string, names []string) bool {
	low := strings.ToLower(norm.NFC.String(s))
	for _, n := range names {
		n = strings.ToLower(norm.NFC.String(n))
		if n == "" {
			continue
		}
		for from := 0; ; {
			i := strings.Index(low[from:], n)
			if i < 0 {
				break
			}
			i += from
			end := i + len(n)
			if !wordRuneBefore(low, i) && !wordRuneAt(low, end) {
				return true
			}
			from = i + 1
		}
	}
	return false
}

func wordRuneBefore(s string, i int) bool {
	if i == 0 {
		return false
	}
	r := []rune(s[:i])
	return isWordRune(r[len(r)-1])
}

func wordRuneAt(s string, i int) bool {
	for _, r := range s[i:] {
		return isWordRune(r)
	}
	return false
}

func isWordRune(r rune) bool { return unicode.IsLetter(r) || unicode.IsDigit(r) }

// suggestable are the athletes' names a did-you-mean may offer the
// speaker: every name to a coach; to anyone else only their own athlete's,
// so that a typo never tells an athlete who else is in the squad.
func (c *call) suggestable(all []record.Athlete) []string {
	var names []string
	for _, a := range all {
		if rank(c.user.Role) >= rank(record.RoleCoach) || (a.ID == c.user.AthleteID && a.ID != 0) {
			names = append(names, a.Name)
		}
	}
	return names
}

// ownAthlete resolves a name typed by a speaker below coach (an athlete, or
// a workspace member asking a calculation for someone): "me", a mention of
// themself or their own linked athlete's name. Every other name gets the
// one refusal of notYoursErr, whether it names another athlete, a hidden
// one (private, under 18 without consent) or nobody, so that the reply
// never tells who is in the squad.
func (c *call) ownAthlete(tx Tx, name string) (record.Athlete, error) {
	if strings.EqualFold(name, "me") || isMention(name) && mentionID(name) == c.user.ID {
		return c.findAthlete(tx, name) // its refusals concern the speaker alone
	}
	var own record.Athlete
	if c.user.Role == record.RoleAthlete && c.user.AthleteID != 0 {
		a, ok, err := tx.AthleteByID(c.user.AthleteID)
		if err != nil {
			return record.Athlete{}, err
		}
		if ok && foldName(a.Name) == foldName(nfc(name)) {
			return a, nil
		}
		if ok {
			own = a
		}
	}
	return record.Athlete{}, c.notYoursErr(name, own)
}

// notYoursErr is the refusal of a name that is not the speaker's own
// athlete: the name as typed, the role that would be needed and who grants
// it, and the way to the speaker's own jumps, with a did-you-mean when the
// name is close to the speaker's own athlete's. It depends only on what was
// typed and on the speaker, never on whether the name exists.
func (c *call) notYoursErr(name string, own record.Athlete) error {
	if own.Name != "" {
		if s, ok := nearest(name, []string{own.Name}); ok {
			return forbiddenErr(replaceWord(c.req.Text, name, s), "%q: another athlete's jumps and profile need the role coach; you see your own. Did you mean %s?", name, s)
		}
	}
	return forbiddenErr("history me", "%q: logging for or reading another athlete needs the role coach; you are %s, with your own athlete only (`history me`). A head coach grants roles; a coach links you with `athlete link NAME @you`.",
		name, withArticle(roleName(c.user.Role)))
}
