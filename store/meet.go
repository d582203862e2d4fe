package store

import (
	"bytes"
	"errors"
	"fmt"

	bolt "go.etcd.io/bbolt"

	"github.com/lathmark-team/lathmark/internal/meetsheet"
)

// bucketMeets holds the meet sheets (issue 18):
//
//	meets  "open" -> JSON meetsheet.Sheet (the team's one open sheet)
//	       "filed" + 0x00 + date + 0x00 + sheet id -> JSON meetsheet.Sheet
//
// Created on the first write (like hints), so files of schema version 1
// gain it without a migration; reads of a file without it find no sheet.
const bucketMeets = "meets"

var keyOpenMeet = []byte("open")

// OpenMeet returns the team's open meet sheet; ok is false when none.
func (t *Tx) OpenMeet() (meetsheet.Sheet, bool, error) {
	var s meetsheet.Sheet
	b := t.tx.Bucket([]byte(bucketMeets))
	if b == nil {
		return s, false, nil
	}
	ok, err := getJSON(b, keyOpenMeet, &s)
	if err != nil {
		return meetsheet.Sheet{}, false, fmt.Errorf("store: open meet sheet: %w", err)
	}
	return s, ok, nil
}

// PutOpenMeet stores the open sheet, replacing the one there.
func (t *Tx) PutOpenMeet(s meetsheet.Sheet) error {
	if s.ID == "" {
		return errors.New("store: put meet sheet: no id")
	}
	b, err := t.tx.CreateBucketIfNotExists([]byte(bucketMeets))
	if err == nil {
		err = putJSON(b, keyOpenMeet, s)
	}
	if err != nil {
		return fmt.Errorf("store: put meet sheet %s: %w", s.ID, err)
	}
	return nil
}

// FileMeet files the sheet under its date and id and removes the open one.
func (t *Tx) FileMeet(s meetsheet.Sheet) error {
	if s.ID == "" {
		return errors.New("store: file meet sheet: no id")
	}
	b, err := t.tx.CreateBucketIfNotExists([]byte(bucketMeets))
	if err == nil {
		err = putJSON(b, filedMeetKey(s), s)
	}
	if err == nil {
		err = b.Delete(keyOpenMeet)
	}
	if err != nil {
		return fmt.Errorf("store: file meet sheet %s: %w", s.ID, err)
	}
	return nil
}

// FiledMeets calls fn for every filed sheet, oldest date first.
func (t *Tx) FiledMeets(fn func(meetsheet.Sheet) error) error {
	b := t.tx.Bucket([]byte(bucketMeets))
	if b == nil {
		return nil
	}
	return forEachFiled(b, fn)
}

func forEachFiled(b *bolt.Bucket, fn func(meetsheet.Sheet) error) error {
	prefix := []byte("filed\x00")
	c := b.Cursor()
	k, v := c.Seek(prefix)
	for ; k != nil && bytes.HasPrefix(k, prefix); k, v = c.Next() {
		var s meetsheet.Sheet
		if err := decodeJSON(k, v, &s); err != nil {
			return fmt.Errorf("store: filed meet sheet %q: %w", k, err)
		}
		if err := fn(s); err != nil {
			return err
		}
	}
	if err := soundAt(k, v); err != nil {
		return fmt.Errorf("store: filed meet sheets: %w", err)
	}
	return nil
}

func filedMeetKey(s meetsheet.Sheet) []byte {
	return []byte("filed\x00" + s.Date + "\x00" + s.ID)
}

// PutFiledMeet replaces a filed sheet under its date and id (forget takes
// an athlete off the filed sheets). A sheet that was never filed is an
// error: filing goes through FileMeet.
func (t *Tx) PutFiledMeet(s meetsheet.Sheet) error {
	b := t.tx.Bucket([]byte(bucketMeets))
	if s.ID == "" || b == nil || b.Get(filedMeetKey(s)) == nil {
		return fmt.Errorf("store: put filed meet sheet %q: not filed", s.ID)
	}
	if err := putJSON(b, filedMeetKey(s), s); err != nil {
		return fmt.Errorf("store: put filed meet sheet %s: %w", s.ID, err)
	}
	return nil
}
