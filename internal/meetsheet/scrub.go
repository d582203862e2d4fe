package meetsheet

import (
	"strconv"
)

// RemovedLabel is the neutral name a removed athlete gets on a sheet; a
// second one on the same sheet is "removed athlete 2", and so on. It holds
// a space, so no competitor can be added or logged under it (names are one
// word).
const RemovedLabel = "removed athlete"

// Scrub takes the squad athlete id's personal data off the sheet: the
// name becomes a neutral label (RemovedLabel) on the competitor and every
// entry, the athlete id and the log keys of the entries go, and the
// competitor is an outsider from then on (nothing is filed for them). The
// entries themselves stay, so the places, the tie notes and the rounds of
// everyone else read as before. It reports whether the athlete was on the
// sheet.
func (s *Sheet) Scrub(id uint64) bool {
	c, ok := s.FindAthlete(id)
	if !ok {
		return false
	}
	label := s.freeLabel()
	s.Rename(c.Name, label)
	for i := range s.Competitors {
		if s.Competitors[i].AthleteID == id {
			s.Competitors[i].AthleteID = 0
		}
	}
	for i := range s.Entries {
		if s.Entries[i].Name == label {
			s.Entries[i].Keys = nil
			s.Entries[i].LineID = ""
		}
	}
	return true
}

// freeLabel is the first of "removed athlete", "removed athlete 2", ...
// not on the sheet yet.
func (s *Sheet) freeLabel() string {
	label := RemovedLabel
	for n := 2; ; n++ {
		if _, taken := s.Find(label); !taken {
			return label
		}
		label = RemovedLabel + " " + strconv.Itoa(n)
	}
}
