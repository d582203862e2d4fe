package bot

import (
	"fmt"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/planning"
	"github.com/lathmark-team/lathmark/internal/record"
)

func seasonCommands() []command {
	return []command{
		{name: "season", topic: "plan", access: coachOnly,
			usage: "season ATHLETE [YEAR|indoor|outdoor]", example: "season Mira",
			summary: "SB progression with dates, meets, first-attempt clearances, make rate by bar relative to the PB, knocks, take-offs", run: runSeason},
		{name: "compare", topic: "plan", access: coachOnly,
			usage: "compare A B [Nw]", example: "compare Mira Kai 12w",
			summary: "two athletes side by side on the season figures (last 12 weeks unless Nw)", run: runCompare},
	}
}

// seasonWindow reads YEAR, indoor (1 Nov before to 31 Mar) or outdoor
// (1 Apr to 31 Oct); northern-hemisphere seasons, common practice.
func seasonWindow(w string, now time.Time, loc *time.Location) (from, to time.Time, label string, ok bool) {
	y := now.In(loc).Year()
	switch strings.ToLower(w) {
	case "":
		return time.Date(y, 1, 1, 0, 0, 0, 0, loc), time.Date(y+1, 1, 1, 0, 0, 0, 0, loc), strconv.Itoa(y), true
	case "indoor":
		if now.In(loc).Month() >= time.November {
			y++
		}
		return time.Date(y-1, 11, 1, 0, 0, 0, 0, loc), time.Date(y, 4, 1, 0, 0, 0, 0, loc), fmt.Sprintf("indoor %d", y), true
	case "outdoor":
		return time.Date(y, 4, 1, 0, 0, 0, 0, loc), time.Date(y, 11, 1, 0, 0, 0, 0, loc), fmt.Sprintf("outdoor %d", y), true
	}
	if n, err := strconv.Atoi(w); err == nil && n >= 1900 && n <= 2200 {
		return time.Date(n, 1, 1, 0, 0, 0, 0, loc), time.Date(n+1, 1, 1, 0, 0, 0, 0, loc), w, true
	}
	return time.Time{}, time.Time{}, "", false
}

func runSeason(c *call) (Reply, error) {
	const ex = "season Mira 2026"
	if len(c.args) < 1 || len(c.args) > 2 {
		return Reply{}, usageErr(ex, "give an athlete and optionally a year, indoor or outdoor")
	}
	w := ""
	if len(c.args) == 2 {
		w = c.args[1].Raw
	}
	var r Reply
	err := c.view(func(tx Tx) error {
		team, loc, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		from, to, label, ok := seasonWindow(w, c.now, loc)
		if !ok {
			return usageErr(ex, "%q is not a year, indoor or outdoor", w)
		}
		ath, err := c.findAthlete(tx, c.args[0].Raw)
		if err != nil {
			return err
		}
		s, err := seasonOf(tx, ath, from, to, loc)
		if err != nil {
			return err
		}
		imp := imperial(team)
		r = Reply{Title: fmt.Sprintf("Season %s of %s", label, ath.Name), Ephemeral: hiddenInChannel(ath, c.now.Year())}
		r.Fields = seasonFields(ath, s, imp)
		for _, m := range s.SBProgression {
			r.Lines = append(r.Lines, fmt.Sprintf("%s: %s at a meet", m.Time.In(loc).Format("2006-01-02"), barText(m.BarM, imp)))
		}
		if len(s.SBProgression) == 0 {
			r.Lines = append(r.Lines, "No meet clearances in this season.")
		}
		if s.Bands != nil {
			r.Table = &Table{Header: []string{"bar vs PB", "made"}}
			for _, b := range s.Bands {
				r.Table.Rows = append(r.Table.Rows, []string{b.Label, madeText(b.Made, b.Tried)})
			}
		}
		return nil
	})
	return r, err
}

func seasonOf(tx Tx, ath record.Athlete, from, to time.Time, loc *time.Location) (planning.Season, error) {
	var as []record.Attempt
	err := tx.Attempts(ath.ID, from, to, func(a record.Attempt) error { as = append(as, a); return nil })
	return planning.Summarize(as, ath.PersonalBestM, loc), err
}

func seasonFields(ath record.Athlete, s planning.Season, imp bool) []Field {
	pb := "not set"
	if ath.PersonalBestM > 0 {
		pb = barText(ath.PersonalBestM, imp)
	}
	sb := "none"
	if n := len(s.SBProgression); n > 0 {
		sb = barText(s.SBProgression[n-1].BarM, imp)
	}
	knocks := "none logged"
	if ks := s.KnockParts(); len(ks) > 0 {
		var parts []string
		for _, k := range ks {
			parts = append(parts, fmt.Sprintf("%s %d", k, s.Knocks[k]))
		}
		knocks = strings.Join(parts, ", ")
	}
	return []Field{
		{"PB", pb}, {"SB (meets)", sb}, {"Meets", strconv.Itoa(s.Meets)},
		{"First-attempt clearances", fmt.Sprintf("%d of %d clearances", s.FirstAttempt, s.Clearances)},
		{"Take-offs", fmt.Sprintf("%d (%d short approach)", s.Jumps, s.Short)},
		{"Knocks", knocks},
	}
}

func runCompare(c *call) (Reply, error) {
	const ex = "compare Mira Kai 12w"
	args, weeks, err := historyWeeks(c.args, ex)
	if err != nil {
		return Reply{}, err
	}
	if len(c.args) == len(args) {
		weeks = 12
	}
	if len(args) != 2 {
		return Reply{}, usageErr(ex, "name two athletes, then optionally a window like 12w")
	}
	var r Reply
	err = c.view(func(tx Tx) error {
		team, loc, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		to := localDay(c.now, loc).AddDate(0, 0, 1)
		from := to.AddDate(0, 0, -7*weeks)
		imp := imperial(team)
		r = Reply{Title: fmt.Sprintf("Last %s side by side", plural(weeks, "week"))}
		r.Table = &Table{Header: []string{""}}
		var cols [][]Field
		for _, a := range args {
			ath, err := c.findAthlete(tx, a.Raw)
			if err != nil {
				return err
			}
			r.Ephemeral = r.Ephemeral || hiddenInChannel(ath, c.now.Year())
			s, err := seasonOf(tx, ath, from, to, loc)
			if err != nil {
				return err
			}
			r.Table.Header = append(r.Table.Header, ath.Name)
			cols = append(cols, seasonFields(ath, s, imp))
		}
		for i, f := range cols[0] {
			r.Table.Rows = append(r.Table.Rows, []string{f.Label, f.Value, cols[1][i].Value})
		}
		return nil
	})
	return r, err
}
