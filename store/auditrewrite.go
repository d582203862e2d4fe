package store

import (
	"fmt"

	"github.com/lathmark-team/lathmark/internal/record"
)

// RewriteAudit passes every audit entry, oldest first, to fn and stores
// the entry fn returns in its place where fn reports a change; the key
// (time and sequence) stays. It is the one rewrite of the otherwise
// append-only trail: `forget` uses it to take an athlete's name and values
// out of the entries about them. It returns the number of entries
// rewritten. The scan reads the whole trail; the writes follow it, so no
// cursor is moved under a put.
func (t *Tx) RewriteAudit(fn func(record.AuditEntry) (record.AuditEntry, bool)) (int, error) {
	b, err := t.bucket(bucketAudit)
	if err != nil {
		return 0, fmt.Errorf("store: rewrite audit: %w", err)
	}
	type rewrite struct {
		key []byte
		e   record.AuditEntry
	}
	var out []rewrite
	c := b.Cursor()
	for k, v := c.First(); k != nil; k, v = c.Next() {
		t.scanSteps++
		var e record.AuditEntry
		if err := decodeJSON(k, v, &e); err != nil {
			return 0, fmt.Errorf("store: rewrite audit: decode %x: %w", k, err)
		}
		if ne, changed := fn(e); changed {
			ne.Time = ne.Time.UTC()
			out = append(out, rewrite{append([]byte(nil), k...), ne})
		}
	}
	for _, r := range out {
		if err := putJSON(b, r.key, r.e); err != nil {
			return 0, fmt.Errorf("store: rewrite audit %x: %w", r.key, err)
		}
	}
	return len(out), nil
}
