package store_test

import (
	"context"
	"encoding/binary"
	"encoding/json"
	"testing"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
	"github.com/lathmark-team/lathmark/store"
)

// A new profile gets the lowest free chart style; an edit keeps it; after a
// removal the freed slot goes to the next athlete added.
func TestChartStyleAssignedOnAdd(t *testing.T) {
	db := openTemp(t)
	put := func(a *record.Athlete) {
		t.Helper()
		if err := db.Update(context.Background(), func(tx *store.Tx) error { return tx.PutAthlete(a) }); err != nil {
			t.Fatal(err)
		}
	}
	a, b, c := record.Athlete{Name: "A1", Created: base}, record.Athlete{Name: "B2", Created: base}, record.Athlete{Name: "C3", Created: base}
	put(&a)
	put(&b)
	put(&c)
	if a.ChartStyle != 1 || b.ChartStyle != 2 || c.ChartStyle != 3 {
		t.Fatalf("styles %d %d %d, want 1 2 3", a.ChartStyle, b.ChartStyle, c.ChartStyle)
	}
	edit := record.Athlete{ID: b.ID, Name: "B2", StatureM: 1.8, Created: base} // a profile built without the style
	put(&edit)
	view(t, db, func(tx *store.Tx) error {
		got, _, err := tx.AthleteByID(b.ID)
		if got.ChartStyle != 2 {
			t.Errorf("edit changed the style to %d", got.ChartStyle)
		}
		return err
	})
	if err := db.Update(context.Background(), func(tx *store.Tx) error { _, err := tx.DeleteAthlete(a.ID); return err }); err != nil {
		t.Fatal(err)
	}
	d := record.Athlete{Name: "D4", Created: base}
	put(&d)
	if d.ChartStyle != 1 {
		t.Errorf("after removing slot 1, new athlete got %d", d.ChartStyle)
	}
}

// A file written before styles were kept gets them at open, oldest id first.
func TestChartStyleBackfilledAtOpen(t *testing.T) {
	path := tempPath(t)
	db, err := store.Open(path, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var ids []uint64
	for _, n := range []string{"Old1", "Old2", "Old3"} {
		a := record.Athlete{Name: n, Created: base}
		if err := db.Update(context.Background(), func(tx *store.Tx) error { return tx.PutAthlete(&a) }); err != nil {
			t.Fatal(err)
		}
		ids = append(ids, a.ID)
	}
	if err := db.Close(); err != nil {
		t.Fatal(err)
	}
	// Wipe the styles as an older lathmark would have stored the profiles.
	raw, err := bolt.Open(path, 0o600, nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := raw.Update(func(tx *bolt.Tx) error {
		b := tx.Bucket([]byte("athletes"))
		for _, id := range ids {
			k := binary.BigEndian.AppendUint64(nil, id)
			var m map[string]any
			p, err := store.Unseal(k, b.Get(k))
			if err != nil {
				return err
			}
			if err := json.Unmarshal(p, &m); err != nil {
				return err
			}
			delete(m, "chart_style")
			v, _ := json.Marshal(m)
			if err := b.Put(k, store.Seal(k, v)); err != nil {
				return err
			}
		}
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	raw.Close()
	db2 := openUnchecked(t, path)
	view(t, db2, func(tx *store.Tx) error {
		for i, id := range ids {
			a, _, err := tx.AthleteByID(id)
			if err != nil {
				return err
			}
			if a.ChartStyle != i+1 {
				t.Errorf("%s: style %d after backfill, want %d", a.Name, a.ChartStyle, i+1)
			}
		}
		return nil
	})
}
