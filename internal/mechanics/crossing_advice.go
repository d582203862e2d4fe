package mechanics

import (
	"fmt"
	"math"
)

// KickAdvice is what the sweep suggests for the timing of the leg lift.
type KickAdvice struct {
	Found bool    // some leg-lift time clears every part
	KickS float64 // the clearing time nearest the one given
	// ShiftS is KickS minus the kick used (negative: lift earlier).
	ShiftS float64
	// MinClearanceM is the lowest clearance with KickS.
	MinClearanceM float64
}

// kickSearchStepS is the step of the leg-lift search.
const kickSearchStepS = 0.01

// SuggestKick searches leg-lift start times from 0.2 s before to 0.3 s
// after the c.m. crosses the bar plane, in 0.01 s steps, for the one
// nearest the input's kick (earlier first on a tie) with which no part
// touches. Everything else is held as given.
func SuggestKick(in CrossingInput) (KickAdvice, error) {
	c, _, err := prepareCrossing(in)
	if err != nil {
		return KickAdvice{}, fmt.Errorf("crossing: %w", err)
	}
	used := c.kick
	var best KickAdvice
	for i := 0; i <= 50; i++ {
		for _, sign := range [2]float64{-1, 1} {
			if i == 0 && sign > 0 {
				continue
			}
			k := used + sign*float64(i)*kickSearchStepS
			if k < c.tb-0.2 || k > c.tb+0.3 || k < 0 {
				continue
			}
			cc := c
			cc.kick = k
			r := cc.sweep(nil)
			if !r.Touches && r.Parts[0].Passed {
				best = KickAdvice{Found: true, KickS: k, ShiftS: k - used, MinClearanceM: r.Parts[0].ClearanceM}
				return best, nil
			}
		}
	}
	return best, nil
}

// VzToClear returns the smallest take-off vz (to 0.05 m/s, up to MaxVzMS)
// with which no part touches, holding the take-off distance and the speed
// across the bar, and letting the default rotation and leg lift follow the
// new flight (the kick keeps its delay after the c.m. plane crossing).
// found is false when even MaxVzMS does not clear.
func VzToClear(in CrossingInput) (vzMS float64, found bool, err error) {
	if _, _, err := prepareCrossing(in); err != nil {
		return 0, false, fmt.Errorf("crossing: %w", err)
	}
	delay := 0.0
	if in.KickS != 0 {
		delay = in.KickS - in.DM/in.VxAcrossMS
	}
	start := math.Ceil(in.VzMS/0.05) * 0.05
	for v := start; v <= MaxVzMS+1e-9; v += 0.05 {
		try := in
		try.VzMS = v
		if in.KickS != 0 {
			try.KickS = in.DM/in.VxAcrossMS + delay
		}
		c, _, err := prepareCrossing(try)
		if err != nil {
			return 0, false, fmt.Errorf("crossing: %w", err)
		}
		r := c.sweep(nil)
		if !r.Touches && r.Parts[0].Passed {
			return v, true, nil
		}
	}
	return 0, false, nil
}
