package bot

import "time"

// Request is one line typed by a person, as a front end received it.
type Request struct {
	UserID    string    // chat user id ("" in the terminal means the operator)
	UserName  string    // display name, for replies and the audit trail
	Channel   string    // channel id, or "" for a direct message / the terminal
	Direct    bool      // a direct message to the bot
	Text      string    // the command, without any mention of the bot
	Time      time.Time // when the message was sent; zero means now
	MessageID string    // unique per delivered message; a repeat is handled once
	// Local is set by the terminal front end: the speaker sits at the bot's
	// own computer, so commands that read its files (import csv) may run.
	Local bool
	// Upload is the file shared with the message, as the front end
	// fetched it (Slack: a CSV sent to the bot for `import csv`); nil when
	// none. A pointer, so that a Request stays comparable.
	Upload *Upload
	// InboxID names the front end's stored copy of this delivery (its
	// durable inbox). A command that writes deletes it in its own
	// transaction, so running the delivery and forgetting it commit
	// together; "" when there is no stored copy.
	InboxID string
	// Seed marks the invented demo data typed in at start (--demo): what
	// it stores is marked seeded, and undo never takes it back.
	Seed bool
}

// Upload is one file shared with a message. Data is nil when the front end
// did not fetch it; Problem then says why, in words for the person who
// sent it ("is 3.1 MiB; files from chat may be up to 2 MiB").
type Upload struct {
	Name    string
	MIME    string
	Data    []byte
	Problem string
}
