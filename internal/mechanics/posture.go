package mechanics

import (
	"fmt"
	"sort"
	"strings"
)

// Posture is a symmetric body posture in the sagittal plane, given as joint
// angles in degrees (left and right limbs alike) plus the trunk's
// orientation. Zero angles are the anatomical reference: head in line with
// the trunk, trunk straight, thighs in line with the trunk, knees straight,
// arms hanging along the trunk, elbows straight, feet at right angles to the
// shanks.
type Posture struct {
	Name string

	// NeckFlexDeg turns the head on the trunk: + flexion (chin to chest),
	// − extension (head thrown back). −90..90.
	NeckFlexDeg float64
	// TrunkArchDeg bends the trunk (back extension) into a circular arc of
	// this central angle, belly on the convex side. 0..180.
	TrunkArchDeg float64
	// HipExtDeg turns the thighs behind the line of the trunk's lower end:
	// + extension, − flexion. −150..90.
	HipExtDeg float64
	// KneeFlexDeg bends the knees, heels towards the buttocks. 0..170.
	KneeFlexDeg float64
	// ShoulderFlexDeg raises the upper arms forward from hanging along the
	// trunk (parallel to the shoulder–hip chord): 90 straight out in front,
	// 180 overhead, − behind. −90..180.
	ShoulderFlexDeg float64
	// ElbowFlexDeg bends the elbows. 0..160.
	ElbowFlexDeg float64
	// AnklePlantarDeg points the feet: 0 at right angles to the shanks,
	// + pointed (plantar flexion), − pulled up. −40..90.
	AnklePlantarDeg float64
	// TrunkElevationDeg is the angle of the trunk's chord (mid-hip to neck)
	// above the horizontal, with the back facing down at 0: 0 lying on the
	// back (head towards −x), 90 upright facing +x, negative head lower than
	// hips. −180..180.
	TrunkElevationDeg float64
}

type jointRange struct {
	name   string
	v      float64
	lo, hi float64
}

func (p Posture) joints() [8]jointRange {
	return [8]jointRange{
		{"neck flexion", p.NeckFlexDeg, -90, 90},
		{"trunk arch", p.TrunkArchDeg, 0, 180},
		{"hip extension", p.HipExtDeg, -150, 90},
		{"knee flexion", p.KneeFlexDeg, 0, 170},
		{"shoulder flexion", p.ShoulderFlexDeg, -90, 180},
		{"elbow flexion", p.ElbowFlexDeg, 0, 160},
		{"ankle plantar flexion", p.AnklePlantarDeg, -40, 90},
		{"trunk elevation", p.TrunkElevationDeg, -180, 180},
	}
}

// Validate checks every angle against its range; the error's Reason names
// the joint.
func (p Posture) Validate() error {
	for _, j := range p.joints() {
		field := FieldJoint
		if j.name == "trunk arch" {
			field = FieldArch
		}
		if err := finite(field, j.v); err != nil {
			return &InputError{Field: field, Value: j.v, Reason: j.name + ": " + err.(*InputError).Reason}
		}
		if j.v < j.lo || j.v > j.hi {
			return &InputError{Field: field, Value: j.v,
				Reason: fmt.Sprintf("%s outside %g to %g degrees", j.name, j.lo, j.hi)}
		}
	}
	return nil
}

// Standing is the upright reference posture, facing +x.
func Standing() Posture {
	return Posture{Name: "standing", TrunkElevationDeg: 90}
}

// StraightHorizontal is the reference posture lying straight on the back.
func StraightHorizontal() Posture {
	return Posture{Name: "horizontal"}
}

// FlopLayout is an illustrative back layout over the bar: head back 30°,
// trunk arched into a 60° arc, hips extended 20°, knees bent 60°, arms along
// the trunk, feet pointed 30°, trunk chord level. It describes the shape
// coaches aim for (common practice), not a measured athlete; give measured
// angles when you have them.
func FlopLayout() Posture {
	return Posture{
		Name:            "layout",
		NeckFlexDeg:     -30,
		TrunkArchDeg:    60,
		HipExtDeg:       20,
		KneeFlexDeg:     60,
		AnklePlantarDeg: 30,
	}
}

// postureAliases maps each accepted name to its constructor.
func postureAliases() map[string]func() Posture {
	return map[string]func() Posture{
		"standing":   Standing,
		"stand":      Standing,
		"upright":    Standing,
		"horizontal": StraightHorizontal,
		"straight":   StraightHorizontal,
		"flat":       StraightHorizontal,
		"layout":     FlopLayout,
		"flop":       FlopLayout,
		"arched":     FlopLayout,
	}
}

// PostureByName returns a named posture (case-insensitive): "standing"
// ("stand", "upright"), "horizontal" ("straight", "flat") or "layout"
// ("flop", "arched").
func PostureByName(name string) (Posture, error) {
	if f, ok := postureAliases()[strings.ToLower(strings.TrimSpace(name))]; ok {
		return f(), nil
	}
	return Posture{}, &InputError{Field: FieldPosture,
		Reason: fmt.Sprintf("no posture called %q; try %s", name, strings.Join(PostureNames(), ", "))}
}

// PostureNames returns the canonical names of the named postures, sorted.
func PostureNames() []string {
	names := []string{Standing().Name, StraightHorizontal().Name, FlopLayout().Name}
	sort.Strings(names)
	return names
}
