package bot

// UserError is a refusal meant for the person who typed the command: what
// was wrong, in their words, and a correct example. Commands return it; the
// engine turns it into a Reply. Any other error is the bot's own failure.
type UserError struct {
	Kind    Kind
	Msg     string
	Example string
}

func (e *UserError) Error() string { return e.Msg }

// usageErr reports input that could not be understood, with an example.
func usageErr(example, format string, args ...any) *UserError {
	return &UserError{Kind: KindUsage, Msg: userMsg(format, args), Example: example}
}

// notFoundErr reports a missing athlete, record or week.
func notFoundErr(example, format string, args ...any) *UserError {
	return &UserError{Kind: KindNotFound, Msg: userMsg(format, args), Example: example}
}

// conflictErr reports a change that clashes with what is stored.
func conflictErr(example, format string, args ...any) *UserError {
	return &UserError{Kind: KindConflict, Msg: userMsg(format, args), Example: example}
}

// forbiddenErr reports a command the speaker's role does not allow; the
// example is something the speaker may do instead.
func forbiddenErr(example, format string, args ...any) *UserError {
	return &UserError{Kind: KindForbidden, Msg: userMsg(format, args), Example: example}
}
