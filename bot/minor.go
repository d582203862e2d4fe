package bot

import "strings"

// setsBorn reports whether an `athlete set` line sets the birth year
// (born 2012, born=2012): then it gets the under-18 reminder.
func setsBorn(args []token) bool {
	for _, t := range args {
		if t.Lower == "born" || strings.HasPrefix(t.Lower, "born=") || strings.HasPrefix(t.Lower, "born:") {
			return true
		}
	}
	return false
}
