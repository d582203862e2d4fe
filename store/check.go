package store

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"os"
	"runtime/debug"
	"slices"

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
	// Without the page walk at open: db.Check runs it and lists every
	// problem instead of refusing at the first.
	db, err := Open(path, Options{ReadOnly: true, OpenWalkMaxBytes: -1})
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
//   - every line's key matches its user and time, its athlete (if any)
//     exists, and its number (if any) is no other line's and at most the
//     lines bucket's sequence; every user's key is its ID and its linked
//     athlete exists;
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
	// The page structure first, with plain reads (no memory map): bbolt's
	// check runs on a goroutine of its own, where a fault in the map would
	// kill the process, so it runs only on pages this walk found sound.
	// The transaction keeps writers out meanwhile.
	problems := &problemList{}
	if f, err := os.Open(db.path); err != nil {
		problems.add("pages: %v", err)
	} else {
		fi, err := f.Stat()
		if err == nil {
			walkPages(f, fi.Size(), problems)
		} else {
			problems.add("pages: %v", err)
		}
		_ = f.Close()
	}
	// Our own scan of the records (from this goroutine, where catchFault
	// turns a fault in the memory map into an error) and bbolt's check run
	// only over a sound page structure: in a damaged tree a cursor can be
	// sent round a loop of branch pages and never end, holding ever more
	// memory (a run of the 400-copy corruption test once grew past 20 GB
	// and was killed; this scan was the one part of check that still ran
	// over a tree the page walk had found damaged).
	if problems.n == 0 {
		invariants(tx, problems)
		for cerr := range tx.Check() {
			problems.add("bbolt: %v", cerr)
		}
	} else {
		problems.add("records and bbolt's own page check were not scanned: the page structure is damaged")
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
		*err = fmt.Errorf("%s: %w", what, damagedFile(fmt.Errorf("reading the file failed (%v)", r)))
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

// invariants checks the data against the layout described at SchemaVersion,
// adding what it finds to p.
func invariants(tx *bolt.Tx, p *problemList) {
	start := p.n
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
	if p.n > start {
		return
	}

	var team record.Team
	if _, err := getJSON(b[bucketTeam], []byte(keySettings), &team); err != nil {
		p.add("team settings: %v", err)
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
		if err := decodeJSON(k, v, &a); err != nil {
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
		} else if got, ok, err := getValue(b[bucketNames], []byte(key)); err != nil || !ok || !bytes.Equal(got, k) {
			p.add("athlete %d (%q): name index holds %x (%v), want %x", id, a.Name, got, err, k)
		}
		return nil
	})

	_ = b[bucketNames].ForEach(func(k, v []byte) error {
		id, err := decodeID(k, v)
		if err != nil {
			p.add("names entry %q: %v", k, err)
			return nil
		}
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
		if err := decodeJSON(k, v, &a); err != nil {
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

	lineNumbers := map[uint64]string{}
	lastLine := b[bucketLines].Sequence()
	_ = b[bucketLines].ForEach(func(k, v []byte) error {
		if len(k) <= lineTail || k[len(k)-lineTail] != 0 {
			p.add("lines key %q is malformed", k)
			return nil
		}
		by := string(k[:len(k)-lineTail])
		n := binary.BigEndian.Uint64(k[len(k)-lineTail+1:])
		var l record.Line
		if err := decodeJSON(k, v, &l); err != nil {
			p.add("line %q: %v", k, err)
			return nil
		}
		if ln, err := nanos(l.Time); l.LoggedBy != by || err != nil || ln != n {
			p.add("line %q holds user %q time %s", k, l.LoggedBy, l.Time)
		}
		if l.AthleteID != 0 && !athleteIDs[l.AthleteID] {
			p.add("line %q: athlete %d has no profile", k, l.AthleteID)
		}
		if l.Number != 0 {
			if other, dup := lineNumbers[l.Number]; dup {
				p.add("lines %q and %q share number #%d", other, k, l.Number)
			}
			lineNumbers[l.Number] = string(k)
			if l.Number > lastLine {
				p.add("line %q: number #%d above the last given, #%d", k, l.Number, lastLine)
			}
		}
		return nil
	})

	_ = b[bucketUsers].ForEach(func(k, v []byte) error {
		var u record.User
		if err := decodeJSON(k, v, &u); err != nil {
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
			if _, err := decodeTime(k, v); err != nil {
				p.add("%s entry %q: %v", name, k, err)
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
		if err := decodeJSON(k, v, &e); err != nil {
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
	sealInvariants(tx, p)
}

// checkedElsewhere lists the buckets whose values invariants decodes
// record by record; sealInvariants checks the seals of all the others
// (hints, and any bucket added later).
func checkedElsewhere() []string {
	return []string{bucketMeta, bucketTeam, bucketAthletes, bucketNames, bucketAttempts, bucketLines,
		bucketUsers, bucketSeen, bucketAudit, bucketDigests, bucketInbox}
}

// sealInvariants checks that every value of the other buckets unseals.
func sealInvariants(tx *bolt.Tx, p *problemList) {
	skip := checkedElsewhere()
	_ = tx.ForEach(func(name []byte, b *bolt.Bucket) error {
		if slices.Contains(skip, string(name)) {
			return nil
		}
		return b.ForEach(func(k, v []byte) error {
			if v == nil {
				p.add("%s: nested bucket %q", name, k)
			} else if _, err := unseal(k, v); err != nil {
				p.add("%s: %v", name, err)
			}
			return nil
		})
	})
}

// damagedFile marks err, found by reading the file's structure, as damage:
// it matches both ErrDamaged and ErrInconsistent.
func damagedFile(err error) error {
	d := fmt.Errorf("%v: %w (%w)", err, ErrDamaged, ErrInconsistent)
	if errors.Is(err, ErrMetaDamaged) {
		return metaPageError{d}
	}
	return d
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
func (db *DB) Stats() (_ Stats, err error) {
	defer db.guard.catch(&err, "stats", debug.SetPanicOnFault(true))
	var s Stats
	err = db.bolt.View(func(tx *bolt.Tx) error {
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
func (db *DB) Checksum() (_ [32]byte, err error) {
	defer db.guard.catch(&err, "checksum", debug.SetPanicOnFault(true))
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
	err = db.bolt.View(func(tx *bolt.Tx) error {
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
