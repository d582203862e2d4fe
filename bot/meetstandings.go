package bot

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/standings"
	"github.com/lathmark-team/lathmark/internal/units"
)

// The short standings show at most this many rows and tie notes, so that
// they keep to the list budget (DEVELOPERS.md); `standings more` has all.
const (
	standingsMaxRows = 7
	standingsMaxTies = 3
)

func runStandings(c *call) (Reply, error) {
	var r Reply
	err := c.view(func(tx Tx) error {
		team, _, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		imp := imperial(team)
		s, open, err := openSheet(tx)
		if err != nil {
			return err
		}
		words := joinRaw(c.args)
		if open && (words == "" || strings.EqualFold(words, s.Name)) {
			hide, err := c.hiddenOnSheet(tx, s)
			if err != nil {
				return err
			}
			r = standingsReply(s, s.Now(), imp, hide, false)
			return nil
		}
		filed, err := filedSheets(tx)
		if err != nil {
			return err
		}
		if words == "" {
			r, err = c.noOpenSheet(tx, filed, imp)
			return err
		}
		f, err := pickFiled(filed, c.args)
		if err != nil {
			return err
		}
		hide, err := c.hiddenOnSheet(tx, f)
		if err != nil {
			return err
		}
		r = standingsReply(f, f.Final(), imp, hide, true)
		return nil
	})
	return r, err
}

// noOpenSheet answers standings with no sheet open: it says so and offers
// the last filed sheet, with its verdict (or refuses when none was filed).
func (c *call) noOpenSheet(tx Tx, filed []meetsheet.Sheet, imp bool) (Reply, error) {
	if len(filed) == 0 {
		return Reply{}, notFoundErr(meetOpenExample, "no meet sheet is open and none is filed; a coach opens one with meet open NAME [DATE] [steps ...]")
	}
	last := filed[0]
	hide, err := c.hiddenOnSheet(tx, last)
	if err != nil {
		return Reply{}, err
	}
	return Reply{
		Title:   "No meet sheet is open. Last filed: " + standingsTitle(last, last.Final(), imp, hide),
		Lines:   []string{"standings last shows its final places; meet list lists every filed sheet."},
		Actions: []Action{{Label: "Last filed sheet", Command: "standings last"}},
	}, nil
}

// ordinal writes 1st, 2nd, 3rd, 4th, 11th, 21st.
func ordinal(n int) string {
	suf := "th"
	switch {
	case n%100 >= 11 && n%100 <= 13:
	case n%10 == 1:
		suf = "st"
	case n%10 == 2:
		suf = "nd"
	case n%10 == 3:
		suf = "rd"
	}
	return strconv.Itoa(n) + suf
}

// standingsReply shows a sheet's standings: the open sheet's as they are
// now, or (filed) a filed sheet's final places.
func standingsReply(s meetsheet.Sheet, st meetsheet.State, imp bool, hide map[string]bool, filed bool) Reply {
	if len(s.Competitors) == 0 {
		return Reply{Title: s.Name + " (" + s.Date + "): nobody on the sheet.", Example: meetAddExample}
	}
	r := Reply{Title: standingsTitle(s, st, imp, hide), Caution: meetCaution}
	if filed {
		r.Title = "Filed: " + r.Title
	}
	full := &Table{Header: []string{"place", "name", "best", "jumps at best", "failures to best", "heights"}}
	short := &Table{Header: []string{"place", "name", "best", "heights"}}
	masked := 0
	for _, x := range st.Standings {
		if hide[x.Name] {
			masked++
			continue
		}
		place, best := "–", "–"
		if x.Place > 0 {
			place = strconv.Itoa(x.Place)
			if x.Shared {
				place += "="
			}
			best = units.Bar(x.BestM, imp)
		}
		heights := seriesText(s, x.Name, imp)
		switch {
		case x.Retired:
			heights += " (retired)"
		case x.Out:
			heights += " (out)"
		}
		full.Rows = append(full.Rows, []string{place, x.Name, best, strconv.Itoa(x.AttemptsAtBest), strconv.Itoa(x.FailuresToBest), heights})
		if len(short.Rows) < standingsMaxRows {
			short.Rows = append(short.Rows, []string{place, x.Name, best, heights})
		}
	}
	ties := tieNotes(st.Standings, imp, hide)
	tail := []string{roundLine(st, imp, hide)}
	if filed {
		tail = []string{"Final places as filed; meet list shows the other filed sheets."}
	}
	if masked > 0 {
		tail = append(tail, fmt.Sprintf("%s not shown here (private or under 18): ask in a direct message.", plural(masked, "squad athlete")))
	}
	notes := append(append([]string(nil), ties...), tail...)
	r.Table = short
	r.Notes = append(append([]string(nil), ties[:min(len(ties), standingsMaxTies)]...), tail...)
	if more := len(full.Rows) - len(short.Rows) + len(ties) - min(len(ties), standingsMaxTies); more > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("%s more: standings more.", plural(more, "line")))
	}
	d := r
	d.Table, d.Notes = full, append(append([]string(nil), notes...), "Ties: fewest jumps at the height of the tie (TR 26.8.1), then fewest failures up to and including the last height cleared (TR 26.8.2), then an equal place, or a jump-off for first where the meet uses one (TR 26.8.3, TR 26.9).")
	r.Details = &d
	return r
}

