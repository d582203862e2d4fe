package store

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"slices"
	"strings"

	bolt "go.etcd.io/bbolt"
)

// SchemaVersion is the layout this code reads and writes. Version 0 is a
// file with no version recorded (a new, empty file).
//
// Version 1 layout, one top-level bucket each (keys and values):
//
//	meta      "schema" -> uint64 big-endian version
//	team      "settings" -> JSON record.Team
//	athletes  uint64 BE id -> JSON record.Athlete; bucket sequence = last id given
//	names     folded name (see foldName) -> uint64 BE id
//	attempts  id(8) + UnixNano(8) + seq(4), all BE -> JSON record.Attempt
//	lines     loggedBy + 0x00 + UnixNano(8) + seq(4) -> JSON record.Line
//	users     chat user id -> JSON record.User
//	seen      message or event id -> UnixNano(8) BE
//	audit     UnixNano(8) + bucket sequence(8), BE -> JSON record.AuditEntry
//	digests   ISO week "2026-W49" -> UnixNano(8) BE
//
// Version 2 keeps that layout and seals every value (see seal.go): the
// value above followed by the CRC-32C of key and value, 4 bytes BE. That
// includes the schema version itself and the buckets created at open
// (inbox, hints). Migrating from version 1 seals the values in place.
//
// Version 3 keeps that layout and numbers every line: record.Line.Number
// (#N in `history`, from the lines bucket's sequence) is non-zero, and each
// attempt a line names carries it as LineNo. Migrating from version 2
// numbers the lines stored before numbering, oldest first
// (migrateNumberLinesV3).
const SchemaVersion uint64 = 3

// Bucket names.
const (
	bucketMeta     = "meta"
	bucketTeam     = "team"
	bucketAthletes = "athletes"
	bucketNames    = "names"
	bucketAttempts = "attempts"
	bucketLines    = "lines"
	bucketUsers    = "users"
	bucketSeen     = "seen"
	bucketAudit    = "audit"
	bucketDigests  = "digests"
)

// Keys inside the meta and team buckets.
const (
	keySchema   = "schema"
	keySettings = "settings"
)

// allBuckets lists every bucket of the current layout.
func allBuckets() []string {
	return []string{bucketMeta, bucketTeam, bucketAthletes, bucketNames, bucketAttempts,
		bucketLines, bucketUsers, bucketSeen, bucketAudit, bucketDigests}
}

// migration brings a file from version `from` to from+1. It runs inside the
// single transaction that Open uses for all pending steps, so a failing step
// leaves the file as it was.
type migration struct {
	name string
	run  func(tx *bolt.Tx) error
}

// migrations returns the steps keyed by the version they start from.
func migrations() map[uint64]migration {
	return map[uint64]migration{
		0: {name: "create the version 1 buckets", run: migrateCreateV1},
		1: {name: "seal every value with its checksum", run: migrateSealV2},
		2: {name: "number the lines stored before lines were numbered", run: migrateNumberLinesV3},
	}
}

// migrateCreateV1 turns a file without a schema version into version 1. Only
// an empty file qualifies: a bbolt file holding other buckets belongs to
// some other program and is refused rather than stamped as ours.
func migrateCreateV1(tx *bolt.Tx) error {
	known := allBuckets()
	var foreign []string
	if err := tx.ForEach(func(name []byte, _ *bolt.Bucket) error {
		if !slices.Contains(known, string(name)) {
			foreign = append(foreign, string(name))
		}
		return nil
	}); err != nil {
		return err
	}
	if len(foreign) > 0 {
		return fmt.Errorf("file has no schema version but holds buckets lathmark does not use (%s): not a lathmark data file", strings.Join(foreign, ", "))
	}
	for _, name := range known {
		if _, err := tx.CreateBucketIfNotExists([]byte(name)); err != nil {
			return fmt.Errorf("create bucket %s: %w", name, err)
		}
	}
	return nil
}

// migrateSealV2 seals every value of every top-level bucket but meta (whose
// version key prepareSchema rewrites sealed). Values are read first and
// written after: a Put under a live cursor may skip keys.
func migrateSealV2(tx *bolt.Tx) error {
	return tx.ForEach(func(name []byte, b *bolt.Bucket) error {
		if string(name) == bucketMeta {
			return nil
		}
		var keys, vals [][]byte
		if err := b.ForEach(func(k, v []byte) error {
			if v == nil {
				return fmt.Errorf("bucket %s: nested bucket %q: not a lathmark layout", name, k)
			}
			keys, vals = append(keys, bytes.Clone(k)), append(vals, bytes.Clone(v))
			return nil
		}); err != nil {
			return err
		}
		for i, k := range keys {
			if err := putValue(b, k, vals[i]); err != nil {
				return fmt.Errorf("bucket %s: seal %q: %w", name, shortKey(k), err)
			}
		}
		return nil
	})
}

// legacySchemaLen is the unsealed version value of schema version 1 files.
const legacySchemaLen = 8

// readSchema returns the version recorded in tx's meta bucket, 0 if none.
// Version 1 stored it unsealed; later versions seal it.
func readSchema(tx *bolt.Tx) (uint64, error) {
	meta := tx.Bucket([]byte(bucketMeta))
	if meta == nil {
		return 0, nil
	}
	v := meta.Get([]byte(keySchema))
	if v == nil {
		return 0, nil
	}
	if len(v) == legacySchemaLen {
		if n := binary.BigEndian.Uint64(v); n == 1 {
			return n, nil
		}
		return 0, fmt.Errorf("unsealed schema version %x: %w", v, ErrDamaged)
	}
	p, err := unseal([]byte(keySchema), v)
	if err != nil {
		return 0, fmt.Errorf("schema version: %w", err)
	}
	if len(p) != 8 {
		return 0, fmt.Errorf("schema version is %d bytes, want 8", len(p))
	}
	return binary.BigEndian.Uint64(p), nil
}

// prepareSchema checks the file's version and, for a read-write open, runs
// the pending migrations from ms up to target in one transaction. A file
// already at target is not written to.
func (db *DB) prepareSchema(ms map[uint64]migration, target uint64) error {
	var have uint64
	if err := db.bolt.View(func(tx *bolt.Tx) error {
		v, err := readSchema(tx)
		have = v
		return err
	}); err != nil {
		return fmt.Errorf("store: open %s: read schema version: %w", db.path, err)
	}
	switch {
	case have > target:
		return fmt.Errorf("store: open %s: schema version %d, this lathmark knows up to %d; upgrade lathmark: %w", db.path, have, target, ErrSchemaNewer)
	case have == target:
		return nil
	case db.readOnly:
		return fmt.Errorf("store: open %s read-only: schema version %d needs migrating to %d; open it read-write once: %w", db.path, have, target, ErrSchemaOlder)
	}
	err := db.bolt.Update(func(tx *bolt.Tx) error {
		for v := have; v < target; v++ {
			m, ok := ms[v]
			if !ok {
				return fmt.Errorf("no migration from schema version %d", v)
			}
			if err := m.run(tx); err != nil {
				return fmt.Errorf("migrate %d to %d (%s): %w", v, v+1, m.name, err)
			}
		}
		meta, err := tx.CreateBucketIfNotExists([]byte(bucketMeta))
		if err != nil {
			return fmt.Errorf("create bucket %s: %w", bucketMeta, err)
		}
		return putValue(meta, []byte(keySchema), binary.BigEndian.AppendUint64(nil, target))
	})
	if err != nil {
		return fmt.Errorf("store: open %s: %w", db.path, err)
	}
	return nil
}
