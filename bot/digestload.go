package bot

import (
	"fmt"
	"time"

	"github.com/lathmark-team/lathmark/internal/digest"
	"github.com/lathmark-team/lathmark/internal/record"
)

// loadNotes counts each athlete's take-offs in the digest week (full and
// short approach) and flags a week far above the athlete's usual
// (digest.LoadRatioFlag). Shown in coaches' previews only: private
// athletes' counts never reach a channel this way.
func loadNotes(tx Tx, week digest.Week, loc *time.Location) ([]string, error) {
	all, err := tx.Athletes()
	if err != nil {
		return nil, err
	}
	from := week.Start(loc).AddDate(0, 0, -28)
	to := week.Start(loc).AddDate(0, 0, 7)
	var out []string
	for _, ath := range all {
		var as []record.Attempt
		if err := tx.Attempts(ath.ID, from, to, func(a record.Attempt) error { as = append(as, a); return nil }); err != nil {
			return nil, err
		}
		l := digest.TakeoffLoad(as, week, loc)
		wl := l.Weeks[len(l.Weeks)-1]
		if wl.Total() == 0 {
			continue
		}
		s := fmt.Sprintf("Take-offs %s: %d (%d full, %d short approach)", ath.Name, wl.Total(), wl.Full, wl.Short)
		if l.Ratio > 0 {
			s += fmt.Sprintf(", %.1f× the previous 4 weeks' mean of %.1f", l.Ratio, l.ChronicAvg)
		}
		if l.Flag {
			s += fmt.Sprintf(": well above the usual (over %.1f×, Gabbett 2016); a prompt to talk, not a limit", digest.LoadRatioFlag)
		}
		out = append(out, s+".")
	}
	return out, nil
}
