package bot

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/internal/units"
)

// The log line, before any athlete is looked up: pure parsing, no store.
//
//	log ATHLETE|me BAR ATTEMPTS [BAR ATTEMPTS]... [meet|practice]
//	    [by MARGIN] [approach MS] [takeoff D] [peak P] [vz MS] [note TEXT]
//
// ATTEMPTS is the trade's result notation: o cleared, x failed, - passed,
// written together (xxo) or apart (x x o), or as the words clear/made,
// miss/knock, pass. Measurements belong to the jump written just before
// them: after a bar's attempts they describe that bar's last jump, so given
// once at the end of the line they describe the line's last jump, the one
// the coach has just watched. meet/practice apply to the whole line; note
// takes the rest of the line and goes with the last jump.

// Plausible bar heights and other limits of one log line.
const (
	logMinBarM      = 0.50 // below any high-jump stand in use (common practice)
	logMaxBarM      = 2.60 // above the men's world record of 2.45 m (from memory)
	logMaxJumps     = 60
	logMaxTries     = 3    // attempts per height (World Athletics TR 26-27)
	logBarTolM      = 5e-4 // two bars within half a millimetre are the same height
	logMaxNoteRunes = 500
)

// jumpMeasures are the optional numbers of one jump, SI units; zero = not given.
type jumpMeasures struct {
	ApproachMS     float64
	TakeoffDistM   float64
	PeakM          float64
	VzMS           float64
	HasCoachMargin bool
	CoachMarginM   float64
}

func (m jumpMeasures) any() bool {
	return m.ApproachMS != 0 || m.TakeoffDistM != 0 || m.PeakM != 0 || m.VzMS != 0 || m.HasCoachMargin
}

// jumpSpec is one attempt as typed.
type jumpSpec struct {
	Outcome record.Outcome
	Meas    jumpMeasures
	Knock   string // the body part the coach saw touch the bar; "" not said
}

// barGroup is one bar height and the attempts typed after it.
type barGroup struct {
	BarM  float64
	Word  string   // the bar as typed
	Marks []string // the notation words as typed, for messages
	Jumps []jumpSpec
}

// logLine is a parsed log command.
type logLine struct {
	Athlete string // as typed: a name (may be several words), "me" or a mention
	Groups  []barGroup
	Meet    bool
	Short   bool // a short-approach session (take-off load counts)
	Note    string
	// Practice: the line said practice (a fix keeps the line's kind
	// unless it says meet or practice).
	Practice bool
	// Confirm: the line ends in confirm, storing it past the checks that
	// ask for it (a rule broken at a meet, an implausible height or peak).
	Confirm bool
	When    logWhen
}

// logWhen is when the session was, as typed (resolved against the clock and
// the team's zone by resolveWhen): nothing means now.
type logWhen struct {
	Yesterday bool
	HasDate   bool
	Y, M, D   int
	HasClock  bool
	Minute    int    // minutes after local midnight
	Typed     string // the words as typed, for messages
}

// jumpCount is the number of attempts in the line.
func (l logLine) jumpCount() int {
	n := 0
	for _, g := range l.Groups {
		n += len(g.Jumps)
	}
	return n
}

// logWordKind says what a keyword of the log line does.
type logWordKind int

const (
	logMeet logWordKind = iota + 1
	logPractice
	logNote
	logMargin
	logApproach
	logTakeoff
	logPeak
	logVz
	logShort
	logConfirm
	logYesterday
	logToday
	logOn
	logAt
)

// logKeyword recognises the option words of a log line.
func logKeyword(w string) (logWordKind, bool) {
	switch w {
	case "meet", "comp", "competition":
		return logMeet, true
	case "practice", "training", "prac":
		return logPractice, true
	case "note", "notes":
		return logNote, true
	case "by", "clearance":
		return logMargin, true
	case "approach", "app", "runup", "run-up":
		return logApproach, true
	case "takeoff", "take-off", "td":
		return logTakeoff, true
	case "peak":
		return logPeak, true
	case "vz", "v":
		return logVz, true
	case "short", "short-approach":
		return logShort, true
	case "confirm", "confirmed":
		return logConfirm, true
	case "yesterday":
		return logYesterday, true
	case "today":
		return logToday, true
	case "on":
		return logOn, true
	case "at":
		return logAt, true
	}
	return 0, false
}

// logVocabulary is every word a log line knows, for did-you-mean.
func logVocabulary() []string {
	return []string{"meet", "practice", "note", "by", "approach", "takeoff", "peak", "vz",
		"clear", "made", "miss", "knock", "pass", "short", "xo", "xxo", "xxx"}
}

