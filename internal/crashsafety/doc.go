// Package crashsafety proves that lathmark loses nothing when its process
// dies at an arbitrary moment. It holds no code of its own, only a test.
//
// The test starts the bot as a child process (the test binary itself, run
// again with LATHMARK_CRASH_CHILD naming the data file). The child opens the
// bbolt store, builds the command engine with one head coach and serves a
// small HTTP endpoint on a loopback address; it answers a command only after
// Engine.Handle has returned, so an answered log line has been committed
// (bbolt's Update writes and syncs the file before it returns). The parent
// sends log lines from several goroutines, each line with its own message id
// and a note carrying that id, kills the child with SIGKILL after a random
// delay, and then reopens the file and checks:
//
//   - the file passes store's consistency check (bbolt pages and lathmark's
//     own invariants);
//   - every answered log line is stored, all of its attempts, exactly once;
//   - a line that was in flight at the kill is stored whole or not at all,
//     never in part, and its message id is marked seen exactly when it is
//     stored;
//   - a message id sent again in the next round is answered "Already done"
//     if (and only if) the line was stored, and then nothing new is stored.
//
// SIGKILL ends the process but leaves the operating system's page cache, so
// this is a proof against crashes of the bot, not against power loss; for
// that the store relies on bbolt syncing the file at every commit.
//
// The short form (a few rounds) runs with the other tests. The long form:
//
//	LATHMARK_CRASH_ROUNDS=200 go test -run Crash -v ./internal/crashsafety
//
// LATHMARK_CRASH_SEED=N repeats the random delays and line shapes of an
// earlier run (the seed is logged).
package crashsafety
