package bot

import (
	"slices"
	"strings"
)

// topics orders the help topics and says what each is for.
var topicOrder = []struct{ name, about string }{
	{"athletes", "profiles: add, show, change, link to a chat user"},
	{"log", "logging jumps, history, best, undo, CSV"},
	{"calc", "quick calculations: margin, flight, centre of mass, jump test"},
	{"digest", "the weekly clearance-trend digest"},
	{"team", "team settings: units, time zone, venue, backups"},
	{"plan", "suggested bars for a practice or a meet, jump budget"},
	{"meet", "the meet sheet: competitors, attempts, standings by the tie rules"},
	{"roles", "who may do what; privacy and the audit trail"},
	{"safety", "what the numbers are and are not; landing, load and youth data"},
}

func helpCommands() []command {
	return []command{{
		name:    "help",
		aliases: []string{"?", "commands"},
		topic:   "help",
		usage:   "help [TOPIC|COMMAND]",
		example: "help log",
		summary: "what I can do; help TOPIC for one topic",
		access:  anyone,
		run:     runHelp,
	}}
}

// safetyLines is the caution text of `help safety`; the README repeats it.
var safetyLines = []string{
	"The numbers are estimates from simplified models (a uniform arc, a 2-D segment body, a point-mass flight). They support the coach's judgement; they never replace it.",
	"Landing areas, uprights and crossbars must follow the competition rules (World Athletics Technical Rules: landing area at least 6 m x 4 m x 0.7 m) and the venue's own checks. Never raise a bar over a short or worn landing area.",
	"Progressions, the number of jumps and training load are the coach's call. A suggested change of take-off spot is a hint to try in practice, not a prescription.",
	"Athletes under 18 are minors: record their data only with a parent's or guardian's consent as local law requires, and keep profiles private where the family asks.",
}

func runHelp(c *call) (Reply, error) {
	if len(c.args) == 0 {
		r := Reply{Title: "lathmark: what I can do", Ephemeral: true}
		for _, t := range topicOrder {
			r.Lines = append(r.Lines, "*"+t.name+"*: "+t.about+" (help "+t.name+")")
		}
		r.Lines = append(r.Lines, "Examples: `log Kai 1.95 o 2.00 xo`, `margin 1.80 for Mira v 4.3`, `history Kai 6w`.")
		r.Example = "help calc"
		return r, nil
	}
	want := strings.ToLower(joinRaw(c.args))
	if want == "safety" {
		return Reply{Title: "Safety and the limits of the numbers", Lines: slices.Clone(safetyLines), Ephemeral: true}, nil
	}
	var picked []command
	for _, cmd := range c.e.commands {
		if cmd.topic == want || cmd.name == want || slices.Contains(cmd.aliases, want) || strings.HasPrefix(cmd.name, want+" ") {
			picked = append(picked, cmd)
		}
	}
	if len(picked) == 0 {
		var names []string
		for _, t := range topicOrder {
			names = append(names, t.name)
		}
		for _, cmd := range c.e.commands {
			names = append(names, cmd.name)
		}
		if s, ok := nearest(want, names); ok {
			return Reply{}, notFoundErr("help "+s, "no help topic %q. Did you mean %q?", want, s)
		}
		return Reply{}, notFoundErr("help log", "no help topic %q. Topics: %s", want, strings.Join(names[:len(topicOrder)], ", "))
	}
	r := Reply{Title: "help " + want, Ephemeral: true}
	for _, cmd := range picked {
		r.Lines = append(r.Lines, "`"+cmd.usage+"`: "+cmd.summary+". e.g. `"+cmd.example+"`")
	}
	if want == "log" || want == "calc" {
		r.Lines = append(r.Lines, "Lengths: 1.78, 1.78m, 178cm, 5-10 or 5'10\"; speeds in m/s; angles in degrees.")
	}
	return r, nil
}
