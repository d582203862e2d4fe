package bot

import (
	"github.com/lathmark-team/lathmark/internal/meetsheet"
)

// sheetExcerpt is what a meet sheet held about a removed athlete, for
// forget's export (the only copy kept once the sheet is scrubbed).
type sheetExcerpt struct {
	Meet    string  `json:"meet"`
	Date    string  `json:"date"`
	Filed   bool    `json:"filed"`
	Place   int     `json:"place,omitempty"` // 0: no height cleared
	Shared  bool    `json:"shared,omitempty"`
	BestM   float64 `json:"best_m,omitempty"`
	Jumps   string  `json:"jumps,omitempty"` // the series in the notation, metres
	Retired bool    `json:"retired,omitempty"`
}

// excerpt reads the athlete's line of a sheet before it is scrubbed.
func excerpt(s meetsheet.Sheet, c meetsheet.Competitor, filed bool) sheetExcerpt {
	x := sheetExcerpt{Meet: s.Name, Date: s.Date, Filed: filed, Jumps: seriesText(s, c.Name, false), Retired: s.Retired(c.Name)}
	st := s.Now()
	if filed {
		st = s.Final()
	}
	for _, p := range st.Standings {
		if p.Name == c.Name {
			x.Place, x.Shared, x.BestM = p.Place, p.Shared, p.BestM
		}
	}
	return x
}

// scrubSheets takes a removed athlete's name and id off the open sheet
// and, when filed is set, off every filed sheet too (meetsheet.Sheet.Scrub:
// a neutral label in their place, everyone else's places unchanged). It
// returns what each changed sheet held about the athlete.
func scrubSheets(tx Tx, athleteID uint64, filed bool) ([]sheetExcerpt, error) {
	var out []sheetExcerpt
	s, ok, err := openSheet(tx)
	if err != nil {
		return nil, err
	}
	if c, on := s.FindAthlete(athleteID); ok && on {
		out = append(out, excerpt(s, c, false))
		s.Scrub(athleteID)
		if err := putSheet(tx, s); err != nil {
			return nil, err
		}
	}
	if !filed {
		return out, nil
	}
	all, err := filedSheets(tx) // read first: no writes under the cursor
	if err != nil {
		return nil, err
	}
	m, err := sheets(tx)
	if err != nil {
		return nil, err
	}
	for _, f := range all {
		c, on := f.FindAthlete(athleteID)
		if !on {
			continue
		}
		out = append(out, excerpt(f, c, true))
		f.Scrub(athleteID)
		if err := m.PutFiledMeet(f); err != nil {
			return nil, err
		}
	}
	return out, nil
}
