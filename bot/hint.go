package bot

import (
	"strings"
	"time"
)

// hintInterval is how long a hint shown to a person stays quiet for them:
// a reminder once a week, not a line under every reply.
const hintInterval = 7 * 24 * time.Hour

// Hint names, as stored per user.
const (
	hintMeasures = "log-measures" // measurements go with the jump before them
)

// hintDue reports whether hint may be shown to the speaker now, and if so
// records it as shown at c.now (the engine's Clock) in tx, the command's own
// read-write transaction: shown once, then not again for hintInterval. A
// read-only transaction cannot record it, so callers use it in c.update or
// c.updateBatched; an error to record leaves the hint out rather than failing
// the command.
func (c *call) hintDue(tx Tx, hint string) bool {
	user := c.req.UserID
	at, ok, err := tx.HintShown(user, hint)
	if err != nil {
		return false
	}
	if ok && c.now.Sub(at) < hintInterval && !c.now.Before(at) {
		return false
	}
	return tx.MarkHintShown(user, hint, c.now) == nil
}

// measuresHintPrefix opens the log reply's line that says which jump the
// measurements went with.
const measuresHintPrefix = "Measurements go with the jump written just before them"

// quietHint keeps r's line starting with prefix only when hint is due for
// the speaker (hintDue), and drops it otherwise.
func (c *call) quietHint(tx Tx, r Reply, hint, prefix string) Reply {
	for i, l := range r.Lines {
		if !strings.HasPrefix(l, prefix) {
			continue
		}
		if c.hintDue(tx, hint) {
			return r
		}
		r.Lines = append(r.Lines[:i:i], r.Lines[i+1:]...)
		return r
	}
	return r
}
