package mechanics

import (
	"fmt"
	"math"
	"strings"
)

// Quantity names a value the published-range table covers.
type Quantity string

// Quantities of the range table. Units are SI as in the rest of the
// package (m, m/s, s, degrees); H0Fraction is h0/stature, dimensionless.
const (
	QVz            Quantity = "vz"                    // take-off vertical c.m. velocity, m/s
	QH0Fraction    Quantity = "h0/stature"            // take-off c.m. height over stature
	QTakeoffDist   Quantity = "take-off distance"     // take-off foot to bar plane, m
	QHorizSpeed    Quantity = "horizontal speed"      // total horizontal c.m. speed at take-off, m/s
	QAcrossSpeed   Quantity = "speed across the bar"  // its component across the bar, m/s
	QAngleToBar    Quantity = "angle to the bar"      // horizontal velocity vs the bar, degrees
	QFlightAngle   Quantity = "flight angle"          // c.m. path above the horizontal at take-off, degrees
	QH3            Quantity = "H3"                    // peak c.m. height minus bar, m
	QApproachSpeed Quantity = "approach speed"        // run-up speed before take-off, m/s
	QContactTime   Quantity = "contact time"          // take-off foot contact, s
	QJumpTestTime  Quantity = "jump-test flight time" // countermovement jump, s
	QClearHeight   Quantity = "height cleared"        // bar the c.m. would clear or peak-based best bar, m
	QArch          Quantity = "arch"                  // the arc model's whole-body bend over the bar, degrees
)

// Level is the standard of the athletes a range was measured in.
type Level int

// Levels. Elite is national-team and championship finalists; Developing
// is club and school jumpers.
const (
	Elite Level = iota
	Developing
)

// String returns "elite" or "developing".
func (l Level) String() string {
	if l == Developing {
		return "developing"
	}
	return "elite"
}

// PublishedRange is one row of the range table: Lo..Hi of a quantity in
// athletes of one sex (SexUnknown: both) and level, with its source.
type PublishedRange struct {
	Quantity Quantity
	Sex      Sex
	Level    Level
	Lo, Hi   float64
	Unit     string // "m/s", "m", "s", "°" or "" (a fraction)
	Source   string // author and year, "from memory", "derived" or "common practice"
}

// Mid returns the middle of the range, (Lo + Hi)/2.
func (r PublishedRange) Mid() float64 { return (r.Lo + r.Hi) / 2 }

// Sigma returns the standard deviation of a value spread evenly over the
// range, (Hi − Lo)/√12: the spread an assumed value taken from this range
// carries into the ± (a uniform distribution; GUM, JCGM 100:2008 §4.3.7).
func (r PublishedRange) Sigma() float64 { return (r.Hi - r.Lo) / math.Sqrt(12) }

// Contains reports whether v lies in [Lo, Hi].
func (r PublishedRange) Contains(v float64) bool { return v >= r.Lo && v <= r.Hi }

