package store

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"strings"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
)

// ErrNameTaken is matched by the error PutAthlete returns when another
// athlete already holds the name (compared case-insensitively).
var ErrNameTaken = errors.New("name already taken by another athlete")

// ErrNoAthlete is matched by the error for a write that refers to an
// athlete id with no profile.
var ErrNoAthlete = errors.New("no athlete with that id")

// Tx is one transaction, read-only inside DB.View and read-write inside
// DB.Update and DB.Batch. It is valid only during the callback and must not
// be shared between goroutines. It implements bot.Tx.
//
// Times are stored in UTC and come back in UTC; keys hold them as
// nanoseconds since 1970, so times before 1970 or after 2262 are refused
// (ErrTimeRange).
type Tx struct {
	tx *bolt.Tx
	// scanSteps counts the keys range scans have visited, so tests can
	// prove a window read touches only the window.
	scanSteps int
}

func (t *Tx) bucket(name string) (*bolt.Bucket, error) {
	b := t.tx.Bucket([]byte(name))
	if b == nil {
		// Open creates every bucket, so a missing one is damage.
		return nil, fmt.Errorf("bucket %s missing from the data file: %w", name, ErrDamaged)
	}
	return b, nil
}

// buckets fetches several buckets at once.
func (t *Tx) buckets(names ...string) ([]*bolt.Bucket, error) {
	bs := make([]*bolt.Bucket, len(names))
	for i, n := range names {
		b, err := t.bucket(n)
		if err != nil {
			return nil, err
		}
		bs[i] = b
	}
	return bs, nil
}

// Team returns the team settings, the zero value if never set.
func (t *Tx) Team() (record.Team, error) {
	var team record.Team
	b, err := t.bucket(bucketTeam)
	if err != nil {
		return team, fmt.Errorf("store: team: %w", err)
	}
	if _, err := getJSON(b, []byte(keySettings), &team); err != nil {
		return record.Team{}, fmt.Errorf("store: team: %w", err)
	}
	return team, nil
}

// PutTeam replaces the team settings.
func (t *Tx) PutTeam(team record.Team) error {
	b, err := t.bucket(bucketTeam)
	if err == nil {
		err = putJSON(b, []byte(keySettings), team)
	}
	if err != nil {
		return fmt.Errorf("store: put team: %w", err)
	}
	return nil
}

func getAthlete(b *bolt.Bucket, id uint64) (record.Athlete, bool, error) {
	var a record.Athlete
	ok, err := getJSON(b, idKey(id), &a)
	if err != nil {
		return record.Athlete{}, false, fmt.Errorf("athlete %d: %w", id, err)
	}
	return a, ok, nil
}

// AthleteByID returns the profile with the given id.
func (t *Tx) AthleteByID(id uint64) (record.Athlete, bool, error) {
	b, err := t.bucket(bucketAthletes)
	if err != nil {
		return record.Athlete{}, false, fmt.Errorf("store: athlete %d: %w", id, err)
	}
	a, ok, err := getAthlete(b, id)
	if err != nil {
		return record.Athlete{}, false, fmt.Errorf("store: athlete %d: %w", id, err)
	}
	return a, ok, nil
}

// AthleteByName finds a profile by name, ignoring case and repeated or
// surrounding white space.
func (t *Tx) AthleteByName(name string) (record.Athlete, bool, error) {
	key := foldName(name)
	if key == "" {
		return record.Athlete{}, false, nil
	}
	bs, err := t.buckets(bucketNames, bucketAthletes)
	if err != nil {
		return record.Athlete{}, false, fmt.Errorf("store: athlete %q: %w", name, err)
	}
	v := bs[0].Get([]byte(key))
	if v == nil {
		if err := missSound(bs[0], []byte(key)); err != nil {
			return record.Athlete{}, false, fmt.Errorf("store: athlete %q: name index: %w", name, err)
		}
		return record.Athlete{}, false, nil
	}
	id, err := decodeID([]byte(key), v)
	if err != nil {
		return record.Athlete{}, false, fmt.Errorf("store: athlete %q: name index: %w", name, err)
	}
	a, ok, err := getAthlete(bs[1], id)
	if err == nil && !ok {
		err = fmt.Errorf("name index points to athlete %d, which has no profile", id)
	}
	if err != nil {
		return record.Athlete{}, false, fmt.Errorf("store: athlete %q: %w", name, err)
	}
	return a, true, nil
}

