package bot

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// groupsText writes parsed groups back as "1.95 o, 2 xo" (bars in metres,
// shortest form).
func groupsText(ln logLine) string {
	var parts []string
	for _, g := range ln.Groups {
		parts = append(parts, strconv.FormatFloat(g.BarM, 'f', -1, 64)+" "+notationString(jumpOutcomes(g)))
	}
	return strings.Join(parts, ", ")
}

func TestParseLogLine(t *testing.T) {
	tests := []struct {
		line    string
		athlete string
		groups  string // bars and notation as parsed
		meet    bool
		note    string
		check   func(t *testing.T, ln logLine)
	}{
		{line: "Kai 1.95 o 2.00 xo 2.04 xxx", athlete: "Kai", groups: "1.95 o, 2 xo, 2.04 xxx"},
		{line: "me 1.80 clear by 3cm", athlete: "me", groups: "1.8 o", check: func(t *testing.T, ln logLine) {
			m := ln.Groups[0].Jumps[0].Meas
			if !m.HasCoachMargin || math.Abs(m.CoachMarginM-0.03) > 1e-12 {
				t.Errorf("by 3cm read as %+v", m)
			}
		}},
		{line: "Kai 2.00 x approach 7.6 takeoff 1.05 peak 2.02 meet", athlete: "Kai", groups: "2 x", meet: true, check: func(t *testing.T, ln logLine) {
			m := ln.Groups[0].Jumps[0].Meas
			if m.ApproachMS != 7.6 || m.TakeoffDistM != 1.05 || m.PeakM != 2.02 {
				t.Errorf("measurements %+v", m)
			}
		}},
		// "knock PART" names what brought the bar down on the x before it;
		// alone it is itself the failure. "knock" without a part stays a
		// plain failure word, as before.
		{line: "Kai 2.00 x knock calves o", athlete: "Kai", groups: "2 xo", check: func(t *testing.T, ln logLine) {
			if j := ln.Groups[0].Jumps; j[0].Knock != "calves" || j[1].Knock != "" {
				t.Errorf("knock on %+v", j)
			}
		}},
		{line: "Kai 2.00 knock heel xx", athlete: "Kai", groups: "2 xxx", check: func(t *testing.T, ln logLine) {
			if j := ln.Groups[0].Jumps; j[0].Knock != "heels" || j[1].Knock != "" {
				t.Errorf("knock on %+v", j)
			}
		}},
		{line: "Kai 2.00 x knock x", athlete: "Kai", groups: "2 xxx"},
		{line: "Kai 1.80 o 1.85 xo short", athlete: "Kai", groups: "1.8 o, 1.85 xo", check: func(t *testing.T, ln logLine) {
			if !ln.Short {
				t.Error("short not read")
			}
		}},
		// Measurements go with the jump written just before them.
		{line: "Kai 1.80 x peak 1.75 o peak 1.84 vz 4.2", athlete: "Kai", groups: "1.8 xo", check: func(t *testing.T, ln logLine) {
			j := ln.Groups[0].Jumps
			if j[0].Meas.PeakM != 1.75 || j[1].Meas.PeakM != 1.84 || j[1].Meas.VzMS != 4.2 || j[0].Meas.VzMS != 0 {
				t.Errorf("per-jump measurements %+v %+v", j[0].Meas, j[1].Meas)
			}
		}},
		{line: "Kai 1.95 o 2.00 xo by -2cm", athlete: "Kai", groups: "1.95 o, 2 xo", check: func(t *testing.T, ln logLine) {
			if ln.Groups[0].Jumps[0].Meas.any() || ln.Groups[1].Jumps[0].Meas.any() {
				t.Error("a margin at the end of the line landed on an earlier jump")
			}
			if m := ln.Groups[1].Jumps[1].Meas; !m.HasCoachMargin || math.Abs(m.CoachMarginM+0.02) > 1e-12 {
				t.Errorf("last jump's margin %+v", m)
			}
		}},
		{line: "Kai 1.80xo 1.85 xx-", athlete: "Kai", groups: "1.8 xo, 1.85 xx-"},
		{line: "Kai 180cm x o", athlete: "Kai", groups: "1.8 xo"},
		// 5 ft 11 in = 71 in x 0.0254 m = 1.8034 m (NIST Handbook 44, Appendix C).
		{line: "Kai 5-11 o", athlete: "Kai", groups: "1.8034 o"},
		{line: "Kai 1.80 miss knock made", athlete: "Kai", groups: "1.8 xxo"},
		{line: "Kai 1.80 O BY -2 CM", athlete: "Kai", groups: "1.8 o", check: func(t *testing.T, ln logLine) {
			if m := ln.Groups[0].Jumps[0].Meas; math.Abs(m.CoachMarginM+0.02) > 1e-12 {
				t.Errorf("by -2 cm read as %v", m.CoachMarginM)
			}
		}},
		{line: "Kai 1.80 o peak=1.85", athlete: "Kai", groups: "1.8 o"},
		{line: "Kai 1.80 o note felt fast, \"good\" one", athlete: "Kai", groups: "1.8 o", note: `felt fast, "good" one`},
		{line: "Kai 1.80 –", athlete: "Kai", groups: "1.8 -"},
		{line: "Mira Lee 1.70 o", athlete: "Mira Lee", groups: "1.7 o"},
		{line: "Kai meet 1.95 o 2.00 o", athlete: "Kai", groups: "1.95 o, 2 o", meet: true},
		{line: "Kai 1.80 xxx 1.80 o", athlete: "Kai", groups: "1.8 xxx, 1.8 o"},
		{line: "Kai 1.80 o 1.75 o practice", athlete: "Kai", groups: "1.8 o, 1.75 o"},
		{line: "<@U1|kai> 1.80 pass 1.85 xo", athlete: "<@U1|kai>", groups: "1.8 -, 1.85 xo"},
	}
	for _, tt := range tests {
		ln, err := parseLogLine(tokenize(tt.line))
		if err != nil {
			t.Errorf("parseLogLine(%q): %v", tt.line, err)
			continue
		}
		if ln.Athlete != tt.athlete || groupsText(ln) != tt.groups || ln.Meet != tt.meet || ln.Note != tt.note {
			t.Errorf("parseLogLine(%q) = athlete %q, %q, meet %v, note %q; want %q, %q, %v, %q",
				tt.line, ln.Athlete, groupsText(ln), ln.Meet, ln.Note, tt.athlete, tt.groups, tt.meet, tt.note)
			continue
		}
		if tt.check != nil {
			tt.check(t, ln)
		}
	}
}