// jumpMeasureSpec says how a measurement keyword's value is read and bounded.
// The bounds only catch typos and unit slips: they are well outside the
// published ranges for the flop (approach 6.5 to 8 m/s, take-off 0.9 to 1.3
// m from the bar, vz 3.9 to 4.7 m/s; Dapena's reports, from memory) and
// are common practice, not limits of what an athlete can do.
type jumpMeasureSpec struct {
	name   string
	lo, hi float64
	unit   string
	sample string
}

func jumpMeasureFor(k logWordKind) jumpMeasureSpec {
	switch k {
	case logMargin:
		return jumpMeasureSpec{"by", -0.5, 0.5, "m", "by 3cm"}
	case logApproach:
		return jumpMeasureSpec{"approach", 3, 11, "m/s", "approach 7.4"}
	case logTakeoff:
		return jumpMeasureSpec{"takeoff", 0.3, 3, "m", "takeoff 1.05"}
	case logPeak:
		return jumpMeasureSpec{"peak", 0.8, 3.2, "m", "peak 2.02"}
	default:
		return jumpMeasureSpec{"vz", 1, 6.5, "m/s", "vz 4.3"}
	}
}

// knockPart reads "knock PART" at ts[i]: the body part the coach saw bring
// the bar down. ok is false when ts[i] is not a knock word followed by a
// body part of the crossing model (head, shoulders, back, hips, thighs,
// calves, heels, hand; a singular such as "calf" or "heel" is accepted).
func knockPart(ts []token, i int) (string, bool) {
	switch ts[i].Lower {
	case "knock", "knocked", "hit", "touched":
	default:
		return "", false
	}
	if i+1 >= len(ts) {
		return "", false
	}
	w := ts[i+1].Lower
	switch w {
	case "calf":
		w = "calves"
	case "heel":
		w = "heels"
	case "hip":
		w = "hips"
	case "thigh":
		w = "thighs"
	case "shoulder":
		w = "shoulders"
	case "hands":
		w = "hand"
	}
	for _, p := range mechanics.BodyParts() {
		if string(p) == w {
			return w, true
		}
	}
	return "", false
}

// notationWord maps one typed word to outcomes. ok is false when the word is
// not notation at all.
func notationWord(w string) ([]record.Outcome, bool) {
	switch w {
	case "clear", "cleared", "made", "make", "over":
		return []record.Outcome{record.Cleared}, true
	case "miss", "missed", "fail", "failed", "knock", "knocked":
		return []record.Outcome{record.Failed}, true
	case "pass", "passed":
		return []record.Outcome{record.Passed}, true
	}
	return notationLetters(w)
}

// notationLetters reads a run of o, x and - (an en or em dash from a phone
// keyboard counts as -).
func notationLetters(w string) ([]record.Outcome, bool) {
	if w == "" {
		return nil, false
	}
	var out []record.Outcome
	for _, r := range w {
		switch r {
		case 'o':
			out = append(out, record.Cleared)
		case 'x':
			out = append(out, record.Failed)
		case '-', '–', '—':
			out = append(out, record.Passed)
		default:
			return nil, false
		}
		if len(out) > logMaxJumps {
			return out, true
		}
	}
	return out, true
}

// notationString writes outcomes in the trade's notation: "xxo".
func notationString(outs []record.Outcome) string {
	var b strings.Builder
	for _, o := range outs {
		b.WriteString(o.String())
	}
	return b.String()
}

// logBarLike reports whether a word is meant as a bar height: it starts with a
// digit or a decimal point.
func logBarLike(w string) bool {
	return w != "" && (w[0] >= '0' && w[0] <= '9' || w[0] == '.')
}

// barRangeText is the plausible bar range, in both unit systems.
func barRangeText() string {
	return fmt.Sprintf("%.2f–%.2f m (%s to %s)", logMinBarM, logMaxBarM, units.Bar(logMinBarM, true), units.Bar(logMaxBarM, true))
}

