package series

// TR names the World Athletics Technical Rule behind each rule of the
// series (numbers from memory, as in the package doc), for replies that
// say which rule a line breaks.
func (r Rule) TR() string {
	switch r {
	case ThreeFailures, HeightDone:
		return "TR 26.2"
	case BarDown:
		return "TR 26.4"
	case SmallRise:
		return "TR 26.4 (a)"
	case AfterJumpOff, JumpOffPass, JumpOffTwice, JumpOffDirection:
		return "TR 26.9"
	}
	return ""
}
