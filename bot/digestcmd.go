package bot

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/digest"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
	"github.com/lathmark-team/lathmark/internal/weekly"
)

// The digest's default slot: Monday 07:00 team time.
const (
	defaultDigestDay    = time.Monday
	defaultDigestMinute = 7 * 60
)

func digestCommands() []command {
	return []command{
		{name: "digest", topic: "digest", access: selfOrCoach,
			usage: "digest", example: "digest", summary: "when the weekly digest goes out, where, and when it last did", run: runDigestShow},
		{name: "digest now", aliases: []string{"digest preview"}, topic: "digest", access: selfOrCoach,
			usage: "digest now", example: "digest now", summary: "a preview of this week's digest, to you only", run: runDigestNow},
		{name: "digest week", topic: "digest", access: selfOrCoach,
			usage: "digest week YYYY-Www", example: "digest week 2026-W48", summary: "the digest of an earlier ISO week, to you only", run: runDigestWeek},
		{name: "digest schedule", aliases: []string{"digest at"}, topic: "digest", access: headOnly,
			usage: "digest schedule DAY HH:MM", example: "digest schedule mon 07:00", summary: "when the digest is posted, in team time", run: runDigestSchedule},
		{name: "digest channel", topic: "digest", access: headOnly,
			usage: "digest channel #CHANNEL", example: "digest channel #jumps", summary: "where the digest is posted", run: runDigestChannel},
		{name: "digest off", topic: "digest", access: headOnly,
			usage: "digest off", example: "digest off", summary: "stop posting the weekly digest", run: runDigestOnOff(true)},
		{name: "digest on", topic: "digest", access: headOnly,
			usage: "digest on", example: "digest on", summary: "post the weekly digest again", run: runDigestOnOff(false)},
	}
}

// withDigestDefaults fills the digest slot when no coach has chosen one.
func withDigestDefaults(t record.Team) record.Team {
	if !t.DigestSet {
		t.DigestDay, t.DigestMinute = defaultDigestDay, defaultDigestMinute
	}
	return t
}

// noArgs refuses words after a command that takes none, suggesting the
// nearest of the related commands.
func noArgs(c *call, related ...string) error {
	if len(c.args) == 0 {
		return nil
	}
	if s, ok := nearest(c.args[0].Lower, related); ok {
		return usageErr(strings.TrimSpace(c.cmd.name+" "+s+" "+joinRaw(c.args[1:])), "I don't know %q after %s. Did you mean %s %s?", c.args[0].Raw, c.cmd.name, c.cmd.name, s)
	}
	return usageErr(c.cmd.example, "%s takes nothing after it; I don't understand %q", c.cmd.name, c.args[0].Raw)
}

func runDigestShow(c *call) (Reply, error) {
	if err := noArgs(c, "now", "week", "schedule", "channel", "off", "on"); err != nil {
		return Reply{}, err
	}
	var (
		t          record.Team
		lastWeek   digest.Week
		lastAt     time.Time
		lastPosted bool
	)
	err := c.view(func(tx Tx) error {
		var err error
		if t, err = tx.Team(); err != nil {
			return err
		}
		t = withDigestDefaults(t)
		loc := t.Location()
		prev := weekly.LastScheduled(c.now, t.DigestDay, t.DigestMinute, loc)
		lastWeek = weekly.DigestWeek(prev, loc)
		for i := 0; i < 8 && !lastPosted; i++ {
			if lastAt, lastPosted, err = tx.DigestPosted(lastWeek.String()); err != nil {
				return err
			}
			if !lastPosted {
				lastWeek = lastWeek.Prev()
			}
		}
		return nil
	})
	if err != nil {
		return Reply{}, err
	}
	loc := t.Location()
	r := Reply{Title: "Weekly digest", Ephemeral: true}
	add := func(l, v string) { r.Fields = append(r.Fields, Field{l, v}) }
	if t.DigestOff {
		add("Status", "off (a head coach turns it on with `digest on`)")
	} else {
		next := weekly.NextScheduled(c.now, t.DigestDay, t.DigestMinute, loc)
		add("Schedule", fmt.Sprintf("every %s at %02d:%02d %s", t.DigestDay, t.DigestMinute/60, t.DigestMinute%60, loc))
		add("Next", next.In(loc).Format("Mon 2 Jan 15:04"))
	}
	channel := channelLabel(t.DigestChannel)
	if channel == "" {
		channel = "not set (a head coach sets it with `digest channel #jumps`)"
	}
	add("Channel", channel)
	if lastPosted {
		add("Last posted", fmt.Sprintf("%s, for %s", lastAt.In(loc).Format("Mon 2 Jan 15:04"), lastWeek))
	} else {
		add("Last posted", "none in the last 8 weeks")
	}
	return r, nil
}

