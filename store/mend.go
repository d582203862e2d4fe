package store

import (
	"errors"
	"fmt"
	"os"
	"runtime/debug"
	"time"

	bolt "go.etcd.io/bbolt"
	bolterrors "go.etcd.io/bbolt/errors"

	"github.com/lathmark-team/lathmark/internal/record"
)

// Mending one damaged meta page. bbolt keeps two meta pages and writes
// them in turn, one a commit, after the commit's data pages are synced; a
// write cut off on a power cut, or one bad disk block, can leave one of
// them failing its checksum while the other still describes a whole file.
// Open refuses such a file (it cannot know whether the damaged page held
// the newest commit), so the bot does not start; MendMeta is the explicit
// step a person takes instead of restoring a backup: it keeps a copy of the
// file as it was, checks every page the sound meta page reaches, and lets
// bbolt write the damaged page anew with one commit (the mend's own audit
// entry). What the file then holds is the commit the sound page describes:
// at most the one commit made last before the damage is missing, against a
// whole day or more for the newest nightly backup.

// ErrNothingToMend: both meta pages are sound, or the file is damaged in a
// way MendMeta does not mend (both meta pages, or the pages themselves).
var ErrNothingToMend = errors.New("nothing MendMeta can mend")

// MendReport says what MendMeta did.
type MendReport struct {
	Damaged  int    // the meta page rebuilt, 0 or 1
	TxID     uint64 // the commit the sound meta page described
	CopyPath string // the file as it was before the mend
}

// MendMeta rebuilds the one damaged meta page of the file at path from the
// other, after copying the file to copyPath (created, 0600, must not
// exist). It refuses, changing nothing, a file whose meta pages are both
// sound (ErrNothingToMend) or both damaged, one cut short, one whose pages
// are damaged as seen from the sound meta page (ErrDamaged), and a file
// another process holds (ErrLocked). at is the time of the mend's audit
// entry.
func MendMeta(path, copyPath string, at time.Time) (rep MendReport, err error) {
	defer catchFault(&err, "store: mend "+path, debug.SetPanicOnFault(true))
	good, damaged, err := soundMeta(path)
	if err != nil {
		return rep, fmt.Errorf("store: mend %s: %w", path, err)
	}
	rep = MendReport{Damaged: damaged, TxID: good.txid, CopyPath: copyPath}
	if _, err := os.Stat(copyPath); !errors.Is(err, os.ErrNotExist) {
		return rep, fmt.Errorf("store: mend %s: the copy %s already exists (or cannot be checked: %v); nothing was changed", path, copyPath, err)
	}
	// The lock first (opening writes nothing), so that a bot holding the
	// file leaves no copy behind; the copy is read under the lock.
	bdb, err := bolt.Open(path, fileMode, &bolt.Options{Timeout: time.Second})
	if errors.Is(err, bolterrors.ErrTimeout) {
		return rep, &LockedError{Path: path, Waited: time.Second, err: err}
	}
	if err != nil {
		return rep, fmt.Errorf("store: mend %s: %w", path, err)
	}
	if err := copyFile(path, copyPath); err != nil {
		_ = bdb.Close()
		return rep, fmt.Errorf("store: mend %s: keep a copy: %w", path, err)
	}
	entry := record.AuditEntry{Time: at, Actor: "lathmark mend", Action: "mend",
		Subject: "data file", After: fmt.Sprintf(`{"meta_page_rebuilt":%d,"from_commit":%d}`, damaged, good.txid)}
	err = bdb.Update(func(tx *bolt.Tx) error { return (&Tx{tx: tx}).Audit(entry) })
	if cerr := bdb.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return rep, fmt.Errorf("store: mend %s: rewrite the meta page: %w", path, err)
	}
	if err := quickCheckFile(path); err != nil {
		return rep, fmt.Errorf("store: mend %s: still damaged after the mend (%v): %w", path, err, ErrDamaged)
	}
	return rep, nil
}

// soundMeta reads both meta pages of the file at path and returns the
// sound one and the number of the damaged one, or why the file is not one
// MendMeta mends. Only plain reads are used.
func soundMeta(path string) (boltMeta, int, error) {
	f, err := os.Open(path)
	if err != nil {
		return boltMeta{}, 0, err
	}
	defer func() { _ = f.Close() }()
	fi, err := f.Stat()
	if err != nil {
		return boltMeta{}, 0, err
	}
	buf := make([]byte, metaChecksumAt+8)
	if _, err := f.ReadAt(buf, 0); err != nil {
		return boltMeta{}, 0, fmt.Errorf("read meta page 0: %w", damagedFile(err))
	}
	m0, err0 := parseMeta(buf, 0)
	// Meta page 1 sits one page in: at meta page 0's page size, or, with
	// page 0 damaged, at the first page size where a sound meta page 1 is
	// found (bbolt's default, the OS page size, is tried first).
	sizes := []int64{int64(m0.pageSize)}
	if err0 != nil {
		sizes = []int64{int64(os.Getpagesize())}
		for ps := int64(minPageSize); ps <= maxPageSize; ps *= 2 {
			sizes = append(sizes, ps)
		}
	}
	var m1 boltMeta
	var err1 error
	for i, ps := range sizes {
		if _, rerr := f.ReadAt(buf, ps); rerr != nil {
			if i == 0 {
				err1 = fmt.Errorf("read meta page 1: %w", rerr)
			}
			continue
		}
		m, perr := parseMeta(buf, 1)
		if i == 0 {
			err1 = perr
		}
		if perr == nil {
			m1, err1 = m, nil
			break
		}
	}
	var good boltMeta
	var damaged int
	switch {
	case err0 == nil && err1 == nil:
		return boltMeta{}, 0, fmt.Errorf("both meta pages are sound: %w", ErrNothingToMend)
	case err0 != nil && err1 != nil:
		return boltMeta{}, 0, fmt.Errorf("both meta pages are damaged (%v; %v), so no page says what the file holds: restore a backup: %w, %w", err0, err1, ErrNothingToMend, ErrDamaged)
	case err0 != nil:
		good, damaged = m1, 0
	default:
		good, damaged = m0, 1
	}
	if need := int64(good.pgid) * int64(good.pageSize); fi.Size() < need {
		return boltMeta{}, 0, damagedFile(fmt.Errorf("file is %d bytes, the sound meta page counts %d pages of %d bytes: it was cut short, restore a backup", fi.Size(), good.pgid, good.pageSize))
	}
	p := &problemList{}
	walkFrom(newBlockReader(f, fi.Size()), good, p)
	if p.n > 0 {
		return boltMeta{}, 0, damagedFile(fmt.Errorf("meta page %d is damaged and the pages the other reaches are damaged too (%v): restore a backup", damaged, p.list[0]))
	}
	return good, damaged, nil
}
