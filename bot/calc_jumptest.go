package bot

import (
	"fmt"

	"github.com/lathmark-team/lathmark/internal/mechanics"
	"github.com/lathmark-team/lathmark/internal/units"
)

// runJumpTestCmd is `jump test T` (or `jump test time T`, or `jump test 30
// frames at 120fps`).
func runJumpTestCmd(c *call) (Reply, error) {
	const ex = "jump test 0.60"
	args, video, err := foldFrames(c.args, "jump test 72 frames at 120fps")
	if err != nil {
		return Reply{}, err
	}
	o, err := parseOptions(args, []optionSpec{{Key: "time", Aliases: []string{"t"}, Kind: kindSeconds}}, ex)
	if err != nil {
		return Reply{}, err
	}
	t, ok := o.num("time")
	switch {
	case ok && len(o.rest) > 0, len(o.rest) > 1:
		return Reply{}, unknownWords(o.rest[len(o.rest)-1:], ex, "give one flight time in seconds, or frames: jump test 72 frames at 120fps")
	case !ok && len(o.rest) == 1:
		if t, err = units.ParseSeconds(o.rest[0].Raw); err != nil {
			return Reply{}, usageErr(ex, "%q is not a flight time; give seconds, e.g. jump test 0.60 (or 600ms, or 72 frames at 120fps)", o.rest[0].Raw)
		}
	case !ok:
		return Reply{}, usageErr(ex, "give the flight time in seconds, e.g. jump test 0.60 (or 72 frames at 120fps)")
	}
	return jumpTest(c, t, video, "jump test", ex)
}

// bentKneeInflationM is how much landing with bent knees inflated the
// flight-time height in one published comparison, about 2.5 cm (as given in
// the project's shared reference notes on Bosco et al. 1983).
const bentKneeInflationM = 0.025

// jumpTest answers a jump-test flight time with the height h = g·t²/8
// (Bosco, Luhtanen and Komi, 1983) and the take-off speed g·t/2. The ± of
// the height is first order, σh = g·t·σt/4, with σt one video frame or the
// 10 ms of a hand-read time.
func jumpTest(c *call, tS float64, video *videoTime, key, ex string) (Reply, error) {
	if tS < minJumpTestS || tS > maxJumpTestS {
		return Reply{}, usageErr(ex, "%s s is not a jump-test flight time; give seconds, e.g. %s 0.60 (or 600ms)", calcNum(tS), key)
	}
	env, err := c.loadCalc("", nil)
	if err != nil {
		return Reply{}, err
	}
	h, err := mechanics.JumpTestHeight(tS, env.gMS2)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	vz, err := mechanics.JumpTestVz(tS, env.gMS2)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	imp := env.imp
	sigT := timeSigma(video)
	sigH := env.gMS2 * tS * sigT / 4
	jump := fmt.Sprintf("%.1f cm", h*100)
	if imp {
		jump = fmt.Sprintf("%.1f in", h/units.MetresPerInch)
	}
	timing := fmt.Sprintf("%.3f s", tS)
	if video != nil {
		timing = video.frames.String()
	}
	full := Reply{Title: fmt.Sprintf("Jump test: %s from %s in the air", jump, timing)}
	full.Fields = []Field{
		{"Jump height", fmt.Sprintf("%s ± %s = g·t²/8 (Bosco et al. 1983)", jump, units.SmallAbs(sigH, imp))},
		{"Take-off speed", calcSpeed(vz) + " = g·t/2"},
		{"Timing ±", fmt.Sprintf("%s (%s)", fmtMS(sigT), timingSource(video))},
	}
	g, err := env.gravityField(0)
	if err != nil {
		return Reply{}, calcErr(err, ex)
	}
	full.Fields = append(full.Fields, g)
	var flags []rangeNote
	if f, bad := mechanics.CheckRange(mechanics.QJumpTestTime, tS, mechanics.SexUnknown); bad {
		flags = append(flags, rangeNoteOf(f))
	}
	full.Lines = append(full.Lines, fullFlags(flags)...)
	full.Lines = append(full.Lines,
		"Valid only for jump tests that take off and land in the same posture (e.g. countermovement jumps on a mat); not for a high jump, whose landing is far below the take-off.",
		fmt.Sprintf("Landing with bent knees or hips lengthens the flight and inflates the height (by about %s in one published comparison).", units.SmallAbs(bentKneeInflationM, imp)))
	full.Assumptions = []string{"the c.m. lands at its take-off height", env.gravityAssumption()}

	s := calcShort{verdict: fmt.Sprintf("Jump test: %s ± %s", shortCM(h, imp), shortSigma(sigH, imp))}
	s.body = append(s.body,
		shortLine{fmt.Sprintf("From %s in the air; take-off %s; timing ± %s", timing, calcSpeed(vz), fmtMS(sigT)), 3})
	if l := checkLine(flags); l != "" {
		s.body = append(s.body, shortLine{l, 0})
	}
	s.body = append(s.body, shortLine{"Jump tests only: not a high jump; bent-knee landings inflate it.", 2})
	s.assumed = []string{"landing at take-off height"}
	return s.reply(full), nil
}

// timingSource says where a time's ± came from.
func timingSource(v *videoTime) string {
	if v == nil {
		return "a hand-read time, common practice"
	}
	return fmt.Sprintf("one frame at %s fps", calcNum(v.frames.FPS))
}