func TestParseLogLineRefuses(t *testing.T) {
	tests := []struct {
		line  string
		wants []string // fragments of the message
	}{
		{"", []string{"who jumped"}},
		{"1.80 o", []string{"who jumped"}},
		{"Kai", []string{"what did Kai jump"}},
		{"Kai 3.20 o", []string{`"3.20"`, "outside the plausible 0.50–2.60 m"}},
		{"Kai 0.2 o", []string{`"0.2"`, "outside the plausible"}},
		{"Kai 320cm o", []string{`"320cm"`, "outside"}},
		{"Kai 1.80 ox", []string{`"ox"`, "after o (cleared) nothing more"}},
		{"Kai 1.80 o x", []string{`"o x"`, "after o (cleared)"}},
		{"Kai 1.80 xxxx", []string{`"xxxx"`, "at most three"}},
		{"Kai 1.80 xx xx", []string{`"xx xx"`, "at most three"}},
		{"Kai 1.80 -o", []string{`"-o"`, "after - (passed)"}},
		{"Kai 2.00 o 1.95 o meet", []string{"bar 1.95 comes after 2.00", "only goes up"}},
		{"Kai 2.00 x 2.00 o meet", []string{"bar 2.00 appears twice"}},
		{"Kai 1.80", []string{"bar 1.80 has no attempts"}},
		{"Kai 1.80 1.85 o", []string{"bar 1.80 has no attempts"}},
		{"Kai xo", []string{`"xo" needs a bar height before it`}},
		{"Kai 1.80 o peak", []string{`"peak" needs a value`}},
		{"Kai 1.80 o peak 5", []string{"peak 5 is outside the plausible 0.8 to 3.2 m"}},
		{"Kai 1.80 o vz 9", []string{"vz 9 is outside the plausible 1 to 6.5 m/s"}},
		{"Kai 1.80 o by 80cm", []string{"by 80cm is outside"}},
		{"Kai 1.80 o approach fast", []string{"approach fast", "not a speed"}},
		{"Kai peak 2.0 1.80 o", []string{`"peak" comes after the jump it measures`}},
		{"Kai 1.80 o peak 1.8 peak 1.9", []string{`"peak" is given twice`}},
		{"Kai 1.80 o meet practice", []string{`both "meet" and "practice"`}},
		{"Kai 1.80 claer", []string{`"claer"`, `Did you mean "clear"?`}},
		{"Kai 1.80 o blah", []string{`"blah"`, "After the name come bars"}},
		{"Kai 1.80 o note", []string{`"note" needs some text`}},
		{"Kai 1.8.0 o", []string{`"1.8.0" is not a height`}},
		{"Kai " + strings.Repeat("1.80 o ", 61), []string{"more than 60 bars"}},
	}
	for _, tt := range tests {
		_, err := parseLogLine(tokenize(tt.line))
		var ue *UserError
		if !errors.As(err, &ue) {
			t.Errorf("parseLogLine(%q): err %v, want a refusal", tt.line, err)
			continue
		}
		if ue.Kind != KindUsage || ue.Example == "" {
			t.Errorf("parseLogLine(%q): kind %v example %q", tt.line, ue.Kind, ue.Example)
		}
		for _, w := range tt.wants {
			if !strings.Contains(ue.Msg, w) {
				t.Errorf("parseLogLine(%q) = %q, want it to contain %q", tt.line, ue.Msg, w)
			}
		}
	}
}

