// Package store keeps lathmark's records in one bbolt data file: team
// settings, athlete profiles with a case-insensitive name index, jump
// attempts keyed so that one athlete's time window is a single range scan,
// logged lines for undo, chat users, seen message ids, the append-only audit
// trail and digest bookkeeping. It owns the file's layout, the schema version
// and its migrations, consistency checks, hot backups and restores.
//
// It is the only package that imports bbolt. Callers run each command as one
// transaction through DB.View, DB.Update or DB.Batch and read and write
// through the methods of Tx.
//
// Every value is stored sealed with a CRC-32C of its key and value and
// checked on every read (seal.go): write and read stored values only
// through putJSON/getJSON/decodeJSON, putValue/getValue and
// putTime/getTime (TestNoUnsealedAccess enforces it), and a new bucket is
// covered as it stands. Damage read, or a fault of the memory map while
// reading, is an error matching ErrDamaged; a commit refused for space,
// ErrDiskFull.
//
// The data file holds personal data (names, body measures, birth years of
// athletes who may be minors): it is created readable by its owner only
// (mode 0600, directory 0700), and backups get the same mode.
package store

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"os"
	"path/filepath"
	"runtime/debug"
	"sync/atomic"
	"time"

	bolt "go.etcd.io/bbolt"
	bolterrors "go.etcd.io/bbolt/errors"
)

// DefaultTimeout is how long Open waits for the data file's lock when
// Options.Timeout is zero.
const DefaultTimeout = time.Second

// DefaultInitialMmapSize is the memory map reserved at open when
// Options.InitialMmapSize is zero. While the data fits in it, a long read
// transaction (a hot backup) never blocks a writer: bbolt must remap to
// grow past the map, and a remap waits for open read transactions. It is
// address space, not memory or disk: on Linux the file grows only with its
// data.
const DefaultInitialMmapSize = 64 << 20

// File and directory modes for data files and backups: owner only.
const (
	fileMode = 0o600
	dirMode  = 0o700
)

// Options tune Open. The zero value is a read-write open that waits
// DefaultTimeout for the lock and uses bbolt's batch defaults.
type Options struct {
	// Timeout is how long to wait for the file lock held by another
	// process before giving up with ErrLocked; 0 means DefaultTimeout.
	Timeout time.Duration
	// ReadOnly opens an existing file with a shared lock for tools that
	// only read (backup, check, export). Update and Batch then fail, and
	// the file must already carry the current schema version.
	ReadOnly bool
	// MaxBatchSize is the most calls Batch combines into one transaction;
	// 0 keeps bbolt's default (1000).
	MaxBatchSize int
	// MaxBatchDelay is the longest Batch waits to fill a batch before it
	// commits; 0 keeps bbolt's default (10 ms).
	MaxBatchDelay time.Duration
	// InitialMmapSize is the memory map reserved at open, in bytes; 0 means
	// DefaultInitialMmapSize. (On Windows bbolt grows the file to it.)
	InitialMmapSize int
	// OpenWalkMaxBytes is the most pages in use, in bytes, of a file whose
	// page tree Open walks before using it (see walkAtOpen); 0 means
	// DefaultOpenWalkMaxBytes, negative never.
	OpenWalkMaxBytes int64
	// Logger receives the warning when an existing data file was readable
	// by others and Open tightened it to 0600, and the first damage a
	// transaction meets (see ErrDamaged); nil discards.
	Logger *slog.Logger
}

// tightenMode sets an existing data file with looser permissions than 0600
// back to 0600 (it holds personal data), with a warning.
func tightenMode(path string, log *slog.Logger) error {
	fi, err := os.Stat(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return fmt.Errorf("store: open %s: %w", path, err)
	}
	mode := fi.Mode().Perm()
	if mode&^fileMode == 0 {
		return nil
	}
	if err := os.Chmod(path, fileMode); err != nil {
		return fmt.Errorf("store: open %s: the file is readable by others (mode %04o) and could not be set to 0600: %w", path, mode, err)
	}
	if log != nil {
		log.Warn("the data file was readable by others; set it to owner-only", "path", path, "was", fmt.Sprintf("%04o", mode), "now", "0600")
	}
	return nil
}

// ErrLocked is matched (errors.Is) by the error Open returns when another
// process holds the data file; the same error also matches bbolt's
// errors.ErrTimeout.
var ErrLocked = errors.New("data file is in use by another lathmark process")

// ErrSchemaNewer is matched by the error Open returns for a data file written
// by a newer lathmark: this code does not know its layout and refuses it.
var ErrSchemaNewer = errors.New("data file schema is newer than this lathmark")

// ErrSchemaOlder is matched by the error a read-only Open returns for a file
// that needs a migration, which only a read-write Open can run.
var ErrSchemaOlder = errors.New("data file schema is older than this lathmark")

