package bot

import (
	"path"
	"strings"
)

// importUpload imports the CSV file shared with the message (Slack: a file
// sent in a direct message, or with `import csv` in a thread), validated
// all-or-nothing exactly as a file on the bot's computer.
func (c *call) importUpload() (Reply, error) {
	const example = "import csv"
	u := c.req.Upload
	if !looksCSV(*u) {
		return Reply{}, usageErr(example, "%q is not a CSV file; send a .csv file (as `export csv` writes it) with the words import csv, or alone in a direct message", u.Name)
	}
	if u.Problem != "" {
		return Reply{}, usageErr(example, "I could not read %q: %s", u.Name, u.Problem)
	}
	return c.importCSV("chat file "+u.Name, u.Data, nil)
}

// looksCSV reports whether a shared file is a CSV by its name or type.
func looksCSV(u Upload) bool {
	mt := strings.ToLower(u.MIME)
	return strings.EqualFold(path.Ext(u.Name), ".csv") || mt == "text/csv" || mt == "application/csv"
}
