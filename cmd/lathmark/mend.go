package main

import (
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/lathmark-team/lathmark/store"
)

// mendData runs `lathmark mend [FILE]`: a data file refused at start
// because one of its two meta pages fails its checksum (a write cut off by
// a power cut, a bad disk block) is mended from the other (store.MendMeta),
// after a copy of the file as it was is written beside it. The bot must be
// stopped. It prints what it did and what may be missing, or why it cannot
// mend the file and the newest backup to restore instead.
func mendData(cfg config, io stdio, now time.Time) error {
	path := cfg.DataPath
	if len(cfg.SubArgs) == 1 {
		path = cfg.SubArgs[0]
	}
	if len(cfg.SubArgs) > 1 {
		return fmt.Errorf("mend takes at most one data file, e.g. lathmark mend %s", path)
	}
	cp := path + ".before-mend-" + now.UTC().Format("20060102T150405Z")
	rep, err := store.MendMeta(path, cp, now)
	switch {
	case errors.Is(err, store.ErrNothingToMend) && !errors.Is(err, store.ErrDamaged):
		fmt.Fprintf(io.Out, "%s: both meta pages are sound; nothing to mend (lathmark check reads the rest).\n", path)
		return nil
	case err != nil:
		fmt.Fprintf(io.Out, "%s: cannot be mended: %s\n", path, strings.TrimPrefix(err.Error(), "store: mend "+path+": "))
		if errors.Is(err, store.ErrDamaged) {
			fmt.Fprintln(io.Out, damageAdvice(path))
		}
		return fmt.Errorf("mend %s: nothing was changed", path)
	}
	fmt.Fprintf(io.Out, "%s: mended. Meta page %d was damaged and is rebuilt; the file now holds commit %d, as the other meta page described.\n", path, rep.Damaged, rep.TxID)
	fmt.Fprintln(io.Out, "  The change saved last before the damage may be missing: check the latest lines (history) and log again what is not there.")
	fmt.Fprintf(io.Out, "  The file as it was: %s\n", rep.CopyPath)
	if err := store.Check(path); err != nil {
		fmt.Fprintf(io.Out, "  The check after the mend found damage: %v\n", err)
		fmt.Fprintln(io.Out, damageAdvice(path))
		return fmt.Errorf("mend %s: the file is still damaged", path)
	}
	fmt.Fprintf(io.Out, "%s: consistency check passed\n", path)
	return nil
}
