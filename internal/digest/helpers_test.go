package digest

import (
	"fmt"
	"math/rand/v2"
	"time"

	_ "time/tzdata" // tests run without a system zone database too

	"github.com/lathmark-team/lathmark/internal/record"
)

// Synthetic squads for order, size and memory tests. The numbers are
// arbitrary (invented), used only to exercise the code, never as check
// values.

func squad(n int) []record.Athlete {
	as := make([]record.Athlete, n)
	for i := range as {
		as[i] = record.Athlete{ID: uint64(i + 1), Name: fmt.Sprintf("Jumper %03d", i+1), PersonalBestM: 1.70 + float64(i%40)/100}
	}
	return as
}

// synthWeeks emits attempts for every athlete in nWeeks weeks starting at
// the Monday 00:00 from (local in loc): three sessions a week (Monday,
// Wednesday, Friday at 17:00 local), each climbing in 3 cm steps with up to
// three tries a height; about half the attempts carry a model margin and a
// quarter a coach estimate. Attempts come out in time order per athlete.
func synthWeeks(athletes []record.Athlete, from time.Time, loc *time.Location, nWeeks int, seed uint64, emit func(record.Attempt)) {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	fy, fm, fd := from.In(loc).Date()
	for _, a := range athletes {
		for w := range nWeeks {
			for _, dayOff := range []int{0, 2, 4} {
				start := time.Date(fy, fm, fd+7*w+dayOff, 17, 0, 0, 0, loc)
				bar := a.PersonalBestM - 0.15
				n := 0
				for h := 0; h < 6 && n < 8; h++ {
					for try := 1; try <= 3 && n < 8; try++ {
						p := rng.Float64()
						at := record.Attempt{AthleteID: a.ID, Time: start.Add(time.Duration(n) * 4 * time.Minute),
							Seq: uint32(n), BarM: bar, Number: try}
						switch {
						case p < 0.05:
							at.Outcome = record.Passed
						case p < 0.05+0.6-0.1*float64(h):
							at.Outcome = record.Cleared
						default:
							at.Outcome = record.Failed
						}
						if rng.Float64() < 0.5 {
							at.HasModelMargin, at.ModelMarginM = true, (rng.Float64()-0.4)*0.08
						}
						if rng.Float64() < 0.25 {
							at.HasCoachMargin, at.CoachMarginM = true, (rng.Float64()-0.4)*0.08
						}
						emit(at)
						n++
						if at.Outcome != record.Failed {
							break
						}
					}
					bar += 0.03
				}
			}
		}
	}
}
