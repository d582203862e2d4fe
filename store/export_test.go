package store

import bolt "go.etcd.io/bbolt"

// Hooks for the external tests in package store_test.

// ScanSteps reports how many keys the range scans of tx have visited.
func ScanSteps(tx *Tx) int { return tx.scanSteps }

// Raw returns the bbolt handle, for tests that craft damaged files and for
// benchmark floors on the same file.
func Raw(db *DB) *bolt.DB { return db.bolt }

// OpenWithNext opens path like Open but with one more schema step,
// SchemaVersion -> SchemaVersion+1, running next.
func OpenWithNext(path string, opts Options, next func(*bolt.Tx) error) (*DB, error) {
	ms := migrations()
	ms[SchemaVersion] = migration{name: "test step", run: next}
	return openWith(path, opts, ms, SchemaVersion+1)
}

// Seal returns v as the store writes it under key (v and its checksum), for
// tests that write records with the raw bbolt handle.
func Seal(key, v []byte) []byte { return seal(key, v) }

// Unseal checks a raw stored value and returns its payload.
func Unseal(key, v []byte) ([]byte, error) { return unseal(key, v) }