// LockedError reports a data file locked by another process. It matches
// both ErrLocked and bbolt's errors.ErrTimeout.
type LockedError struct {
	Path   string
	Waited time.Duration // the lock timeout that ran out
	err    error
}

// Error names the file and how long Open waited.
func (e *LockedError) Error() string {
	return fmt.Sprintf("store: data file %s is in use by another lathmark process (lock not released within %s); stop that process or use another file", e.Path, e.Waited)
}

// Unwrap returns ErrLocked and the bbolt timeout it came from.
func (e *LockedError) Unwrap() []error { return []error{ErrLocked, e.err} }

// DB is an open data file. Its methods are safe for concurrent use.
type DB struct {
	writers  atomic.Int32  // Batch calls in flight
	inboxSeq atomic.Uint64 // second half of inbox keys (NewInboxID)
	bolt     *bolt.DB
	path     string
	readOnly bool
	guard    txGuard
}

// Open opens the data file at path, creating it (mode 0600, parent
// directories 0700) unless opts.ReadOnly. A read-write open brings the file
// to SchemaVersion by running the pending migrations in one transaction and
// refuses a file whose schema is newer than this code (ErrSchemaNewer).
// Every open refuses a damaged file (ErrDamaged): the quick check reads
// the meta pages, and a file up to opts.OpenWalkMaxBytes has its whole
// page tree walked (see walkAtOpen). If another process holds the file,
// Open gives up after opts.Timeout with a *LockedError (errors.Is(err,
// ErrLocked)).
func Open(path string, opts Options) (*DB, error) {
	return openWith(path, opts, migrations(), SchemaVersion)
}

// openWith is Open with the migration set and target version as
// parameters, so tests can exercise the migration machinery.
func openWith(path string, opts Options, ms map[uint64]migration, target uint64) (_ *DB, err error) {
	// A damaged file can fault inside bbolt's Open (a freelist page past a
	// truncated end): report it instead of crashing the process.
	defer catchFault(&err, "store: open "+path, debug.SetPanicOnFault(true))
	if path == "" {
		return nil, errors.New("store: open: empty data file path")
	}
	if opts.Timeout < 0 || opts.MaxBatchSize < 0 || opts.MaxBatchDelay < 0 || opts.InitialMmapSize < 0 {
		return nil, fmt.Errorf("store: open %s: negative timeout, batch size, batch delay or map size", path)
	}
	mmapSize := opts.InitialMmapSize
	if mmapSize == 0 {
		mmapSize = DefaultInitialMmapSize
	}
	timeout := opts.Timeout
	if timeout == 0 {
		timeout = DefaultTimeout
	}
	if !opts.ReadOnly {
		if err := os.MkdirAll(filepath.Dir(path), dirMode); err != nil {
			return nil, fmt.Errorf("store: open %s: create directory: %w", path, err)
		}
	}
	if !opts.ReadOnly {
		if err := tightenMode(path, opts.Logger); err != nil {
			return nil, err
		}
	}
	// The quick check: two page reads, before bbolt maps anything.
	if err := quickCheckFile(path); errors.Is(err, errNotBolt) {
		return nil, fmt.Errorf("store: open %s: %w", path, err)
	} else if err != nil {
		return nil, fmt.Errorf("store: open %s: %w", path, damagedFile(err))
	}
	bdb, err := bolt.Open(path, fileMode, &bolt.Options{Timeout: timeout, ReadOnly: opts.ReadOnly, InitialMmapSize: mmapSize})
	if errors.Is(err, bolterrors.ErrTimeout) {
		return nil, &LockedError{Path: path, Waited: timeout, err: err}
	}
	if err != nil {
		return nil, fmt.Errorf("store: open %s: %w", path, err)
	}
	// The page walk: every page in use, with plain reads, under the lock
	// and before anything is written (see walkAtOpen).
	walkLimit := opts.OpenWalkMaxBytes
	if walkLimit == 0 {
		walkLimit = DefaultOpenWalkMaxBytes
	}
	if err := walkAtOpen(path, walkLimit); err != nil {
		_ = bdb.Close()
		return nil, fmt.Errorf("store: open %s: %w", path, err)
	}
	if opts.MaxBatchSize > 0 {
		bdb.MaxBatchSize = opts.MaxBatchSize
	}
	if opts.MaxBatchDelay > 0 {
		bdb.MaxBatchDelay = opts.MaxBatchDelay
	}
	db := &DB{bolt: bdb, path: path, readOnly: opts.ReadOnly}
	db.guard.log, db.guard.path = opts.Logger, path
	if err := db.checkSize(); err != nil {
		_ = bdb.Close()
		return nil, err
	}
	if err := db.prepareSchema(ms, target); err != nil {
		_ = bdb.Close()
		return nil, err
	}
	if err := db.ensureInbox(); err != nil {
		_ = bdb.Close()
		return nil, fmt.Errorf("store: open %s: create inbox: %w", path, err)
	}
	if err := db.ensureHints(); err != nil {
		_ = bdb.Close()
		return nil, fmt.Errorf("store: open %s: create hints: %w", path, err)
	}
	if err := db.backfillChartStyles(); err != nil {
		_ = bdb.Close()
		return nil, fmt.Errorf("store: open %s: chart styles: %w", path, err)
	}
	return db, nil
}

