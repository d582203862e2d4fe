package mechanics

// World records of the high jump, outdoor, metres, from memory: men 2.45 m
// (set in 1993), women 2.10 m (set in 2024; 2.09 m from 1987 until then).
// They bound the "height cleared" rows of the range table and the
// plausibility checks of a logged bar or a personal best.
const (
	WorldRecordMenM   = 2.45
	WorldRecordWomenM = 2.10
)

// WorldRecordM is the world record for sex; the men's when the sex is not
// known, so that no real height is flagged for want of a profile field.
func WorldRecordM(sex Sex) float64 {
	if sex == Female {
		return WorldRecordWomenM
	}
	return WorldRecordMenM
}