// Athletes lists every profile sorted by folded name (the name index order).
func (t *Tx) Athletes() ([]record.Athlete, error) {
	bs, err := t.buckets(bucketNames, bucketAthletes)
	if err != nil {
		return nil, fmt.Errorf("store: athletes: %w", err)
	}
	var out []record.Athlete
	err = bs[0].ForEach(func(k, v []byte) error {
		id, err := decodeID(k, v)
		if err != nil {
			return fmt.Errorf("name index entry %q: %w", k, err)
		}
		a, ok, err := getAthlete(bs[1], id)
		if err == nil && !ok {
			err = fmt.Errorf("name index entry %q points to a missing profile", k)
		}
		out = append(out, a)
		return err
	})
	if err != nil {
		return nil, fmt.Errorf("store: athletes: %w", err)
	}
	return out, nil
}

// PutAthlete inserts a profile (a.ID == 0: the next id from the athletes
// bucket's sequence is assigned and written back into a, to be trusted
// once the transaction commits; ids are never reused) or replaces the profile with a.ID, moving its name index entry
// on a rename. A name held by another athlete fails with ErrNameTaken;
// an unknown non-zero id fails with ErrNoAthlete.
func (t *Tx) PutAthlete(a *record.Athlete) error {
	if a == nil {
		return errors.New("store: put athlete: nil profile")
	}
	if err := t.putAthlete(a); err != nil {
		return fmt.Errorf("store: put athlete %q: %w", a.Name, err)
	}
	return nil
}

func (t *Tx) putAthlete(a *record.Athlete) error {
	key := foldName(a.Name)
	switch {
	case key == "":
		return errors.New("empty name")
	case len(key) > maxNameBytes:
		return fmt.Errorf("name is %d bytes, at most %d", len(key), maxNameBytes)
	}
	bs, err := t.buckets(bucketAthletes, bucketNames)
	if err != nil {
		return err
	}
	athletes, names := bs[0], bs[1]
	if holder := names.Get([]byte(key)); holder != nil {
		hid, err := decodeID([]byte(key), holder)
		if err != nil {
			return fmt.Errorf("name index: %w", err)
		}
		if a.ID == 0 || hid != a.ID {
			return ErrNameTaken
		}
	}
	id := a.ID
	if id == 0 {
		if id, err = athletes.NextSequence(); err != nil {
			return fmt.Errorf("next id: %w", err)
		}
		if a.ChartStyle == 0 {
			used, err := usedChartStyles(athletes)
			if err != nil {
				return fmt.Errorf("chart styles: %w", err)
			}
			a.ChartStyle = record.FreeChartStyle(used)
		}
	} else {
		old, ok, err := getAthlete(athletes, id)
		if err != nil {
			return err
		}
		if !ok {
			return fmt.Errorf("id %d: %w", id, ErrNoAthlete)
		}
		if a.ChartStyle == 0 {
			a.ChartStyle = old.ChartStyle // a style, once chosen, stays
		}
		if oldKey := foldName(old.Name); oldKey != key {
			if err := names.Delete([]byte(oldKey)); err != nil {
				return fmt.Errorf("drop old name: %w", err)
			}
		}
	}
	rec := *a
	rec.ID = id
	rec.Created = rec.Created.UTC()
	if err := putJSON(athletes, idKey(id), rec); err != nil {
		return err
	}
	if err := putValue(names, []byte(key), idKey(id)); err != nil {
		return fmt.Errorf("index name: %w", err)
	}
	a.ID = id
	return nil
}

// DeleteAthlete removes the profile and its name index entry, all its
// attempts (one range delete), the logged lines for it, and unlinks chat
// users linked to it (their AthleteID becomes 0). removed counts the
// profile, attempts, lines and unlinked users. The audit trail is kept
// (forget pseudonymises it with RewriteAudit).
func (t *Tx) DeleteAthlete(id uint64) (int, error) {
	removed, err := t.deleteAthlete(id)
	if err != nil {
		return 0, fmt.Errorf("store: delete athlete %d: %w", id, err)
	}
	return removed, nil
}

