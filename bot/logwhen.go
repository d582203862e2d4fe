package bot

import (
	"fmt"
	"strconv"
	"strings"
	"time"
)

// Past sessions: `log ... yesterday`, `log ... on 2026-11-30`,
// `log ... at 18:30` (the team's zone). Parsing is pure; resolveWhen applies
// the clock.

// logSeasonBack is how far back a session may be logged without confirm:
// about one season (a year).
const logSeasonBack = 365 * 24 * time.Hour

// logFutureSlack lets a phone's clock run a little ahead.
const logFutureSlack = 5 * time.Minute

// parseWhenWord reads yesterday, today, on DATE or at HH:MM at ts[i] into w
// and returns how many extra tokens it took.
func parseWhenWord(w *logWhen, kind logWordKind, ts []token, i int, inline bool, value, example string) (int, error) {
	t := ts[i]
	ex := example + " yesterday"
	switch kind {
	case logYesterday, logToday:
		if w.Yesterday || w.HasDate {
			return 0, usageErr(ex, "%q: the line already says which day", t.Raw)
		}
		w.Yesterday = kind == logYesterday
		w.Typed = strings.TrimSpace(w.Typed + " " + t.Raw)
		if kind == logToday {
			w.HasDate = false
		}
		return 0, nil
	}
	extra := 0
	if !inline {
		if i+1 >= len(ts) {
			return 0, usageErr(ex, "%q needs a value after it: on 2026-11-30, at 18:30", t.Raw)
		}
		value, extra = ts[i+1].Raw, 1
	}
	w.Typed = strings.TrimSpace(w.Typed + " " + t.Raw + " " + value)
	if kind == logOn {
		if w.Yesterday || w.HasDate {
			return 0, usageErr(ex, "%q: the line already says which day", t.Raw+" "+value)
		}
		d, err := time.Parse("2006-01-02", value)
		if err != nil {
			return 0, usageErr(ex, "%q is not a date; write it as YYYY-MM-DD, e.g. on 2026-11-30", value)
		}
		w.HasDate, w.Y, w.M, w.D = true, d.Year(), int(d.Month()), d.Day()
		return extra, nil
	}
	if w.HasClock {
		return 0, usageErr(ex, "%q: the line already says at what time", t.Raw+" "+value)
	}
	h, m, ok := parseLogClock(value)
	if !ok {
		return 0, usageErr(ex, "%q is not a time of day; write it as HH:MM on the 24-hour clock, e.g. at 18:30", value)
	}
	w.HasClock, w.Minute = true, h*60+m
	return extra, nil
}

// parseLogClock reads "18:30", "18.30" or "1830".
func parseLogClock(s string) (h, m int, ok bool) {
	s = strings.ReplaceAll(s, ".", ":")
	hs, ms, found := strings.Cut(s, ":")
	if !found {
		if len(s) != 4 {
			return 0, 0, false
		}
		hs, ms = s[:2], s[2:]
	}
	h, err1 := strconv.Atoi(hs)
	m, err2 := strconv.Atoi(ms)
	if err1 != nil || err2 != nil || len(ms) != 2 || h < 0 || h > 23 || m < 0 || m > 59 {
		return 0, 0, false
	}
	return h, m, true
}

// given reports whether the line named a day or a time.
func (w logWhen) given() bool { return w.Yesterday || w.HasDate || w.HasClock }

// resolveWhen turns the typed day and time into the session's instant in
// loc: the day (today, yesterday or the date) at the time typed, or at
// now's time of day when none was. A session in the future is refused; one
// more than a season back needs confirm.
func resolveWhen(w logWhen, now time.Time, loc *time.Location, confirm bool, example string) (time.Time, error) {
	if !w.given() {
		return now, nil
	}
	local := now.In(loc)
	y, mo, d := local.Date()
	switch {
	case w.HasDate:
		y, mo, d = w.Y, time.Month(w.M), w.D
	case w.Yesterday:
		yd := time.Date(y, mo, d-1, 12, 0, 0, 0, loc)
		y, mo, d = yd.Date()
	}
	minute := local.Hour()*60 + local.Minute()
	sec := local.Second()
	if w.HasClock {
		minute, sec = w.Minute, 0
	}
	at := time.Date(y, mo, d, minute/60, minute%60, sec, 0, loc)
	when := at.Format("Mon 2006-01-02 15:04")
	if at.After(now.Add(logFutureSlack)) {
		return time.Time{}, usageErr(strings.Replace(example, " "+w.Typed, "", 1)+" yesterday",
			"%q is %s, still to come (it is %s); log a session once it has happened", w.Typed, when, local.Format("Mon 2006-01-02 15:04"))
	}
	if now.Sub(at) > logSeasonBack && !confirm {
		return time.Time{}, conflictErr(example+" confirm",
			"%q is %s, more than a season (%d days) back; if that is right, add confirm", w.Typed, when, int(logSeasonBack.Hours()/24))
	}
	return at, nil
}

// whenText says in a reply when a past session was: "" for now.
func whenText(w logWhen, at time.Time, loc *time.Location) string {
	if !w.given() {
		return ""
	}
	return fmt.Sprintf(" on %s", at.In(loc).Format("Mon 2006-01-02 15:04"))
}

// withoutWhen drops the day and time words from a line's words, for an
// example that keeps the rest.
func withoutWhen(ts []token) []token {
	var out []token
	for i := 0; i < len(ts); i++ {
		switch ts[i].Lower {
		case "yesterday", "today":
			continue
		case "on", "at":
			i++
			continue
		}
		out = append(out, ts[i])
	}
	return out
}
