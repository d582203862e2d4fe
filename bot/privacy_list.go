package bot

import (
	"fmt"
	"slices"
	"strings"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// runAthleteList lists the squad by role: an athlete sees their own line
// and who their coaches are; a coach sees everyone, except that in a
// shared channel the athletes kept out of channels (hiddenInChannel) are
// left out and only counted, and in a direct message they are named as
// such under the table.
func runAthleteList(c *call) (Reply, error) {
	group := ""
	if len(c.args) > 0 {
		group = c.args[0].Raw
	}
	var (
		all   []record.Athlete
		users []record.User
		team  record.Team
	)
	err := c.view(func(tx Tx) error {
		var err error
		if all, err = tx.Athletes(); err != nil {
			return err
		}
		if users, err = tx.Users(); err != nil {
			return err
		}
		team, err = tx.Team()
		return err
	})
	if err != nil {
		return Reply{}, err
	}
	if rank(c.user.Role) < rank(record.RoleCoach) {
		return c.ownLine(all, users, team), nil
	}
	imp := imperial(team)
	t := &Table{Header: []string{"name", "height", "pb", "group"}}
	var left, kept []string
	for _, a := range all {
		if group != "" && !strings.EqualFold(nfc(a.Group), nfc(group)) {
			continue
		}
		if c.hidden(a) {
			if c.inChannel() {
				left = append(left, a.Name)
				continue
			}
			kept = append(kept, a.Name+" ("+hiddenReason(a)+")")
		}
		t.Rows = append(t.Rows, squadRow(a, imp))
	}
	if len(t.Rows) == 0 && len(left) == 0 {
		if group != "" {
			return Reply{Title: "No athletes in group " + group, Example: "athletes", Ephemeral: true}, nil
		}
		return Reply{Title: "No athletes yet", Lines: []string{"Add the first one:"}, Example: exampleAdd}, nil
	}
	title := fmt.Sprintf("Squad: %d athletes", len(t.Rows))
	if group != "" {
		title += " in " + group
	}
	r := Reply{Title: title}
	if len(t.Rows) > 0 {
		r.Table = t
	}
	if len(left) > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("%s not shown in a channel (private, or under 18 without a guardian's consent recorded); ask me in a direct message.", plural(len(left), "more athlete")))
	}
	if len(kept) > 0 {
		r.Notes = append(r.Notes, "Kept out of channel replies: "+strings.Join(kept, ", ")+".")
	}
	return r, nil
}

// squadRow is one athlete's line of the squad list; a private athlete's
// personal best stays blank.
func squadRow(a record.Athlete, imp bool) []string {
	h, pb := "", ""
	if a.StatureM > 0 {
		h = units.Bar(a.StatureM, imp)
	}
	if a.PersonalBestM > 0 && !a.Private {
		pb = units.Bar(a.PersonalBestM, imp)
	}
	return []string{a.Name, h, pb, a.Group}
}

// ownLine is the squad list for an athlete (or anyone below a coach): their
// own line, if they are linked to an athlete, and who their coaches are.
func (c *call) ownLine(all []record.Athlete, users []record.User, team record.Team) Reply {
	r := Reply{Title: "Your line of the squad"}
	for _, a := range all {
		if a.ID == c.user.AthleteID && a.ID != 0 {
			r.Table = &Table{Header: []string{"name", "height", "pb", "group"}, Rows: [][]string{squadRow(a, imperial(team))}}
		}
	}
	if r.Table == nil {
		r.Title = "You are not linked to an athlete yet"
		r.Lines = append(r.Lines, "A coach links you with `athlete link NAME @you`.")
	}
	var coaches []string
	for _, id := range c.e.headCoaches {
		coaches = append(coaches, id)
	}
	for _, u := range users {
		if rank(u.Role) >= rank(record.RoleCoach) && !slices.Contains(c.e.headCoaches, u.ID) {
			coaches = append(coaches, userLabel(u))
		}
	}
	if len(coaches) > 0 {
		r.Lines = append(r.Lines, "Athletes see only their own profile and jumps. Your coaches: "+strings.Join(coaches, ", ")+".")
	} else {
		r.Lines = append(r.Lines, "Athletes see only their own profile and jumps.")
	}
	r.Ephemeral = true
	return r
}

// mayRecordConsent refuses a profile line that records a guardian's
// consent unless the speaker is a head coach: consent decides whether a
// minor appears in channel replies.
func (c *call) mayRecordConsent(o options) error {
	if _, ok := o.word("consent"); !ok || rank(c.user.Role) >= rank(record.RoleHeadCoach) {
		return nil
	}
	return forbiddenErr("whoami", "recording a guardian's consent needs the role head coach; you are %s. Ask a head coach to type `athlete set NAME consent yes`.", withArticle(roleName(c.user.Role)))
}
