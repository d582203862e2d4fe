package bot

import (
	"encoding/json"
	"slices"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/record"
)

// Forgetting in the audit trail. The trail stays a record of who changed
// what and when, but `forget` takes the athlete out of it: every entry
// about the athlete (by id, or by name for entries older than the id)
// keeps its time, actor and action, gets the neutral label as its subject
// and loses its values (heights, birth year, notes, the sheet entries);
// an entry the athlete's own chat account made names the label as its
// actor when that account goes with the athlete. Undo entries keep
// pointing at what they undid, so undo still passes over changes it took
// back, and refuses a forgotten change with the reason.

// scrubAudit pseudonymises the audit entries about athlete a and by the
// deleted chat users gone (their ids); it returns the entries rewritten.
func scrubAudit(tx Tx, a record.Athlete, gone []string) (int, error) {
	// The names come from the renames, which may follow entries made under
	// an earlier name: one pass for them, kept alone, then the rewrite.
	var renames []record.AuditEntry
	if err := tx.AuditEntries(time.Unix(0, 0), func(e record.AuditEntry) error {
		if e.Action == "athlete rename" {
			renames = append(renames, e)
		}
		return nil
	}); err != nil {
		return 0, err
	}
	var names []string // every name the athlete bore
	for _, s := range namesHeld(a, renames) {
		names = append(names, s.name)
	}
	named := func(subject string) bool {
		return slices.ContainsFunc(names, func(n string) bool { return strings.EqualFold(n, subject) })
	}
	renamed := map[string]string{} // entryID before → after, for undo entries
	return tx.RewriteAudit(func(e record.AuditEntry) (record.AuditEntry, bool) {
		about := e.AthleteID == a.ID || e.AthleteID == 0 && named(e.Subject)
		by := slices.Contains(gone, actorID(e.Actor))
		if !about && !by {
			return e, false
		}
		if by {
			e.Actor = meetsheet.RemovedLabel
		}
		if !about {
			return e, true
		}
		old := entryID(e)
		undid, _ := jsonObject(e.After)[auditUndid].(string)
		e.Subject, e.AthleteID, e.Before, e.After, e.Forgotten = meetsheet.RemovedLabel, 0, "", "", true
		if e.Action == auditUndo && undid != "" {
			if id, ok := renamed[undid]; ok {
				undid = id
			}
			b, err := json.Marshal(map[string]string{auditUndid: undid})
			if err == nil {
				e.After = string(b)
			}
		}
		renamed[old] = entryID(e)
		return e, true
	})
}