func runDigestNow(c *call) (Reply, error) {
	if err := noArgs(c); err != nil {
		return Reply{}, err
	}
	var r Reply
	err := c.view(func(tx Tx) error {
		t, err := tx.Team()
		if err != nil {
			return err
		}
		loc := t.Location()
		week := digest.WeekOf(c.now, loc)
		d, err := buildDigest(tx, week, loc)
		if err != nil {
			return err
		}
		note := "This week so far (" + week.String() + "); the scheduled digest covers the whole week."
		if d.Team.Attempts == 0 && !anyPrivateJumped(d) {
			week = week.Prev()
			if d, err = buildDigest(tx, week, loc); err != nil {
				return err
			}
			note = "Nothing logged yet this week, so this is last week (" + week.String() + ")."
		}
		r, err = c.digestPreview(tx, t, d)
		r.Lines = append([]string{note}, r.Lines...)
		return err
	})
	return r, err
}

func anyPrivateJumped(d digest.Digest) bool {
	for _, a := range d.Athletes {
		if a.Private && a.Attempts > 0 {
			return true
		}
	}
	return false
}

func runDigestWeek(c *call) (Reply, error) {
	const ex = "digest week 2026-W48"
	if len(c.args) != 1 {
		return Reply{}, usageErr(ex, "give one ISO week, like 2026-W48")
	}
	week, err := digest.ParseWeek(strings.ToUpper(c.args[0].Raw))
	if err != nil {
		return Reply{}, usageErr(ex, "%q is not an ISO week; write YEAR-Wnn, e.g. 2026-W48", c.args[0].Raw)
	}
	var r Reply
	err = c.view(func(tx Tx) error {
		t, err := tx.Team()
		if err != nil {
			return err
		}
		loc := t.Location()
		if week.Start(loc).After(c.now) {
			return usageErr("digest now", "week %s has not started yet", week)
		}
		d, err := buildDigest(tx, week, loc)
		if err != nil {
			return err
		}
		r, err = c.digestPreview(tx, t, d)
		return err
	})
	return r, err
}

// privateMark heads the part of a coach's preview that the channel never
// sees.
const privateMark = "── Private: to coaches only, never posted in the channel ──"

// digestPreview renders a digest for the asker only. It shows exactly what
// the channel would get (the same lines, table, notes and chart, its caution
// folded in as the last note so that the channel part stays together); for a
// coach, what goes out privately follows under privateMark: each private
// athlete's direct message and the week's take-off counts.
func (c *call) digestPreview(tx Tx, t record.Team, d digest.Digest) (Reply, error) {
	r, err := renderDigest(tx, t, d, c.e.chartOptions(t))
	if err != nil {
		return r, err
	}
	if r.Caution != "" {
		r.Notes = append(r.Notes, "! "+r.Caution)
		r.Caution = ""
	}
	r.Ephemeral = true
	r.Direct = nil // a preview sends nothing to anyone else
	if rank(c.user.Role) < rank(record.RoleCoach) {
		return r, nil
	}
	priv, err := privatePart(tx, t, d)
	if err != nil {
		return r, err
	}
	if len(priv) > 0 {
		r.Notes = append(r.Notes, privateMark)
		r.Notes = append(r.Notes, priv...)
	}
	return r, nil
}

