package store

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"runtime/debug"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
)

// ErrInconsistent is matched by the error Check returns for a file that
// fails bbolt's page checks or this package's invariants.
var ErrInconsistent = errors.New("data file is inconsistent")

// maxProblems caps how many problems one check lists.
const maxProblems = 20

// Check opens the data file at path read-only (it must not be held by a
// running lathmark) and checks it as (*DB).Check does.
func Check(path string) (err error) {
	defer catchFault(&err, "store: check "+path, debug.SetPanicOnFault(true))
	db, err := Open(path, Options{ReadOnly: true})
	if err != nil {
		return err
	}
	defer func() {
		if cerr := db.Close(); err == nil {
			err = cerr
		}
	}()
	return db.Check()
}

// Check runs bbolt's page-level consistency check and this package's
// invariants on the open file:
//   - the schema version is present and current, and every bucket exists;
//   - every profile's key is its ID, at most the athletes bucket's sequence,
//     and its folded name is indexed to it; every names entry points to a
//     profile whose folded name is that key;
//   - every attempt belongs to an existing athlete and its key matches its
//     athlete, time and Seq;
//   - every line's key matches its user and time, and its athlete (if any)
//     exists; every user's key is its ID and its linked athlete exists;
//   - seen and digest values are 8-byte times; audit keys match their times;
//   - inbox entries decode and the inbox's count matches them.
//
// On a read-write DB it runs in a write transaction (rolled back), which
// bbolt requires for checking while other writers may run; writers wait.
func (db *DB) Check() (err error) {
	defer catchFault(&err, "store: check "+db.path, debug.SetPanicOnFault(true))
	tx, err := db.bolt.Begin(!db.readOnly)
	if err != nil {
		return fmt.Errorf("store: check %s: begin: %w", db.path, err)
	}
	defer func() { _ = tx.Rollback() }()
	// Our own scan first: it touches every data page from this goroutine,
	// where catchFault turns a fault in the memory map into an error.
	problems := invariants(tx)
	for cerr := range tx.Check() {
		problems.add("bbolt: %v", cerr)
	}
	if problems.n == 0 {
		return nil
	}
	return fmt.Errorf("store: check %s: %d problem(s): %w", db.path, problems.n, errors.Join(append([]error{ErrInconsistent}, problems.list...)...))
}

// catchFault, deferred as
//
//	defer catchFault(&err, what, debug.SetPanicOnFault(true))
//
// makes a memory fault in the calling goroutine (reading a damaged
// memory-mapped file) a panic, turns that or any other panic into an error
// for the deferring function, and restores the previous fault setting. It
// guards only reads of files that may be damaged (checks and restores).
func catchFault(err *error, what string, oldPanicOnFault bool) {
	debug.SetPanicOnFault(oldPanicOnFault)
	if r := recover(); r != nil {
		*err = fmt.Errorf("%s: damaged file: %v: %w", what, r, ErrInconsistent)
	}
}

type problemList struct {
	n    int
	list []error
}

func (p *problemList) add(format string, args ...any) {
	p.n++
	if len(p.list) < maxProblems {
		p.list = append(p.list, fmt.Errorf(format, args...))
	}
}

