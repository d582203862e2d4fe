// Package demo invents the squad the terminal shows with --demo: the
// Harbour Lane Athletics Club, its athletes and eight weeks of practice and
// meet logs up to a given day. Everything here is made up for the demo; none
// of it is a measurement and no test uses it as a check value.
//
// The squad is produced as ordinary command lines with the times they were
// "typed", so seeding runs through the same engine, parser and store as a
// real coach would.
package demo

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"time"
)

// Line is one command typed at a given time.
type Line struct {
	Time time.Time
	Text string
}

// athlete is an invented profile and how the invented season goes for them.
type athlete struct {
	name, sex, leg       string
	statureM, massKg, pb float64
	born                 int
	group                string
	private              bool
	consent              bool    // a guardian's consent is on file (a minor)
	startM, gainMPerWeek float64 // practice bar at week 0 and weekly progress
	skipWeeks            []int   // weeks with no jumps (injury, exams)
}

// squad is the invented Harbour Lane squad.
var squad = []athlete{
	{name: "Mira", sex: "f", leg: "left", statureM: 1.78, massKg: 63, pb: 1.81, born: 2001, group: "seniors", startM: 1.66, gainMPerWeek: 0.012},
	{name: "Kai", sex: "m", leg: "left", statureM: 1.86, massKg: 74, pb: 2.01, born: 1999, group: "seniors", startM: 1.88, gainMPerWeek: 0.008},
	{name: "Cole", sex: "m", leg: "right", statureM: 1.854, massKg: 71, pb: 1.95, born: 2003, group: "seniors", startM: 1.84, gainMPerWeek: 0.0},
	{name: "Noor", sex: "f", leg: "right", statureM: 1.74, massKg: 58, pb: 1.72, born: 2004, group: "seniors", startM: 1.62, gainMPerWeek: 0.006, skipWeeks: []int{7}},
	{name: "Tomas", sex: "m", leg: "left", statureM: 1.91, massKg: 80, pb: 2.05, born: 1997, group: "seniors", startM: 1.98, gainMPerWeek: -0.006, skipWeeks: []int{2, 3}},
	{name: "Ines", sex: "f", leg: "left", statureM: 1.69, massKg: 54, pb: 1.64, born: 2011, group: "juniors", private: true, startM: 1.50, gainMPerWeek: 0.015},
	{name: "Ren", sex: "m", leg: "right", statureM: 1.80, massKg: 66, pb: 1.85, born: 2010, group: "juniors", consent: true, startM: 1.70, gainMPerWeek: 0.01},
}

// Weeks is how many weeks of invented logs the demo carries.
const Weeks = 8

// Script returns the demo as command lines, oldest first, ending before
// now. Sessions fall on Tuesdays and Thursdays at 17:30 in loc; every
// fourth Saturday is a meet. The same now gives the same script.
func Script(now time.Time, loc *time.Location) []Line {
	rng := rand.New(rand.NewPCG(2026, 49))
	start := mondayOf(now.In(loc)).AddDate(0, 0, -7*Weeks)
	var out []Line
	at := start.Add(-24 * time.Hour)
	add := func(text string) {
		at = at.Add(time.Second)
		out = append(out, Line{Time: at, Text: text})
	}
	add("team name Harbour Lane Athletics Club")
	add("team tz " + loc.String())
	for _, a := range squad {
		line := fmt.Sprintf("athlete add %s height %.3f mass %.0f sex %s leg %s pb %.2f born %d group %s", a.name, a.statureM, a.massKg, a.sex, a.leg, a.pb, a.born, a.group)
		if a.private {
			line += " private yes"
		}
		if a.consent {
			line += " consent yes"
		}
		add(line)
	}
	for w := 0; w <= Weeks; w++ {
		monday := start.AddDate(0, 0, 7*w)
		for _, day := range []int{1, 3, 5} { // Tuesday, Thursday, Saturday
			meet := day == 5
			if meet && w%4 != 3 {
				continue
			}
			t0 := time.Date(monday.Year(), monday.Month(), monday.Day()+day, 17, 30, 0, 0, loc)
			if meet {
				t0 = t0.Add(-5 * time.Hour)
			}
			if !t0.Before(now) {
				continue
			}
			for i, a := range squad {
				if contains(a.skipWeeks, w) {
					continue
				}
				at = t0.Add(time.Duration(i) * 7 * time.Minute)
				out = append(out, Line{Time: at, Text: session(rng, a, w, meet)})
			}
		}
	}
	return out
}

// session invents one athlete's line for a session: a ladder of bars in
// 3 cm steps (meets) or 5 cm steps (practice), ending at three misses or
// after five heights, with a measured take-off on the last clearance.
func session(rng *rand.Rand, a athlete, week int, meet bool) string {
	level := a.startM + a.gainMPerWeek*float64(week) + rng.NormFloat64()*0.015
	step := 0.05
	bar := roundCM(level - 0.12)
	if meet {
		step, bar = 0.03, roundCM(level-0.09)
	}
	var parts []string
	parts = append(parts, "log", a.name)
	var (
		lastClear float64
		clearAt   int // index in parts just after the last cleared height
	)
	for h := 0; h < 5; h++ {
		p := 1 / (1 + math.Exp((bar-level)/0.025)) // chance of a clearance
		notation := ""
		for try := 0; try < 3; try++ {
			if rng.Float64() < p {
				notation += "o"
				break
			}
			notation += "x"
		}
		parts = append(parts, fmt.Sprintf("%.2f", bar), notation)
		if strings.HasSuffix(notation, "o") {
			lastClear, clearAt = bar, len(parts)
		} else {
			break
		}
		bar = roundCM(bar + step)
	}
	if meet {
		parts = append(parts, "meet")
	}
	if lastClear > 0 {
		// The vertical take-off velocity that lifts a take-off c.m. of
		// 0.70 × stature to the athlete's level of the day: vz = √(2g·rise).
		vz := math.Sqrt(2*9.81*(level+0.02-0.70*a.statureM)) + rng.NormFloat64()*0.06
		marginCM := max(1, math.Round((level-lastClear)*100+rng.NormFloat64()*2)) // a clearance: by at least 1 cm
		// Measurements go with the jump written just before them: the
		// last clearance, the one filmed.
		m := fmt.Sprintf("by %.0fcm vz %.2f takeoff %.2f", marginCM, vz, 0.9+rng.Float64()*0.4)
		parts = append(parts[:clearAt], append([]string{m}, parts[clearAt:]...)...)
	}
	return strings.Join(parts, " ")
}

func roundCM(m float64) float64 { return math.Round(m*100) / 100 }

func mondayOf(t time.Time) time.Time {
	d := (int(t.Weekday()) + 6) % 7
	y, m, day := t.Date()
	return time.Date(y, m, day-d, 0, 0, 0, 0, t.Location())
}

func contains(xs []int, x int) bool {
	for _, v := range xs {
		if v == x {
			return true
		}
	}
	return false
}
