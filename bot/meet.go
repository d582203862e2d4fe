package bot

import (
	"errors"
	"fmt"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/planning"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// Examples of the meet sheet commands (each works as typed in help).
const (
	meetOpenExample  = "meet open Club-night steps 1.60 1.65 1.70 1.73 1.75"
	meetAddExample   = "meet add Bea guest"
	meetLogExample   = "meet log Bea 1.60 xo"
	meetUndoExample  = "meet undo"
	meetCloseExample = "meet close"
	standingsExample = "standings"
)

// Audit actions of the meet sheet.
const (
	auditMeetOpen  = "meet open"
	auditMeetAdd   = "meet add"
	auditMeetLog   = "meet log"
	auditMeetUndo  = "meet undo"
	auditMeetClose = "meet close"
	auditMeetPB    = "meet personal best"
)

// Limits of the sheet's words.
const (
	meetMaxNameRunes = 40
	meetMinBarM      = 0.50 // below any high-jump stand in use (common practice)
	meetMaxBarM      = 2.60 // above the men's world record of 2.45 m (from memory)
)

// meetCaution goes under the sheet's standings and filing.
const meetCaution = "The sheet is the coach's record, not the official result: the judges' card and the competition rules decide."

func meetCommands() []command {
	return []command{
		{name: "meet open", topic: "meet", access: coachOnly,
			usage:   "meet open NAME [DATE] [steps BAR BAR ...] [jumpoff]",
			example: meetOpenExample,
			summary: "open the team's meet sheet (one at a time): the meet's name, its date (today unless given), the announced heights, and jumpoff if a tie for first goes to a jump-off",
			run:     runMeetOpen},
		{name: "meet add", topic: "meet", access: coachOnly,
			usage:   "meet add NAME [NAME ...] [guest]",
			example: meetAddExample,
			summary: "put competitors on the sheet: a squad athlete by name, anyone else as typed (guest says they are from outside the squad)",
			run:     runMeetAdd},
		{name: "meet log", topic: "meet", access: coachOnly,
			usage:   "meet log NAME BAR ATTEMPTS [BAR ATTEMPTS]... [jumpoff]",
			example: meetLogExample,
			summary: "enter attempts on the sheet (o cleared, x failed, - passed), checked by the competition rules; for squad athletes log NAME ... meet does the same and logs it too",
			run:     runMeetLog},
		{name: "meet undo", topic: "meet", access: coachOnly, usage: "meet undo", example: meetUndoExample,
			summary: "take the sheet's last entry off", run: runMeetUndo},
		{name: "meet close", topic: "meet", access: coachOnly, usage: "meet close", example: meetCloseExample,
			summary: "file the sheet: the squad's results go into their log as meet jumps (bests, digest, history)", run: runMeetClose},
		{name: "meet retire", topic: "meet", access: coachOnly, usage: "meet retire NAME", example: meetRetireExample,
			summary: "a competitor withdraws: the place stands on the heights cleared, no longer still in or called (meet undo takes it back)", run: runMeetRetire},
		{name: "standings", topic: "meet", access: selfOrCoach, usage: "standings [last|NAME|DATE]", example: standingsExample, details: true,
			summary: "places on the open sheet by the tie rules (TR 26.8), each tie with its rule, who is still in and the next height; last, a meet's name or date: a filed sheet's final places", run: runStandings},
		{name: "meet list", aliases: []string{"meets"}, topic: "meet", access: selfOrCoach, usage: "meet list", example: meetListExample, details: true,
			summary: "the filed sheets, newest first, a line each with its verdict", run: runMeetList},
	}
}

// meetOpenArgs is what `meet open` was given.
type meetOpenArgs struct {
	name    string
	date    string
	stepsM  []float64
	jumpOff bool
}

func parseMeetOpen(args []token, today string) (meetOpenArgs, error) {
	o := meetOpenArgs{date: today}
	var name []string
	for i := 0; i < len(args); i++ {
		w := args[i]
		switch {
		case w.Lower == "jumpoff" || w.Lower == "jump-off":
			o.jumpOff = true
		case w.Lower == "today":
		case isDateWord(w.Raw):
			if _, err := time.Parse("2006-01-02", w.Raw); err != nil {
				return o, usageErr(meetOpenExample, "%q is not a date; write it 2026-12-05", w.Raw)
			}
			o.date = w.Raw
		case w.Lower == "steps":
			for i+1 < len(args) && logBarWord(args[i+1].Lower) {
				m, err := meetBar(args[i+1].Raw)
				if err != nil {
					return o, err
				}
				o.stepsM = append(o.stepsM, m)
				i++
			}
			if len(o.stepsM) == 0 {
				return o, usageErr(meetOpenExample, "steps needs the meet's heights after it")
			}
		case isBarHeight(w.Raw):
			return o, usageErr(meetOpenExample, "%q: put steps before the meet's heights", w.Raw)
		default:
			name = append(name, w.Raw)
		}
	}
	o.name = strings.Join(name, " ")
	switch {
	case o.name == "":
		return o, usageErr(meetOpenExample, "name the meet")
	case utf8.RuneCountInString(o.name) > meetMaxNameRunes:
		return o, usageErr(meetOpenExample, "the meet's name is longer than %d letters", meetMaxNameRunes)
	}
	if err := planning.CheckSteps(o.stepsM); err != nil {
		return o, usageErr(meetOpenExample, "%s (World Athletics TR 26.4: at least 2 cm, never a larger rise than the one before)", strings.TrimPrefix(err.Error(), "planning: "))
	}
	return o, nil
}

// isDateWord reports a word shaped like a date, 2026-12-05.
func isDateWord(w string) bool {
	return len(w) == 10 && w[4] == '-' && w[7] == '-' && w[0] >= '0' && w[0] <= '9'
}

// logBarWord reports whether a word is meant as a bar height.
func logBarWord(w string) bool { return w != "" && (w[0] >= '0' && w[0] <= '9' || w[0] == '.') }

// isBarHeight reports a word that reads as a bar height (1.60, 160cm, 5-3).
func isBarHeight(w string) bool {
	_, err := meetBar(w)
	return logBarWord(w) && err == nil
}

// meetBar reads one bar height of the sheet.
func meetBar(w string) (float64, error) {
	m, err := units.ParseLength(w)
	if err != nil || m < meetMinBarM-5e-4 || m > meetMaxBarM+5e-4 {
		return 0, usageErr(meetLogExample, "%q is not a bar height from %.2f to %.2f m", w, meetMinBarM, meetMaxBarM)
	}
	return m, nil
}

func runMeetOpen(c *call) (Reply, error) {
	var r Reply
	err := c.update(func(tx Tx) error {
		team, loc, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		o, err := parseMeetOpen(c.args, c.now.In(loc).Format("2006-01-02"))
		if err != nil {
			return err
		}
		if s, ok, err := openSheet(tx); err != nil {
			return err
		} else if ok {
			return conflictErr(meetCloseExample, "the sheet of %s (%s) is still open; one sheet at a time: file it with meet close first", s.Name, s.Date)
		}
		s := meetsheet.Sheet{ID: strings.TrimPrefix(c.lineID("meet"), "meet:"), Name: o.name, Date: o.date, StepsM: o.stepsM,
			JumpOff: o.jumpOff, OpenedBy: c.lineOwner(), Opened: c.now}
		if err := putSheet(tx, s); err != nil {
			return err
		}
		if err := c.auditFor(tx, 0, auditMeetOpen, "meet "+s.Name, nil, s); err != nil {
			return err
		}
		r = meetOpenReply(s, imperial(team))
		return nil
	})
	return r, err
}

func meetOpenReply(s meetsheet.Sheet, imp bool) Reply {
	r := Reply{Title: fmt.Sprintf("Sheet open: %s, %s.", s.Name, s.Date), Example: meetAddExample}
	steps := "Heights not announced: the bar rises at least 2 cm (TR 26.4)."
	if len(s.StepsM) > 0 {
		bs := make([]string, len(s.StepsM))
		for i, b := range s.StepsM {
			bs[i] = units.Bar(b, imp)
		}
		steps = "Heights: " + strings.Join(bs, " ") + "."
	}
	tie := "A tie for first is an equal first (no jump-off)."
	if s.JumpOff {
		tie = "A tie for first goes to a jump-off (TR 26.9)."
	}
	r.Lines = []string{steps + " " + tie, "Next: meet add NAME for each competitor."}
	return r
}

func runMeetAdd(c *call) (Reply, error) {
	var names []string
	guest := false
	for _, t := range c.args {
		switch t.Lower {
		case "guest", "guests":
			guest = true
		default:
			names = append(names, t.Raw)
		}
	}
	if len(names) == 0 {
		return Reply{}, usageErr(meetAddExample, "name the competitor (a squad athlete, or anyone with guest)")
	}
	var r Reply
	err := c.update(func(tx Tx) error {
		s, err := mustOpenSheet(tx)
		if err != nil {
			return err
		}
		all, err := tx.Athletes()
		if err != nil {
			return err
		}
		var added []string
		hidden := false
		for _, n := range names {
			comp, ath, err := c.meetCompetitor(tx, n, guest, all)
			if err != nil {
				return err
			}
			switch err := s.Add(comp); {
			case errors.Is(err, meetsheet.ErrTaken):
				return conflictErr(standingsExample, "%s is already on the sheet of %s", comp.Name, s.Name)
			case errors.Is(err, meetsheet.ErrFull):
				return conflictErr(standingsExample, "the sheet holds at most %d competitors", meetsheet.MaxCompetitors)
			case err != nil:
				return err
			}
			if err := c.auditFor(tx, comp.AthleteID, auditMeetAdd, "meet "+s.Name, nil, comp); err != nil {
				return err
			}
			label := comp.Name
			if comp.Outsider() {
				label += " (guest)"
			}
			added = append(added, label)
			hidden = hidden || ath != nil && c.meetHidden(*ath)
		}
		if err := putSheet(tx, s); err != nil {
			return err
		}
		r = Reply{Title: fmt.Sprintf("On the sheet of %s: %s.", s.Name, strings.Join(added, ", ")),
			Lines: []string{fmt.Sprintf("%s in all. Enter attempts with meet log NAME 1.60 xo.", plural(len(s.Competitors), "competitor"))},
			// A private or under-18 squad athlete is named only to the asker.
			Ephemeral: hidden}
		return nil
	})
	return r, err
}

// meetCompetitor resolves a name for the sheet: a squad athlete by name
// (case-insensitive), or with guest (or when no squad name is close) a
// competitor from outside the squad, named as typed.
func (c *call) meetCompetitor(tx Tx, name string, guest bool, all []record.Athlete) (meetsheet.Competitor, *record.Athlete, error) {
	if err := checkName(name, meetAddExample); err != nil {
		return meetsheet.Competitor{}, nil, err
	}
	a, ok, err := tx.AthleteByName(name)
	if err != nil {
		return meetsheet.Competitor{}, nil, err
	}
	if ok {
		if guest {
			return meetsheet.Competitor{}, nil, conflictErr("meet add "+a.Name, "%s is a squad athlete; a guest needs another name (e.g. %s-G)", a.Name, a.Name)
		}
		return meetsheet.Competitor{Name: a.Name, AthleteID: a.ID}, &a, nil
	}
	if !guest {
		names := make([]string, len(all))
		for i, x := range all {
			names[i] = x.Name
		}
		if near, ok := nearest(name, names); ok {
			return meetsheet.Competitor{}, nil, notFoundErr("meet add "+near, "no squad athlete called %q. Did you mean %s? For someone from outside the squad: meet add %s guest", name, near, name)
		}
	}
	return meetsheet.Competitor{Name: name}, nil, nil
}