// invariants checks the data against the layout described at SchemaVersion.
func invariants(tx *bolt.Tx) *problemList {
	p := &problemList{}
	v, err := readSchema(tx)
	switch {
	case err != nil:
		p.add("%v", err)
	case v != SchemaVersion:
		p.add("schema version %d, want %d", v, SchemaVersion)
	}
	b := map[string]*bolt.Bucket{}
	for _, name := range allBuckets() {
		if b[name] = tx.Bucket([]byte(name)); b[name] == nil {
			p.add("bucket %s missing", name)
		}
	}
	if p.n > 0 {
		return p
	}

	if v := b[bucketTeam].Get([]byte(keySettings)); v != nil {
		var team record.Team
		if err := json.Unmarshal(v, &team); err != nil {
			p.add("team settings: %v", err)
		}
	}

	athleteIDs := map[uint64]bool{}
	lastID := b[bucketAthletes].Sequence()
	_ = b[bucketAthletes].ForEach(func(k, v []byte) error {
		if len(k) != idLen {
			p.add("athletes key %x is %d bytes, want %d", k, len(k), idLen)
			return nil
		}
		id := binary.BigEndian.Uint64(k)
		athleteIDs[id] = true
		var a record.Athlete
		if err := json.Unmarshal(v, &a); err != nil {
			p.add("athlete %d: %v", id, err)
			return nil
		}
		if a.ID != id {
			p.add("athlete under key %d has ID %d", id, a.ID)
		}
		if id == 0 || id > lastID {
			p.add("athlete %d: id outside 1..%d (the ids given so far)", id, lastID)
		}
		key := foldName(a.Name)
		if key == "" {
			p.add("athlete %d: empty name", id)
		} else if got := b[bucketNames].Get([]byte(key)); !bytes.Equal(got, k) {
			p.add("athlete %d (%q): name index holds %x, want %x", id, a.Name, got, k)
		}
		return nil
	})

	_ = b[bucketNames].ForEach(func(k, v []byte) error {
		if len(v) != idLen {
			p.add("names entry %q is %d bytes, want %d", k, len(v), idLen)
			return nil
		}
		id := binary.BigEndian.Uint64(v)
		a, ok, err := getAthlete(b[bucketAthletes], id)
		switch {
		case err != nil:
			p.add("names entry %q: %v", k, err)
		case !ok:
			p.add("names entry %q points to athlete %d, which has no profile", k, id)
		case foldName(a.Name) != string(k):
			p.add("names entry %q points to athlete %d named %q", k, id, a.Name)
		}
		return nil
	})

	_ = b[bucketAttempts].ForEach(func(k, v []byte) error {
		if len(k) != attemptLen {
			p.add("attempts key %x is %d bytes, want %d", k, len(k), attemptLen)
			return nil
		}
		id := binary.BigEndian.Uint64(k)
		n := binary.BigEndian.Uint64(k[idLen:])
		seq := binary.BigEndian.Uint32(k[idLen+nanosLen:])
		if !athleteIDs[id] {
			p.add("attempt %x: athlete %d has no profile", k, id)
		}
		var a record.Attempt
		if err := json.Unmarshal(v, &a); err != nil {
			p.add("attempt %x: %v", k, err)
			return nil
		}
		if an, err := nanos(a.Time); a.AthleteID != id || err != nil || an != n || a.Seq != seq {
			p.add("attempt %x holds athlete %d time %s seq %d", k, a.AthleteID, a.Time.Format("2006-01-02T15:04:05.999999999Z07:00"), a.Seq)
		}
		if !a.Outcome.Valid() {
			p.add("attempt %x: outcome %d", k, a.Outcome)
		}
		return nil
	})

	_ = b[bucketLines].ForEach(func(k, v []byte) error {
		if len(k) <= lineTail || k[len(k)-lineTail] != 0 {
			p.add("lines key %q is malformed", k)
			return nil
		}
		by := string(k[:len(k)-lineTail])
		n := binary.BigEndian.Uint64(k[len(k)-lineTail+1:])
		var l record.Line
		if err := json.Unmarshal(v, &l); err != nil {
			p.add("line %q: %v", k, err)
			return nil
		}
		if ln, err := nanos(l.Time); l.LoggedBy != by || err != nil || ln != n {
			p.add("line %q holds user %q time %s", k, l.LoggedBy, l.Time)
		}
		if l.AthleteID != 0 && !athleteIDs[l.AthleteID] {
			p.add("line %q: athlete %d has no profile", k, l.AthleteID)
		}
		return nil
	})

	_ = b[bucketUsers].ForEach(func(k, v []byte) error {
		var u record.User
		if err := json.Unmarshal(v, &u); err != nil {
			p.add("user %q: %v", k, err)
			return nil
		}
		if u.ID != string(k) {
			p.add("user under key %q has ID %q", k, u.ID)
		}
		if u.AthleteID != 0 && !athleteIDs[u.AthleteID] {
			p.add("user %q is linked to athlete %d, which has no profile", k, u.AthleteID)
		}
		return nil
	})

	for _, name := range []string{bucketSeen, bucketDigests} {
		_ = b[name].ForEach(func(k, v []byte) error {
			if len(v) != nanosLen {
				p.add("%s entry %q: time value is %d bytes, want %d", name, k, len(v), nanosLen)
			}
			return nil
		})
	}

	lastAudit := b[bucketAudit].Sequence()
	_ = b[bucketAudit].ForEach(func(k, v []byte) error {
		if len(k) != auditLen {
			p.add("audit key %x is %d bytes, want %d", k, len(k), auditLen)
			return nil
		}
		var e record.AuditEntry
		if err := json.Unmarshal(v, &e); err != nil {
			p.add("audit %x: %v", k, err)
			return nil
		}
		if n, err := nanos(e.Time); err != nil || n != binary.BigEndian.Uint64(k) {
			p.add("audit %x holds time %s", k, e.Time)
		}
		if seq := binary.BigEndian.Uint64(k[nanosLen:]); seq == 0 || seq > lastAudit {
			p.add("audit %x: sequence outside 1..%d", k, lastAudit)
		}
		return nil
	})
	inboxInvariants(tx, p)
	return p
}

