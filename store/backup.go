package store

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"runtime/debug"
	"time"

	bolt "go.etcd.io/bbolt"
	bolterrors "go.etcd.io/bbolt/errors"
)

// restoreProbeTimeout is how long Restore waits for the live file's lock
// before deciding a running process holds it.
const restoreProbeTimeout = 200 * time.Millisecond

// BeforeRestoreSuffix is appended to the live path to name the copy of the
// previous data file that Restore keeps.
const BeforeRestoreSuffix = ".before-restore"

// Backup writes a consistent copy of the whole data file to w from one
// read transaction (bbolt tx.WriteTo): writers go on meanwhile and the copy
// holds exactly the transactions committed before it began. It returns the
// bytes written.
func (db *DB) Backup(w io.Writer) (n int64, err error) {
	defer db.guard.catch(&err, "backup", debug.SetPanicOnFault(true))
	err = db.bolt.View(func(tx *bolt.Tx) error {
		var err error
		n, err = tx.WriteTo(w)
		return err
	})
	if err != nil {
		return n, fmt.Errorf("store: backup %s: %w", db.path, err)
	}
	return n, nil
}

// BackupToFile writes a hot copy (see Backup) to a temporary file (mode
// 0600) in path's directory (created 0700 if missing), syncs it, checks it
// with Check, and only then renames it to path, so path is either the old
// file or a complete, checked backup. It refuses to overwrite the open data
// file itself.
func (db *DB) BackupToFile(path string) (int64, error) {
	n, err := db.backupToFile(path)
	if err != nil {
		return 0, fmt.Errorf("store: backup %s to %s: %w", db.path, path, err)
	}
	return n, nil
}

func (db *DB) backupToFile(path string) (int64, error) {
	if same, err := sameFile(path, db.path); err != nil || same {
		if err == nil {
			err = errors.New("the target is the open data file")
		}
		return 0, err
	}
	var n int64
	err := writeAtomic(path, func(w io.Writer) error {
		var err error
		n, err = db.Backup(w)
		return err
	}, Check)
	return n, err
}

// Restore replaces the data file at livePath with the backup at backupPath.
// It refuses (ErrLocked) while a process holds livePath, copies the backup
// to a temporary file beside livePath, opens that read-write (which runs any
// pending migrations and refuses a newer schema) and checks it as
// (*DB).Check does, so a damaged backup never replaces anything. It then
// keeps the previous live file as livePath+BeforeRestoreSuffix (replacing an
// older one) and renames the checked copy onto livePath.
//
// Stop lathmark before restoring: Restore notices a running process but
// cannot stop one from starting while it works.
func Restore(backupPath, livePath string) (err error) {
	defer catchFault(&err, "store: restore "+backupPath+" to "+livePath, debug.SetPanicOnFault(true))
	if err := restore(backupPath, livePath); err != nil {
		return fmt.Errorf("store: restore %s to %s: %w", backupPath, livePath, err)
	}
	return nil
}

func restore(backupPath, livePath string) error {
	if same, err := sameFile(backupPath, livePath); err != nil || same {
		if err == nil {
			err = errors.New("backup and live file are the same file")
		}
		return err
	}
	// Hold a shared lock on the live file while we work: it fails if a
	// lathmark holds it, and makes one starting now wait.
	live, err := bolt.Open(livePath, fileMode, &bolt.Options{ReadOnly: true, Timeout: restoreProbeTimeout})
	switch {
	case errors.Is(err, bolterrors.ErrTimeout):
		return &LockedError{Path: livePath, Waited: restoreProbeTimeout, err: err}
	case err == nil:
		defer func() { _ = live.Close() }()
	case errors.Is(err, fs.ErrNotExist):
		// Nothing to keep: restoring onto a new path.
	default:
		// The live file is damaged; it is kept below as it is.
	}

	backup, err := os.Open(backupPath)
	if err != nil {
		return err
	}
	defer func() { _ = backup.Close() }()

	err = writeAtomic(livePath, func(w io.Writer) error {
		_, err := io.Copy(w, backup)
		return err
	}, func(candidate string) error {
		if err := checkLength(candidate); err != nil {
			return fmt.Errorf("backup refused: %w", err)
		}
		db, err := Open(candidate, Options{Timeout: restoreProbeTimeout})
		if err != nil {
			return fmt.Errorf("backup refused: %w", err)
		}
		cerr := db.Check()
		if err := db.Close(); cerr == nil {
			cerr = err
		}
		if cerr != nil {
			return fmt.Errorf("backup refused: %w", cerr)
		}
		// Keep the previous file only once the replacement is known good.
		if _, err := os.Stat(livePath); err == nil {
			if err := copyFile(livePath, livePath+BeforeRestoreSuffix); err != nil {
				return fmt.Errorf("keep previous file: %w", err)
			}
		}
		return nil
	})
	return err
}

// checkLength opens path read-only, which reads only its meta pages, to
// refuse a truncated file before a read-write open maps pages past its end.
func checkLength(path string) error {
	bdb, err := bolt.Open(path, fileMode, &bolt.Options{ReadOnly: true, Timeout: restoreProbeTimeout})
	if err != nil {
		return fmt.Errorf("store: open %s: %w", path, err)
	}
	db := &DB{bolt: bdb, path: path, readOnly: true}
	err = db.checkSize()
	if cerr := bdb.Close(); err == nil && cerr != nil {
		err = fmt.Errorf("store: close %s: %w", path, cerr)
	}
	return err
}

// writeAtomic creates path's directory (0700) and a temporary file (0600)
// in it, lets fill write the content, syncs and closes it, lets verify
// inspect the finished temporary file (nil skips), then renames it to path
// and syncs the directory. On any error the temporary file is removed and
// path is untouched.
func writeAtomic(path string, fill func(io.Writer) error, verify func(tmp string) error) error {
	dir := filepath.Dir(path)
	if err := os.MkdirAll(dir, dirMode); err != nil {
		return fmt.Errorf("create directory: %w", err)
	}
	f, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	done := false
	defer func() { // also on a panic unwinding through here
		if !done {
			_ = f.Close()
			_ = os.Remove(tmp)
		}
	}()
	if err := f.Chmod(fileMode); err != nil {
		return err
	}
	if err := fill(f); err != nil {
		return err
	}
	if err := f.Sync(); err != nil {
		return err
	}
	if err := f.Close(); err != nil {
		return err
	}
	if verify != nil {
		if err := verify(tmp); err != nil {
			return err
		}
	}
	if err := os.Rename(tmp, path); err != nil {
		return err
	}
	done = true
	return syncDir(dir)
}

// copyFile copies src to dst atomically (see writeAtomic).
func copyFile(src, dst string) error {
	in, err := os.Open(src)
	if err != nil {
		return err
	}
	defer func() { _ = in.Close() }()
	return writeAtomic(dst, func(w io.Writer) error {
		_, err := io.Copy(w, in)
		return err
	}, nil)
}

// syncDir makes a rename in dir durable.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	err = d.Sync()
	if cerr := d.Close(); err == nil {
		err = cerr
	}
	return err
}

// sameFile reports whether a and b name the same existing file; a missing
// file is the same as nothing.
func sameFile(a, b string) (bool, error) {
	fa, err := os.Stat(a)
	if errors.Is(err, fs.ErrNotExist) {
		return false, nil
	}
	if err != nil {
		return false, err
	}
	fb, err := os.Stat(b)
	if errors.Is(err, fs.ErrNotExist) {
		return false, nil
	}
	if err != nil {
		return false, err
	}
	return os.SameFile(fa, fb), nil
}