// parseBarWord reads a bar height, optionally with its notation glued on
// ("1.80xo"). ok is false when the word is not bar-like.
func parseBarWord(raw, lower, example string) (barM float64, glued []record.Outcome, ok bool, err error) {
	if strings.Trim(lower, "0ox-") == "" && strings.Contains(lower, "0") {
		// "1.70 0" or "1.75 x0": a zero typed for the letter o.
		return 0, nil, true, usageErr(example, "%q has a zero (0) where the notation needs the letter o (cleared); write %s", raw, strings.ReplaceAll(lower, "0", "o"))
	}
	if !logBarLike(lower) {
		return 0, nil, false, nil
	}
	m, perr := units.ParseLength(lower)
	if perr != nil {
		// A glued notation suffix: "1.80xo", "178cmo".
		cut := len(lower)
		for cut > 0 && strings.ContainsRune("ox-", rune(lower[cut-1])) {
			cut--
		}
		if cut > 0 && cut < len(lower) {
			if gm, gerr := units.ParseLength(lower[:cut]); gerr == nil {
				outs, _ := notationLetters(lower[cut:])
				m, glued, perr = gm, outs, nil
			}
		}
	}
	if perr != nil {
		if v, ferr := strconv.ParseFloat(strings.ReplaceAll(lower, ",", "."), 64); ferr == nil && !math.IsNaN(v) && !math.IsInf(v, 0) {
			return 0, nil, true, usageErr(example, "bar %q is outside the plausible %s. Type bars in metres (1.80), centimetres (180cm) or feet-inches (5-11).", raw, barRangeText())
		}
		return 0, nil, true, usageErr(example, "bar %q is not a height I can read. Type bars in metres (1.80), centimetres (180cm) or feet-inches (5-11).", raw)
	}
	if m < logMinBarM-logBarTolM || m > logMaxBarM+logBarTolM {
		return 0, nil, true, usageErr(example, "bar %q is %s, outside the plausible %s.", raw, units.Length(m, false), barRangeText())
	}
	return m, glued, true, nil
}

// logSplitInline splits "peak=2.02" or "by:3cm" into a known keyword and its
// value.
func logSplitInline(t token) (word, value string, inline bool) {
	if j := strings.IndexAny(t.Lower, "=:"); j > 0 && j < len(t.Lower)-1 {
		if _, known := logKeyword(t.Lower[:j]); known {
			return t.Lower[:j], t.Raw[j+1:], true
		}
	}
	return t.Lower, "", false
}

// logUnitWord reports a unit typed apart from its number: "3 cm".
func logUnitWord(w string) bool {
	switch w {
	case "m", "cm", "mm", "in", "m/s", "ms", "mps":
		return true
	}
	return false
}

