package bot_test

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"
)

// replyBudget is how much of a phone screen a default reply may take, as
// rendered in the golden files (the terminal's plain text). Lines are text
// lines; the renderings of buttons ("[Undo] type: undo") and attachments
// ("file: ...") are not counted, because Slack shows them as a button or a
// picture, not as text. Characters are counted in runes, indentation
// included. The numbers are stated in DEVELOPERS.md ("Reply budget").
type replyBudget struct {
	kind     string
	lines    int
	chars    int
	awaiting string // non-empty: replies still over budget on this branch are reported and skipped, not failed
}

// The budgets. Calculations: the five short lines, 400 characters
// (verdict, two or three numbers, one line of what was assumed). Refusals:
// what was wrong and a correct example. Confirmations (a logged line, a
// profile, a best): one phone screen held upright, about 18 lines of 40
// characters, of which at most 8 lines. Lists and tables (history, help,
// CSV summaries, import problems): two screens.
var (
	calcBudget    = replyBudget{kind: "calculation", lines: 5, chars: 400}
	refusalBudget = replyBudget{kind: "refusal", lines: 4, chars: 350}
	confirmBudget = replyBudget{kind: "confirmation", lines: 8, chars: 700}
	listBudget    = replyBudget{kind: "list or table", lines: 16, chars: 1600}
)

// budgetByGolden maps the start of a golden file's name to the command it
// renders and that command's budget; the longest matching prefix wins.
var budgetByGolden = []struct {
	prefix, command string
	budget          replyBudget
}{
	{"calc-margin", "margin", calcBudget},
	{"calc-flight", "flight", calcBudget},
	{"calc-com", "com", calcBudget},
	{"calc-jump-test", "jump test", calcBudget},
	{"crossing", "crossing", calcBudget},
	{"calc-err", "a calculation refused", refusalBudget},
	{"log-err", "a log command refused", refusalBudget},
	{"athlete-typo", "athlete (unknown name)", refusalBudget},
	{"athlete", "athlete", confirmBudget},
	{"log", "log", confirmBudget},
	{"log-best", "best", confirmBudget},
	{"log-undo", "undo", confirmBudget},
	{"log-history", "history", listBudget},
	{"log-export", "export csv", listBudget},
	{"log-import", "import csv", listBudget},
	{"log-help", "help log", listBudget},
	{"help", "help", listBudget},
	{"digest", "digest", listBudget},
	{"chart", "chart", confirmBudget},
	{"hint", "log (hint)", confirmBudget},
	{"block", "a pasted block of lines", listBudget},
	{"meet", "the meet sheet commands", confirmBudget},
	{"meet-standings", "standings", listBudget},
	{"meet-list", "meet list", listBudget},
	{"meet-err", "a meet sheet command refused", refusalBudget},
}

// TestReplyBudget renders (reads) every golden reply and fails when a
// default reply is longer than its command's budget. Replies asked for with
// "more" (golden names ending in "-more") are exempt. A golden whose name
// matches no command fails, so a new command gets a budget.
func TestReplyBudget(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "replies", "*.golden"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no golden replies found (err %v)", err)
	}
	for _, path := range files {
		name := strings.TrimSuffix(filepath.Base(path), ".golden")
		t.Run(name, func(t *testing.T) {
			if strings.HasSuffix(name, "-more") || strings.Contains(name, "-more-") {
				t.Skip("a `more` reply: exempt")
			}
			command, b, ok := budgetFor(name)
			if !ok {
				t.Fatalf("golden %s matches no command in budgetByGolden: add it with its budget", name)
			}
			data, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			lines, chars := measureReply(string(data))
			if lines <= b.lines && chars <= b.chars {
				return
			}
			msg := "%s (%s, budget for a %s: %d lines, %d characters) takes %d lines, %d characters"
			if b.awaiting != "" {
				t.Skipf("over budget, awaiting %s: "+msg, b.awaiting, name, command, b.kind, b.lines, b.chars, lines, chars)
			}
			t.Errorf(msg, name, command, b.kind, b.lines, b.chars, lines, chars)
		})
	}
}

func budgetFor(name string) (command string, b replyBudget, ok bool) {
	best := -1
	for _, e := range budgetByGolden {
		if (name == e.prefix || strings.HasPrefix(name, e.prefix+"-")) && len(e.prefix) > best {
			best, command, b, ok = len(e.prefix), e.command, e.budget, true
		}
	}
	return command, b, ok
}

// measureReply counts the text lines and characters of a rendered reply,
// leaving out the lines that stand for buttons and attachments.
func measureReply(s string) (lines, chars int) {
	for _, l := range strings.Split(strings.TrimRight(s, "\n"), "\n") {
		trimmed := strings.TrimSpace(l)
		if strings.HasPrefix(trimmed, "[") && strings.Contains(trimmed, "] type: ") || strings.HasPrefix(trimmed, "file: ") {
			continue
		}
		lines++
		chars += utf8.RuneCountInString(l)
	}
	return lines, chars
}

// TestMeasureReply checks the counting on a hand-counted rendering.
func TestMeasureReply(t *testing.T) {
	s := "Logged\n  1.70 o\n  [Undo] type: undo\n  file: x.png (image/png, 3 bytes)\n"
	if l, c := measureReply(s); l != 2 || c != 6+8 {
		t.Errorf("measureReply = %d lines, %d chars; want 2, 14", l, c)
	}
	if _, b, _ := budgetFor("log-history-tz"); b.kind != listBudget.kind {
		t.Errorf("log-history-tz has the %s budget, want %s", b.kind, listBudget.kind)
	}
	if _, _, ok := budgetFor("logbook"); ok {
		t.Error("logbook matched a prefix without a dash")
	}
}
