// Package series applies the competition rules of the vertical jumps to one
// athlete's series: the attempts of one athlete in one competition on one
// day, in the order they were jumped, across however many log lines they
// were typed in.
//
// The rules are those of the World Athletics Technical Rules for the
// vertical jumps and the high jump (TR 26 and TR 27; rule numbers below are
// from memory):
//
//   - Three consecutive failures, at any heights, end the athlete's
//     competition (TR 26.2). A pass does not break the run: the failures
//     before it carry to the next height, so after "x-" only two attempts
//     remain at the next height.
//   - The bar never goes down (TR 26.4): a new height is above the last one.
//   - After a clearance or a pass nothing more is jumped at that height.
//   - While more than one athlete remains the bar rises by at least 2 cm
//     between heights (TR 26.4 (a)); an athlete alone in the competition
//     (Attempt.Alone) chooses her own rises.
//   - A jump-off for first place (TR 26.9, Attempt.JumpOff) is the
//     exception: the three-failure rule and the bar-down rule do not apply;
//     each jump-off height takes exactly one attempt, passing is not
//     allowed, and the bar goes up after a clearance and down after a
//     failure.
//
// The rule that the rise never grows between rounds concerns the bar
// settings of the whole competition, not one athlete's series (she may skip
// heights), so it is not checked here.
//
// The package is pure: values in, values out. Bars are compared in whole
// millimetres.
package series