// privatePart is the coach-only text of a preview: what each private
// athlete's direct message says (sent to the athlete's linked chat users
// and to the coaches) and the week's take-off counts.
func privatePart(tx Tx, t record.Team, d digest.Digest) ([]string, error) {
	var out []string
	for _, s := range d.PrivateSummaries() {
		lines := strings.Split(strings.TrimRight(s.Text(imperial(t)), "\n"), "\n")
		out = append(out, lines[0]+" (direct message):")
		for _, l := range lines[1:] {
			out = append(out, "  "+l)
		}
	}
	ls, err := loadNotes(tx, d.Week, t.Location())
	if err != nil {
		return nil, err
	}
	return append(out, ls...), nil
}

// buildDigest streams the trend window's attempts of every athlete into a
// digest builder: one range scan per athlete, so the cost follows the
// window, not the stored history.
func buildDigest(tx Tx, week digest.Week, loc *time.Location) (digest.Digest, error) {
	b, err := digest.NewBuilder(digest.Config{Week: week, Loc: loc})
	if err != nil {
		return digest.Digest{}, fmt.Errorf("digest %s: %w", week, err)
	}
	from, to := b.Window()
	athletes, err := tx.Athletes()
	if err != nil {
		return digest.Digest{}, err
	}
	year := week.Start(loc).Year()
	for _, a := range athletes {
		// An athlete kept out of channels (private, or a minor without
		// consent recorded) is private to the digest: left out of the
		// channel's lines, table and chart, sent by direct message.
		a.Private = hiddenInChannel(a, year)
		b.AddAthlete(a)
		if err := tx.Attempts(a.ID, from, to, b.Add); err != nil {
			return digest.Digest{}, fmt.Errorf("digest %s: attempts of %s: %w", week, a.Name, err)
		}
	}
	return b.Result(), nil
}

// renderDigest turns a digest into the channel's reply: a count line and a
// summary table over the same athletes (the non-private ones who jumped),
// notes, the chart, and direct messages carrying the private athletes'
// details to them and to the coaches.
func renderDigest(tx Tx, t record.Team, d digest.Digest, opts digest.ChartOptions) (Reply, error) {
	imp := imperial(t)
	shown := d.Redacted()
	title := "Clearance digest " + d.Week.String()
	if t.Name != "" {
		title += ": " + t.Name
	}
	r := Reply{Title: title}
	loc := t.Location()
	r.Lines = append(r.Lines, fmt.Sprintf("Week of %s to %s.", d.From.In(loc).Format("Mon 2 Jan"), d.To.In(loc).Add(-time.Hour).Format("Sun 2 Jan")))
	tt := d.Team
	if tt.Jumped == 0 {
		r.Lines = append(r.Lines, "No jumps were logged this week.")
	} else {
		line := fmt.Sprintf("%d %s jumped: %d attempts, %d cleared", tt.Jumped, pluralOf(tt.Jumped, "athlete", "athletes"), tt.Attempts, tt.Clearances)
		if v, ok := tt.MakeRate.Value(); ok {
			line += fmt.Sprintf(", make rate %.0f%%", 100*v)
		}
		if tt.PrivateExcluded > 0 {
			// The totals leave private athletes out (so their numbers cannot
			// be worked out by subtraction); say so beside rows that show them.
			line += fmt.Sprintf(" (not counting %s)", plural(tt.PrivateExcluded, "private athlete"))
		}
		r.Lines = append(r.Lines, line+".")
	}
	table := &Table{Header: []string{"athlete", "O-X", "make", "best", "coach", "model", "trend"}}
	var bests, ceilings, private []string
	for _, a := range shown.Athletes {
		if a.Private {
			private = append(private, a.Name)
			continue
		}
		if a.Attempts == 0 {
			continue
		}
		table.Rows = append(table.Rows, digestRow(a, imp))
		meetBest := meetBestOf(a)
		switch {
		case a.PersonalBest:
			bests = append(bests, a.Name+" "+units.Length(meetBest, imp)+" personal best (meet)")
		case a.SeasonBest:
			bests = append(bests, a.Name+" "+units.Length(meetBest, imp)+" season best (meet)")
		}
		if a.PracticeAbovePB {
			bests = append(bests, a.Name+" "+units.Length(a.BestM, imp)+" in practice, above the personal best")
		}
		if a.Ceiling.OK {
			ceilings = append(ceilings, a.Name+" "+units.Length(a.Ceiling.BarM, imp))
		}
	}
	if len(table.Rows) > 0 {
		r.Table = table
	}
	if len(bests) > 0 {
		r.Notes = append(r.Notes, "Bests: "+strings.Join(bests, "; ")+".")
	}
	if len(ceilings) > 0 {
		r.Notes = append(r.Notes, fmt.Sprintf("Ceiling (highest bar made on at least half its tries, %d weeks): %s.", len(d.TrendWeeks), strings.Join(ceilings, ", ")))
	}
	if kn, err := knockNote(tx, shown, loc, false); err != nil {
		return r, err
	} else if kn != "" {
		r.Notes = append(r.Notes, kn)
	}
	if len(d.Idle) > 0 {
		r.Notes = append(r.Notes, "No jumps this week: "+strings.Join(d.Idle, ", ")+".")
	}
	if len(private) > 0 {
		// Counted, never named: the channel does not learn who they are.
		r.Notes = append(r.Notes, fmt.Sprintf("Details of %s sent privately.", plural(len(private), "more athlete")))
	}
	r.Notes = append(r.Notes, "O-X: clearances-failures. make: O/(O+X). PB, SB: personal or season best at a meet; >PB: above the personal best in practice. coach, model: median clearance margin (coach's estimate; mechanics model).")
	r.Notes = append(r.Notes, strings.ToUpper(digest.TrendRule[:1])+digest.TrendRule[1:]+" (common practice).")
	r.Caution = "Trends over a few weeks are a hint, not a verdict; progressions and training load are the coach's call."
	png, err := digest.Chart(shown, opts)
	switch {
	case err == nil:
		r.Files = append(r.Files, File{Name: "lathmark-digest-" + d.Week.String() + ".png", MIME: "image/png", Title: title, Data: png})
	case errors.Is(err, digest.ErrNoChartData):
	default:
		return r, fmt.Errorf("digest chart: %w", err)
	}
	ds, err := privateDirects(tx, d, imp)
	if err != nil {
		return r, err
	}
	r.Direct = ds
	return r, nil
}

