// Package bot is lathmark's command engine, independent of any chat
// transport. A front end (the terminal, Slack) turns what a person typed
// into a Request; Engine.Handle parses it, checks the speaker's role, runs the
// command inside one store transaction and returns a Reply, which the front
// end renders in its own way.
//
// Commands are short, case-insensitive, forgiving of word order and spacing,
// and typed with thumbs: "log Kai 1.95 o 2.00 xo", "margin 1.80 for Mira v 4.3".
// Every refusal names the word that was wrong and shows a correct example.
package bot
