package bot

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/digest"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// chartDefaultWeeks is the window of `chart NAME` without a span.
const chartDefaultWeeks = 12

func chartCommands() []command {
	return []command{
		{name: "chart", aliases: []string{"graph"}, topic: "digest", access: selfOrCoach,
			usage: "chart NAME [12w|season]", example: "chart Mira 12w",
			summary: "one athlete's best bars, meet marks, margins and make rate over time, as a picture", run: runChart},
	}
}

// chartSpan reads the window: Nw (6 to 104 weeks) or season (from the
// first ISO week of this year, at least 6 weeks).
func chartSpan(args []token, thisWeek digest.Week) (name string, weeks int, label string, err error) {
	const ex = "chart Mira 12w"
	if len(args) == 0 {
		return "", 0, "", usageErr(ex, "name the athlete, e.g. chart Mira")
	}
	name, weeks, label = args[0].Raw, chartDefaultWeeks, fmt.Sprintf("last %d weeks", chartDefaultWeeks)
	rest := args[1:]
	if len(rest) == 0 {
		return name, weeks, label, nil
	}
	if len(rest) > 1 {
		return "", 0, "", unknownWords(rest[1:], ex, "chart takes an athlete and 12w or season")
	}
	w := rest[0].Lower
	if w == "season" {
		weeks = min(max(thisWeek.Num, digest.MinTrendWeeks), digest.MaxTrendWeeks)
		return name, weeks, fmt.Sprintf("season %d (%d weeks)", thisWeek.Year, weeks), nil
	}
	n, err := strconv.Atoi(strings.TrimSuffix(strings.TrimSuffix(w, "wk"), "w"))
	if err != nil || !strings.HasSuffix(w, "w") && !strings.HasSuffix(w, "wk") {
		return "", 0, "", usageErr(ex, "%q: give the window as weeks (12w) or season", rest[0].Raw)
	}
	if n < digest.MinTrendWeeks || n > digest.MaxTrendWeeks {
		return "", 0, "", usageErr(ex, "%q: a chart covers %d to %d weeks", rest[0].Raw, digest.MinTrendWeeks, digest.MaxTrendWeeks)
	}
	return name, n, fmt.Sprintf("last %d weeks", n), nil
}

// chartOptions are the chart settings for a team.
func (e *Engine) chartOptions(t record.Team) digest.ChartOptions {
	o := digest.ChartOptions{Imperial: imperial(t), Team: t.Name}
	if e.chartW > 0 {
		o.WidthPx, o.HeightPx = e.chartW, e.chartW*5/4
	}
	return o
}

// inChannel reports whether the reply would be seen in a shared channel.
func (c *call) inChannel() bool { return c.req.Channel != "" && !c.req.Direct }

func runChart(c *call) (Reply, error) {
	var r Reply
	err := c.view(func(tx Tx) error {
		team, loc, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		week := digest.WeekOf(c.now, loc)
		name, weeks, span, err := chartSpan(c.args, week)
		if err != nil {
			return err
		}
		ath, err := c.athleteFor(tx, name)
		if err != nil {
			return err
		}
		if c.hidden(ath) && c.inChannel() {
			return forbiddenErr("chart "+ath.Name, "%s is kept out of channels (%s), so their chart never goes to a channel; ask me in a direct message", ath.Name, hiddenReason(ath))
		}
		aw, trend, err := athleteWindow(tx, ath, week, weeks, loc)
		if err != nil {
			return err
		}
		imp := imperial(team)
		png, err := digest.AthleteChart(aw, trend, c.e.chartOptions(team))
		if errors.Is(err, digest.ErrNoChartData) {
			return notFoundErr("history "+ath.Name, "%s has no jumps logged in the %s; nothing to draw", ath.Name, span)
		}
		if err != nil {
			return fmt.Errorf("chart %s: %w", ath.Name, err)
		}
		r = chartReply(aw, trend, span, imp)
		r.Ephemeral = c.hidden(ath)
		r.Files = []File{{Name: fmt.Sprintf("lathmark-chart-%s-%s-%dw.png", fileSafe(ath.Name), week, weeks), MIME: "image/png",
			Title: ath.Name + ", " + span, Data: png}}
		return nil
	})
	return r, err
}

// athleteWindow builds one athlete's digest entry over the weeks up to
// week: one range scan of that athlete's attempts.
func athleteWindow(tx Tx, ath record.Athlete, week digest.Week, weeks int, loc *time.Location) (digest.AthleteWeek, []digest.Week, error) {
	b, err := digest.NewBuilder(digest.Config{Week: week, Loc: loc, TrendWeeks: weeks})
	if err != nil {
		return digest.AthleteWeek{}, nil, fmt.Errorf("chart %s: %w", ath.Name, err)
	}
	b.AddAthlete(ath)
	from, to := b.Window()
	if err := tx.Attempts(ath.ID, from, to, b.Add); err != nil {
		return digest.AthleteWeek{}, nil, fmt.Errorf("chart %s: %w", ath.Name, err)
	}
	d := b.Result()
	for _, a := range append(d.Athletes, d.Resting...) {
		if a.AthleteID == ath.ID {
			return a, d.TrendWeeks, nil
		}
	}
	return digest.AthleteWeek{}, nil, fmt.Errorf("chart %s: athlete missing from its own digest", ath.Name)
}

// chartReply is the text beside the picture: the latest best, the meet
// marks and the trend, in the team's units.
func chartReply(a digest.AthleteWeek, weeks []digest.Week, span string, imp bool) Reply {
	r := Reply{Title: "Chart of " + a.Name + ": " + span}
	var best, meet string
	meets := 0
	for i := len(a.Weeks) - 1; i >= 0; i-- {
		ws := a.Weeks[i]
		if ws.HasPracticeBest && best == "" {
			best = units.Length(ws.PracticeBestM, imp) + " in " + weeks[i].String()
		}
		if ws.HasMeetBest {
			meets++
			if meet == "" {
				meet = units.Length(ws.MeetBestM, imp) + " in " + weeks[i].String()
			}
		}
	}
	if best != "" {
		r.Lines = append(r.Lines, "Latest practice best "+best+".")
	}
	if meet != "" {
		r.Lines = append(r.Lines, fmt.Sprintf("Latest meet mark %s (%d %s with a meet).", meet, meets, pluralOf(meets, "week", "weeks")))
	}
	r.Lines = append(r.Lines, "Best-bar trend: "+a.BestTrend.Text(imp)+".")
	r.Notes = append(r.Notes, "Line: practice best (a gap is a week without one); ringed: meet mark; light bar: coach's estimate, solid bar: model.")
	return r
}