func (t *Tx) deleteAthlete(id uint64) (int, error) {
	bs, err := t.buckets(bucketAthletes, bucketNames, bucketAttempts, bucketLines, bucketUsers)
	if err != nil {
		return 0, err
	}
	athletes, names, attempts, lines, users := bs[0], bs[1], bs[2], bs[3], bs[4]
	removed := 0

	a, ok, err := getAthlete(athletes, id)
	if err != nil {
		return 0, err
	}
	if ok {
		key := []byte(foldName(a.Name))
		if v := names.Get(key); v != nil {
			held, err := decodeID(key, v)
			if err != nil {
				return 0, fmt.Errorf("name index: %w", err)
			}
			if held == id {
				if err := names.Delete(key); err != nil {
					return 0, fmt.Errorf("drop name: %w", err)
				}
			}
		}
		if err := athletes.Delete(idKey(id)); err != nil {
			return 0, fmt.Errorf("drop profile: %w", err)
		}
		removed++
	}

	// Collect first, delete after: deleting under a live cursor skips keys.
	prefix := idKey(id)
	var doomed [][]byte
	c := attempts.Cursor()
	for k, _ := c.Seek(prefix); k != nil && bytes.HasPrefix(k, prefix); k, _ = c.Next() {
		doomed = append(doomed, bytes.Clone(k))
	}
	for _, k := range doomed {
		if err := attempts.Delete(k); err != nil {
			return 0, fmt.Errorf("drop attempt: %w", err)
		}
	}
	removed += len(doomed)

	doomed = doomed[:0]
	err = lines.ForEach(func(k, v []byte) error {
		var l record.Line
		if err := decodeJSON(k, v, &l); err != nil {
			return fmt.Errorf("decode line %q: %w", k, err)
		}
		if l.AthleteID == id {
			doomed = append(doomed, bytes.Clone(k))
		}
		return nil
	})
	if err != nil {
		return 0, err
	}
	for _, k := range doomed {
		if err := lines.Delete(k); err != nil {
			return 0, fmt.Errorf("drop line: %w", err)
		}
	}
	removed += len(doomed)

	var linked []record.User
	err = users.ForEach(func(k, v []byte) error {
		var u record.User
		if err := decodeJSON(k, v, &u); err != nil {
			return fmt.Errorf("decode user %q: %w", k, err)
		}
		if u.AthleteID == id {
			linked = append(linked, u)
		}
		return nil
	})
	if err != nil {
		return 0, err
	}
	for _, u := range linked {
		u.AthleteID = 0
		if err := putJSON(users, []byte(u.ID), u); err != nil {
			return 0, fmt.Errorf("unlink user %s: %w", u.ID, err)
		}
	}
	removed += len(linked)
	return removed, nil
}

// AddAttempts stores attempts. Each gets Seq = the smallest sequence number
// not yet used for its athlete and Time, so attempts of one message that
// share a time get 0, 1, 2, ... in slice order; the Seq is written back into
// as (also when the transaction later rolls back, so trust it only after a
// commit). The athlete must exist (ErrNoAthlete), the outcome be valid and
// the time inside the key range (ErrTimeRange); the first refusal fails the
// call, and the caller's Update then keeps none of it.
func (t *Tx) AddAttempts(as []record.Attempt) error {
	if len(as) == 0 {
		return nil
	}
	bs, err := t.buckets(bucketAttempts, bucketAthletes)
	if err != nil {
		return fmt.Errorf("store: add attempts: %w", err)
	}
	for i := range as {
		if err := addAttempt(bs[0], bs[1], &as[i]); err != nil {
			return fmt.Errorf("store: add attempt %d of %d (athlete %d): %w", i+1, len(as), as[i].AthleteID, err)
		}
	}
	return nil
}

