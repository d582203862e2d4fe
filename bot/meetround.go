package bot

import (
	"fmt"
	"strings"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
	"github.com/lathmark-team/lathmark/internal/units"
)

// roundLine says where the competition stands: the bar up, who is still
// to jump there with how many attempts, and the next height. hide masks
// names kept from this reader.
func roundLine(st meetsheet.State, imp bool, hide map[string]bool) string {
	if st.Over {
		return "Everyone is out: the competition is over; meet close files the sheet."
	}
	if st.JumpOff {
		return jumpOffLine(st, imp, hide)
	}
	if st.CurrentM == 0 && !st.Started {
		return "No height jumped yet."
	}
	var who []string
	for _, x := range st.ToJump {
		if !hide[x.Name] {
			who = append(who, fmt.Sprintf("%s %d", x.Name, x.Left))
		}
	}
	if st.CurrentM == 0 {
		why := st.NextWhy
		if why == "" {
			why = "not announced (at least 2 cm up, TR 26.4)"
		}
		if len(who) == 0 {
			return "Next height: " + why + "."
		}
		return "Next height: " + why + "; to jump " + strings.Join(who, ", ") + " (attempts left)."
	}
	line := "Up " + units.Bar(st.CurrentM, imp) + ": "
	if len(who) == 0 {
		line += "nobody left to jump"
	} else {
		line += "to jump " + strings.Join(who, ", ") + " (attempts left)"
	}
	if st.Waiting > 0 {
		line += fmt.Sprintf("; %d through", st.Waiting)
	}
	switch {
	case st.NextM > 0:
		line += ". Next " + units.Bar(st.NextM, imp)
		if st.NextWhy != meetsheet.NextAnnounced {
			line += ", " + st.NextWhy
		}
	case st.NextWhy != "":
		line += ". Next height: " + st.NextWhy
	default:
		line += ". Next height not announced (at least 2 cm up, TR 26.4)"
	}
	return line + "."
}

// jumpOffLine says where a jump-off for first stands (TR 26.9).
func jumpOffLine(st meetsheet.State, imp bool, hide map[string]bool) string {
	var who []string
	for _, x := range st.ToJump {
		if !hide[x.Name] {
			who = append(who, x.Name)
		}
	}
	each := "one attempt, TR 26.9"
	if len(who) > 1 {
		each = "one attempt each, TR 26.9"
	}
	to := ""
	if len(who) > 0 {
		to = "to jump " + strings.Join(who, ", ") + " (" + each + ")"
	}
	why := ""
	switch {
	case st.JumpOffLastM > 0:
		all, verb, dir := "both", "failed at", "down"
		if len(st.ToJump) > 2 {
			all = "all"
		}
		if st.JumpOffUp {
			verb, dir = "cleared", "up"
		}
		why = fmt.Sprintf("%s %s %s, so the bar goes %s to %s (TR 26.9)", all, verb, units.Bar(st.JumpOffLastM, imp), dir, units.Bar(st.CurrentM, imp))
	case st.CurrentM == 0:
		why = "its first height is the officials' call (TR 26.9)"
	default:
		return "Jump-off at " + units.Bar(st.CurrentM, imp) + ": " + to + "."
	}
	if to == "" {
		return "Jump-off: " + why + "."
	}
	return "Jump-off: " + why + "; " + to + "."
}
