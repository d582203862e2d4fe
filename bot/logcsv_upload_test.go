package bot_test

import (
	"context"
	"os"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/bot"
)

// upload runs `import csv` as user with one file shared in chat.
func (te *testEngine) upload(user, text string, f bot.Upload) bot.Reply {
	te.t.Helper()
	te.seq++
	te.advance(time.Second)
	return te.E.Handle(context.Background(), bot.Request{UserID: user, UserName: user, Text: text, Time: te.now,
		MessageID: te.idPrefix + itoa(te.seq), Direct: true, Upload: &f})
}

// TestImportUploadedCSV: a CSV shared in chat imports exactly as the same
// file read from disk (the spreadsheet fixture: 5 attempts, Mira o x o at
// 1.70/1.75, Kai x o in a meet, counted by hand from the file).
func TestImportUploadedCSV(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	logAddAthlete(t, te.DB, logKai())
	data, err := os.ReadFile("../testdata/csv/import-spreadsheet.csv")
	if err != nil {
		t.Fatal(err)
	}
	r := te.upload("U_HEAD", "import csv", bot.Upload{Name: "squad.csv", MIME: "text/csv", Data: data})
	if !r.OK() {
		t.Fatalf("refused: %s", plain(r))
	}
	contains(t, r, "Imported 5 jumps for 2 athletes")
	if m := logAttempts(t, te.DB, "Mira"); notation(m) != "oxo" {
		t.Errorf("Mira %q", notation(m))
	}
	if k := logAttempts(t, te.DB, "Kai"); notation(k) != "xo" || !k[0].Meet {
		t.Errorf("Kai %q", notation(k))
	}
}

// TestImportUploadRefusals: a coach who is not head coach, a file the
// front end could not fetch, a file that is not CSV and a CSV with bad rows
// are each refused with the reason, and nothing is stored.
func TestImportUploadRefusals(t *testing.T) {
	te := newTestEngine(t)
	logAddAthlete(t, te.DB, logMira())
	te.must("role coach <@U_COACH>")
	bad, err := os.ReadFile("../testdata/csv/import-errors.csv")
	if err != nil {
		t.Fatal(err)
	}
	before := te.checksum()
	for _, tt := range []struct {
		name, user string
		f          bot.Upload
		kind       bot.Kind
		want       string
	}{
		{"coach", "U_COACH", bot.Upload{Name: "a.csv", Data: []byte("athlete,time,bar_m,outcome\n")}, bot.KindForbidden, "head coach"},
		{"too big", "U_HEAD", bot.Upload{Name: "big.csv", Problem: "it is 3.0 MiB; files from chat may be up to 2 MiB"}, bot.KindUsage, "up to 2 MiB"},
		{"not csv", "U_HEAD", bot.Upload{Name: "photo.jpg", MIME: "image/jpeg", Data: []byte{0xff, 0xd8}}, bot.KindUsage, `"photo.jpg" is not a CSV file`},
		{"bad rows", "U_HEAD", bot.Upload{Name: "errors.csv", MIME: "text/csv", Data: bad}, bot.KindUsage, `row 3: no athlete called "Mria"`},
	} {
		r := te.upload(tt.user, "import csv", tt.f)
		if r.Kind != tt.kind || !strings.Contains(plain(r), tt.want) {
			t.Errorf("%s: kind %v, want %v with %q:\n%s", tt.name, r.Kind, tt.kind, tt.want, plain(r))
		}
	}
	if te.checksum() != before {
		t.Error("a refused upload changed the store")
	}
}
