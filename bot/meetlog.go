package bot

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/series"
	"github.com/lathmark-team/lathmark/internal/units"
)

// parseMeetJumps reads "NAME BAR ATTEMPTS [BAR ATTEMPTS]... [jumpoff]".
func parseMeetJumps(args []token) (string, []meetsheet.Jump, error) {
	if len(args) == 0 {
		return "", nil, usageErr(meetLogExample, "name the competitor, then the bar and the attempts")
	}
	name := args[0].Raw
	var (
		jumps   []meetsheet.Jump
		bar     float64
		barWord string
		jumpOff bool
	)
	for _, t := range args[1:] {
		switch {
		case t.Lower == "jumpoff" || t.Lower == "jump-off":
			jumpOff = true
		case logBarWord(t.Lower):
			m, err := meetBar(t.Raw)
			if err != nil {
				return "", nil, err
			}
			bar, barWord = m, t.Raw
		case strings.Trim(t.Lower, "ox-") == "":
			if bar == 0 {
				return "", nil, usageErr("meet log "+name+" 1.60 "+t.Raw, "give the bar before the attempts %q", t.Raw)
			}
			for _, r := range t.Lower {
				jumps = append(jumps, meetsheet.Jump{BarM: bar, Outcome: record.Outcome(r), Decimals: units.MetreDecimals(barWord, bar)})
			}
		default:
			return "", nil, usageErr(meetLogExample, "I don't understand %q: attempts are o (cleared), x (failed) and - (passed) after the bar", t.Raw)
		}
	}
	if len(jumps) == 0 {
		return "", nil, usageErr("meet log "+name+" 1.60 xo", "no attempts: give the bar and then o, x or -")
	}
	if len(jumps) > 60 {
		return "", nil, usageErr(meetLogExample, "at most 60 attempts in one entry")
	}
	for i := range jumps {
		jumps[i].JumpOff = jumpOff
	}
	return name, jumps, nil
}

func runMeetLog(c *call) (Reply, error) {
	name, jumps, err := parseMeetJumps(c.args)
	if err != nil {
		return Reply{}, err
	}
	var r Reply
	err = c.update(func(tx Tx) error {
		sc, err := openSheetIn(tx)
		if err != nil {
			return err
		}
		imp, s := sc.imp, sc.s
		comp, ok := s.Find(name)
		if !ok {
			return notFoundErr("meet add "+name, "%s is not on the sheet of %s; put them on it with meet add %s", name, s.Name, name)
		}
		e := meetsheet.Entry{Name: comp.Name, Jumps: jumps, By: c.lineOwner(), Time: c.now}
		if err := c.logOnSheet(&s, e, imp); err != nil {
			return err
		}
		if err := putSheet(tx, s); err != nil {
			return err
		}
		if err := c.auditFor(tx, comp.AthleteID, auditMeetLog, "meet "+s.Name, nil, s.Entries[len(s.Entries)-1]); err != nil {
			return err
		}
		hide, err := c.hiddenOnSheet(tx, s)
		if err != nil {
			return err
		}
		r = meetLogReply(s, comp.Name, jumps, imp, hide)
		r.Ephemeral = hide[comp.Name]
		return nil
	})
	return r, err
}

// logOnSheet enters e on s, or refuses it with the rule it breaks.
func (c *call) logOnSheet(s *meetsheet.Sheet, e meetsheet.Entry, imp bool) error {
	err := s.Log(e)
	if errors.Is(err, meetsheet.ErrFull) {
		return conflictErr(meetCloseExample, "the sheet holds at most %d entries; file it with meet close", meetsheet.MaxEntries)
	}
	if errors.Is(err, meetsheet.ErrRetired) {
		return conflictErr(meetUndoExample, "not on the sheet: %s retired from the competition; if that was a mistake, meet undo takes the retirement back while it is the last entry", e.Name)
	}
	if errors.Is(err, meetsheet.ErrNoJumpOff) {
		return conflictErr(standingsExample, "not on the sheet: a competitor tied for first has retired, so the sheet holds no jump-off (how that tie is settled is the officials' call; the sheet shows an equal first, TR 26.8.3)")
	}
	var se *meetsheet.StepError
	if errors.As(err, &se) {
		bs := make([]string, len(se.StepsM))
		for i, b := range se.StepsM {
			bs[i] = units.Bar(b, imp)
		}
		return usageErr(standingsExample, "not on the sheet: %s is not one of the announced heights (%s); the bar goes to those first (TR 26.4)", units.Bar(se.BarM, imp), strings.Join(bs, " "))
	}
	var be *meetsheet.BreachError
	if errors.As(err, &be) {
		return usageErr(standingsExample, "not on the sheet: %s %s %s breaks %s", be.Name, units.Bar(be.Jump.BarM, imp), be.Jump.Outcome, breachText(be.Breach, imp))
	}
	return err
}

// ruleRef is the Technical Rule a series rule comes from (World Athletics
// TR 26 and 27; numbers from memory, as in internal/series).
func ruleRef(r series.Rule) string {
	switch r {
	case series.ThreeFailures, series.HeightDone:
		return "TR 26.2"
	case series.BarDown:
		return "TR 26.4"
	case series.SmallRise:
		return "TR 26.4 (a)"
	case series.AfterJumpOff, series.JumpOffPass, series.JumpOffTwice, series.JumpOffDirection:
		return "TR 26.9"
	}
	return "the notation"
}

// breachText names the rule and what in the series broke it.
func breachText(b series.Breach, imp bool) string {
	s := ruleRef(b.Rule) + ": " + b.Rule.String()
	switch {
	case b.Rule == series.ThreeFailures && len(b.FailureBarsM) > 0:
		bs := make([]string, len(b.FailureBarsM))
		for i, m := range b.FailureBarsM {
			bs[i] = units.Bar(m, imp) + " x"
		}
		s += " (" + strings.Join(bs, ", ") + ")"
	case b.PrevBarM > 0:
		s += " (the height before was " + units.Bar(b.PrevBarM, imp) + ")"
	}
	return s
}

func meetLogReply(s meetsheet.Sheet, name string, jumps []meetsheet.Jump, imp bool, hide map[string]bool) Reply {
	st := s.Now()
	verdict := fmt.Sprintf("Sheet: %s %s.", name, jumpsText(jumps, imp))
	for _, x := range st.Standings {
		if x.Name == name && x.Out {
			verdict = fmt.Sprintf("Sheet: %s %s, out.", name, jumpsText(jumps, imp))
		}
	}
	return Reply{Title: verdict, Lines: []string{roundLine(st, imp, hide)}, Actions: []Action{{Label: "Standings", Command: "standings"}}}
}

// jumpsText writes jumps in the trade's notation, "1.70 o 1.75 xo", with
// "jump-off" before jump-off heights.
func jumpsText(jumps []meetsheet.Jump, imp bool) string {
	var b strings.Builder
	for i, j := range jumps {
		if i == 0 || math.Abs(j.BarM-jumps[i-1].BarM) >= 5e-4 || j.JumpOff != jumps[i-1].JumpOff || j.JumpOff {
			if i > 0 {
				b.WriteString(" ")
			}
			if j.JumpOff {
				b.WriteString("jump-off ")
			}
			b.WriteString(units.Bar(j.BarM, imp) + " ")
		}
		b.WriteString(j.Outcome.String())
	}
	return b.String()
}
