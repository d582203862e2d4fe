package bot

// access is who may run a command.
type access int

const (
	// anyone in the workspace: calculations and help.
	anyone access = iota
	// athletes for their own linked athlete, coaches for any; the command
	// checks the athlete with call.mayActFor once it knows who.
	selfOrCoach
	// coaches and head coaches.
	coachOnly
	// head coaches only: removals, team settings, roles.
	headOnly
)

// command is one entry of the command language.
type command struct {
	name    string   // words that start the line, e.g. "athlete add"
	aliases []string // other words meaning the same, e.g. "athletes"
	topic   string   // help topic
	usage   string   // the full form, e.g. "athlete add NAME height H ..."
	example string   // a line that works as typed
	summary string   // one line for help
	access  access
	// details says the command answers short by default and keeps the full
	// read-out in Reply.Details; a trailing word "more" asks for it.
	details bool
	run     func(c *call) (Reply, error)
}

func (c command) names() []string { return append([]string{c.name}, c.aliases...) }

// allCommands is the whole command language, one group per file.
func allCommands() []command {
	var cs []command
	for _, group := range [][]command{
		helpCommands(),
		athleteCommands(),
		teamCommands(),
		logCommands(),
		calcCommands(),
		digestCommands(),
		chartCommands(),
		roleCommands(),
		planCommands(),
		seasonCommands(),
		meetCommands(),
	} {
		cs = append(cs, group...)
	}
	return cs
}

// CommandInfo describes one command for documentation and tests. Access
// is who may run it: "anyone", "self or coach", "coach" or "head coach".
type CommandInfo struct {
	Name, Usage, Example, Summary, Topic, Access string
}

// String names an access level as CommandInfo.Access does.
func (a access) String() string {
	switch a {
	case selfOrCoach:
		return "self or coach"
	case coachOnly:
		return "coach"
	case headOnly:
		return "head coach"
	default:
		return "anyone"
	}
}

// Commands lists the command language in help order.
func (e *Engine) Commands() []CommandInfo {
	out := make([]CommandInfo, len(e.commands))
	for i, c := range e.commands {
		out[i] = CommandInfo{Name: c.name, Usage: c.usage, Example: c.example, Summary: c.summary, Topic: c.topic, Access: c.access.String()}
	}
	return out
}