// checkSize refuses a file shorter than its own meta page says: reading the
// missing pages through the memory map would crash the process.
func (db *DB) checkSize() error {
	fi, err := os.Stat(db.path)
	if err != nil {
		return fmt.Errorf("store: open %s: %w", db.path, err)
	}
	var want int64
	if err := db.bolt.View(func(tx *bolt.Tx) error { want = tx.Size(); return nil }); err != nil {
		return fmt.Errorf("store: open %s: %w", db.path, err)
	}
	if fi.Size() < want {
		return fmt.Errorf("store: open %s: file is truncated: %d bytes, its header needs %d: %w", db.path, fi.Size(), want, ErrInconsistent)
	}
	return nil
}

// Path returns the data file's path as given to Open.
func (db *DB) Path() string { return db.path }

// Close releases the file and its lock.
func (db *DB) Close() error {
	if err := db.bolt.Close(); err != nil {
		return fmt.Errorf("store: close %s: %w", db.path, err)
	}
	return nil
}

// View runs fn in one read-only transaction. It returns ctx's error without
// starting if ctx is already done, and otherwise fn's error unchanged. A
// fault of the memory map while fn reads (a damaged file) ends fn and is
// returned as an error matching ErrDamaged (see txGuard).
func (db *DB) View(ctx context.Context, fn func(*Tx) error) (err error) {
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("store: view not started: %w", err)
	}
	defer db.guard.catch(&err, "view", debug.SetPanicOnFault(true))
	tx, err := db.bolt.Begin(false)
	if err != nil {
		return fmt.Errorf("store: begin view: %w", err)
	}
	defer func() { _ = tx.Rollback() }()
	return fn(&Tx{tx: tx})
}

// Update runs fn in one read-write transaction and commits iff fn returns
// nil and ctx is still live; otherwise nothing fn wrote is kept. It does not
// start if ctx is already done. fn's own error is returned unchanged; a
// commit that fails for a full disk matches ErrDiskFull, and a fault of the
// memory map (a damaged file) matches ErrDamaged.
func (db *DB) Update(ctx context.Context, fn func(*Tx) error) (err error) {
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("store: update not started: %w", err)
	}
	defer db.guard.catch(&err, "update", debug.SetPanicOnFault(true))
	tx, err := db.bolt.Begin(true)
	if err != nil {
		return fmt.Errorf("store: begin update: %w", err)
	}
	// Rolls back unless committed; after Commit (which rolls back itself on
	// failure) it is a no-op. It also runs while a fault unwinds.
	defer func() { _ = tx.Rollback() }()
	if err := fn(&Tx{tx: tx}); err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("store: update rolled back: %w", err)
	}
	if err := tx.Commit(); err != nil {
		return db.guard.commitFailed(err)
	}
	db.guard.committed()
	return nil
}

// Batch runs fn like Update but lets bbolt combine concurrent calls into
// one transaction (one fsync for many writers), waiting up to
// Options.MaxBatchDelay for Options.MaxBatchSize calls.
//
// fn may run more than once: if any call in a batch fails, bbolt rolls the
// whole batch back and runs the other calls again, and the failing one solo.
// fn must therefore be idempotent and keep no effects outside the
// transaction until Batch has returned nil. Batch does not start if ctx is
// already done; once queued, the call is not withdrawn.
func (db *DB) Batch(ctx context.Context, fn func(*Tx) error) error {
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("store: batch not started: %w", err)
	}
	// A writer with no company gains nothing from waiting MaxBatchDelay for
	// one (and the runtime's timers fire a 0.2 ms delay only after about
	// 1 ms on an idle process), so it commits at once as a plain Update.
	// Once damage was met, writers commit one at a time on their own
	// goroutine: bbolt commits a batch on a goroutine of its own, where a
	// fault or panic while it rebalances damaged pages could not be caught.
	if db.writers.Add(1) == 1 || db.guard.damaged.Load() {
		defer db.writers.Add(-1)
		return db.Update(ctx, fn)
	}
	defer db.writers.Add(-1)
	err := db.bolt.Batch(func(tx *bolt.Tx) (err error) {
		// bbolt runs this on its own batch goroutine: guard it there.
		defer db.guard.catch(&err, "batch", debug.SetPanicOnFault(true))
		return fn(&Tx{tx: tx})
	})
	switch {
	case err == nil:
		db.guard.committed()
	case !errors.Is(err, ErrDamaged) && isDiskFull(err):
		return db.guard.commitFailed(err)
	}
	return err
}
