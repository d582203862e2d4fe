package series

import "testing"

// Summarize's figures for the tie rules, counted by hand from the rule
// text (World Athletics TR 26.8; rule numbers from memory): jumps at the
// best height (26.8.1) and failures up to and including it (26.8.2); a
// pass is not a jump; failures above the best do not count for 26.8.2;
// the valid attempts before a breach are the ones counted.
func TestSummarizeByHand(t *testing.T) {
	cases := []struct {
		series              string
		bestCM, atBest, toB int
		fails, jumps        int
		remaining           int
		out, valid          bool
	}{
		{"1.70 xo 1.75 x- 1.78 xo", 178, 2, 3, 3, 5, 3, false, true},
		{"1.70 xo 1.75 x- 1.78 xxo", 170, 2, 1, 4, 5, 0, true, false}, // x, x- and xx are three in a row (TR 26.2): the o is refused
		{"1.70 o 1.75 xo 1.78 xxx", 175, 2, 1, 4, 6, 0, true, true},
		{"1.70 xo 1.75 xo 1.78 xx-", 175, 2, 2, 4, 6, 1, false, true},
		{"1.65 xxx 1.70 o", 0, 0, 0, 3, 3, 0, true, false}, // the 1.70 o breaks TR 26.2 and is not counted
		{"1.70 -", 0, 0, 0, 0, 0, 3, false, true},
	}
	for _, c := range cases {
		s := Summarize(seq(t, c.series))
		if mm(s.BestM) != int64(c.bestCM*10) || s.AttemptsAtBest != c.atBest || s.FailuresToBest != c.toB ||
			s.Failures != c.fails || s.Jumps != c.jumps || s.Remaining != c.remaining || s.Out != c.out || s.Verdict.Valid() != c.valid {
			t.Errorf("%q: got %+v", c.series, s)
		}
	}
}
