package main

import (
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// The sequences piped through the terminal front end, as a coach
// would type them: the competition rules (World Athletics TR 26.2: three
// consecutive failures end the competition; a pass carries the failures
// before it), plausibility, counts, corrections by line number, a past
// session, and a CSV with an invalid meet series.
func TestTerminalLogKeepsTheRules(t *testing.T) {
	dir := t.TempDir()
	data := filepath.Join(dir, "x.db")
	csvPath := filepath.Join(dir, "bad.csv")
	csv := "athlete,time,bar_m,outcome,meet\n" +
		"Ana,2026-06-06T14:00:00Z,1.60,x,true\n" +
		"Ana,2026-06-06T14:01:00Z,1.60,x,true\n" +
		"Ana,2026-06-06T14:02:00Z,1.60,x,true\n" +
		"Ana,2026-06-06T14:03:00Z,1.65,o,true\n" +
		"Ana,2026-06-06T14:04:00Z,1.70,o,true\n"
	if err := os.WriteFile(csvPath, []byte(csv), 0o600); err != nil {
		t.Fatal(err)
	}
	script := strings.Join([]string{
		"athlete add Ana height 1.75 sex f",
		"athlete add Lea height 1.70 sex f pb 1.65",
		"athlete add Sam height 1.85 sex m pb 1.95",
		"athlete add Bo height 1.80 sex m pb 1.75",
		"log Ana 1.70 o 1.75 x- 1.78 xx meet",
		"log Ana 1.81 xxo meet",
		"best Ana",
		"log Bo 1.65 x- 1.70 xxx meet",
		"log Lea 2.40 o",
		"history Lea",
		"log Sam 1.80 o 1.85 - 1.90 xo",
		"log Sam 1.70 xo yesterday",
		"history Sam",
		"fix #2 1.80 o 1.85 - 1.90 xxo",
		"drop #3",
		"history Sam",
		"import csv " + csvPath,
	}, "\n") + "\n"
	out, errs, code := runLines(t, script, "--data", data)
	if code != 0 {
		t.Fatalf("exit %d:\n%s\n%s", code, out, errs)
	}
	for _, want := range []string{
		// Ana's second meet line is refused with the rule; her best stays 1.70.
		"Ana was already out: three consecutive failures (1.75, 1.78, 1.78)",
		"TR 26.2",
		"Personal best:       1.70 m (meet",
		// The real fault after a pass: only two tries left at 1.70.
		"Bo had only two tries left at 1.70 m",
		// Lea's 2.40 asks for confirm and stores nothing.
		"2.40 m is 75.0 cm above Lea's personal best 1.65 m",
		"No jumps logged for Lea",
		// Three jumps and one pass.
		"Logged for Sam (practice), line #2: 3 jumps and 1 pass",
		// Corrections by number.
		"Fixed line #2 for Sam",
		"Dropped line #3",
		// The CSV's invalid meet series, by row.
		"row 5: a meet attempt that breaks the rules",
		"row 6: a meet attempt that breaks the rules",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
	// The line logged yesterday shows under yesterday's date, before today.
	hist := strings.Split(out, "History of Sam")
	if len(hist) != 3 {
		t.Fatalf("want two histories of Sam:\n%s", out)
	}
	rows := regexp.MustCompile(`(?m)^\s+(\w{3} \d{4}-\d\d-\d\d)\s+practice.*#(\d+)`).FindAllStringSubmatch(hist[1], -1)
	if len(rows) != 2 || rows[0][2] != "3" || rows[1][2] != "2" || rows[0][1][4:] >= rows[1][1][4:] {
		t.Errorf("history rows %q, want yesterday's #3 first, then today's #2:\n%s", rows, hist[1])
	}
	if !strings.Contains(hist[2], "#2 1.80 o, 1.85 -, 1.90 xxo") || strings.Contains(hist[2], "#3 ") {
		t.Errorf("history after fix and drop:\n%s", hist[2])
	}
	if strings.Contains(out, "New personal best: 1.81") || strings.Contains(out, "2.40 m (") {
		t.Errorf("a refused line became a best:\n%s", out)
	}
}

// In the demo, undo never removes a seeded line nobody typed.
func TestDemoUndoLeavesSeededData(t *testing.T) {
	out, errs, code := runLines(t, "undo\n", "--demo", "--data", filepath.Join(t.TempDir(), "real.db"))
	if code != 0 {
		t.Fatalf("exit %d:\n%s\n%s", code, out, errs)
	}
	if !strings.Contains(out, "no change of your own to undo") {
		t.Errorf("undo in a fresh demo:\n%s", out)
	}
}
