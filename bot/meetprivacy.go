package bot

import (
	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/record"
)

// meetHidden reports whether an athlete is kept out of what others see:
// private athletes, and athletes under 18 without a guardian's consent on
// file, are never named in a channel (even when they ask themselves), nor
// to another athlete in a direct message.
func (c *call) meetHidden(a record.Athlete) bool {
	if !hiddenInChannel(a, c.now.Year()) {
		return false
	}
	if c.inChannel() {
		return true // whoever asks, the channel reads it
	}
	self := c.user.AthleteID == a.ID && a.ID != 0
	return !self && rank(c.user.Role) < rank(record.RoleCoach)
}

// hiddenOnSheet names the sheet's squad athletes kept out of what this
// reader sees (meetHidden); outsiders are named as typed.
func (c *call) hiddenOnSheet(tx Tx, s meetsheet.Sheet) (map[string]bool, error) {
	hide := map[string]bool{}
	for _, comp := range s.Competitors {
		if comp.Outsider() {
			continue
		}
		a, ok, err := tx.AthleteByID(comp.AthleteID)
		if err != nil {
			return nil, err
		}
		if !ok || c.meetHidden(a) { // a forgotten athlete is not named
			hide[comp.Name] = true
		}
	}
	return hide, nil
}