// rangeTable is the one table every calculation checks. Values marked
// "from memory" are recalled figures from Dapena's published analyses of
// elite flop jumpers (Dapena 1980, Med Sci Sports Exerc 12:37-44, and his
// later championship reports) and are leads, not measurements copied here;
// "derived" rows follow from other rows by the formula named.
// It is built by a function so that no caller can change it.
func rangeTable() []PublishedRange {
	return []PublishedRange{
		{QVz, Male, Elite, 4.3, 4.7, "m/s", "Dapena's elite-men reports (from memory)"},
		{QVz, Female, Elite, 3.9, 4.3, "m/s", "Dapena's elite-women reports (from memory)"},
		{QVz, SexUnknown, Developing, 3.0, 4.7, "m/s", "club jumpers clearing 1.40-2.00 m by vz²/2g (derived)"},
		{QH0Fraction, SexUnknown, Elite, 0.66, 0.74, "", "H1 about 0.70 × stature, Dapena (from memory)"},
		{QH0Fraction, SexUnknown, Developing, 0.62, 0.74, "", "lower take-off posture of novices (common practice)"},
		{QTakeoffDist, SexUnknown, Elite, 0.9, 1.3, "m", "Dapena's reports (from memory)"},
		{QTakeoffDist, SexUnknown, Developing, 0.6, 1.3, "m", "club jumpers take off closer in (common practice)"},
		{QHorizSpeed, Male, Elite, 3.5, 4.5, "m/s", "Dapena's reports, end of take-off (from memory)"},
		{QHorizSpeed, Female, Elite, 3.0, 4.0, "m/s", "Dapena's reports, end of take-off (from memory)"},
		{QHorizSpeed, SexUnknown, Developing, 2.5, 4.5, "m/s", "slower run-ups (common practice)"},
		{QAngleToBar, SexUnknown, Elite, 30, 45, "°", "final run-up direction and c.m. velocity vs the bar, Dapena's run-up analyses (from memory)"},
		{QAngleToBar, SexUnknown, Developing, 25, 55, "°", "wider spread in club jumpers (common practice)"},
		{QAcrossSpeed, Male, Elite, 2.2, 2.6, "m/s", "g·D/vz for D 1.0-1.2 m, vz 4.4-4.6 m/s (derived)"},
		{QAcrossSpeed, Female, Elite, 2.0, 2.6, "m/s", "g·D/vz for D 0.9-1.2 m, vz 3.9-4.3 m/s (derived)"},
		{QAcrossSpeed, SexUnknown, Developing, 1.5, 2.8, "m/s", "g·D/vz for D 0.6-1.3 m, vz 3.0-4.7 m/s, and speed·sin(angle) (derived)"},
		{QFlightAngle, SexUnknown, Elite, 40, 48, "°", "Dapena 1980, Med Sci Sports Exerc 12:37-44"},
		{QFlightAngle, SexUnknown, Developing, 35, 55, "°", "wider spread in club jumpers (common practice)"},
		{QH3, SexUnknown, Elite, -0.05, 0.10, "m", "peak level with or just above the bar, Dapena 1980; 0 to +0.10 m in his reports (from memory)"},
		{QH3, SexUnknown, Developing, -0.05, 0.20, "m", "more height wasted above the bar (common practice)"},
		{QApproachSpeed, Male, Elite, 7.5, 8.0, "m/s", "Dapena's reports (from memory)"},
		{QApproachSpeed, Female, Elite, 6.5, 7.0, "m/s", "Dapena's reports (from memory)"},
		{QApproachSpeed, SexUnknown, Developing, 5.0, 8.0, "m/s", "shorter, slower run-ups (common practice)"},
		{QContactTime, SexUnknown, Elite, 0.14, 0.20, "s", "flop take-off contact (from memory)"},
		{QContactTime, SexUnknown, Developing, 0.14, 0.26, "s", "longer contacts of slower jumpers (common practice)"},
		{QJumpTestTime, SexUnknown, Elite, 0.55, 0.80, "s", "countermovement jumps of 0.37-0.78 m by t = √(8h/g), Bosco et al. 1983 (heights from memory)"},
		{QJumpTestTime, SexUnknown, Developing, 0.35, 0.80, "s", "jumps of 0.15-0.78 m (common practice)"},
		{QArch, SexUnknown, Elite, 60, 120, "°", "whole-body bend of a layout over the bar (common practice)"},
		{QClearHeight, Male, Elite, 1.90, WorldRecordMenM, "m", "men's world record 2.45 m (from memory)"},
		{QClearHeight, Female, Elite, 1.70, WorldRecordWomenM, "m", "women's world record 2.10 m since 2024 (from memory)"},
		{QClearHeight, SexUnknown, Developing, 1.00, WorldRecordMenM, "m", "up to the men's world record 2.45 m (from memory)"},
	}
}

// PublishedRanges returns a copy of the range table, one row per quantity,
// sex and level, each with its source.
func PublishedRanges() []PublishedRange {
	return rangeTable()
}