func addAttempt(attempts, athletes *bolt.Bucket, a *record.Attempt) error {
	if a.AthleteID == 0 || athletes.Get(idKey(a.AthleteID)) == nil {
		return ErrNoAthlete
	}
	if !a.Outcome.Valid() {
		return fmt.Errorf("outcome %q is not o, x or -", string(rune(a.Outcome)))
	}
	n, err := nanos(a.Time)
	if err != nil {
		return err
	}
	prefix := attemptKey(a.AthleteID, n, 0)[:idLen+nanosLen]
	var used []uint32
	c := attempts.Cursor()
	for k, _ := c.Seek(prefix); k != nil && bytes.HasPrefix(k, prefix); k, _ = c.Next() {
		used = append(used, binary.BigEndian.Uint32(k[idLen+nanosLen:]))
	}
	seq, err := smallestUnused(used)
	if err != nil {
		return err
	}
	rec := *a
	rec.Time = a.Time.UTC()
	rec.Seq = seq
	if err := putJSON(attempts, attemptKey(a.AthleteID, n, seq), rec); err != nil {
		return err
	}
	a.Seq = seq
	return nil
}

// Attempts calls fn for the athlete's attempts with from <= Time < to, in
// key order (time, then Seq), by one cursor range scan from the key of
// (athleteID, from) up to the key of (athleteID, to). Returning
// record.ErrStop from fn ends early with a nil error; any other error from
// fn ends the scan and is returned unchanged. fn must not write attempts.
func (t *Tx) Attempts(athleteID uint64, from, to time.Time, fn func(record.Attempt) error) error {
	b, err := t.bucket(bucketAttempts)
	if err != nil {
		return fmt.Errorf("store: attempts of athlete %d: %w", athleteID, err)
	}
	start := attemptKey(athleteID, clampNanos(from), 0)
	end := attemptKey(athleteID, clampNanos(to), 0)
	if bytes.Compare(start, end) >= 0 {
		return nil
	}
	c := b.Cursor()
	for k, v := c.Seek(start); k != nil; k, v = c.Next() {
		t.scanSteps++
		if bytes.Compare(k, end) >= 0 {
			// The first key past the window may be one of ours whose key
			// was damaged: it must be sound for the window to be whole.
			if err := soundAt(k, v); err != nil {
				return fmt.Errorf("store: attempts of athlete %d: %w", athleteID, err)
			}
			break
		}
		if bytes.Compare(k, start) < 0 {
			// Only a damaged page tree walks backwards.
			return fmt.Errorf("store: attempts of athlete %d: key %x out of order: %w", athleteID, k, ErrDamaged)
		}
		var a record.Attempt
		if err := decodeJSON(k, v, &a); err != nil {
			return fmt.Errorf("store: attempts of athlete %d: decode %x: %w", athleteID, k, err)
		}
		if err := fn(a); err != nil {
			if errors.Is(err, record.ErrStop) {
				return nil
			}
			return err
		}
	}
	return nil
}

// DeleteAttempts removes attempts by key; keys with nothing stored (or a
// time no key can hold) are ignored.
func (t *Tx) DeleteAttempts(keys []record.Key) error {
	b, err := t.bucket(bucketAttempts)
	if err != nil {
		return fmt.Errorf("store: delete attempts: %w", err)
	}
	for _, k := range keys {
		n, err := nanos(k.Time)
		if err != nil {
			continue
		}
		if err := b.Delete(attemptKey(k.AthleteID, n, k.Seq)); err != nil {
			return fmt.Errorf("store: delete attempt %d/%s/%d: %w", k.AthleteID, k.Time.Format(time.RFC3339Nano), k.Seq, err)
		}
	}
	return nil
}

// findLine returns the key of the stored line with l's user, time and ID,
// and the sequence numbers used at that user and time.
func findLine(b *bolt.Bucket, l record.Line, n uint64) (found []byte, used []uint32, err error) {
	prefix := lineKey(l.LoggedBy, n, 0)
	prefix = prefix[:len(prefix)-seqLen]
	c := b.Cursor()
	k, v := c.Seek(prefix)
	for ; k != nil && bytes.HasPrefix(k, prefix); k, v = c.Next() {
		var have record.Line
		if err := decodeJSON(k, v, &have); err != nil {
			return nil, nil, fmt.Errorf("decode line %q: %w", k, err)
		}
		if found == nil && have.ID == l.ID {
			found = bytes.Clone(k)
		}
		used = append(used, binary.BigEndian.Uint32(k[len(prefix):]))
	}
	if err := soundAt(k, v); err != nil {
		return nil, nil, err
	}
	return found, used, nil
}

