package digest

import (
	"fmt"
	"strings"

	"github.com/lathmark-team/lathmark/internal/units"
)

// Redacted returns a copy of d for the team channel: each private athlete's
// entry keeps only the ID, the name and the Private mark, so a renderer that
// forgets to check Private still has nothing to show but the name.
func (d Digest) Redacted() Digest {
	out := d
	out.Athletes = make([]AthleteWeek, len(d.Athletes))
	for i, a := range d.Athletes {
		if a.Private {
			a = AthleteWeek{AthleteID: a.AthleteID, Name: a.Name, Private: true, SeasonFrom: a.SeasonFrom}
		}
		out.Athletes[i] = a
	}
	return out
}

// PrivateSummary is what a private athlete receives by direct message
// instead of a line in the channel digest.
type PrivateSummary struct {
	Week  Week
	Entry AthleteWeek
}

// PrivateSummaries returns one summary per private athlete, in the order of
// d.Athletes.
func (d Digest) PrivateSummaries() []PrivateSummary {
	var out []PrivateSummary
	for _, a := range d.Athletes {
		if a.Private {
			out = append(out, PrivateSummary{Week: d.Week, Entry: a})
		}
	}
	return out
}

// Text renders the summary as plain text lines for a direct message;
// imperial shows bars in feet and inches and margins in inches.
func (p PrivateSummary) Text(imperial bool) string {
	var sb strings.Builder
	fmt.Fprintf(&sb, "Your week %s, %s\n", p.Week, p.Entry.Name)
	for _, l := range p.Entry.Lines(imperial) {
		sb.WriteString(l)
		sb.WriteByte('\n')
	}
	sb.WriteString("Sent to you privately: the team channel shows only that your details were sent.\n")
	sb.WriteString("Trends over a few weeks are a hint, not a verdict; your coach's judgement comes first.\n")
	return sb.String()
}

// Lines describes one athlete's entry in plain text, one fact a line, for
// any renderer (channel, direct message, terminal).
func (a AthleteWeek) Lines(imperial bool) []string {
	if a.Attempts == 0 {
		return []string{"No jumps logged this week."}
	}
	var ls []string
	l := fmt.Sprintf("%d %s, %d %s (O %d, X %d, - %d)",
		a.Sessions, plural(a.Sessions, "session", "sessions"), a.Attempts, plural(a.Attempts, "attempt", "attempts"),
		a.Clearances, a.Failures, a.Passes)
	if v, ok := a.MakeRate.Value(); ok {
		l += fmt.Sprintf(", make rate %.0f%% (%d of %d)", 100*v, a.MakeRate.Cleared, a.MakeRate.Tried)
	}
	ls = append(ls, l)
	if a.HasBest {
		l = "Best bar cleared " + FormatBar(a.BestM, imperial)
		switch {
		case a.PersonalBest:
			l += ": personal best"
		case a.SeasonBest:
			l += ": season best (since " + a.SeasonFrom.String() + ")"
		case a.PracticeAbovePB:
			l += ": above the personal best, in practice"
		}
		ls = append(ls, l)
	} else {
		ls = append(ls, "No bar cleared this week.")
	}
	for _, m := range []struct {
		label string
		s     MarginStat
	}{{"coach estimate", a.CoachMargin}, {"model", a.ModelMargin}} {
		if m.s.N > 0 {
			ls = append(ls, fmt.Sprintf("Clearance margin (%s): median %s over %d %s",
				m.label, FormatMargin(m.s.MedianM, imperial), m.s.N, plural(m.s.N, "attempt", "attempts")))
		}
	}
	n := len(a.Weeks)
	ls = append(ls, fmt.Sprintf("Best-bar trend, last %d weeks: %s", n, a.BestTrend.Text(imperial)))
	if a.CoachMarginTrend.Points > 0 {
		ls = append(ls, fmt.Sprintf("Margin trend (coach estimate): %s", a.CoachMarginTrend.Text(imperial)))
	}
	if a.ModelMarginTrend.Points > 0 {
		ls = append(ls, fmt.Sprintf("Margin trend (model): %s", a.ModelMarginTrend.Text(imperial)))
	}
	if a.Ceiling.OK {
		ls = append(ls, fmt.Sprintf("Ceiling (highest bar made on at least half its tries, %d weeks): %s (O %d, X %d)",
			n, FormatBar(a.Ceiling.BarM, imperial), a.Ceiling.Cleared, a.Ceiling.Failed))
	}
	return ls
}

// MetresPerInch is the international inch, 0.0254 m exactly (international
// yard and pound agreement, 1959).
const MetresPerInch = units.MetresPerInch

// FormatBar writes a bar height as the text replies do: "2.01 m", or in
// imperial the trade's feet-inches to the quarter inch, "6-7¼"
// (units.Length).
func FormatBar(m float64, imperial bool) string { return units.Length(m, imperial) }

// FormatMargin writes a signed clearance margin as the text replies do:
// "+3.0 cm", "−1.2 in" (units.Small).
func FormatMargin(m float64, imperial bool) string { return units.Small(m, imperial) }
