package main

import (
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// The worked example of World Athletics Technical Rule 26.8 (four
// competitors; placed by hand in internal/standings, rule numbers from
// memory) typed at the terminal, one command a line, with a restart in the
// middle of the competition: the sheet survives it.
func TestTerminalMeetWorkedExample(t *testing.T) {
	data := filepath.Join(t.TempDir(), "meet.db")
	first := strings.Join([]string{
		"meet open Harbour Open steps 1.70 1.75 1.78",
		"meet add Ada Bea Cleo Dora guest",
		"meet log Ada 1.70 o", "meet log Bea 1.70 o", "meet log Cleo 1.70 xo", "meet log Dora 1.70 xo",
		"meet log Ada 1.75 xo", "meet log Bea 1.75 o",
	}, "\n") + "\n"
	out, errs, code := runLines(t, first, "--data", data)
	if code != 0 || strings.Contains(out, "Not done") {
		t.Fatalf("first run (code %d):\n%s\n%s", code, out, errs)
	}
	second := strings.Join([]string{
		"meet log Cleo 1.75 xo", "meet log Dora 1.75 xo",
		"meet log Ada 1.78 xxx", "meet log Bea 1.78 xxx", "meet log Cleo 1.78 xxx", "meet log Dora 1.78 xxx",
		"meet log Dora 1.81 o", // refused: out after three consecutive failures (TR 26.2)
		"standings",
		"meet close",
		"standings",      // none open: offers the last filed sheet
		"standings last", // the filed sheet's final places
		"meets",
	}, "\n") + "\n"
	out, errs, code = runLines(t, second, "--data", data)
	if code != 0 {
		t.Fatalf("second run (code %d):\n%s\n%s", code, out, errs)
	}
	for _, want := range []string{
		"breaks TR 26.2: out after three consecutive failures",
		"Harbour Open (", "Bea wins at 1.75",
		"Bea ahead of Ada at 1.75: fewest jumps at the height of the tie (TR 26.8.1)",                        // first place by TR 26.8.1
		"Ada ahead of Cleo at 1.75: fewest failures up to and including the last height cleared (TR 26.8.2)", // second by TR 26.8.2
		"Cleo and Dora share 3rd at 1.75: still tied: equal place (TR 26.8.3)",                               // a shared place
		"Filed: Harbour Open",
		"No meet sheet is open. Last filed: Harbour Open (",
		"1 filed sheet, newest first.",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("terminal output lacks %q:\n%s", want, out)
		}
	}
	if m := regexp.MustCompile(`(?m)^\s+4\s`).FindString(out); m != "" {
		t.Errorf("nobody is fourth after a shared third:\n%s", out)
	}
	// standings last reads the filed sheet back with the open sheet's tie
	// notes (the same hand placing, TR 26.8.1 to 26.8.3).
	_, filed, _ := strings.Cut(out, "[Last filed sheet]")
	for _, want := range []string{
		"Filed: Harbour Open (",
		"Bea ahead of Ada at 1.75: fewest jumps at the height of the tie (TR 26.8.1)",
		"Ada ahead of Cleo at 1.75: fewest failures up to and including the last height cleared (TR 26.8.2)",
		"Cleo and Dora share 3rd at 1.75: still tied: equal place (TR 26.8.3)",
		"Final places as filed",
	} {
		if !strings.Contains(filed, want) {
			t.Errorf("standings last lacks %q:\n%s", want, filed)
		}
	}
}

// The planning claims of issue 18 on the demo squad: `plan Mira` opens
// under her ceiling and tops within 3 cm of it; `plan Mira meet` keeps every
// rise at least 2 cm (TR 26.4); `season Mira` and `compare Mira Ren`
// answer; a session logged short is counted as short in the coaches'
// digest preview. (The demo's numbers are invented; the checks are the
// rules, not the values.)
func TestDemoPlanningClaims(t *testing.T) {
	out, errs, code := runLines(t, "plan Mira\nplan Mira meet\nseason Mira\ncompare Mira Ren\nlog Ren 1.70 o 1.75 xo short\ndigest now\n",
		"--demo", "--data", filepath.Join(t.TempDir(), "real.db"), "--files", t.TempDir())
	if code != 0 || strings.Contains(out, "Not done") {
		t.Fatalf("exit %d:\n%s\n%s", code, out, errs)
	}
	plans := strings.Split(out, "Suggested ")
	if len(plans) < 3 {
		t.Fatalf("two plans expected:\n%s", out)
	}
	row := regexp.MustCompile(`(?m)^  (\d\.\d\d)  `)
	ceil := regexp.MustCompile(`Ceiling:\s+(\d\.\d\d) m`)
	for i, p := range plans[1:3] {
		c := ceil.FindStringSubmatch(p)
		rows := row.FindAllStringSubmatch(p, -1)
		if c == nil || len(rows) < 2 {
			t.Fatalf("plan %d unreadable:\n%s", i, p)
		}
		ceiling, _ := strconv.ParseFloat(c[1], 64)
		var bars []float64
		for _, r := range rows {
			b, _ := strconv.ParseFloat(r[1], 64)
			bars = append(bars, b)
		}
		if bars[0] >= ceiling || bars[len(bars)-1] < ceiling-0.03 || bars[len(bars)-1] > ceiling+0.03 {
			t.Errorf("plan %d: open %.2f, top %.2f, ceiling %.2f", i, bars[0], bars[len(bars)-1], ceiling)
		}
		if i == 1 {
			for k := 1; k < len(bars); k++ {
				if bars[k]-bars[k-1] < 0.02-1e-9 {
					t.Errorf("meet plan rise %.2f to %.2f under 2 cm (TR 26.4)", bars[k-1], bars[k])
				}
			}
		}
	}
	if !regexp.MustCompile(`Season \d{4} of Mira`).MatchString(out) {
		t.Errorf("no season of Mira:\n%s", out)
	}
	for _, want := range []string{"side by side", "Take-offs"} {
		if !strings.Contains(out, want) {
			t.Errorf("lacks %q", want)
		}
	}
	// o, x, o at 1.70 and 1.75 are three take-offs from a short approach.
	if !regexp.MustCompile(`Take-offs Ren: \d+ \(\d+ full, 3 short approach\)`).MatchString(out) {
		t.Errorf("the short session is not counted as short:\n%s", out)
	}
}