// parseLogLine reads the words after "log". Every refusal is a *UserError
// that names the offending word and shows a correct line.
func parseLogLine(ts []token) (logLine, error) {
	var ln logLine
	example := "log Kai 1.95 o 2.00 xo 2.04 xxx"
	i := 0
	var name []string
	for ; i < len(ts); i++ {
		w, _, _ := logSplitInline(ts[i])
		_, isKey := logKeyword(w)
		_, isMark := notationWord(ts[i].Lower)
		if logBarLike(ts[i].Lower) || isKey || len(name) > 0 && isMark {
			break
		}
		name = append(name, ts[i].Raw)
	}
	if len(name) == 0 {
		return ln, usageErr("log me 1.80 o", "who jumped? Start with the athlete's name, or me: log me 1.80 o")
	}
	ln.Athlete = strings.Join(name, " ")
	example = "log " + ln.Athlete + " 1.80 xo"
	var (
		meetWord, practiceWord string
		cur                    = -1 // index of the group being filled
	)
	lastJump := func() *jumpSpec {
		if cur < 0 || len(ln.Groups[cur].Jumps) == 0 {
			return nil
		}
		g := &ln.Groups[cur]
		return &g.Jumps[len(g.Jumps)-1]
	}
	closeGroup := func() error {
		if cur < 0 {
			return nil
		}
		g := ln.Groups[cur]
		if len(g.Jumps) == 0 {
			return usageErr(example, "bar %s has no attempts after it. Write what happened there: o (cleared), x (failed) or - (passed), e.g. %s xo.", g.Word, g.Word)
		}
		return checkHeightMarks(g, ln.Athlete, example)
	}
	for ; i < len(ts); i++ {
		t := ts[i]
		word, value, inline := logSplitInline(t)
		if kind, ok := logKeyword(word); ok {
			switch kind {
			case logMeet:
				meetWord = t.Raw
				continue
			case logPractice:
				practiceWord = t.Raw
				continue
			case logShort:
				ln.Short = true
				continue
			case logConfirm:
				ln.Confirm = true
				continue
			case logYesterday, logToday, logOn, logAt:
				n, err := parseWhenWord(&ln.When, kind, ts, i, inline, value, example)
				if err != nil {
					return ln, err
				}
				i += n
				continue
			case logNote:
				note := joinRaw(ts[i+1:])
				if inline {
					note = strings.TrimSpace(value + " " + note)
				}
				if note == "" {
					return ln, usageErr(example+" note fast approach", "%q needs some text after it, e.g. note fast approach", t.Raw)
				}
				if len([]rune(note)) > logMaxNoteRunes {
					return ln, usageErr(example+" note fast approach", "the note is %d characters; keep it under %d", len([]rune(note)), logMaxNoteRunes)
				}
				if lastJump() == nil {
					return ln, usageErr(example+" note fast approach", "%q comes after the jumps it describes, e.g. %s note fast approach", t.Raw, example)
				}
				ln.Note = note
				i = len(ts)
				continue
			}
			spec := jumpMeasureFor(kind)
			if !inline {
				if i+1 >= len(ts) {
					return ln, usageErr(example+" "+spec.sample, "%q needs a value after it, e.g. %s", t.Raw, spec.sample)
				}
				i++
				value = ts[i].Raw
				if i+1 < len(ts) && logUnitWord(ts[i+1].Lower) && !strings.ContainsAny(strings.ToLower(value), "abcdefghijklmnopqrstuvwxyz'\"") {
					i++
					value += ts[i].Lower
				}
			}
			j := lastJump()
			if j == nil {
				return ln, usageErr(example+" "+spec.sample, "%q comes after the jump it measures, e.g. %s %s", t.Raw, example, spec.sample)
			}
			if err := setMeasure(&j.Meas, kind, spec, t.Raw, value, example); err != nil {
				return ln, err
			}
			continue
		}
		if part, ok := knockPart(ts, i); ok {
			if cur < 0 {
				return ln, usageErr(example+" knock calves", "%q needs a bar height before it, e.g. log %s 2.00 x knock calves", t.Raw, ln.Athlete)
			}
			g := &ln.Groups[cur]
			if j := lastJump(); j != nil && j.Outcome == record.Failed && j.Knock == "" {
				j.Knock = part // "2.00 x knock calves": the x was that knock
			} else {
				g.Marks = append(g.Marks, t.Raw)
				g.Jumps = append(g.Jumps, jumpSpec{Outcome: record.Failed, Knock: part})
				if len(g.Jumps) > logMaxTries {
					return ln, checkHeightMarks(*g, ln.Athlete, example)
				}
			}
			i++ // the body part word
			continue
		}
		if outs, ok := notationWord(t.Lower); ok {
			if cur < 0 {
				return ln, usageErr(example, "%q needs a bar height before it, e.g. %s", t.Raw, example)
			}
			g := &ln.Groups[cur]
			g.Marks = append(g.Marks, t.Raw)
			for _, o := range outs {
				g.Jumps = append(g.Jumps, jumpSpec{Outcome: o})
			}
			if len(g.Jumps) > logMaxTries {
				return ln, checkHeightMarks(*g, ln.Athlete, example)
			}
			continue
		}
		bar, glued, ok, err := parseBarWord(t.Raw, t.Lower, example)
		if err != nil {
			return ln, err
		}
		if ok {
			if err := closeGroup(); err != nil {
				return ln, err
			}
			if len(ln.Groups) >= logMaxJumps {
				return ln, usageErr(example, "that is more than %d bars in one line; split the session over several lines", logMaxJumps)
			}
			g := barGroup{BarM: bar, Word: t.Raw}
			if len(glued) > 0 {
				g.Marks = append(g.Marks, notationString(glued))
				for _, o := range glued {
					g.Jumps = append(g.Jumps, jumpSpec{Outcome: o})
				}
			}
			ln.Groups = append(ln.Groups, g)
			cur = len(ln.Groups) - 1
			if len(g.Jumps) > logMaxTries {
				return ln, checkHeightMarks(g, ln.Athlete, example)
			}
			continue
		}
		if s, ok := nearest(t.Lower, logVocabulary()); ok {
			return ln, usageErr(example, "I don't understand %q in a log line. Did you mean %q?", t.Raw, s)
		}
		return ln, usageErr(example, "I don't understand %q in a log line. After the name come bars and attempts (o cleared, x failed, - passed), then options: meet, by 3cm, approach, takeoff, peak, vz, note.", t.Raw)
	}
	if len(ln.Groups) == 0 {
		return ln, usageErr(example, "what did %s jump? Give a bar and the attempts, e.g. %s", ln.Athlete, example)
	}
	if err := closeGroup(); err != nil {
		return ln, err
	}
	if meetWord != "" && practiceWord != "" {
		return ln, usageErr(example+" meet", "the line says both %q and %q; a line is either a meet or practice", meetWord, practiceWord)
	}
	ln.Meet = meetWord != ""
	ln.Practice = practiceWord != ""
	if n := ln.jumpCount(); n > logMaxJumps {
		return ln, usageErr(example, "that is %d jumps in one line; split the session over lines of at most %d", n, logMaxJumps)
	}
	if ln.Meet {
		for k := 1; k < len(ln.Groups); k++ {
			prev, g := ln.Groups[k-1], ln.Groups[k]
			switch {
			case math.Abs(g.BarM-prev.BarM) < logBarTolM:
				merged := append(jumpOutcomes(prev), jumpOutcomes(g)...)
				if !validSeries(merged) {
					merged = jumpOutcomes(prev) // the two cannot be one height's series; offer the first
				}
				return ln, usageErr(fmt.Sprintf("log %s %s %s meet", ln.Athlete, strconv.FormatFloat(prev.BarM, 'f', 2, 64), notationString(merged)),
					"bar %s appears twice in this meet line; write all attempts at one height together after it", g.Word)
			case g.BarM < prev.BarM:
				return ln, usageErr(fmt.Sprintf("log %s %s %s %s %s meet", ln.Athlete, g.Word, notationString(jumpOutcomes(g)), prev.Word, notationString(jumpOutcomes(prev))),
					"bar %s comes after %s in this meet line, but in a competition the bar only goes up; write the heights in the order they were jumped", g.Word, prev.Word)
			}
		}
	}
	return ln, nil
}

