package store_test

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/bot"
	"github.com/lathmark-team/lathmark/internal/botstore"
	"github.com/lathmark-team/lathmark/internal/console"
	"github.com/lathmark-team/lathmark/store"
)

// botCommands are read by the bot's engine on every damaged copy, as a head
// coach in the terminal would type them.
var botCommands = []string{"athletes", "athlete Ath01", "history Ath03 52w", "best Ath05", "audit 3650d", "team"}

// botReplies runs botCommands through an engine on db and renders each reply.
func botReplies(t testing.TB, db *store.DB) []string {
	t.Helper()
	now := base.Add(30 * 24 * time.Hour)
	e, err := bot.New(bot.Config{Store: botstore.New(db), Clock: bot.ClockFunc(func() time.Time { return now }), HeadCoaches: []string{"U_HEAD"}})
	if err != nil {
		t.Fatal(err)
	}
	out := make([]string, len(botCommands))
	for i, c := range botCommands {
		var b bytes.Buffer
		_ = console.Render(&b, e.Handle(context.Background(), bot.Request{UserID: "U_HEAD", UserName: "coach", Text: c, Time: now, Local: true}))
		out[i] = b.String()
	}
	return out
}

// damageReply is how the bot answers a read of damaged data.
const damageReply = "The data file is damaged; run `lathmark check`, restore from a backup."

// corruptCopies is how many damaged copies TestCorruptCopies makes: 40 in
// the ordinary run (CI), LATHMARK_CORRUPT_COPIES for the long form (.ci/long
// uses 400).
func corruptCopies(t *testing.T) int {
	if s := os.Getenv("LATHMARK_CORRUPT_COPIES"); s != "" {
		n, err := strconv.Atoi(s)
		if err != nil || n < 1 {
			t.Fatalf("LATHMARK_CORRUPT_COPIES=%q: want a positive whole number", s)
		}
		return n
	}
	if testing.Short() {
		return 12
	}
	return 40
}

// corruptStats counts what the damaged copies did.
type corruptStats struct {
	copies, bits, truncated   int
	unchanged                 int // every read as written, check passed
	checkFound, refusedAtOpen int
	readDamage                int // copies where some read reported ErrDamaged
	wrongValue                int // copies where a read gave another value than was written, without an error
	wrongUnseenByCheck        int // ... of those, copies check passed
	missing                   int // copies where a read succeeded but records it should have found were absent
	missingUnseenByCheck      int
	readClean                 int // copies that opened and where every read succeeded
	silentShort               int // ... of those, copies whose records read are not the records written
	botDamage, botOther       int // bot replies saying the file is damaged; other changed replies
	caught                    int // copies where a read faulted or bbolt panicked, caught by the guard
}

// TestCorruptCopies makes many copies of a real data file (built here with
// records of every kind, some rewritten so that free pages hold older
// versions), damages each (1 to 8 random bits flipped in the pages in use,
// or, one copy in ten, the file cut at a random page), and then, for each,
// runs Check and opens the copy read-write and reads everything through the
// store's accessors, one transaction a read, as the bot does. The seed is
// fixed, so a failure repeats. It asserts that nothing dies (this process
// would: the guards must catch every fault), that every failed read is
// ErrDamaged, and that no read returns a value other than the one written
// while Check passes the file, and that a copy which opens and reads
// without any error reads exactly the set of records written: none left
// out in silence (a damaged branch page once made a range scan skip sound
// records; the page walk at open now refuses such a file). The expected
// values are the undamaged file's.
func TestCorruptCopies(t *testing.T) {
	start := time.Now()
	dir := t.TempDir()
	tmpl := filepath.Join(dir, "template.db")
	db := openUnchecked(t, tmpl)
	fillStore(t, db, 8, 90)
	pr := probesOf(t, db)
	want, errs := dumpStoreReads(db, pr)
	if len(errs) > 0 {
		t.Fatalf("undamaged file: %v", errs)
	}
	wantBot := botReplies(t, db)
	for i, r := range wantBot {
		if strings.Contains(r, "Not done") {
			t.Fatalf("undamaged file: %q: %s", botCommands[i], r)
		}
	}
	var used int64
	if err := store.Raw(db).View(func(tx *bolt.Tx) error { used = tx.Size(); return nil }); err != nil {
		t.Fatal(err)
	}
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(tmpl)
	if err != nil {
		t.Fatal(err)
	}
	const pageSize = 4096
	rng := rand.New(rand.NewPCG(13, 2026))
	var st corruptStats
	n := corruptCopies(t)
	for i := range n {
		buf := bytes.Clone(data)
		what := ""
		if i%10 == 9 {
			cut := int64(rng.IntN(int(used/pageSize))) * pageSize
			buf = buf[:cut]
			st.truncated++
			what = fmt.Sprintf("cut at %d of %d bytes", cut, used)
		} else {
			k := 1 + rng.IntN(8)
			for range k {
				bit := rng.Int64N(used * 8)
				buf[bit/8] ^= 1 << (bit % 8)
				what += fmt.Sprintf(" %d.%d", bit/8, bit%8)
			}
			st.bits += k
			what = "bits flipped at" + what
		}
		path := filepath.Join(dir, fmt.Sprintf("copy-%03d.db", i))
		if err := os.WriteFile(path, buf, 0o600); err != nil {
			t.Fatal(err)
		}
		st.copies++
		corruptOne(t, path, what, want, wantBot, pr, &st)
		_ = os.Remove(path)
	}
	t.Logf("corruption summary: %d copies (%d with %d bits flipped, %d cut short) of a %d-byte file in %s: "+
		"check found damage in %d, %d refused at open, reads reported damage in %d, %d read exactly as written; "+
		"a read gave another value than written in %d (check passed %d of those); records absent from a read that succeeded in %d (check passed %d); "+
		"%d opened and read without an error, %d of them with other records than written; the bot said the file is damaged in %d of %d replies, other changed replies %d; a fault or a panic inside bbolt was caught by the guard in %d; no run died",
		st.copies, st.copies-st.truncated, st.bits, st.truncated, used, time.Since(start).Round(time.Millisecond),
		st.checkFound, st.refusedAtOpen, st.readDamage, st.unchanged,
		st.wrongValue, st.wrongUnseenByCheck, st.missing, st.missingUnseenByCheck, st.readClean, st.silentShort, st.botDamage, len(botCommands)*(st.copies-st.refusedAtOpen), st.botOther, st.caught)
	if st.wrongValue > 0 {
		t.Errorf("%d copies returned a damaged record as another value", st.wrongValue)
	}
	if st.missingUnseenByCheck > 0 {
		t.Errorf("%d copies lost records that check did not notice", st.missingUnseenByCheck)
	}
	if st.silentShort > 0 {
		t.Errorf("%d of %d copies that opened and read without an error read fewer (or other) records than were written", st.silentShort, st.readClean)
	}
}