func validLoggedBy(by string) error {
	if by == "" || strings.IndexByte(by, 0) >= 0 {
		return fmt.Errorf("logged-by user id %q is empty or holds a NUL byte", by)
	}
	return nil
}

// PutLine records a logged line for undo, keyed by its user and time. A line
// with the same user, time and ID is replaced, so a re-run stores it once.
// A non-zero AthleteID must name an existing athlete.
func (t *Tx) PutLine(l record.Line) error {
	if err := t.putLine(l); err != nil {
		return fmt.Errorf("store: put line %q by %q: %w", l.ID, l.LoggedBy, err)
	}
	return nil
}

func (t *Tx) putLine(l record.Line) error {
	if err := validLoggedBy(l.LoggedBy); err != nil {
		return err
	}
	n, err := nanos(l.Time)
	if err != nil {
		return err
	}
	bs, err := t.buckets(bucketLines, bucketAthletes)
	if err != nil {
		return err
	}
	if l.AthleteID != 0 && bs[1].Get(idKey(l.AthleteID)) == nil {
		return fmt.Errorf("athlete %d: %w", l.AthleteID, ErrNoAthlete)
	}
	key, used, err := findLine(bs[0], l, n)
	if err != nil {
		return err
	}
	if key == nil {
		seq, err := smallestUnused(used)
		if err != nil {
			return err
		}
		key = lineKey(l.LoggedBy, n, seq)
	}
	rec := l
	rec.Time = l.Time.UTC()
	rec.Attempts = make([]record.Key, len(l.Attempts))
	for i, k := range l.Attempts {
		k.Time = k.Time.UTC()
		rec.Attempts[i] = k
	}
	return putJSON(bs[0], key, rec)
}

// LastLine returns the most recent line logged by a chat user: one Seek past
// the user's key prefix and one step back.
func (t *Tx) LastLine(loggedBy string) (record.Line, bool, error) {
	if validLoggedBy(loggedBy) != nil {
		return record.Line{}, false, nil
	}
	b, err := t.bucket(bucketLines)
	if err != nil {
		return record.Line{}, false, fmt.Errorf("store: last line of %q: %w", loggedBy, err)
	}
	prefix := linePrefix(loggedBy)
	past := append([]byte(loggedBy), 1) // every key of this user sorts below it
	c := b.Cursor()
	k, v := c.Seek(past)
	if k == nil {
		k, v = c.Last()
	} else {
		k, v = c.Prev()
	}
	if k == nil || !bytes.HasPrefix(k, prefix) {
		if err := soundAt(k, v); err != nil {
			return record.Line{}, false, fmt.Errorf("store: last line of %q: %w", loggedBy, err)
		}
		return record.Line{}, false, nil
	}
	var l record.Line
	if err := decodeJSON(k, v, &l); err != nil {
		return record.Line{}, false, fmt.Errorf("store: last line of %q: decode: %w", loggedBy, err)
	}
	return l, true, nil
}

// NextLineNumber returns a fresh line number (1, 2, 3, ...; never reused),
// from the lines bucket's sequence, for `history` to show as #N.
func (t *Tx) NextLineNumber() (uint64, error) {
	b, err := t.bucket(bucketLines)
	if err != nil {
		return 0, fmt.Errorf("store: next line number: %w", err)
	}
	n, err := b.NextSequence()
	if err != nil {
		return 0, fmt.Errorf("store: next line number: %w", err)
	}
	return n, nil
}

// LastLineNumber is the highest line number handed out so far (0 none).
func (t *Tx) LastLineNumber() (uint64, error) {
	b, err := t.bucket(bucketLines)
	if err != nil {
		return 0, fmt.Errorf("store: last line number: %w", err)
	}
	return b.Sequence(), nil
}

// LineByNumber finds the stored line numbered n, by one scan of the lines
// (corrections are rare; the scan stops at the line).
func (t *Tx) LineByNumber(n uint64) (record.Line, bool, error) {
	if n == 0 {
		return record.Line{}, false, nil
	}
	b, err := t.bucket(bucketLines)
	if err != nil {
		return record.Line{}, false, fmt.Errorf("store: line #%d: %w", n, err)
	}
	c := b.Cursor()
	for k, v := c.Last(); k != nil; k, v = c.Prev() {
		var l record.Line
		if err := decodeJSON(k, v, &l); err != nil {
			return record.Line{}, false, fmt.Errorf("store: line #%d: decode %q: %w", n, k, err)
		}
		if l.Number == n {
			return l, true, nil
		}
	}
	return record.Line{}, false, nil
}

