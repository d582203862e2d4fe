package store

import (
	"encoding/binary"
	"fmt"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/record"
)

// usedChartStyles lists the chart style slots of every stored profile.
func usedChartStyles(athletes *bolt.Bucket) ([]int, error) {
	var used []int
	err := athletes.ForEach(func(k, _ []byte) error {
		if len(k) != idLen {
			return nil // reported by Check, not here
		}
		a, _, err := getAthlete(athletes, binary.BigEndian.Uint64(k))
		if err != nil {
			return nil // a damaged profile is Check's to report; it holds no slot
		}
		used = append(used, a.ChartStyle)
		return nil
	})
	return used, err
}

// backfillChartStyles gives every profile stored without a chart style
// (files written before styles were kept) the next free slot, oldest id
// first, in one transaction; a file where every profile has one is not
// written to.
func (db *DB) backfillChartStyles() error {
	if db.readOnly {
		return nil
	}
	need := false
	if err := db.bolt.View(func(tx *bolt.Tx) error {
		b := tx.Bucket([]byte(bucketAthletes))
		if b == nil {
			return nil
		}
		used, err := usedChartStyles(b)
		for _, s := range used {
			need = need || s == 0
		}
		return err
	}); err != nil || !need {
		return err
	}
	return db.bolt.Update(func(tx *bolt.Tx) error {
		b := tx.Bucket([]byte(bucketAthletes))
		used, err := usedChartStyles(b)
		if err != nil {
			return err
		}
		c := b.Cursor()
		for k, _ := c.First(); k != nil; k, _ = c.Next() {
			if len(k) != idLen {
				continue
			}
			id := binary.BigEndian.Uint64(k)
			a, _, err := getAthlete(b, id)
			if err != nil || a.ChartStyle != 0 {
				continue
			}
			a.ChartStyle = record.FreeChartStyle(used)
			used = append(used, a.ChartStyle)
			if err := putJSON(b, idKey(id), a); err != nil {
				return fmt.Errorf("athlete %d: %w", id, err)
			}
		}
		return nil
	})
}
