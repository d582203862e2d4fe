package bot

import (
	"context"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// Store runs one command's reads and writes as a single transaction. Update
// commits when fn returns nil and rolls everything back otherwise, so a
// command never half-writes. The store package's DB satisfies it through a
// small adapter in cmd/lathmark.
type Store interface {
	View(ctx context.Context, fn func(Tx) error) error
	Update(ctx context.Context, fn func(Tx) error) error
	// Batch is Update for many concurrent writers: calls that arrive
	// together share one commit (one fsync). fn may run more than once, so
	// it must build everything it returns afresh on each run.
	Batch(ctx context.Context, fn func(Tx) error) error
}

// Tx is what a command may read and write inside one transaction.
// Lookups that find nothing return ok == false and a nil error.
type Tx interface {
	// Team returns the team settings (zero value if never set).
	Team() (record.Team, error)
	PutTeam(t record.Team) error

	// AthleteByName finds a profile by name, case-insensitively.
	AthleteByName(name string) (a record.Athlete, ok bool, err error)
	AthleteByID(id uint64) (a record.Athlete, ok bool, err error)
	// Athletes lists every profile sorted by name.
	Athletes() ([]record.Athlete, error)
	// PutAthlete inserts (ID 0: a fresh ID is assigned and written back) or
	// replaces a profile, keeping the name index in step with renames.
	// A name already held by another athlete is an error.
	PutAthlete(a *record.Athlete) error
	// DeleteAthlete removes the profile, its attempts, its lines and its user
	// links, and reports how many records went.
	DeleteAthlete(id uint64) (removed int, err error)

	// AddAttempts stores attempts, assigning each a Seq so that keys are
	// unique, and writes the assigned Seq back into the slice.
	AddAttempts(as []record.Attempt) error
	// Attempts calls fn for the athlete's attempts with from <= Time < to in
	// time order, by one range scan. Returning record.ErrStop from fn ends
	// early with a nil error; any other error ends it and is returned.
	Attempts(athleteID uint64, from, to time.Time, fn func(record.Attempt) error) error
	// DeleteAttempts removes attempts by key; missing keys are ignored.
	DeleteAttempts(keys []record.Key) error

	// PutLine records a logged line for undo.
	PutLine(l record.Line) error
	// LastLine returns the most recent line logged by a chat user.
	LastLine(loggedBy string) (l record.Line, ok bool, err error)
	DeleteLine(l record.Line) error
	// NextLineNumber hands out a fresh line number (#N, never reused);
	// LastLineNumber is the highest handed out; LineByNumber finds a line.
	NextLineNumber() (uint64, error)
	LastLineNumber() (uint64, error)
	LineByNumber(n uint64) (l record.Line, ok bool, err error)

	User(id string) (u record.User, ok bool, err error)
	PutUser(u record.User) error
	DeleteUser(id string) error
	Users() ([]record.User, error)

	// Seen reports whether a message or event id was already handled; MarkSeen records it.
	Seen(id string) (bool, error)
	MarkSeen(id string, at time.Time) error

	// Audit appends an entry to the append-only audit trail.
	Audit(e record.AuditEntry) error
	// AuditEntries calls fn for entries with Time >= since, oldest first
	// (record.ErrStop ends early).
	AuditEntries(since time.Time, fn func(record.AuditEntry) error) error
	// RewriteAudit stores fn's entry in place of each entry fn reports
	// changed, keeping its key: forget's pseudonymisation, nothing else.
	RewriteAudit(fn func(record.AuditEntry) (record.AuditEntry, bool)) (int, error)

	// DigestPosted reports when the digest of an ISO week ("2026-W49") went out.
	DigestPosted(week string) (at time.Time, ok bool, err error)
	MarkDigestPosted(week string, at time.Time) error
	// UnmarkDigestPosted releases a week claimed by MarkDigestPosted whose
	// post finally failed.
	UnmarkDigestPosted(week string) error

	// HintShown reports when a hint was last shown to a chat user;
	// MarkHintShown records it (see hintDue).
	HintShown(user, hint string) (at time.Time, ok bool, err error)
	MarkHintShown(user, hint string, at time.Time) error
}

// Clock tells the time; tests pass a fixed or stepping clock.
type Clock interface {
	Now() time.Time
}

// ClockFunc adapts a function to Clock.
type ClockFunc func() time.Time

// Now calls f.
func (f ClockFunc) Now() time.Time { return f() }