// The example shown with a refusal must itself be a valid line.
func TestLogRefusalExamplesParse(t *testing.T) {
	for _, line := range []string{"Kai 1.80 ox", "Kai 1.80 xxxx", "Kai 3.20 o", "Kai 2.00 o 1.95 o meet", "Kai 2.00 x 2.00 o meet", "Kai 1.80 o vz 9", "Kai xo", "Kai peak 2.0 1.80 o"} {
		_, err := parseLogLine(tokenize(line))
		var ue *UserError
		if !errors.As(err, &ue) {
			t.Fatalf("%q accepted", line)
		}
		ex := strings.TrimPrefix(ue.Example, "log ")
		if _, err := parseLogLine(tokenize(ex)); err != nil {
			t.Errorf("example %q for %q does not parse: %v", ue.Example, line, err)
		}
	}
}

// attempts builds attempts from "2.00 xx 2.04 x".
func attempts(spec string, meet bool) []record.Attempt {
	f := strings.Fields(spec)
	var out []record.Attempt
	for i := 0; i+1 < len(f); i += 2 {
		bar, err := strconv.ParseFloat(f[i], 64)
		if err != nil {
			panic(err)
		}
		for _, o := range f[i+1] {
			out = append(out, record.Attempt{BarM: bar, Outcome: record.Outcome(o), Meet: meet})
		}
	}
	return out
}

func TestNumberAttempts(t *testing.T) {
	tests := []struct {
		prev, add string
		meet      bool
		want      []int
	}{
		{"", "1.70 o 1.75 xo 1.78 xxx", false, []int{1, 1, 2, 1, 2, 3}},
		// A meet logged jump by jump: the second message's jump at 2.00 is attempt 2.
		{"2.00 x", "2.00 o", true, []int{2}},
		{"2.00 xx", "2.00 xo", true, []int{3, 4}},
		// Practice: after a clearance or three tries the count starts again.
		{"1.80 xxx", "1.80 o", false, []int{1}},
		{"1.80 o", "1.80 xo", false, []int{1, 2}},
		{"1.80 x", "1.85 o", false, []int{1}},
	}
	for _, tt := range tests {
		prev, add := attempts(tt.prev, tt.meet), attempts(tt.add, tt.meet)
		numberAttempts(nil, prev, tt.meet)
		numberAttempts(prev, add, tt.meet)
		var got []int
		for _, a := range add {
			got = append(got, a.Number)
		}
		if !equalInts(got, tt.want) {
			t.Errorf("numberAttempts(%q then %q) = %v, want %v", tt.prev, tt.add, got, tt.want)
		}
	}
}

func TestHeightRunsAndMade(t *testing.T) {
	as := attempts("1.70 o 1.75 xo 1.78 xxx", false)
	numberAttempts(nil, as, false)
	if got := runsText(heightRuns(as), false); got != "1.70 o, 1.75 xo, 1.78 xxx" {
		t.Errorf("runsText = %q", got)
	}
	if b, ok := bestCleared(as); !ok || b.BarM != 1.75 {
		t.Errorf("bestCleared = %v %v", b.BarM, ok)
	}
	if m, n := madeCount(as); m != 2 || n != 6 {
		t.Errorf("madeCount = %d/%d", m, n)
	}
	if got := madeText(2, 6); got != "2/6 (33%)" {
		t.Errorf("madeText = %q", got)
	}
	again := attempts("1.80 xxx 1.80 o", false)
	numberAttempts(nil, again, false)
	if got := runsText(heightRuns(again), false); got != "1.80 xxx, 1.80 o" {
		t.Errorf("a second go at one height: %q", got)
	}
	// Passes are not jumps: 1 made of 2 taken.
	if m, n := madeCount(attempts("1.80 - 1.85 xo", true)); m != 1 || n != 2 {
		t.Errorf("madeCount with a pass = %d/%d", m, n)
	}
}

