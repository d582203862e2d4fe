package bot

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/planning"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// planWindowWeeks is how far back a plan reads the log.
const planWindowWeeks = 8

// planCaution goes under every plan.
const planCaution = "A suggestion from the log, not a prescription: the coach decides, and the warm-up, the day's conditions and how the athlete feels come first."

func planCommands() []command {
	return []command{
		{name: "plan", topic: "plan", access: selfOrCoach,
			usage:   "plan ATHLETE|me [practice|meet] [DATE] [jumps N] [steps BAR BAR ...]",
			example: "plan Mira meet steps 1.60 1.65 1.70 1.73 1.75",
			summary: "a suggested opening height and progression from the last 8 weeks (ceiling, trend, make rate), with expected jumps and a reason for each bar",
			run:     runPlan},
		{name: "team jumps", topic: "plan", access: headOnly,
			usage: "team jumps N|off", example: "team jumps 25",
			summary: "the practice jump budget per athlete and session that plan keeps to", run: runTeamJumps},
	}
}

func runTeamJumps(c *call) (Reply, error) {
	const ex = "team jumps 25"
	if len(c.args) != 1 {
		return Reply{}, usageErr(ex, "give one number of jumps per session, or off")
	}
	n := 0
	if c.args[0].Lower != "off" {
		v, err := strconv.Atoi(c.args[0].Raw)
		if err != nil || v < 1 || v > 200 {
			return Reply{}, usageErr(ex, "%q is not a number of jumps from 1 to 200", c.args[0].Raw)
		}
		n = v
	}
	if _, err := c.updateTeam("team jumps", func(t *record.Team) error { t.JumpBudget = n; return nil }); err != nil {
		return Reply{}, err
	}
	if n == 0 {
		return Reply{Title: "Practice jump budget off."}, nil
	}
	return Reply{Title: fmt.Sprintf("Practice jump budget: %d jumps per athlete and session.", n),
		Caution: "A budget is the coach's call; young athletes and those coming back from injury usually jump less."}, nil
}

func runPlan(c *call) (Reply, error) {
	const ex = "plan Mira meet"
	if len(c.args) == 0 {
		return Reply{}, usageErr(ex, "name the athlete (or me)")
	}
	name := c.args[0].Raw
	in := planning.Input{Kind: planning.Practice}
	var day time.Time
	budget := -1
	rest := c.args[1:]
	for i := 0; i < len(rest); i++ {
		w := rest[i]
		switch {
		case w.Lower == "practice":
			in.Kind = planning.Practice
		case w.Lower == "meet":
			in.Kind = planning.Meet
		case w.Lower == "jumps" && i+1 < len(rest):
			v, err := strconv.Atoi(rest[i+1].Raw)
			if err != nil || v < 1 || v > 200 {
				return Reply{}, usageErr("plan "+name+" jumps 20", "%q is not a number of jumps from 1 to 200", rest[i+1].Raw)
			}
			budget, i = v, i+1
		case w.Lower == "steps":
			for i+1 < len(rest) {
				m, err := units.ParseLength(rest[i+1].Lower)
				if err != nil {
					break
				}
				in.StepsM = append(in.StepsM, m)
				i++
			}
			if len(in.StepsM) == 0 {
				return Reply{}, usageErr("plan "+name+" meet steps 1.60 1.65 1.70", "steps needs the meet's bars after it")
			}
		default:
			d, err := time.Parse("2006-01-02", w.Raw)
			if err != nil {
				return Reply{}, usageErr(ex, "I don't understand %q; plan takes practice or meet, a date (2026-12-05), jumps N and steps BAR ...", w.Raw)
			}
			day = d
		}
	}
	if len(in.StepsM) > 0 {
		in.Kind = planning.Meet
	}
	var r Reply
	err := c.view(func(tx Tx) error {
		team, loc, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		ath, err := c.athleteFor(tx, name)
		if err != nil {
			return err
		}
		end := localDay(c.now, loc).AddDate(0, 0, 1)
		if !day.IsZero() {
			end = time.Date(day.Year(), day.Month(), day.Day(), 0, 0, 0, 0, loc)
		}
		from := end.AddDate(0, 0, -7*planWindowWeeks)
		if err := tx.Attempts(ath.ID, from, end, func(a record.Attempt) error { in.Attempts = append(in.Attempts, a); return nil }); err != nil {
			return err
		}
		in.PBM, in.Loc = ath.PersonalBestM, loc
		in.BudgetJumps = team.JumpBudget
		if budget > 0 {
			in.BudgetJumps = budget
		}
		p, err := planning.Make(in)
		var se planning.ErrSteps
		switch {
		case errors.Is(err, planning.ErrNoJumps):
			return notFoundErr("log "+ath.Name+" 1.60 o 1.65 xo", "no jumps logged for %s in the %d weeks before %s; a plan needs some", ath.Name, planWindowWeeks, end.AddDate(0, 0, -1).Format("2006-01-02"))
		case errors.As(err, &se):
			return usageErr("plan "+ath.Name+" meet steps 1.60 1.65 1.70 1.73 1.75", "%s (World Athletics TR 26: at least 2 cm, never a larger rise than the one before)", strings.TrimPrefix(se.Error(), "planning: "))
		case err != nil:
			return err
		}
		r = planReply(ath, p, imperial(team))
		r.Ephemeral = r.Ephemeral || hiddenInChannel(ath, c.now.Year()) // under 18 without consent too
		return nil
	})
	return r, err
}

func planReply(ath record.Athlete, p planning.Plan, imp bool) Reply {
	kind := "practice"
	if p.Kind == planning.Meet {
		kind = "meet"
	}
	r := Reply{Title: fmt.Sprintf("Suggested %s bars for %s", kind, ath.Name), Ephemeral: ath.Private, Caution: planCaution}
	r.Table = &Table{Header: []string{"bar", "make rate", "expected jumps", "why"}}
	if p.Kind == planning.Meet {
		r.Table.Header = []string{"bar", "make rate", "expected jumps", "attempts", "why"}
	}
	for _, h := range p.Heights {
		row := []string{units.Bar(h.BarM, imp), fmt.Sprintf("%.0f%%", 100*h.MakeRate), fmt.Sprintf("%.1f", h.ExpectedJumps)}
		if p.Kind == planning.Meet {
			row = append(row, strconv.Itoa(h.AttemptsLeft))
		}
		r.Table.Rows = append(r.Table.Rows, append(row, h.Reason))
	}
	r.Fields = []Field{
		{Label: "Ceiling", Value: barText(p.CeilingM, imp)},
		{Label: "Trend", Value: fmt.Sprintf("%+.1f cm a week", 100*p.TrendMPerWeek)},
		{Label: "Expected jumps", Value: fmt.Sprintf("%.1f", p.ExpectedJumps)},
	}
	r.Notes = append(r.Notes, p.Reasons...)
	r.Notes = append(r.Notes, "Make rates: (clearances+1)/(tries+2) within 1.5 cm of the bar, last 8 weeks.")
	return r
}