// DeleteLine removes the stored line with l's user, time and ID; a line not
// stored is ignored.
func (t *Tx) DeleteLine(l record.Line) error {
	if validLoggedBy(l.LoggedBy) != nil {
		return nil
	}
	n, err := nanos(l.Time)
	if err != nil {
		return nil
	}
	b, err := t.bucket(bucketLines)
	if err == nil {
		var key []byte
		key, _, err = findLine(b, l, n)
		if err == nil && key != nil {
			err = b.Delete(key)
		}
	}
	if err != nil {
		return fmt.Errorf("store: delete line %q by %q: %w", l.ID, l.LoggedBy, err)
	}
	return nil
}

// User returns the chat user with the given id.
func (t *Tx) User(id string) (record.User, bool, error) {
	b, err := t.bucket(bucketUsers)
	if err != nil {
		return record.User{}, false, fmt.Errorf("store: user %q: %w", id, err)
	}
	if id == "" {
		return record.User{}, false, nil
	}
	var u record.User
	ok, err := getJSON(b, []byte(id), &u)
	if err != nil {
		return record.User{}, false, fmt.Errorf("store: user %q: %w", id, err)
	}
	return u, ok, nil
}

// PutUser inserts or replaces a chat user. A non-zero AthleteID must name an
// existing athlete (ErrNoAthlete).
func (t *Tx) PutUser(u record.User) error {
	err := func() error {
		if u.ID == "" {
			return errors.New("empty user id")
		}
		bs, err := t.buckets(bucketUsers, bucketAthletes)
		if err != nil {
			return err
		}
		if u.AthleteID != 0 && bs[1].Get(idKey(u.AthleteID)) == nil {
			return fmt.Errorf("link to athlete %d: %w", u.AthleteID, ErrNoAthlete)
		}
		return putJSON(bs[0], []byte(u.ID), u)
	}()
	if err != nil {
		return fmt.Errorf("store: put user %q: %w", u.ID, err)
	}
	return nil
}

// DeleteUser removes a chat user; an unknown id is ignored.
func (t *Tx) DeleteUser(id string) error {
	b, err := t.bucket(bucketUsers)
	if err == nil && id != "" {
		err = b.Delete([]byte(id))
	}
	if err == nil {
		err = t.deleteHints(id)
	}
	if err != nil {
		return fmt.Errorf("store: delete user %q: %w", id, err)
	}
	return nil
}