func TestSplitSessionsTimeZone(t *testing.T) {
	chicago, err := time.LoadLocation("America/Chicago")
	if err != nil {
		t.Skip("no time zone data:", err)
	}
	// 2026-11-25 03:00 UTC is 21:00 on the 24th in Chicago (UTC-6 in November).
	as := []record.Attempt{
		{Time: time.Date(2026, 11, 25, 3, 0, 0, 0, time.UTC), BarM: 1.7, Outcome: record.Cleared},
		{Time: time.Date(2026, 11, 25, 17, 0, 0, 0, time.UTC), BarM: 1.7, Outcome: record.Cleared},
	}
	if n := len(splitSessions(as, time.UTC)); n != 1 {
		t.Errorf("UTC: %d sessions, want 1", n)
	}
	s := splitSessions(as, chicago)
	if len(s) != 2 || s[0].Day.Format("2006-01-02") != "2026-11-24" {
		t.Errorf("Chicago sessions: %+v", s)
	}
}

func matchAll(got, want []string) bool {
	if len(got) != len(want) {
		return false
	}
	for i := range got {
		if !strings.Contains(got[i], want[i]) {
			return false
		}
	}
	return true
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func TestCSVGuardRoundTrip(t *testing.T) {
	for _, s := range []string{"", "plain", "=SUM(A1)", "+1", "-x", "@cmd", "'quoted", "''=x", "\tTab"} {
		if got := csvUnguard(csvGuard(s)); got != s {
			t.Errorf("csvUnguard(csvGuard(%q)) = %q", s, got)
		}
		if g := csvGuard(s); g != "" && strings.ContainsRune("=+-@\t\r", rune(g[0])) {
			t.Errorf("csvGuard(%q) = %q still starts with a formula character", s, g)
		}
	}
}

// FuzzLogLine: no input panics the parser; a refusal always has a message
// and an example; an accepted line obeys the notation's rules.
func FuzzLogLine(f *testing.F) {
	for _, s := range []string{
		"Kai 1.95 o 2.00 xo 2.04 xxx", "me 1.80 clear by 3cm", "Kai 2.00 x approach 7.6 takeoff 1.05 peak 2.02 meet",
		"Kai 1.80 ox", "Kai 1.80 xxxx", "Kai 3.20 o", "Kai 0.2 o", "Kai 2.00 o 1.95 o meet", "Kai 1.80xo 5-11 x-",
		"Kai 1.80 o note x", "Kai 1.80 o peak=1.85 by:-2cm", "Mira 6'1\" xo", "Kai 1.80 — ", "Kai 1,80 o",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		ln, err := parseLogLine(tokenize(s))
		if err != nil {
			var ue *UserError
			if !errors.As(err, &ue) || strings.TrimSpace(ue.Msg) == "" || ue.Example == "" {
				t.Fatalf("parseLogLine(%q): refusal without message or example: %v", s, err)
			}
			return
		}
		if ln.Athlete == "" || len(ln.Groups) == 0 || ln.jumpCount() > logMaxJumps {
			t.Fatalf("parseLogLine(%q) accepted %+v", s, ln)
		}
		for k, g := range ln.Groups {
			if g.BarM < logMinBarM-logBarTolM || g.BarM > logMaxBarM+logBarTolM || len(g.Jumps) == 0 || len(g.Jumps) > logMaxTries {
				t.Fatalf("parseLogLine(%q): group %+v", s, g)
			}
			for i, j := range g.Jumps {
				if !j.Outcome.Valid() || i < len(g.Jumps)-1 && j.Outcome != record.Failed {
					t.Fatalf("parseLogLine(%q): notation %q", s, notationString(jumpOutcomes(g)))
				}
			}
			if ln.Meet && k > 0 && !higherBar(g.BarM, ln.Groups[k-1].BarM) {
				t.Fatalf("parseLogLine(%q): meet bars not rising", s)
			}
		}
	})
}
