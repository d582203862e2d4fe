package bot

import (
	"fmt"
	"time"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/record"
)

// forgotten counts what `forget` removed, each record once, by kind.
type forgotten struct {
	Profiles int `json:"profiles"`
	Attempts int `json:"attempts"` // jumps and passes
	Lines    int `json:"logged_lines"`
	Links    int `json:"chat_links"`
	Roles    int `json:"athlete_roles"` // withdrawn with the link (not a record of its own)
	// Sheets counts the meet sheets (open and filed) the athlete was taken
	// off: renamed to a neutral label, not deleted (not a record removed).
	Sheets int `json:"meet_sheets"`
	// Audit counts the audit entries pseudonymised (scrubAudit): kept,
	// without the athlete's name and values (not a record removed).
	Audit int `json:"audit_entries_pseudonymised"`
}

// total is every record removed: a linked user's record is counted once,
// as its chat link, also when its athlete role goes with it.
func (n forgotten) total() int { return n.Profiles + n.Attempts + n.Lines + n.Links }

// sentence says what went, the parts adding up to the total.
func (n forgotten) sentence() string {
	s := fmt.Sprintf("Deleted %s: %s, %s, %s and %s.", plural(n.total(), "record"), plural(n.Profiles, "profile"),
		plural(n.Attempts, "attempt"), plural(n.Lines, "logged line"), plural(n.Links, "chat link"))
	if n.Roles > 0 {
		s += fmt.Sprintf(" %s withdrawn with the link.", plural(n.Roles, "athlete role"))
	}
	if n.Sheets > 0 {
		s += fmt.Sprintf(" Taken off %s (named %q there; other places unchanged).", plural(n.Sheets, "meet sheet"), meetsheet.RemovedLabel)
	}
	if n.Audit > 0 {
		s += fmt.Sprintf(" Took the name and values out of %s (who changed what, and when, stays).", plural(n.Audit, "audit entry"))
	}
	return s
}

// forgetInTx exports and deletes everything about athlete a: the profile,
// its attempts and logged lines, the chat users' links to it, and the
// athlete role of a user linked to it (a user left with no role and no
// link is removed); on the open and the filed meet sheets the athlete's
// name and id give way to a neutral label (scrubSheets), and so they do in
// the audit trail (scrubAudit).
func (c *call) forgetInTx(tx Tx, a record.Athlete) (forgetExport, forgotten, error) {
	exp := forgetExport{Exported: c.now.UTC(), Athlete: a}
	var n forgotten
	if err := tx.Attempts(a.ID, time.Unix(0, 0), farFuture(), func(at record.Attempt) error {
		exp.Attempts = append(exp.Attempts, at)
		return nil
	}); err != nil {
		return exp, n, err
	}
	users, err := linkedUsers(tx, a.ID)
	if err != nil {
		return exp, n, err
	}
	exp.Users = users
	removed, err := tx.DeleteAthlete(a.ID)
	if err != nil {
		return exp, n, err
	}
	n.Profiles, n.Attempts, n.Links = 1, len(exp.Attempts), len(users)
	// The store counts the profile, attempts, lines and unlinked users.
	n.Lines = removed - n.Profiles - n.Attempts - n.Links
	if n.Lines < 0 {
		return exp, n, fmt.Errorf("forget %s: the store removed %d records, fewer than the %d counted", a.Name, removed, n.Profiles+n.Attempts+n.Links)
	}
	if exp.Sheets, err = scrubSheets(tx, a.ID, true); err != nil {
		return exp, n, err
	}
	n.Sheets = len(exp.Sheets)
	var gone []string
	for _, u := range users {
		if u.Role != record.RoleAthlete {
			continue
		}
		n.Roles++
		if err := tx.DeleteUser(u.ID); err != nil {
			return exp, n, err
		}
		gone = append(gone, u.ID)
	}
	if n.Audit, err = scrubAudit(tx, a, gone); err != nil {
		return exp, n, err
	}
	// The forget itself is recorded without the name it took out.
	return exp, n, c.auditFor(tx, 0, "forget", meetsheet.RemovedLabel, n, nil)
}
