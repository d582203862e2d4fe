package bot

import "fmt"

// inboxTx is a Tx that also holds the front ends' durable inbox: every
// acknowledged chat delivery is stored before its acknowledgement and
// forgotten when it has run. store.Tx implements it.
type inboxTx interface {
	// DeleteInbox forgets a stored delivery; a missing id is not an error.
	DeleteInbox(id string) error
}

// forgetDelivery deletes the request's stored copy (Request.InboxID)
// inside the command's own transaction: a crash either keeps both the
// command's writes and the deletion or neither, so a delivery replayed at
// start never runs twice.
func (c *call) forgetDelivery(tx Tx) error {
	if c.req.InboxID == "" {
		return nil
	}
	it, ok := tx.(inboxTx)
	if !ok {
		return fmt.Errorf("forget delivery %s: the store has no inbox", c.req.InboxID)
	}
	if err := it.DeleteInbox(c.req.InboxID); err != nil {
		return fmt.Errorf("forget delivery: %w", err)
	}
	return nil
}