// Users lists every chat user in id order.
func (t *Tx) Users() ([]record.User, error) {
	b, err := t.bucket(bucketUsers)
	if err != nil {
		return nil, fmt.Errorf("store: users: %w", err)
	}
	var out []record.User
	err = b.ForEach(func(k, v []byte) error {
		var u record.User
		if err := decodeJSON(k, v, &u); err != nil {
			return fmt.Errorf("decode user %q: %w", k, err)
		}
		out = append(out, u)
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("store: users: %w", err)
	}
	return out, nil
}

// Seen reports whether a message or event id was already handled.
func (t *Tx) Seen(id string) (bool, error) {
	b, err := t.bucket(bucketSeen)
	if err != nil {
		return false, fmt.Errorf("store: seen %q: %w", id, err)
	}
	_, ok, err := getTime(b, id)
	if err != nil {
		return false, fmt.Errorf("store: seen %q: %w", id, err)
	}
	return ok, nil
}

// MarkSeen records that a message or event id was handled at a time.
func (t *Tx) MarkSeen(id string, at time.Time) error {
	b, err := t.bucket(bucketSeen)
	if err == nil {
		err = putTime(b, id, at)
	}
	if err != nil {
		return fmt.Errorf("store: mark seen %q: %w", id, err)
	}
	return nil
}

// PruneSeen forgets the seen ids marked before a time (a full scan: the
// bucket is keyed by id) and reports how many went. Chat platforms stop
// re-delivering after minutes, so a few days of ids is plenty.
func (t *Tx) PruneSeen(before time.Time) (int, error) {
	b, err := t.bucket(bucketSeen)
	if err != nil {
		return 0, fmt.Errorf("store: prune seen: %w", err)
	}
	limit := clampNanos(before)
	var doomed [][]byte
	err = b.ForEach(func(k, v []byte) error {
		at, err := decodeTime(k, v)
		if err != nil {
			return fmt.Errorf("seen %q: %w", k, err)
		}
		if uint64(at.UnixNano()) < limit {
			doomed = append(doomed, bytes.Clone(k))
		}
		return nil
	})
	for _, k := range doomed {
		if err != nil {
			break
		}
		err = b.Delete(k)
	}
	if err != nil {
		return 0, fmt.Errorf("store: prune seen: %w", err)
	}
	return len(doomed), nil
}

// Audit appends an entry to the audit trail under its time and the audit
// bucket's next sequence number. Nothing in this package deletes audit
// entries; only RewriteAudit (forget's pseudonymisation) rewrites them.
func (t *Tx) Audit(e record.AuditEntry) error {
	err := func() error {
		n, err := nanos(e.Time)
		if err != nil {
			return err
		}
		b, err := t.bucket(bucketAudit)
		if err != nil {
			return err
		}
		seq, err := b.NextSequence()
		if err != nil {
			return fmt.Errorf("next sequence: %w", err)
		}
		rec := e
		rec.Time = e.Time.UTC()
		return putJSON(b, auditKey(n, seq), rec)
	}()
	if err != nil {
		return fmt.Errorf("store: audit %q by %q: %w", e.Action, e.Actor, err)
	}
	return nil
}

// AuditEntries calls fn for entries with Time >= since, oldest first (and
// in append order within one time), by one Seek and a forward scan.
// record.ErrStop from fn ends early with a nil error; any other error from
// fn is returned unchanged.
func (t *Tx) AuditEntries(since time.Time, fn func(record.AuditEntry) error) error {
	b, err := t.bucket(bucketAudit)
	if err != nil {
		return fmt.Errorf("store: audit entries: %w", err)
	}
	c := b.Cursor()
	from := binary.BigEndian.AppendUint64(nil, clampNanos(since))
	for k, v := c.Seek(from); k != nil; k, v = c.Next() {
		t.scanSteps++
		if bytes.Compare(k, from) < 0 {
			return fmt.Errorf("store: audit entries: key %x out of order: %w", k, ErrDamaged)
		}
		var e record.AuditEntry
		if err := decodeJSON(k, v, &e); err != nil {
			return fmt.Errorf("store: audit entries: decode %x: %w", k, err)
		}
		if err := fn(e); err != nil {
			if errors.Is(err, record.ErrStop) {
				return nil
			}
			return err
		}
	}
	return nil
}

// DigestPosted reports when the digest of an ISO week ("2026-W49") went out.
func (t *Tx) DigestPosted(week string) (time.Time, bool, error) {
	b, err := t.bucket(bucketDigests)
	if err != nil {
		return time.Time{}, false, fmt.Errorf("store: digest %q: %w", week, err)
	}
	at, ok, err := getTime(b, week)
	if err != nil {
		return time.Time{}, false, fmt.Errorf("store: digest %q: %w", week, err)
	}
	return at, ok, nil
}

// MarkDigestPosted records when the digest of an ISO week went out.
func (t *Tx) MarkDigestPosted(week string, at time.Time) error {
	b, err := t.bucket(bucketDigests)
	if err == nil {
		err = putTime(b, week, at)
	}
	if err != nil {
		return fmt.Errorf("store: mark digest %q posted: %w", week, err)
	}
	return nil
}

// UnmarkDigestPosted forgets that a week's digest went out, so it can be
// posted again: the bot claims a week before posting and releases the claim
// when the post finally fails.
func (t *Tx) UnmarkDigestPosted(week string) error {
	b, err := t.bucket(bucketDigests)
	if err == nil {
		err = b.Delete([]byte(week))
	}
	if err != nil {
		return fmt.Errorf("store: unmark digest %q: %w", week, err)
	}
	return nil
}
