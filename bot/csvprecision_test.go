package bot_test

import (
	"encoding/csv"
	"strings"
	"testing"
	"time"
)

// A spreadsheet gets times to the second with the team's offset (RFC 3339)
// and bars with the precision they were typed with. Feet-inches are exact
// in metres (1 in = 0.0254 m exactly, international yard and pound
// agreement, 1959): 5-4¼ = 64.25 in = 1.63195 m, 6-0 = 1.8288 m.
func TestExportCSVTypedPrecision(t *testing.T) {
	te := newTestEngine(t)
	te.must("athlete add Lea height 1.70 sex f")
	te.must("team tz America/New_York")
	te.now = te.now.Add(437 * time.Millisecond) // a message time with a fraction of a second
	te.must("log Lea 1.6 o 1.785 xo 165cm o")
	te.must("team units imperial")
	te.must("log Lea 5-4¼ o 6-0 x")
	r := te.must("export csv Lea")
	rows, err := csv.NewReader(strings.NewReader(string(r.Files[0].Data))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var bars []string
	for _, row := range rows[1:] {
		bars = append(bars, row[2])
		_, err := time.Parse(time.RFC3339, row[1])
		if err != nil || strings.Contains(row[1], ".") || !strings.HasSuffix(row[1], "-05:00") {
			t.Errorf("time %q: want RFC 3339 to the second with New York's November offset −05:00 (err %v)", row[1], err)
		}
	}
	want := "1.60 1.785 1.785 1.65 1.63195 1.8288"
	if got := strings.Join(bars, " "); got != want {
		t.Errorf("bars %q, want %q", got, want)
	}
}
