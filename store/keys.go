package store

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"strings"
	"time"
)

// Key lengths in bytes.
const (
	idLen      = 8
	nanosLen   = 8
	seqLen     = 4
	attemptLen = idLen + nanosLen + seqLen // athlete id + time + seq
	auditLen   = nanosLen + 8              // time + bucket sequence
	lineTail   = 1 + nanosLen + seqLen     // 0x00 + time + seq after loggedBy
)

// maxNameBytes bounds athlete names so index keys stay small.
const maxNameBytes = 200

// ErrTimeRange is matched by the error for a time the keys cannot hold:
// before 1970 (including an unset time.Time) or past the int64 nanosecond
// range.
var ErrTimeRange = errors.New("time outside 1970-01-01 to 2262-04-11 UTC")

// nanos returns t as nanoseconds since 1970 for a key. Keys sort
// big-endian unsigned, so times before 1970 (including the zero time.Time)
// and times past the int64 range are refused.
func nanos(t time.Time) (uint64, error) {
	if t.Before(time.Unix(0, 0)) || !t.Before(time.Unix(0, math.MaxInt64)) {
		return 0, fmt.Errorf("%s: %w", t.Format(time.RFC3339Nano), ErrTimeRange)
	}
	return uint64(t.UnixNano()), nil
}

// clampNanos maps any time onto the key range, for range bounds.
func clampNanos(t time.Time) uint64 {
	switch {
	case t.Before(time.Unix(0, 0)):
		return 0
	case !t.Before(time.Unix(0, math.MaxInt64)):
		return math.MaxInt64
	}
	return uint64(t.UnixNano())
}

// fromNanos is the inverse of nanos, in UTC.
func fromNanos(n uint64) time.Time { return time.Unix(0, int64(n)).UTC() }

func idKey(id uint64) []byte { return binary.BigEndian.AppendUint64(make([]byte, 0, idLen), id) }

// attemptKey is athlete id + time + seq, all big-endian, so one athlete's
// attempts are contiguous and in time order.
func attemptKey(athleteID, n uint64, seq uint32) []byte {
	k := make([]byte, 0, attemptLen)
	k = binary.BigEndian.AppendUint64(k, athleteID)
	k = binary.BigEndian.AppendUint64(k, n)
	return binary.BigEndian.AppendUint32(k, seq)
}

// linePrefix is the key prefix of one chat user's lines.
func linePrefix(loggedBy string) []byte {
	k := make([]byte, 0, len(loggedBy)+lineTail)
	k = append(k, loggedBy...)
	return append(k, 0)
}

func lineKey(loggedBy string, n uint64, seq uint32) []byte {
	k := linePrefix(loggedBy)
	k = binary.BigEndian.AppendUint64(k, n)
	return binary.BigEndian.AppendUint32(k, seq)
}

func auditKey(n, seq uint64) []byte {
	k := make([]byte, 0, auditLen)
	k = binary.BigEndian.AppendUint64(k, n)
	return binary.BigEndian.AppendUint64(k, seq)
}

// foldName is the name index key: white space trimmed and collapsed to
// single spaces, then lower-cased, so "Kai  Lee", "kai lee" and " KAI LEE"
// are the same athlete.
func foldName(name string) string {
	return strings.ToLower(strings.Join(strings.Fields(name), " "))
}

// smallestUnused returns the smallest seq not in used.
func smallestUnused(used []uint32) (uint32, error) {
	seen := make(map[uint32]bool, len(used))
	for _, s := range used {
		seen[s] = true
	}
	for s := uint32(0); s < math.MaxUint32; s++ {
		if !seen[s] {
			return s, nil
		}
	}
	return 0, errors.New("no free sequence number")
}
