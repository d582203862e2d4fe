package bot

import (
	"errors"
	"strings"
)

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

// plainCause is an error from below the engine (the store) that names its
// cause in a sentence for the person, such as "the disk is full; nothing was
// saved" or a damaged data file. The store logs these itself.
type plainCause interface {
	error
	PlainCause() string
}

// plainCauseReply answers such an error with its own sentence instead of
// "something went wrong".
func plainCauseReply(err error) (Reply, bool) {
	var pc plainCause
	if !errors.As(err, &pc) {
		return Reply{}, false
	}
	msg := pc.PlainCause()
	if msg != "" {
		msg = strings.ToUpper(msg[:1]) + msg[1:] + "."
	}
	return Reply{Kind: KindInternal, Title: "Not done", Lines: []string{msg}, Ephemeral: true}, true
}
