package store

import (
	"bytes"
	"errors"
	"fmt"
	"strings"
	"time"

	bolt "go.etcd.io/bbolt"
)

// bucketHints holds when a hint was last shown to a chat user:
//
//	hints  user id + 0x00 + hint name -> UnixNano(8) BE
//
// Created at open (like the inbox), so files of schema version 1 gain it
// without a migration.
const bucketHints = "hints"

func (db *DB) ensureHints() error {
	if db.readOnly {
		return nil
	}
	return db.bolt.Update(func(tx *bolt.Tx) error {
		_, err := tx.CreateBucketIfNotExists([]byte(bucketHints))
		return err
	})
}

func hintKey(user, hint string) (string, error) {
	if hint == "" || strings.ContainsRune(user, 0) || strings.ContainsRune(hint, 0) {
		return "", errors.New("hint key: empty hint or a NUL byte")
	}
	return user + "\x00" + hint, nil
}

// HintShown reports when hint was last shown to user ("" is the terminal's
// operator); ok is false if never. A file opened read-only before the
// bucket existed reads as never.
func (t *Tx) HintShown(user, hint string) (time.Time, bool, error) {
	k, err := hintKey(user, hint)
	if err != nil {
		return time.Time{}, false, fmt.Errorf("store: hint shown: %w", err)
	}
	b := t.tx.Bucket([]byte(bucketHints))
	if b == nil {
		return time.Time{}, false, nil
	}
	at, ok, err := getTime(b, k)
	if err != nil {
		return time.Time{}, false, fmt.Errorf("store: hint shown %q: %w", hint, err)
	}
	return at, ok, nil
}

// MarkHintShown records that hint was shown to user at at.
func (t *Tx) MarkHintShown(user, hint string, at time.Time) error {
	k, err := hintKey(user, hint)
	if err != nil {
		return fmt.Errorf("store: mark hint: %w", err)
	}
	b, err := t.tx.CreateBucketIfNotExists([]byte(bucketHints))
	if err == nil {
		err = putTime(b, k, at)
	}
	if err != nil {
		return fmt.Errorf("store: mark hint %q: %w", hint, err)
	}
	return nil
}

// deleteHints removes every hint record of user (when the user is deleted).
func (t *Tx) deleteHints(user string) error {
	b := t.tx.Bucket([]byte(bucketHints))
	if b == nil || user == "" {
		return nil
	}
	prefix := []byte(user + "\x00")
	c := b.Cursor()
	for k, _ := c.Seek(prefix); k != nil && bytes.HasPrefix(k, prefix); k, _ = c.Seek(prefix) {
		if err := b.Delete(k); err != nil {
			return err
		}
	}
	return nil
}
