package bot

// scrubSheets takes a removed athlete's name and id off the open sheet
// and, when filed is set, off every filed sheet too (meetsheet.Sheet.Scrub:
// a neutral label in their place, everyone else's places unchanged). It
// returns how many sheets it changed.
func scrubSheets(tx Tx, athleteID uint64, filed bool) (int, error) {
	n := 0
	s, ok, err := openSheet(tx)
	if err != nil {
		return 0, err
	}
	if ok && s.Scrub(athleteID) {
		if err := putSheet(tx, s); err != nil {
			return 0, err
		}
		n++
	}
	if !filed {
		return n, nil
	}
	all, err := filedSheets(tx) // read first: no writes under the cursor
	if err != nil {
		return n, err
	}
	m, err := sheets(tx)
	if err != nil {
		return n, err
	}
	for _, f := range all {
		if !f.Scrub(athleteID) {
			continue
		}
		if err := m.PutFiledMeet(f); err != nil {
			return n, err
		}
		n++
	}
	return n, nil
}