// Stats counts the records in each bucket.
type Stats struct {
	SchemaVersion uint64
	FileBytes     int64 // size of the data the file holds (bbolt tx.Size)
	TeamSet       bool  // team settings were saved
	Athletes      int
	Names         int
	Attempts      int
	Lines         int
	Users         int
	Seen          int
	Audit         int
	Digests       int
}

// Stats returns the record counts per bucket, read in one transaction.
func (db *DB) Stats() (Stats, error) {
	var s Stats
	err := db.bolt.View(func(tx *bolt.Tx) error {
		v, err := readSchema(tx)
		if err != nil {
			return err
		}
		s.SchemaVersion = v
		s.FileBytes = tx.Size()
		count := func(name string) (int, error) {
			b := tx.Bucket([]byte(name))
			if b == nil {
				return 0, fmt.Errorf("bucket %s missing", name)
			}
			return b.Stats().KeyN, nil
		}
		for _, f := range []struct {
			name string
			n    *int
		}{
			{bucketAthletes, &s.Athletes}, {bucketNames, &s.Names}, {bucketAttempts, &s.Attempts},
			{bucketLines, &s.Lines}, {bucketUsers, &s.Users}, {bucketSeen, &s.Seen},
			{bucketAudit, &s.Audit}, {bucketDigests, &s.Digests},
		} {
			if *f.n, err = count(f.name); err != nil {
				return err
			}
		}
		if team := tx.Bucket([]byte(bucketTeam)); team != nil {
			s.TeamSet = team.Get([]byte(keySettings)) != nil
		}
		return nil
	})
	if err != nil {
		return Stats{}, fmt.Errorf("store: stats: %w", err)
	}
	return s, nil
}

// Checksum returns a SHA-256 over every bucket in name order: the bucket's
// name and sequence, then each key and value in key order, every field
// preceded by its 8-byte big-endian length. Equal checksums mean equal
// contents (tests use it to prove a refused write changed nothing).
func (db *DB) Checksum() ([32]byte, error) {
	h := sha256.New()
	field := func(b []byte) {
		_, _ = h.Write(binary.BigEndian.AppendUint64(nil, uint64(len(b))))
		_, _ = h.Write(b)
	}
	var walk func(b *bolt.Bucket) error
	walk = func(b *bolt.Bucket) error {
		field(binary.BigEndian.AppendUint64(nil, b.Sequence()))
		return b.ForEach(func(k, v []byte) error {
			field(k)
			if v != nil {
				field(v)
				return nil
			}
			field([]byte("bucket"))
			return walk(b.Bucket(k))
		})
	}
	err := db.bolt.View(func(tx *bolt.Tx) error {
		return tx.ForEach(func(name []byte, b *bolt.Bucket) error {
			field(name)
			return walk(b)
		})
	})
	var sum [32]byte
	if err != nil {
		return sum, fmt.Errorf("store: checksum: %w", err)
	}
	copy(sum[:], h.Sum(nil))
	return sum, nil
}
