package bot

import (
	"fmt"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/internal/record"
)

// The log's short reply (issue 17, "verdict first, details on request"): a
// line with measurements answers with the verdict (the title), the jumps,
// one short line per measured jump (model margin ± and the lowest part),
// one Check line for values outside the published ranges, and one line
// naming what the model assumed; the full read-out (every value typed, the
// assumptions with their sources, the flags in full) is Reply.Details, shown
// by `more` at the end of the line or by `line N more`, which the Slack
// Details button runs so that pressing it never logs the line again.

// logBrief is what the short reply changes in the full one.
type logBrief struct {
	flagFull []string          // the full flag lines of the full reply
	check    string            // their one short line ("Check: …")
	fields   map[string]string // attempt label → its short value
	assumed  []string          // short names of what the model assumed
}

// needed reports whether the full reply is long enough to need a short one.
func (sh logBrief) needed(full Reply) bool {
	return len(sh.fields) > 0 || sh.check != "" || len(full.Assumptions) > 0
}

// shortJumpValue is a measured jump's short line: "model margin +11 cm ± 3,
// thighs lowest +1 cm"; "" when the jump has neither.
func shortJumpValue(j loggedJump, imp bool) string {
	var parts []string
	if j.model.ok {
		parts = append(parts, "model margin "+signedShort(j.model.marginM, imp)+" ± "+shortSigma(j.model.sigmaM, imp))
	}
	if a := j.rec; a.HasPrediction {
		parts = append(parts, a.PredictedPart+" lowest "+signedShort(a.PredictedClearanceM, imp))
	}
	return strings.Join(parts, ", ")
}

// signedShort is shortCM with its sign: "+11 cm", "−2 cm", "+4 in".
func signedShort(m float64, imp bool) string {
	s := shortCM(m, imp)
	if strings.HasPrefix(s, "0 ") {
		return s
	}
	if m < 0 {
		return "−" + s
	}
	return "+" + s
}

// assumedLine is the short reply's one line about the model: "assumed arch
// 90°, h0, body depth; say `more` for the details".
func assumedLine(assumed []string) string {
	tail := "say `more` for the details"
	if len(assumed) == 0 {
		return capitalize(tail)
	}
	return "assumed " + strings.Join(assumed, ", ") + "; " + tail
}

// shortOf builds the short reply from the full one (whose first two lines
// are the jumps and the day's summary, as logReply writes them): those two
// share a line, the flag lines become
// the one Check line, measured jumps' fields their short values, the
// assumptions one line; the full reply is its Details, shown in Slack by
// running detailsCmd (read-only).
func shortOf(full Reply, sh logBrief, detailsCmd string) Reply {
	s := full
	s.Lines = nil
	lines := full.Lines
	if len(lines) >= 2 {
		// The jumps and the day's summary share a line: "1.70 o, 1.75 xo.
		// Today: best 1.75 m, made 2/3 (67%)."
		s.Lines = append(s.Lines, lines[0]+". "+lines[1])
		lines = lines[2:]
	}
	placed := false
	for _, l := range lines {
		if slices.Contains(sh.flagFull, l) {
			if !placed {
				s.Lines = append(s.Lines, sh.check)
				placed = true
			}
			continue
		}
		s.Lines = append(s.Lines, l)
	}
	s.Fields = slices.Clone(full.Fields)
	for i, f := range s.Fields {
		if v, ok := sh.fields[f.Label]; ok {
			s.Fields[i].Value = v
		}
	}
	s.Assumptions = nil
	s.Notes = append(slices.Clone(full.Notes), assumedLine(sh.assumed))
	d := full
	s.Details = &d
	s.DetailsCommand = detailsCmd
	return s
}

// shortLogReply turns a log line's full reply into its default one when it
// has measurements (shortOf), and shows the which-jump hint once a week:
// a hint left out of the short reply is left out of the details too.
func (c *call) shortLogReply(tx Tx, full Reply, sh logBrief, no uint64) Reply {
	if !sh.needed(full) {
		return c.quietHint(tx, full, hintMeasures, measuresHintPrefix)
	}
	s := c.quietHint(tx, shortOf(full, sh, lineDetailsCommand(no)), hintMeasures, measuresHintPrefix)
	if !slices.ContainsFunc(s.Lines, func(l string) bool { return strings.HasPrefix(l, measuresHintPrefix) }) {
		d := *s.Details
		d.Lines = slices.DeleteFunc(slices.Clone(d.Lines), func(l string) bool { return strings.HasPrefix(l, measuresHintPrefix) })
		s.Details = &d
	}
	return s
}

// lineDetailsCommand is the read-only line that shows line #no's details.
func lineDetailsCommand(no uint64) string { return "line " + strconv.FormatUint(no, 10) + " more" }

// runLine shows a logged line again: its jumps, each measured jump's model
// margin and lowest part, the range flags, and with `more` everything the
// log reply's details hold. The model is recomputed with the profile as it
// is now.
func runLine(c *call) (Reply, error) {
	const example = "line 12"
	n, rest, ok := lineNumberArg(c.args)
	if !ok && len(c.args) == 1 {
		if v, err := strconv.ParseUint(c.args[0].Lower, 10, 64); err == nil && v > 0 {
			n, rest, ok = v, nil, true
		}
	}
	if !ok {
		return Reply{}, usageErr(example, "name the line by its number from history, e.g. line 12")
	}
	if len(rest) > 0 {
		return Reply{}, unknownWords(rest, example, "line takes one line number")
	}
	var r Reply
	err := c.view(func(tx Tx) error {
		team, loc, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		l, ath, err := c.findLineNo(tx, n, "show")
		if err != nil {
			return err
		}
		if l.AthleteID == 0 {
			return usageErr("history Kai", "line #%d is an import of several athletes; history NAME shows each athlete's jumps", n)
		}
		as, err := lineAttempts(tx, l)
		if err != nil {
			return err
		}
		if len(as) == 0 {
			return notFoundErr("history "+ath.Name, "line #%d has no jumps left", n)
		}
		r = lineReply(ath, team, n, as, loc)
		return nil
	})
	return r, err
}

// lineReply is line #n's reply from its stored attempts.
func lineReply(ath record.Athlete, team record.Team, n uint64, as []record.Attempt, loc *time.Location) Reply {
	imp := imperial(team)
	jumps := make([]loggedJump, len(as))
	for i, a := range as {
		jumps[i] = loggedJump{rec: a, model: modelMargin(a, ath, team), flags: attemptFlags(a, ath, team)}
	}
	ln := logLine{Meet: as[0].Meet, Note: as[len(as)-1].Note, When: logWhen{HasDate: true}}
	full, sh := logReply(ath, ln, n, jumps, nil, nil, as, nil, nil, imp)
	kind := "practice"
	if ln.Meet {
		kind = "meet"
	}
	full.Title = fmt.Sprintf("Line #%d for %s (%s, %s): %s", n, ath.Name, kind, as[0].Time.In(loc).Format("2006-01-02"), jumpPassText(as))
	full.Lines = slices.DeleteFunc(full.Lines, func(l string) bool { return strings.HasPrefix(l, measuresHintPrefix) })
	if !sh.needed(full) {
		return full
	}
	return shortOf(full, sh, lineDetailsCommand(n))
}
