package store

import (
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"hash/crc32"
	"time"

	bolt "go.etcd.io/bbolt"
)

// Every value this package stores (from schema version 2) is sealed:
//
//	sealed = payload ‖ CRC-32C(key ‖ payload)   (4 bytes, big-endian)
//
// CRC-32C is the Castagnoli polynomial (hash/crc32, RFC 3720 §B.4). The key
// is covered too, so a record whose key bytes were damaged (it would show up
// under another athlete, time or name) fails its check like a damaged
// value. A read that finds a mismatch returns an error matching ErrDamaged;
// it never returns the damaged bytes.
//
// All puts and gets of stored values go through the helpers in this file
// (putValue, getValue, putJSON, getJSON, decodeJSON, decodeID, putTime,
// getTime, decodeTime); TestNoUnsealedAccess fails if a file of the package
// calls bbolt's Put or json.Unmarshal itself, so a bucket added later is
// sealed too when it is written through them.
const sealLen = 4

// errPlain is an error whose text is itself the plain cause to tell the
// person (bot/errors.go shows it as the reply instead of "something went
// wrong").
type errPlain struct{ msg string }

func (e *errPlain) Error() string { return e.msg }

// PlainCause is the sentence for the person who asked.
func (e *errPlain) PlainCause() string { return e.msg }

// ErrDamaged is matched (errors.Is) by every error from a read of damaged
// data: a record whose checksum does not match, or a fault of the memory
// map (SIGBUS/SIGSEGV) while reading the file, which the store's
// transactions turn into this error instead of a crash.
var ErrDamaged error = &errPlain{"the data file is damaged; run `lathmark check`, restore from a backup"}

// ErrDiskFull is matched by the error of a commit that failed because the
// disk (or the user's quota) is full: ENOSPC or EDQUOT from a write or sync.
// bbolt writes the new meta page last, so the transaction left no trace.
var ErrDiskFull error = &errPlain{"the disk is full; nothing was saved"}

// sealSum is CRC-32C over key then payload.
func sealSum(key, payload []byte) uint32 {
	tab := crc32.MakeTable(crc32.Castagnoli) // cached by hash/crc32
	return crc32.Update(crc32.Update(0, tab, key), tab, payload)
}

// seal returns payload with its checksum appended (a fresh slice).
func seal(key, payload []byte) []byte {
	out := make([]byte, len(payload), len(payload)+sealLen)
	copy(out, payload)
	return binary.BigEndian.AppendUint32(out, sealSum(key, payload))
}

// unseal checks a stored value against its key and returns the payload (a
// sub-slice of v, valid as long as v is).
func unseal(key, v []byte) ([]byte, error) {
	if len(v) < sealLen {
		return nil, fmt.Errorf("record %s: %d bytes, too short to hold its checksum: %w", shortKey(key), len(v), ErrDamaged)
	}
	p := v[:len(v)-sealLen]
	if got, want := binary.BigEndian.Uint32(v[len(p):]), sealSum(key, p); got != want {
		return nil, fmt.Errorf("record %s: checksum %08x, content gives %08x: %w", shortKey(key), got, want, ErrDamaged)
	}
	return p, nil
}

// shortKey is a key for an error message: text as it is, binary keys in
// hex, at most 40 bytes of either.
func shortKey(key []byte) string {
	cut := ""
	if len(key) > 40 {
		key, cut = key[:40], "…"
	}
	for _, c := range key {
		if c < ' ' || c > '~' {
			return fmt.Sprintf("%x%s", key, cut)
		}
	}
	return string(key) + cut
}

// soundAt checks the seal of the record a scan stopped at (k nil: the
// bucket's end; v nil: a nested bucket). A scan that ends at a key outside
// its range calls it, so that a record whose key bits were damaged (moving
// it past the range) is reported instead of silently left out.
func soundAt(k, v []byte) error {
	if k == nil || v == nil {
		return nil
	}
	_, err := unseal(k, v)
	return err
}

// missSound is called when key holds nothing: the records either side of
// where it would be must be sound, or the one wanted may be among them
// under a damaged key.
func missSound(b *bolt.Bucket, key []byte) error {
	c := b.Cursor()
	k, v := c.Seek(key)
	if err := soundAt(k, v); err != nil {
		return err
	}
	if k == nil {
		k, v = c.Last()
	} else {
		k, v = c.Prev()
	}
	return soundAt(k, v)
}

// putValue stores payload sealed under key.
func putValue(b *bolt.Bucket, key, payload []byte) error {
	return b.Put(key, seal(key, payload))
}

// getValue returns the checked payload under key; ok is false if nothing is
// stored there.
func getValue(b *bolt.Bucket, key []byte) (payload []byte, ok bool, err error) {
	v := b.Get(key)
	if v == nil {
		return nil, false, missSound(b, key)
	}
	p, err := unseal(key, v)
	if err != nil {
		return nil, false, err
	}
	return p, true, nil
}

// putJSON stores v as sealed JSON.
func putJSON(b *bolt.Bucket, key []byte, v any) error {
	data, err := json.Marshal(v)
	if err != nil {
		return fmt.Errorf("encode: %w", err)
	}
	// data is ours: seal it in place rather than copying it.
	return b.Put(key, binary.BigEndian.AppendUint32(data, sealSum(key, data)))
}

// getJSON decodes the sealed JSON under key into out; ok is false if
// nothing is stored there.
func getJSON(b *bolt.Bucket, key []byte, out any) (ok bool, err error) {
	v := b.Get(key)
	if v == nil {
		return false, missSound(b, key)
	}
	return true, decodeJSON(key, v, out)
}

// decodeJSON checks a sealed value read under key (by a cursor or ForEach)
// and decodes its JSON into out.
func decodeJSON(key, v []byte, out any) error {
	p, err := unseal(key, v)
	if err != nil {
		return err
	}
	if err := json.Unmarshal(p, out); err != nil {
		// The checksum matched, so these are the bytes that were written.
		return fmt.Errorf("decode: %w", err)
	}
	return nil
}

// decodeID checks a sealed 8-byte id (the names index).
func decodeID(key, v []byte) (uint64, error) {
	p, err := unseal(key, v)
	if err != nil {
		return 0, err
	}
	if len(p) != idLen {
		return 0, fmt.Errorf("id value is %d bytes, want %d", len(p), idLen)
	}
	return binary.BigEndian.Uint64(p), nil
}

// putTime stores a time as 8 big-endian bytes of UnixNano, sealed.
func putTime(b *bolt.Bucket, key string, at time.Time) error {
	if key == "" {
		return errors.New("empty key")
	}
	n, err := nanos(at)
	if err != nil {
		return err
	}
	return putValue(b, []byte(key), binary.BigEndian.AppendUint64(nil, n))
}

// getTime reads a time stored by putTime.
func getTime(b *bolt.Bucket, key string) (time.Time, bool, error) {
	if key == "" {
		return time.Time{}, false, nil
	}
	v := b.Get([]byte(key))
	if v == nil {
		return time.Time{}, false, missSound(b, []byte(key))
	}
	at, err := decodeTime([]byte(key), v)
	return at, err == nil, err
}

// decodeTime checks a sealed time read under key.
func decodeTime(key, v []byte) (time.Time, error) {
	p, err := unseal(key, v)
	if err != nil {
		return time.Time{}, err
	}
	if len(p) != nanosLen {
		return time.Time{}, fmt.Errorf("time value is %d bytes, want %d", len(p), nanosLen)
	}
	return fromNanos(binary.BigEndian.Uint64(p)), nil
}
