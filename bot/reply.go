package bot

// Kind says whether a reply is an answer or which kind of refusal it is.
type Kind int

// Reply kinds. Everything but KindOK is a refusal and changed nothing.
const (
	KindOK        Kind = iota
	KindUsage          // the words could not be understood or a value is out of range
	KindNotFound       // an athlete, week or record does not exist
	KindConflict       // the change would clash with what is stored
	KindForbidden      // the speaker's role does not allow it
	KindInternal       // the bot failed; nothing was changed
)

// String names the kind for logs and tests.
func (k Kind) String() string {
	switch k {
	case KindOK:
		return "ok"
	case KindUsage:
		return "usage"
	case KindNotFound:
		return "not-found"
	case KindConflict:
		return "conflict"
	case KindForbidden:
		return "forbidden"
	default:
		return "internal"
	}
}

// Reply is the structured answer every front end renders. Numbers carry
// their units in the strings: the engine has already formatted them in the
// team's unit system.
type Reply struct {
	Kind        Kind
	Title       string   // one short line
	Lines       []string // plain sentences, in order
	Fields      []Field  // label/value pairs, numbers with units
	Table       *Table   // optional; rendered preformatted
	Notes       []string // plain sentences shown after the table
	Assumptions []string // what the engine filled in, and how to override it
	Caution     string   // a short safety or model caution, shown last
	Example     string   // for refusals: a correct command to type instead
	Ephemeral   bool     // show only to the asker (help, errors, previews)
	Files       []File   // attachments: a chart, a CSV export
	Actions     []Action // buttons on a phone; each runs a command line
	Direct      []Direct // messages to other people (private digest lines)
	// Details is the full read-out behind a short reply: every term, every
	// assumption with its source, the uncertainty budget. Nil when the reply
	// is already complete. The engine returns it instead of the short reply
	// when the line ends in the word "more" (for commands that offer
	// details); Slack shows a Details button that expands the same message.
	Details *Reply
	// DetailsCommand is the command line that shows Details without doing
	// anything else (the Slack Details button runs it); empty means the
	// line as typed with "more" at the end. A command that writes sets it
	// (log: `line N more`), so that pressing Details never writes again.
	DetailsCommand string
}

// Field is one labelled value, e.g. {"Margin", "+4.1 ± 2.3 cm"}.
type Field struct {
	Label string
	Value string
}

// Table is a small grid for histories and digests.
type Table struct {
	Header []string
	Rows   [][]string
}

// File is an attachment. The terminal writes it to disk; Slack uploads it.
type File struct {
	Name  string // file name, e.g. "digest-2026-W48.png"
	MIME  string // "image/png", "text/csv"
	Title string
	Data  []byte
}

// Action is a button. Pressing it runs Command as if the presser typed it,
// with the presser's own role.
type Action struct {
	Label   string
	Command string
	Style   string // "", "primary" or "danger"
	// Expand says the reply to Command replaces the message the button is
	// on instead of arriving as a new one (Slack: chat.update), as the
	// Details button under a short reply does.
	Expand bool
}

// Direct is a message for one chat user only.
type Direct struct {
	UserID string
	Reply  Reply
}

// OK reports whether the reply is an answer rather than a refusal.
func (r Reply) OK() bool { return r.Kind == KindOK }
