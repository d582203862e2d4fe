package store

import (
	"bytes"
	"cmp"
	"fmt"
	"slices"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
)

// unnumberedLine is a line stored before lines were numbered, with the
// attempts it logged, as read by migrateNumberLinesV3.
type unnumberedLine struct {
	key      []byte
	line     record.Line
	attempts map[string]record.Attempt // attempt key -> attempt, those still stored
}

// migrateNumberLinesV3 gives every line stored with Number 0 (files written
// before `history` showed #N) a fresh number from the lines bucket's
// sequence, oldest line first (ties in key order), and writes that number
// into the LineNo of each attempt the line names, so `fix #N` and `drop #N`
// reach it. Lines already numbered, and their attempts, are left alone; an
// attempt a line names but no longer stored (dropped since) is skipped.
// Everything is read first and written after: a Put under a live cursor
// may skip keys.
func migrateNumberLinesV3(tx *bolt.Tx) error {
	lines, attempts := tx.Bucket([]byte(bucketLines)), tx.Bucket([]byte(bucketAttempts))
	if lines == nil || attempts == nil {
		return fmt.Errorf("bucket %s or %s missing: %w", bucketLines, bucketAttempts, ErrDamaged)
	}
	todo, err := readUnnumberedLines(lines, attempts)
	if err != nil {
		return err
	}
	for _, u := range todo {
		n, err := lines.NextSequence()
		if err != nil {
			return fmt.Errorf("next line number: %w", err)
		}
		u.line.Number = n
		if err := putJSON(lines, u.key, u.line); err != nil {
			return fmt.Errorf("line %s: %w", shortKey(u.key), err)
		}
		for k, a := range u.attempts {
			a.LineNo = n
			if err := putJSON(attempts, []byte(k), a); err != nil {
				return fmt.Errorf("attempt %x of line %s: %w", k, shortKey(u.key), err)
			}
		}
	}
	return nil
}

// readUnnumberedLines returns the lines with Number 0, oldest first, each
// with its stored attempts.
func readUnnumberedLines(lines, attempts *bolt.Bucket) ([]unnumberedLine, error) {
	var todo []unnumberedLine
	err := lines.ForEach(func(k, v []byte) error {
		var l record.Line
		if err := decodeJSON(k, v, &l); err != nil {
			return fmt.Errorf("line %s: %w", shortKey(k), err)
		}
		if l.Number == 0 {
			todo = append(todo, unnumberedLine{key: bytes.Clone(k), line: l})
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	slices.SortStableFunc(todo, func(a, b unnumberedLine) int {
		return cmp.Or(a.line.Time.Compare(b.line.Time), bytes.Compare(a.key, b.key))
	})
	for i := range todo {
		todo[i].attempts = map[string]record.Attempt{}
		for _, ak := range todo[i].line.Attempts {
			n, err := nanos(ak.Time)
			if err != nil {
				continue // no key can hold it, so nothing is stored there
			}
			key := attemptKey(ak.AthleteID, n, ak.Seq)
			var a record.Attempt
			ok, err := getJSON(attempts, key, &a)
			if err != nil {
				return nil, fmt.Errorf("attempt %x of line %s: %w", key, shortKey(todo[i].key), err)
			}
			if ok {
				todo[i].attempts[string(key)] = a
			}
		}
	}
	return todo, nil
}