// digestRow is one athlete's line of the summary table.
func digestRow(a digest.AthleteWeek, imp bool) []string {
	make_, best, coach, model := "", "", "", ""
	if v, ok := a.MakeRate.Value(); ok {
		make_ = fmt.Sprintf("%.0f%%", 100*v)
	}
	if a.HasBest {
		best = units.Bar(a.BestM, imp)
		atMeet := meetBestOf(a) == a.BestM
		switch {
		case a.PersonalBest && atMeet:
			best += " PB"
		case a.SeasonBest && atMeet:
			best += " SB"
		case a.PracticeAbovePB:
			best += " >PB"
		}
	}
	if a.CoachMargin.N > 0 {
		coach = units.Small(a.CoachMargin.MedianM, imp)
	}
	if a.ModelMargin.N > 0 {
		model = units.Small(a.ModelMargin.MedianM, imp)
	}
	return []string{a.Name, fmt.Sprintf("%d-%d", a.Clearances, a.Failures), make_, best, coach, model, trendCell(a.BestTrend, imp)}
}

// meetBestOf is the athlete's best meet clearance of the digest week (0 if none).
func meetBestOf(a digest.AthleteWeek) float64 {
	if n := len(a.Weeks); n > 0 && a.Weeks[n-1].HasMeetBest {
		return a.Weeks[n-1].MeetBestM
	}
	return 0
}

// trendCell shows a trend's reading and slope ± SE, or why there is none.
func trendCell(t digest.Trend, imp bool) string {
	if t.Reading == digest.NotEnoughData {
		return fmt.Sprintf("(%d wk)", t.Points)
	}
	return t.Reading.String() + " " + t.Slope(imp)
}

// privateDirects addresses each private athlete's details to the chat users
// linked to them and to every coach.
func privateDirects(tx Tx, d digest.Digest, imp bool) ([]Direct, error) {
	sums := d.PrivateSummaries()
	if len(sums) == 0 {
		return nil, nil
	}
	users, err := tx.Users()
	if err != nil {
		return nil, err
	}
	var out []Direct
	for _, s := range sums {
		lines := strings.Split(strings.TrimRight(s.Text(imp), "\n"), "\n")
		msg := Reply{Title: lines[0], Lines: lines[1:], Ephemeral: true}
		for _, u := range users {
			if u.AthleteID == s.Entry.AthleteID || rank(u.Role) >= rank(record.RoleCoach) {
				out = append(out, Direct{UserID: u.ID, Reply: msg})
			}
		}
	}
	return out, nil
}

