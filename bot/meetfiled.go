package bot

import (
	"fmt"
	"strings"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
)

// meetListExample and the other filed-sheet examples (each works as typed
// in help).
const (
	meetListExample      = "meet list"
	standingsLastExample = "standings last"
)

// meetListMax is how many filed sheets the short list shows (the list
// budget, DEVELOPERS.md); `meet list more` shows them all.
const meetListMax = 12

// pickFiled finds the filed sheet the words name: "last" (the newest), a
// date (the newest sheet of that day), or the meet's name (the newest of
// that name, matched case-insensitively, else the newest whose name holds
// the words). filed is newest first.
func pickFiled(filed []meetsheet.Sheet, args []token) (meetsheet.Sheet, error) {
	words := joinRaw(args)
	if len(filed) == 0 {
		return meetsheet.Sheet{}, notFoundErr(meetOpenExample, "no meet sheet is filed yet, so none answers to %q; meet close files the open one", words)
	}
	switch {
	case len(args) == 1 && args[0].Lower == "last":
		return filed[0], nil
	case len(args) == 1 && isDateWord(args[0].Raw):
		for _, s := range filed {
			if s.Date == args[0].Raw {
				return s, nil
			}
		}
		return meetsheet.Sheet{}, notFoundErr(meetListExample, "no sheet filed for %s; meet list shows the filed sheets", args[0].Raw)
	}
	for _, s := range filed {
		if strings.EqualFold(s.Name, words) {
			return s, nil
		}
	}
	for _, s := range filed {
		if strings.Contains(strings.ToLower(s.Name), strings.ToLower(words)) {
			return s, nil
		}
	}
	return meetsheet.Sheet{}, notFoundErr(meetListExample, "no filed sheet called %q; meet list shows the filed sheets (standings last, standings 2026-11-25)", words)
}

func runMeetList(c *call) (Reply, error) {
	if len(c.args) > 0 {
		return Reply{}, usageErr(meetListExample, "meet list takes no words after it (%q is extra); standings NAME shows one sheet", joinRaw(c.args))
	}
	var r Reply
	err := c.view(func(tx Tx) error {
		team, _, err := teamAndZone(tx)
		if err != nil {
			return err
		}
		imp := imperial(team)
		filed, err := filedSheets(tx)
		if err != nil {
			return err
		}
		if len(filed) == 0 {
			r = Reply{Title: "No meet sheet filed yet.", Lines: []string{"meet open NAME starts one; meet close files it."}, Example: meetOpenExample}
			return nil
		}
		var lines []string
		for _, s := range filed {
			hide, err := c.hiddenOnSheet(tx, s)
			if err != nil {
				return err
			}
			lines = append(lines, fmt.Sprintf("%s %s", standingsTitle(s, s.Final(), imp, hide), plural(len(s.Competitors), "competitor")+"."))
		}
		r = Reply{Title: fmt.Sprintf("%s, newest first.", plural(len(filed), "filed sheet")),
			Lines: lines[:min(len(lines), meetListMax)],
			Notes: []string{"standings last, or standings NAME or DATE, shows a sheet's final places."}}
		if len(lines) > meetListMax {
			d := r
			d.Lines = lines
			r.Notes = append(r.Notes, fmt.Sprintf("%d older: meet list more.", len(lines)-meetListMax))
			r.Details = &d
		}
		return nil
	})
	return r, err
}
