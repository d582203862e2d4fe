package digest

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/gonum/stat"
)

// MinTrendPoints is how many weekly points a trend needs before it is read
// as rising, flat or falling.
const MinTrendPoints = 4

// Reading is the plain-language reading of a trend.
type Reading int

// Readings. NotEnoughData is the zero value: fewer than MinTrendPoints weeks
// carry a value.
const (
	NotEnoughData Reading = iota
	Flat
	Rising
	Falling
)

// String returns "not enough data", "flat", "rising" or "falling".
func (r Reading) String() string {
	switch r {
	case Flat:
		return "flat"
	case Rising:
		return "rising"
	case Falling:
		return "falling"
	default:
		return "not enough data"
	}
}

// TrendSEFactor is how many standard errors the slope must exceed to read
// as rising or falling.
const TrendSEFactor = 2

// TrendRule states the reading rule in one line, for a digest's legend.
const TrendRule = "trend: fitted weekly change of the best bar ± its standard error; rising or falling when |slope| > 2·SE, else flat; needs 4 or more weekly points"

// Trend is an ordinary least-squares line y = a + b·x through weekly values,
// x in weeks (0 = the oldest week of the trend window), y in centimetres.
//
// Reading rule: with fewer than MinTrendPoints (4) weekly points the reading
// is NotEnoughData. Otherwise the slope b is Rising (b > 0) or Falling (b < 0)
// when |b| > 2·SE(b), its standard error, and Flat when |b| ≤ 2·SE(b). A
// t-ratio above 2 is the usual rough cut for "the slope is more than noise"
// (common practice: about the 95 % level for many degrees of freedom; with
// four to eight points it is somewhat more lenient than a t-test at 5 %).
type Trend struct {
	Points          int     // weekly values the line rests on
	SlopeCMPerWeek  float64 // b, cm/week; meaningful when Points ≥ 2
	InterceptCM     float64 // a, cm at x = 0 (the oldest week); meaningful when Points ≥ 2
	StdErrCMPerWeek float64 // SE(b) = √(Σr²/(n−2) / Σ(x−x̄)²), cm/week; meaningful when Points ≥ 3
	Reading         Reading
}

// Slope writes the slope with its standard error, "+0.6 ± 0.4 cm/wk" (or
// in/wk), negatives with a leading minus sign (U+2212).
func (t Trend) Slope(imperial bool) string {
	b, se, unit := t.SlopeCMPerWeek, t.StdErrCMPerWeek, "cm/wk"
	if imperial {
		b, se, unit = b/100/MetresPerInch, se/100/MetresPerInch, "in/wk"
	}
	return signedOne(b) + " ± " + strconv.FormatFloat(se, 'f', 1, 64) + " " + unit
}

// signedOne writes v to one decimal with its sign, "+0.6", "−1.2", "+0.0".
func signedOne(v float64) string {
	s := strconv.FormatFloat(math.Abs(v), 'f', 1, 64)
	if v < 0 && s != "0.0" {
		return "−" + s
	}
	return "+" + s
}

// Text reads the trend in plain words, e.g. "rising +1.5 ± 0.4 cm/wk (6 weeks)"
// or "not enough data (3 weeks)".
func (t Trend) Text(imperial bool) string {
	if t.Reading == NotEnoughData {
		return fmt.Sprintf("not enough data (%d %s)", t.Points, plural(t.Points, "week", "weeks"))
	}
	return fmt.Sprintf("%s %s (%d weeks)", t.Reading, t.Slope(imperial), t.Points)
}

// errFewPoints reports a fit asked of fewer than two points.
var errFewPoints = errors.New("digest: a line needs at least two points with distinct x")

// line is a least-squares fit.
type line struct {
	intercept, slope float64
	stdErr           float64 // NaN below three points
}

// fitLine fits y = a + b·x by ordinary least squares with gonum's
// stat.LinearRegression and adds the slope's standard error
// SE(b) = √(s² / Sxx), s² = Σ(yᵢ − a − b·xᵢ)² / (n − 2), Sxx = Σ(xᵢ − x̄)²
// (any regression text, e.g. Draper and Smith, Applied Regression Analysis).
func fitLine(xs, ys []float64) (line, error) {
	n := len(xs)
	if n != len(ys) {
		return line{}, fmt.Errorf("digest: fit: %d x values but %d y values", n, len(ys))
	}
	if n < 2 || slices.Min(xs) == slices.Max(xs) {
		return line{}, errFewPoints
	}
	a, b := stat.LinearRegression(xs, ys, nil, false)
	l := line{intercept: a, slope: b, stdErr: math.NaN()}
	if n >= 3 {
		xm := stat.Mean(xs, nil)
		var ssr, sxx float64
		for i, x := range xs {
			r := ys[i] - (a + b*x)
			ssr += r * r
			sxx += (x - xm) * (x - xm)
		}
		l.stdErr = math.Sqrt(ssr / float64(n-2) / sxx)
	}
	return l, nil
}

// trendOf fits the weekly points and applies the reading rule of Trend.
func trendOf(xs, ys []float64) Trend {
	t := Trend{Points: len(xs)}
	l, err := fitLine(xs, ys)
	if err != nil {
		return t
	}
	t.SlopeCMPerWeek, t.InterceptCM = l.slope, l.intercept
	if !math.IsNaN(l.stdErr) {
		t.StdErrCMPerWeek = l.stdErr
	}
	if t.Points < MinTrendPoints {
		return t
	}
	switch {
	case math.Abs(l.slope) <= TrendSEFactor*l.stdErr:
		t.Reading = Flat
	case l.slope > 0:
		t.Reading = Rising
	default:
		t.Reading = Falling
	}
	return t
}

// median returns the middle value of vs (the mean of the two middle values
// for an even count); it sorts vs in place. It returns NaN for no values.
func median(vs []float64) float64 {
	n := len(vs)
	if n == 0 {
		return math.NaN()
	}
	slices.Sort(vs)
	if n%2 == 1 {
		return vs[n/2]
	}
	return (vs[n/2-1] + vs[n/2]) / 2
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}