// standingsTitle is the verdict: who leads or won, at what height. Names
// in hide are left out; when every leader is hidden the title says only
// that.
func standingsTitle(s meetsheet.Sheet, st meetsheet.State, imp bool, hide map[string]bool) string {
	head := s.Name + " (" + s.Date + "): "
	var first []string
	var at float64
	jumpOff, tied := false, false
	for _, x := range st.Standings {
		if x.Place != 1 {
			continue
		}
		at, jumpOff, tied = x.BestM, jumpOff || x.JumpOff, tied || x.Shared
		if !hide[x.Name] {
			first = append(first, x.Name)
		}
	}
	bar := units.Bar(at, imp)
	switch {
	case at == 0:
		return head + "no height cleared yet."
	case len(first) == 0:
		return head + "the leaders are not shown here; ask in a direct message."
	case jumpOff && (st.JumpOff || st.Over):
		return head + joinAnd(first) + " tied for first at " + bar + ": jump-off (TR 26.9)."
	case tied && st.Over:
		return head + joinAnd(first) + " " + shareVerb(len(first)) + " first at " + bar + "."
	case tied:
		return head + joinAnd(first) + " " + shareVerb(len(first)) + " the lead at " + bar + "."
	case st.Over:
		return head + first[0] + " wins at " + bar + "."
	}
	return head + first[0] + " leads at " + bar + "."
}

// tieNotes says, for each tie on height, which rule broke it. Ties that
// involve a name in hide are left out.
func tieNotes(ss []standings.Standing, imp bool, hide map[string]bool) []string {
	var out []string
	for i := 0; i < len(ss); i++ {
		x := ss[i]
		switch {
		case x.Shared && x.Place > 0:
			var group []string
			for j := i; j < len(ss) && ss[j].Place == x.Place; j++ {
				if !hide[ss[j].Name] {
					group = append(group, ss[j].Name)
				}
				i = j
			}
			what := standings.RuleEqual
			if x.JumpOff {
				what = standings.RuleJumpOff
			}
			if len(group) > 0 {
				out = append(out, fmt.Sprintf("%s %s %s at %s: %s.", joinAnd(group), shareVerb(len(group)), ordinal(x.Place), units.Bar(x.BestM, imp), what))
			}
			if last := ss[i]; len(group) > 0 && last.NextRule != "" && !hide[last.Behind] {
				out = append(out, fmt.Sprintf("%s ahead of %s at %s: %s.", joinAnd(group), last.Behind, units.Bar(last.BestM, imp), last.NextRule))
			}
		case x.NextRule != "" && x.Behind != "" && !hide[x.Name] && !hide[x.Behind]:
			out = append(out, fmt.Sprintf("%s ahead of %s at %s: %s.", x.Name, x.Behind, units.Bar(x.BestM, imp), x.NextRule))
		}
	}
	return out
}

// shareVerb is "shares" for one name, "share" for more.
func shareVerb(n int) string {
	if n == 1 {
		return "shares"
	}
	return "share"
}

// joinAnd writes "A", "A and B", "A, B and C".
func joinAnd(xs []string) string {
	if len(xs) <= 1 {
		return strings.Join(xs, "")
	}
	return strings.Join(xs[:len(xs)-1], ", ") + " and " + xs[len(xs)-1]
}

// seriesText is a competitor's series on the sheet in the notation.
func seriesText(s meetsheet.Sheet, name string, imp bool) string {
	var js []meetsheet.Jump
	for _, a := range s.Series(name) {
		js = append(js, meetsheet.Jump{BarM: a.BarM, Outcome: a.Outcome, JumpOff: a.JumpOff})
	}
	if len(js) == 0 {
		return "not jumped yet"
	}
	return jumpsText(js, imp)
}