func jumpOutcomes(g barGroup) []record.Outcome {
	out := make([]record.Outcome, len(g.Jumps))
	for i, j := range g.Jumps {
		out[i] = j.Outcome
	}
	return out
}

// checkHeightMarks enforces the notation at one height: at most three attempts,
// and nothing after a clearance (o) or a pass (-) at that height.
func checkHeightMarks(g barGroup, athlete, example string) error {
	outs := jumpOutcomes(g)
	typed := strings.Join(g.Marks, " ")
	for k, o := range outs {
		if k == len(outs)-1 {
			break
		}
		switch o {
		case record.Cleared:
			return usageErr(example, "%q at %s: after o (cleared) nothing more is jumped at that height. Write the attempts in the order they happened, e.g. xo (missed, then cleared).", typed, g.Word)
		case record.Passed:
			return usageErr(example, "%q at %s: after - (passed) nothing more is jumped at that height. A miss then a pass is x-.", typed, g.Word)
		}
	}
	if len(outs) > logMaxTries {
		bar := strconv.FormatFloat(g.BarM, 'f', 2, 64)
		return usageErr(fmt.Sprintf("log %s %s xxx %s o", athlete, bar, bar), "%q at %s is %d attempts; one height takes at most three (xxx). In practice, give the height again for more tries.", typed, g.Word, len(outs))
	}
	return nil
}

// setMeasure reads a measurement value into m, refusing values outside the
// plausible range or given twice for one jump.
func setMeasure(m *jumpMeasures, kind logWordKind, spec jumpMeasureSpec, keyRaw, value, example string) error {
	var (
		v   float64
		err error
	)
	switch kind {
	case logMargin:
		v, err = units.ParseSignedLength(value)
	case logApproach, logVz:
		v, err = units.ParseSpeed(value)
	default:
		v, err = units.ParseLength(value)
	}
	ex := example + " " + spec.sample
	if err != nil {
		reason := "not a number"
		if ue, ok := err.(*units.Error); ok {
			reason = ue.Reason
		}
		return usageErr(ex, "%s %s: %s", keyRaw, value, reason)
	}
	if v < spec.lo || v > spec.hi {
		return usageErr(ex, "%s %s is outside the plausible %g to %g %s", keyRaw, value, spec.lo, spec.hi, spec.unit)
	}
	twice := func(given bool) error {
		if given {
			return usageErr(ex, "%q is given twice for the same jump; put each measurement after its own jump", keyRaw)
		}
		return nil
	}
	switch kind {
	case logMargin:
		if err := twice(m.HasCoachMargin); err != nil {
			return err
		}
		m.HasCoachMargin, m.CoachMarginM = true, v
	case logApproach:
		if err := twice(m.ApproachMS != 0); err != nil {
			return err
		}
		m.ApproachMS = v
	case logTakeoff:
		if err := twice(m.TakeoffDistM != 0); err != nil {
			return err
		}
		m.TakeoffDistM = v
	case logPeak:
		if err := twice(m.PeakM != 0); err != nil {
			return err
		}
		m.PeakM = v
	case logVz:
		if err := twice(m.VzMS != 0); err != nil {
			return err
		}
		m.VzMS = v
	}
	return nil
}

// validSeries reports whether outcomes can be one height's attempts: at
// most three, and nothing after a clearance or a pass.
func validSeries(outs []record.Outcome) bool {
	if len(outs) > logMaxTries {
		return false
	}
	for k, o := range outs {
		if k < len(outs)-1 && o != record.Failed {
			return false
		}
	}
	return true
}
