package store

import (
	"fmt"
	"io"

	bolt "go.etcd.io/bbolt"
)

// Backup writes a consistent copy of the whole file to w while the agent
// keeps running, and returns the number of bytes written. It flushes
// buffered records first (on a writable store; a failed flush does not stop
// the backup and shows in Stats) so the copy holds all that was added, then copies inside one read transaction: writers go
// on, and the copy shows the file as of that transaction's start. The copy
// is a valid bbolt file that Open reads (use ReadOnly). Backup does not
// close w.
func (s *Store) Backup(w io.Writer) (int64, error) {
	if err := s.begin(false); err != nil {
		return 0, err
	}
	defer s.life.RUnlock()
	if !s.opt.ReadOnly {
		_ = s.flush() // a failed flush must not prevent a rescue copy; Stats shows it
	}
	var n int64
	err := s.db.View(func(tx *bolt.Tx) error {
		var err error
		n, err = tx.WriteTo(w)
		return err
	})
	if err != nil {
		return n, fmt.Errorf("store: backup of %s after %d bytes: %w", s.path, n, err)
	}
	return n, nil
}
