package main

import (
	"errors"
	"fmt"
	"strings"

	"github.com/lathmark-team/lathmark/store"
)

// checkData runs `lathmark check [FILE]`: bbolt's page check and lathmark's
// own invariants and record checksums (store.Check, which reads a damaged
// file without crashing). It prints "consistency check passed", or each
// problem found and the newest backup to restore, and then fails, so the
// exit status is non-zero.
func checkData(cfg config, io stdio) error {
	path := cfg.DataPath
	if len(cfg.SubArgs) == 1 {
		path = cfg.SubArgs[0]
	}
	err := store.Check(path)
	if err == nil {
		fmt.Fprintf(io.Out, "%s: consistency check passed\n", path)
		return nil
	}
	if !errors.Is(err, store.ErrInconsistent) && !errors.Is(err, store.ErrDamaged) {
		return err // not opened: locked, missing, an older schema ...
	}
	fmt.Fprintf(io.Out, "%s: DAMAGED\n", path)
	for _, l := range strings.Split(err.Error(), "\n") {
		if l = strings.TrimSuffix(l, ": "+store.ErrDamaged.Error()); l != "" && l != store.ErrInconsistent.Error() {
			fmt.Fprintf(io.Out, "  - %s\n", l)
		}
	}
	fmt.Fprintln(io.Out, damageAdvice(path))
	return fmt.Errorf("check %s: the data file is damaged; see the problems above", path)
}
