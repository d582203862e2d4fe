package bot_test

import (
	"strings"
	"testing"
)

// TestNoProbingWhoIsInTheSquad: an athlete (or a workspace member) asking
// for someone else gets one refusal whatever the name: another athlete
// (Kai), a private one (Ines), one under 18 without consent (Tom), one under
// 18 with consent (Lena) and a name nobody has (Zed) give replies equal
// apart from the name typed, in a channel and in a direct message, so that
// the reply never tells who is on the squad (issue 13, "Privacy by role").
// The refusal names the role needed. Role matrix style: every
// per-athlete command, each speaker below coach, both places.
func TestNoProbingWhoIsInTheSquad(t *testing.T) {
	f := newPrivacyFixture(t)
	names := []string{"Kai", "Ines", "Tom", "Lena", "Zed"}
	forms := []string{
		"athlete NAME", "history NAME", "history NAME 6w", "best NAME", "chart NAME", "chart NAME season",
		"season NAME", "compare Mira NAME 12w", "export csv NAME", "audit NAME 30d", "plan NAME",
		"log NAME 1.80 o", "margin 1.80 for NAME v 4.3", "crossing 2.05 for NAME v 4.4 from 1.1", "com for NAME model segments",
		"forget NAME confirm", "athlete set NAME pb 1.90",
	}
	for _, who := range []string{athlete, nobody} {
		for _, form := range forms {
			for _, inChannel := range []bool{true, false} {
				var first, firstName string
				for _, n := range names {
					r := f.run(who, strings.ReplaceAll(form, "NAME", n), inChannel)
					if r.OK() {
						t.Errorf("%s %q for %s: answered\n%s", who, form, n, plain(r))
						continue
					}
					got := r.Kind.String() + "|" + strings.ReplaceAll(shownText(r), n, "NAME")
					if !r.Ephemeral {
						t.Errorf("%s %q for %s: the refusal went to the channel", who, form, n)
					}
					if first == "" {
						first, firstName = got, n
						if !strings.Contains(got, "role") {
							t.Errorf("%s %q: the refusal names no role:\n%s", who, form, got)
						}
						continue
					}
					if got != first {
						t.Errorf("%s %q: %s and %s get different refusals:\n%s\n---\n%s", who, form, firstName, n, first, got)
					}
				}
			}
		}
	}
}