func pluralOf(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

var weekdays = map[string]time.Weekday{
	"mon": time.Monday, "monday": time.Monday, "tue": time.Tuesday, "tues": time.Tuesday, "tuesday": time.Tuesday,
	"wed": time.Wednesday, "wednesday": time.Wednesday, "thu": time.Thursday, "thur": time.Thursday, "thurs": time.Thursday, "thursday": time.Thursday,
	"fri": time.Friday, "friday": time.Friday, "sat": time.Saturday, "saturday": time.Saturday, "sun": time.Sunday, "sunday": time.Sunday,
}

func runDigestSchedule(c *call) (Reply, error) {
	const ex = "digest schedule mon 07:00"
	if len(c.args) != 2 {
		return Reply{}, usageErr(ex, "give a day and a time, like mon 07:00")
	}
	day, ok := weekdays[c.args[0].Lower]
	if !ok {
		return Reply{}, usageErr(ex, "%q is not a day; use mon, tue, wed, thu, fri, sat or sun", c.args[0].Raw)
	}
	hh, mm, ok := parseClock(c.args[1].Lower)
	if !ok {
		return Reply{}, usageErr(ex, "%q is not a time of day; use 24-hour HH:MM, like 07:00 or 18:30", c.args[1].Raw)
	}
	t, err := c.updateTeam("digest schedule", func(t *record.Team) error {
		t.DigestDay, t.DigestMinute, t.DigestSet = day, hh*60+mm, true
		return nil
	})
	if err != nil {
		return Reply{}, err
	}
	loc := t.Location()
	next := weekly.NextScheduled(c.now, day, hh*60+mm, loc)
	return Reply{Title: "Digest schedule set", Lines: []string{fmt.Sprintf("Every %s at %02d:%02d %s; next %s.", day, hh, mm, loc, next.In(loc).Format("Mon 2 Jan 15:04"))}}, nil
}

// parseClock reads HH:MM (or H:MM, or HHMM) on a 24-hour clock.
func parseClock(s string) (hh, mm int, ok bool) {
	s = strings.ReplaceAll(s, ".", ":")
	if !strings.Contains(s, ":") && len(s) == 4 {
		s = s[:2] + ":" + s[2:]
	}
	h, m, found := strings.Cut(s, ":")
	if !found || len(m) != 2 || len(h) < 1 || len(h) > 2 {
		return 0, 0, false
	}
	for _, r := range h + m {
		if r < '0' || r > '9' {
			return 0, 0, false
		}
	}
	fmt.Sscanf(h, "%d", &hh)
	fmt.Sscanf(m, "%d", &mm)
	return hh, mm, hh < 24 && mm < 60
}

func runDigestChannel(c *call) (Reply, error) {
	const ex = "digest channel #jumps"
	if len(c.args) != 1 {
		return Reply{}, usageErr(ex, "give one channel, like #jumps")
	}
	ch := channelRef(c.args[0].Raw)
	if ch == "" {
		return Reply{}, usageErr(ex, "%q is not a channel; type # and pick it, like #jumps", c.args[0].Raw)
	}
	if _, err := c.updateTeam("digest channel", func(t *record.Team) error { t.DigestChannel = ch; return nil }); err != nil {
		return Reply{}, err
	}
	return Reply{Title: "Digest channel set", Lines: []string{"The weekly digest will be posted in " + channelLabel(ch) + ". Invite the bot to that channel if it is not there yet."}}, nil
}

// channelLabel shows a stored channel: Slack's mention form for an id, #name otherwise.
func channelLabel(ch string) string {
	switch {
	case ch == "":
		return ""
	case isChannelID(ch):
		return "<#" + ch + ">"
	default:
		return "#" + ch
	}
}

// isChannelID reports whether ch looks like a Slack conversation id (C…, G…, D…).
func isChannelID(ch string) bool {
	if len(ch) < 9 || !strings.ContainsRune("CGD", rune(ch[0])) {
		return false
	}
	for _, r := range ch {
		if !(r >= 'A' && r <= 'Z' || r >= '0' && r <= '9') {
			return false
		}
	}
	return true
}

// channelRef reads a channel as typed: Slack's <#C123|jumps> gives its id;
// a plain #name or id is kept as typed (the Slack API accepts names for posting).
func channelRef(w string) string {
	if strings.HasPrefix(w, "<#") && strings.HasSuffix(w, ">") {
		id, _, _ := strings.Cut(strings.TrimSuffix(strings.TrimPrefix(w, "<#"), ">"), "|")
		return id
	}
	name := strings.TrimPrefix(w, "#")
	if name == "" || len(name) > 80 {
		return ""
	}
	for _, r := range name {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_') {
			return ""
		}
	}
	return name
}

