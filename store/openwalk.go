package store

import (
	"fmt"
	"os"
)

// DefaultOpenWalkMaxBytes is the most pages in use (bbolt's tx.Size) of a
// data file whose page tree Open walks, with plain reads, before using it
// (see walkAtOpen); a larger file gets only the quick check. The walk
// reads every page in use once: 9-11 ms for 4 MiB and 70-105 ms for 64 MiB
// on the CI machine kind, shared, with the file in the page cache, against
// 0.2-0.35 ms for the open without it (README, "Performance and
// reliability", `store` `OpenPageWalk`). A squad's file of several years
// stays well under 64 MiB; a start-up a tenth of a second longer is cheap
// beside serving a file that leaves records out in silence.
const DefaultOpenWalkMaxBytes = 64 << 20

// walkAtOpen walks the page tree of the data file at path (see walkPages)
// when its pages in use are at most limit bytes (limit < 0: never), and
// refuses the file if the walk finds a damaged page. It runs while Open
// holds the file lock, so no other process writes meanwhile, and before
// anything writes.
//
// Why refuse rather than open the file marked as damaged: bbolt keeps no
// page checksums, so a damaged branch page can send a range scan to the
// wrong leaf, and the records read are sound (their seals match) while
// others are left out with no error (history shows fewer sessions). With
// such a page in the tree no read can be trusted to be whole, so a DB
// kept open could only answer ErrDamaged to every View and Update: the bot
// would look alive and serve nothing. It would also still write at open
// (migrations, the inbox and hints buckets, chart styles) and through the
// inbox, into a tree whose rebalancing can spread the damage. Refusing at
// open writes nothing, keeps the file as it was for `lathmark check` and
// a restore, and is the path the quick check at open already takes: the
// error matches ErrDamaged and ErrInconsistent, and cmd/lathmark names the
// newest backup for it. Check opens without the walk (it runs the same walk
// itself and lists every problem), so a refused file can still be checked.
func walkAtOpen(path string, limit int64) error {
	if limit < 0 {
		return nil
	}
	f, err := os.Open(path)
	if err != nil {
		return fmt.Errorf("page walk: %w", err)
	}
	defer func() { _ = f.Close() }()
	fi, err := f.Stat()
	if err != nil {
		return fmt.Errorf("page walk: %w", err)
	}
	if fi.Size() == 0 {
		return nil
	}
	// The cost is the pages in use (the newer meta page's high water
	// mark), not the file's length: bbolt grows the file ahead of its data.
	if m, err := quickCheck(f, fi.Size()); err == nil && int64(m.pgid)*int64(m.pageSize) > limit {
		return nil
	}
	p := &problemList{}
	walkPages(newBlockReader(f, fi.Size()), fi.Size(), p)
	if p.n == 0 {
		return nil
	}
	more := ""
	if p.n > 1 {
		more = fmt.Sprintf(" (and %d more problems)", p.n-1)
	}
	return damagedFile(fmt.Errorf("%v%s", p.list[0], more))
}
