package bot

import (
	"fmt"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/digest"
	"github.com/lathmark-team/lathmark/internal/record"
)

// knockNote counts, per athlete shown in the digest, the failures the
// coach logged with the body part that touched the bar over the trend
// window, beside what the crossing model had forecast for them: "Knocks
// by part, 8 weeks: Kai calves 3, hips 1 (the model named the same part
// 2 of 3 times)". Private athletes are left out unless full (a coach's
// preview). "" when nothing was knocked.
func knockNote(tx Tx, d digest.Digest, loc *time.Location, full bool) (string, error) {
	if len(d.TrendWeeks) == 0 {
		return "", nil
	}
	from, to := d.TrendWeeks[0].Start(loc), d.Week.End(loc)
	var per []string
	for _, a := range d.Athletes {
		if a.Private && !full {
			continue
		}
		var as []record.Attempt
		if err := tx.Attempts(a.AthleteID, from, to, func(at record.Attempt) error { as = append(as, at); return nil }); err != nil {
			return "", fmt.Errorf("knocks of %s: %w", a.Name, err)
		}
		if s := digest.Knocks(as).Text(); s != "" {
			per = append(per, a.Name+" "+s)
		}
	}
	if len(per) == 0 {
		return "", nil
	}
	return fmt.Sprintf("Knocks by part, %d weeks: %s.", len(d.TrendWeeks), strings.Join(per, "; ")), nil
}