// corruptOne checks one damaged copy (see TestCorruptCopies).
func corruptOne(t *testing.T, path, what string, wantDump storeDump, wantBot []string, pr probes, st *corruptStats) {
	want := wantDump.out
	t.Helper()
	checkErr := store.Check(path)
	found := checkErr != nil
	if found {
		st.checkFound++
		if !errors.Is(checkErr, store.ErrInconsistent) && !errors.Is(checkErr, store.ErrDamaged) && !errors.Is(checkErr, store.ErrSchemaNewer) {
			t.Logf("%s: check refused it with %v", what, checkErr)
		}
	}
	db, err := store.Open(path, store.Options{Timeout: testTimeout})
	if err != nil {
		st.refusedAtOpen++
		if !found {
			t.Errorf("%s: open refused a file check passed: %v", what, err)
		}
		return
	}
	gotDump, errs := dumpStoreReads(db, pr)
	got := gotDump.out
	gotBot := botReplies(t, db)
	if err := db.Close(); err != nil {
		t.Errorf("%s: close: %v", what, err)
	}
	for _, err := range errs {
		if !errors.Is(err, store.ErrDamaged) {
			t.Errorf("%s: a read failed with %v, want ErrDamaged", what, err)
		}
	}
	if len(errs) > 0 {
		st.readDamage++
	}
	for _, err := range errs {
		if strings.Contains(err.Error(), "reading the file failed") {
			st.caught++
			break
		}
	}
	wrong, missing := false, false
	for _, k := range sortedKeys(got) {
		v := got[k]
		switch {
		case len(v) > 4 && v[:4] == "ERR ":
		case want[k] == "":
			wrong = true
			t.Logf("%s: %s read, which was never written: %.200s", what, k, v)
		case v != want[k]:
			wrong = true
			t.Logf("%s: %s read as %.200s, was %.200s", what, k, v, want[k])
		}
	}
	// Records absent from a read that succeeded: nothing told the reader.
	for k := range want {
		if _, ok := got[k]; !ok && gotDump.okReads[wantDump.readOf[k]] {
			if !missing {
				t.Logf("%s: %s absent from a read that succeeded (check found damage: %v)", what, k, found)
			}
			missing = true
		}
	}
	// A copy read without any error must hold exactly the records written.
	if len(errs) == 0 {
		st.readClean++
		if diff := recordSetDiff(want, got); diff != "" {
			st.silentShort++
			t.Errorf("%s: opened and read without an error, but %s (check found damage: %v)", what, diff, found)
		}
	}
	// The bot answers each command as before, or says the file is damaged;
	// never "something went wrong". (Where records went missing without a
	// read error its replies may differ; check reports those files.)
	for i, r := range gotBot {
		switch {
		case r == wantBot[i]:
		case strings.Contains(r, damageReply):
			st.botDamage++
		case missing && found:
		default:
			st.botOther++
			t.Errorf("%s: the bot answered %q with\n%s\nwas\n%s", what, botCommands[i], r, wantBot[i])
		}
	}
	switch {
	case wrong:
		st.wrongValue++
		if !found {
			st.wrongUnseenByCheck++
		}
	case missing:
		st.missing++
		if !found {
			st.missingUnseenByCheck++
			t.Logf("%s: records missing and check passed", what)
		}
	case len(errs) == 0 && !found:
		st.unchanged++
	}
}

// recordSetDiff compares the records read (got) with those written (want)
// by name and value, and says what differs ("" if nothing).
func recordSetDiff(want, got map[string]string) string {
	var absent, other []string
	for k, v := range want {
		switch g, ok := got[k]; {
		case !ok:
			absent = append(absent, k)
		case g != v:
			other = append(other, k)
		}
	}
	for k := range got {
		if _, ok := want[k]; !ok {
			other = append(other, k)
		}
	}
	if len(absent) == 0 && len(other) == 0 {
		return ""
	}
	sort.Strings(absent)
	sort.Strings(other)
	return fmt.Sprintf("%d of %d records absent (first: %v) and %d read otherwise (first: %v)", len(absent), len(want), first(absent), len(other), first(other))
}

// first is the first few names of a list, for a message.
func first(names []string) []string { return names[:min(len(names), 3)] }
