package bot

import (
	"strconv"
	"strings"

	"github.com/lathmark-team/lathmark/internal/mechanics"
)

// videoTime is a time read off phone video: the frames counted, and the
// seconds they make.
type videoTime struct {
	frames  mechanics.Frames
	seconds float64
}

// foldFrames finds a time counted in video frames, "108 frames at 240fps"
// (also "108 frames at 240 fps", "108 frames @ 240fps", "108f at 240"),
// and replaces it with one token holding the seconds, so every command
// that accepts a time accepts frames. It returns the frames found (nil if
// none). A frame count with an impossible rate is refused with an example.
func foldFrames(ts []token, example string) ([]token, *videoTime, error) {
	for i := 1; i < len(ts); i++ {
		if !isFramesWord(ts[i].Lower) {
			continue
		}
		count, err := strconv.ParseFloat(strings.ReplaceAll(ts[i-1].Lower, ",", "."), 64)
		if err != nil {
			return nil, nil, usageErr(example, "%q frames: give the number of frames, e.g. 108 frames at 240fps", ts[i-1].Raw)
		}
		j := i + 1
		if j < len(ts) && (ts[j].Lower == "at" || ts[j].Lower == "@") {
			j++
		}
		if j >= len(ts) {
			return nil, nil, usageErr(example, "%s frames at what frame rate? e.g. %s frames at 240fps", ts[i-1].Raw, ts[i-1].Raw)
		}
		rate := strings.TrimSuffix(ts[j].Lower, "fps")
		end := j + 1
		if rate == ts[j].Lower && end < len(ts) && ts[end].Lower == "fps" {
			end++
		}
		fps, err := strconv.ParseFloat(strings.ReplaceAll(rate, ",", "."), 64)
		if err != nil {
			return nil, nil, usageErr(example, "%q is not a frame rate; e.g. %s frames at 240fps", ts[j].Raw, ts[i-1].Raw)
		}
		f := mechanics.Frames{Count: count, FPS: fps}
		sec, err := f.Seconds()
		if err != nil {
			return nil, nil, calcErr(err, example)
		}
		v := &videoTime{frames: f, seconds: sec}
		tok := token{Raw: strconv.FormatFloat(sec, 'f', -1, 64), Lower: strconv.FormatFloat(sec, 'f', -1, 64)}
		out := append(append(append([]token(nil), ts[:i-1]...), tok), ts[end:]...)
		return out, v, nil
	}
	return ts, nil, nil
}

func isFramesWord(w string) bool {
	return w == "frames" || w == "frame" || w == "f"
}

// timeSigma is the ± of a typed time: one frame (1/fps) when counted in
// frames, else the typical precision of a hand-timed flight (common
// practice: 10 ms, what a coach reads off a 100 fps clip or a contact mat).
func timeSigma(v *videoTime) float64 {
	if v == nil {
		return typedTimeSigmaS
	}
	r, err := v.frames.ResolutionS()
	if err != nil {
		return typedTimeSigmaS
	}
	return r
}

// typedTimeSigmaS is the ± given to a time typed in seconds (common
// practice).
const typedTimeSigmaS = 0.010
