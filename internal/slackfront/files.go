package slackfront

import (
	"context"
	"errors"
	"fmt"
	"path"
	"strings"
	"time"

	"github.com/slack-go/slack"

	"github.com/lathmark-team/lathmark/bot"
)

// Files shared with a message, fetched for `import csv`.
//
// A CSV file sent to the bot in a direct message (with no words, or with
// "import csv"), or shared in a channel thread with "@lathmark import csv",
// is downloaded with the bot token (its url_private_download, with
// Authorization: Bearer; slack-go's GetFileContext, which sends the token
// only to Slack's own https hosts or the configured API URL) and handed to
// the engine in bot.Request.Upload. Slack needs the files:read scope for it.
// Other files are named to the engine but never downloaded.

// maxUploadBytes bounds a file fetched from chat: 2 MiB holds about 20 000
// rows of the export format (some 100 bytes a row), several seasons of a
// squad; a larger file is refused before any byte is read when Slack says
// its size, and cut off at the bound when it does not.
const maxUploadBytes = 2 << 20

// fetchTimeout bounds one file's download.
const fetchTimeout = 30 * time.Second

// sharedFile is a file attached to a message, as the event describes it.
type sharedFile struct {
	ID, Name, MIME, FileType, URL string
	Size                          int64
}

// sharedFiles keeps what the front end needs of the event's files.
func sharedFiles(fs []slack.File) []sharedFile {
	var out []sharedFile
	for _, f := range fs {
		u := f.URLPrivateDownload
		if u == "" {
			u = f.URLPrivate
		}
		name := f.Name
		if name == "" {
			name = f.Title
		}
		out = append(out, sharedFile{ID: f.ID, Name: name, MIME: f.Mimetype, FileType: f.Filetype, URL: u, Size: int64(f.Size)})
	}
	return out
}

// isCSV reports whether a shared file is a CSV by name, type or Slack's
// file type.
func (s sharedFile) isCSV() bool {
	mt := strings.ToLower(s.MIME)
	return strings.EqualFold(path.Ext(s.Name), ".csv") || mt == "text/csv" || mt == "application/csv" || s.FileType == "csv"
}

// importWords reports whether a message's text asks to import the files
// shared with it: "import csv" (or "csv import"), or no words at all in a
// direct message.
func importWords(text string, direct bool) bool {
	t := strings.Join(strings.Fields(strings.ToLower(text)), " ")
	return t == "import csv" || t == "csv import" || (t == "" && direct)
}

// withFiles attaches the message's file to a request that imports it:
// the first CSV among the shared files, or the first file when none is a
// CSV (named, never downloaded, so the engine can say what it got). Any
// other request goes on untouched and nothing is downloaded.
func (f *Front) withFiles(ctx context.Context, in inbound, req bot.Request) bot.Request {
	if len(in.files) == 0 || !importWords(req.Text, req.Direct) {
		return req
	}
	pick := in.files[0]
	for _, s := range in.files {
		if s.isCSV() {
			pick = s
			break
		}
	}
	req.Text = "import csv"
	up := f.fetchFile(ctx, pick)
	req.Upload = &up
	return req
}

// fetchFile downloads one CSV file within the bound; what went wrong is
// said in Upload.Problem for the engine to answer.
func (f *Front) fetchFile(ctx context.Context, s sharedFile) bot.Upload {
	up := bot.Upload{Name: s.Name, MIME: s.MIME}
	if !s.isCSV() {
		return up
	}
	if up.MIME == "" {
		up.MIME = "text/csv"
	}
	if s.Size > maxUploadBytes {
		up.Problem = fmt.Sprintf("it is %s; files from chat may be up to %s (a larger file goes on the bot's computer: import csv PATH there)", mib(s.Size), mib(maxUploadBytes))
		return up
	}
	ctx, cancel := context.WithTimeout(ctx, fetchTimeout)
	defer cancel()
	if s.URL == "" && s.ID != "" {
		if err := f.call(ctx, "files.info", func(ctx context.Context) error {
			info, _, _, err := f.api.GetFileInfoContext(ctx, s.ID, 0, 0)
			if err == nil {
				s.URL = info.URLPrivateDownload
				if s.URL == "" {
					s.URL = info.URLPrivate
				}
			}
			return err
		}); err != nil {
			f.log.Warn("files.info failed", "file", s.ID, "err", err)
		}
	}
	if s.URL == "" {
		up.Problem = "Slack did not say where to fetch it; check that the app has the files:read scope (update the manifest and reinstall the app)"
		return up
	}
	w := &capWriter{max: maxUploadBytes}
	err := f.api.GetFileContext(ctx, s.URL, w)
	switch {
	case errors.Is(err, errTooLarge):
		up.Problem = fmt.Sprintf("it is larger than %s, the most a file from chat may be", mib(maxUploadBytes))
	case err != nil:
		f.log.Warn("file download failed", "file", s.ID, "err", err)
		up.Problem = "Slack did not give me the file; check that the app has the files:read scope (update the manifest and reinstall the app), then send it again"
	default:
		up.Data = w.buf
	}
	return up
}

// errTooLarge stops a download at the bound.
var errTooLarge = errors.New("file larger than the bound")

// capWriter keeps at most max bytes and fails past them.
type capWriter struct {
	buf []byte
	max int
}

func (w *capWriter) Write(p []byte) (int, error) {
	if len(w.buf)+len(p) > w.max {
		return 0, errTooLarge
	}
	w.buf = append(w.buf, p...)
	return len(p), nil
}

// mib writes a size in MiB with one decimal.
func mib(n int64) string { return fmt.Sprintf("%.1f MiB", float64(n)/(1<<20)) }
