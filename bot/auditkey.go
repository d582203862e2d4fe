package bot

import (
	"encoding/json"
	"fmt"
	"slices"
	"sort"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// The audit trail follows athletes, not names: every entry carries the id
// of the athlete it concerns, so `audit Mira` still lists what happened to
// her under an earlier name. Entries written before the id was kept are
// matched when read: by the athlete record, line or user link they hold,
// else by the name the athlete bore at the entry's time (read from the
// trail's own renames).

// auditAthlete finds the athlete a change concerns: from the records
// before and after the change, else the athlete now called subject.
func auditAthlete(tx Tx, subject string, vals ...any) (uint64, error) {
	for _, v := range vals {
		if id := athleteIn(v); id != 0 {
			return id, nil
		}
	}
	if subject == "" || strings.ContainsAny(subject, " ") {
		return 0, nil
	}
	a, ok, err := tx.AthleteByName(subject)
	if err != nil || !ok {
		return 0, err
	}
	return a.ID, nil
}

// athleteIn is the athlete id a stored value names, 0 when none.
func athleteIn(v any) uint64 {
	switch x := v.(type) {
	case record.Athlete:
		return x.ID
	case *record.Athlete:
		if x != nil {
			return x.ID
		}
	case record.User:
		return x.AthleteID
	case record.Line:
		return x.AthleteID
	case []record.Attempt:
		if len(x) > 0 {
			return x[0].AthleteID
		}
	case record.Attempt:
		return x.AthleteID
	}
	return 0
}

// athleteInJSON is athleteIn for an entry's stored JSON: an athlete
// record ("id" with "name"), or a line, user or attempts ("athlete").
func athleteInJSON(s string) uint64 {
	if s == "" {
		return 0
	}
	var m map[string]any
	if json.Unmarshal([]byte(s), &m) != nil {
		var list []map[string]any
		if json.Unmarshal([]byte(s), &list) != nil || len(list) == 0 {
			return 0
		}
		m = list[0]
	}
	num := func(k string) uint64 {
		f, ok := m[k].(float64)
		if !ok || f < 1 {
			return 0
		}
		return uint64(f)
	}
	if _, named := m["name"]; named {
		if id := num("id"); id != 0 {
			return id
		}
	}
	return num("athlete")
}

// entryAthlete is the athlete an entry concerns, as stored or as read
// from its records.
func entryAthlete(e record.AuditEntry) uint64 {
	if e.AthleteID != 0 {
		return e.AthleteID
	}
	if id := athleteInJSON(e.Before); id != 0 {
		return id
	}
	return athleteInJSON(e.After)
}

// nameSpan is a name an athlete bore until a time (zero: still).
type nameSpan struct {
	name  string
	until time.Time
}

// namesHeld reads from the trail's renames the names an athlete bore, in
// order, ending with the current one.
func namesHeld(a record.Athlete, entries []record.AuditEntry) []nameSpan {
	var spans []nameSpan
	for _, e := range entries {
		if e.Action != "athlete rename" || entryAthlete(e) != a.ID {
			continue
		}
		var before record.Athlete
		if json.Unmarshal([]byte(e.Before), &before) == nil && before.Name != "" {
			spans = append(spans, nameSpan{name: before.Name, until: e.Time})
		}
	}
	sort.SliceStable(spans, func(i, j int) bool { return spans[i].until.Before(spans[j].until) })
	return append(spans, nameSpan{name: a.Name})
}

// concerns reports whether an entry is about athlete a: by id, or for an
// entry without one, by the name a bore at the entry's time.
func concerns(e record.AuditEntry, a record.Athlete, spans []nameSpan) bool {
	if id := entryAthlete(e); id != 0 {
		return id == a.ID
	}
	if !a.Created.IsZero() && e.Time.Before(a.Created.Add(-time.Second)) {
		return false
	}
	i := slices.IndexFunc(spans, func(s nameSpan) bool { return s.until.IsZero() || !e.Time.After(s.until) })
	return i >= 0 && strings.EqualFold(spans[i].name, e.Subject)
}

// auditOf lists the entries since a time that concern athlete a, under
// any name it bore. The whole trail is read once: its renames say which
// names a bore when.
func auditOf(tx Tx, a record.Athlete, since time.Time) ([]record.AuditEntry, error) {
	var renames, recent []record.AuditEntry
	err := tx.AuditEntries(time.Time{}, func(e record.AuditEntry) error {
		if e.Action == "athlete rename" {
			renames = append(renames, e)
		}
		if !e.Time.Before(since) {
			recent = append(recent, e)
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	spans := namesHeld(a, renames)
	var out []record.AuditEntry
	for _, e := range recent {
		if concerns(e, a, spans) {
			out = append(out, e)
		}
	}
	return out, nil
}

// clip shortens s to at most n runes, marking the cut with "…".
func clip(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n-1]) + "…"
}

// auditChange is the old → new values of an entry, briefly: the fields
// that differ ("pb 1.81 → 1.83"), what was added or removed.
func auditChange(e record.AuditEntry) string {
	before, after := jsonObject(e.Before), jsonObject(e.After)
	switch {
	case before == nil && after == nil:
		return ""
	case before == nil:
		if l, ok := after["line"].(string); ok {
			return l
		}
		return "new: " + fieldList(after, nil)
	case after == nil:
		return "removed: " + fieldList(before, nil)
	}
	return fieldList(after, before)
}

// jsonObject reads an entry's record as an object; a list becomes its
// length, anything else nil.
func jsonObject(s string) map[string]any {
	if s == "" {
		return nil
	}
	var m map[string]any
	if json.Unmarshal([]byte(s), &m) == nil {
		return m
	}
	var list []any
	if json.Unmarshal([]byte(s), &list) == nil {
		return map[string]any{"records": len(list)}
	}
	return nil
}

// auditFieldNames shortens stored field names for the change column.
var auditFieldNames = map[string]string{
	"pb_m": "pb", "stature_m": "height", "mass_kg": "mass", "birth_year": "born", "leg": "leg",
	"athlete": "linked athlete", "body_depth_m": "depth",
}

// fieldList writes "key value" pairs of m, or with old set "key old → new"
// for the keys whose values differ. Ids, creation times and chart slots
// are left out.
func fieldList(m, old map[string]any) string {
	keys := make([]string, 0, len(m)+len(old))
	for k := range m {
		keys = append(keys, k)
	}
	for k := range old {
		if _, ok := m[k]; !ok {
			keys = append(keys, k)
		}
	}
	sort.Strings(keys)
	var parts []string
	for _, k := range keys {
		if k == "id" || k == "created" || k == "chart_style" || strings.HasPrefix(k, "_") {
			continue
		}
		name := k
		if n, ok := auditFieldNames[k]; ok {
			name = n
		}
		nv, ov := show(m[k]), show(old[k])
		switch {
		case old == nil:
			parts = append(parts, name+" "+nv)
		case nv != ov:
			parts = append(parts, fmt.Sprintf("%s %s → %s", name, ov, nv))
		}
	}
	return strings.Join(parts, ", ")
}

// show writes one JSON value; a missing one is "–".
func show(v any) string {
	switch x := v.(type) {
	case nil:
		return "–"
	case string:
		if x == "" {
			return "–"
		}
		return x
	case float64:
		return fmt.Sprint(x)
	case bool:
		if x {
			return "yes"
		}
		return "no"
	}
	b, _ := json.Marshal(v)
	return string(b)
}