func runDigestOnOff(off bool) func(c *call) (Reply, error) {
	return func(c *call) (Reply, error) {
		if len(c.args) > 0 {
			return Reply{}, usageErr("digest off", "%q: digest on and digest off take nothing after them", c.args[0].Raw)
		}
		if _, err := c.updateTeam("digest on/off", func(t *record.Team) error { t.DigestOff = off; return nil }); err != nil {
			return Reply{}, err
		}
		if off {
			return Reply{Title: "Weekly digest off", Lines: []string{"Nothing will be posted until a head coach types `digest on`."}}, nil
		}
		return Reply{Title: "Weekly digest on", Lines: []string{"`digest` shows when it goes out next."}}, nil
	}
}

// PostFunc posts a reply into a channel; the Slack front end provides it.
type PostFunc func(ctx context.Context, channel string, r Reply) error

// ErrNoDigestChannel means the digest is due but no channel is set.
var ErrNoDigestChannel = errors.New("no digest channel set (a head coach sets one with `digest channel #jumps`)")

// PostDigest posts the digest of week at most once. It claims the week in
// one transaction (so a second caller, or a restart, finds it taken), then
// builds and posts it; if the post fails, the claim is released so a later
// try can post it. A crash between the claim and the post loses that week's
// digest rather than posting it twice.
func (e *Engine) PostDigest(ctx context.Context, week digest.Week, scheduledAt time.Time, late bool, post PostFunc) (posted bool, err error) {
	now := e.clock.Now()
	var team record.Team
	err = e.store.Update(ctx, func(tx Tx) error {
		var err error
		if team, err = tx.Team(); err != nil {
			return err
		}
		if team.DigestOff {
			return nil
		}
		if team.DigestChannel == "" {
			return ErrNoDigestChannel
		}
		if _, done, err := tx.DigestPosted(week.String()); err != nil || done {
			return err
		}
		posted = true
		return tx.MarkDigestPosted(week.String(), now)
	})
	if err != nil || !posted {
		return false, err
	}
	var r Reply
	err = e.store.View(ctx, func(tx Tx) error {
		d, err := buildDigest(tx, week, team.Location())
		if err != nil {
			return err
		}
		r, err = renderDigest(tx, team, d, e.chartOptions(team))
		return err
	})
	if err == nil {
		if late {
			loc := team.Location()
			r.Lines = append([]string{fmt.Sprintf("This digest is late: it was due %s, when the bot was not running.", scheduledAt.In(loc).Format("Mon 2 Jan 15:04"))}, r.Lines...)
		}
		err = post(ctx, team.DigestChannel, r)
	}
	if err != nil {
		release := e.store.Update(context.WithoutCancel(ctx), func(tx Tx) error { return tx.UnmarkDigestPosted(week.String()) })
		return false, errors.Join(fmt.Errorf("post digest %s: %w", week, err), release)
	}
	return true, nil
}

// DigestPosted reports whether the digest of week already went out.
func (e *Engine) DigestPosted(ctx context.Context, week digest.Week) (bool, error) {
	var ok bool
	err := e.store.View(ctx, func(tx Tx) error {
		var err error
		_, ok, err = tx.DigestPosted(week.String())
		return err
	})
	return ok, err
}