// RangeFor returns the row for a quantity, sex and level: the sex's own
// row when there is one, else the row for both sexes; for SexUnknown, the
// union of the male and female rows. ok is false when the table has no
// row for that quantity and level.
func RangeFor(q Quantity, sex Sex, level Level) (PublishedRange, bool) {
	var both, male, female PublishedRange
	var hasBoth, hasMale, hasFemale bool
	for _, r := range rangeTable() {
		if r.Quantity != q || r.Level != level {
			continue
		}
		switch r.Sex {
		case SexUnknown:
			both, hasBoth = r, true
		case Male:
			male, hasMale = r, true
		case Female:
			female, hasFemale = r, true
		}
	}
	switch {
	case sex == Male && hasMale:
		return male, true
	case sex == Female && hasFemale:
		return female, true
	case hasBoth:
		return both, true
	case hasMale && hasFemale:
		u := male
		u.Sex, u.Lo, u.Hi = SexUnknown, math.Min(male.Lo, female.Lo), math.Max(male.Hi, female.Hi)
		u.Source = male.Source + "; " + female.Source
		return u, true
	}
	return PublishedRange{}, false
}

// RangeFlag is the verdict of CheckRange on a value outside every level's
// range: the row it is compared with and one short line for the reply.
type RangeFlag struct {
	Quantity Quantity
	Value    float64
	Range    PublishedRange // the elite row when above, the developing row when below
	Above    bool
	Line     string // e.g. "vz 6.50 m/s is far above the 4.3–4.7 m/s measured in elite men: check the number"
}

// CheckRange compares v with the published ranges of q for sex: a value
// inside the elite or the developing range passes (ok false); a value
// above both is compared with the elite row, one below both with the
// developing row. "far" is added when v is more than one range width
// outside. Impossible values are refused elsewhere (Validate, Margin);
// this only flags the implausible.
func CheckRange(q Quantity, v float64, sex Sex) (RangeFlag, bool) {
	el, okE := RangeFor(q, sex, Elite)
	dv, okD := RangeFor(q, sex, Developing)
	if !okE && !okD {
		return RangeFlag{}, false
	}
	if (okE && el.Contains(v)) || (okD && dv.Contains(v)) {
		return RangeFlag{}, false
	}
	hi, lo := el, el
	if okD && (!okE || dv.Hi > el.Hi) {
		hi = dv
	}
	if okD && (!okE || dv.Lo < el.Lo) {
		lo = dv
	}
	f := RangeFlag{Quantity: q, Value: v, Above: v > hi.Hi}
	f.Range = lo
	out := lo.Lo - v
	if f.Above {
		f.Range, out = el, v-hi.Hi
		if !okE {
			f.Range = hi
		}
	}
	far := ""
	if out > f.Range.Hi-f.Range.Lo {
		far = "far "
	}
	dir := "below"
	if f.Above {
		dir = "above"
	}
	seen := "measured in"
	if strings.Contains(f.Range.Source, "common practice") {
		seen = "usual in" // a trade figure, not a measurement
	}
	f.Line = fmt.Sprintf("%s %s is %s%s the %s %s %s: check the number",
		q, formatRangeValue(v, f.Range.Unit), far, dir, formatRangeSpan(f.Range), seen, rangeWho(f.Range))
	return f, true
}

// rangeWho names the athletes of a row: "elite men", "developing jumpers".
func rangeWho(r PublishedRange) string {
	who := "jumpers"
	switch r.Sex {
	case Male:
		who = "men"
	case Female:
		who = "women"
	}
	return r.Level.String() + " " + who
}

// formatRangeSpan prints "4.3–4.7 m/s", "40–48°", "0.66–0.74 of stature".
func formatRangeSpan(r PublishedRange) string {
	lo, hi := trimNum(r.Lo), trimNum(r.Hi)
	switch r.Unit {
	case "°":
		return lo + "–" + hi + "°"
	case "":
		return lo + "–" + hi + " of stature"
	}
	return lo + "–" + hi + " " + r.Unit
}

func formatRangeValue(v float64, unit string) string {
	switch unit {
	case "°":
		return fmt.Sprintf("%.0f°", v)
	case "":
		return fmt.Sprintf("%.2f", v)
	case "s":
		return fmt.Sprintf("%.2f s", v)
	}
	return fmt.Sprintf("%.2f %s", v, unit)
}

// trimNum prints a table bound with at most two decimals and no trailing
// zeros: 4.3, 0.66, 40, -0.05.
func trimNum(v float64) string {
	s := fmt.Sprintf("%.2f", v)
	for s[len(s)-1] == '0' {
		s = s[:len(s)-1]
	}
	if s[len(s)-1] == '.' {
		s = s[:len(s)-1]
	}
	return s
}
