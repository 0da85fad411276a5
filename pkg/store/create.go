package store

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"time"

	bolt "go.etcd.io/bbolt"
)

// create makes a new, initialised store at path if no file is there yet.
// It builds the file under a temporary name, syncs it, and links it into
// place, so a crash during creation leaves either no file or a complete
// one, never a torn bbolt header. If path appears meanwhile (another
// process won the race), that file is kept and create does nothing.
func create(path string, now time.Time) error {
	if _, err := os.Stat(path); !errors.Is(err, os.ErrNotExist) {
		return nil // exists, or an error Open will report
	}
	tmp := path + ".new-" + strconv.Itoa(os.Getpid())
	_ = os.Remove(tmp) // left by an earlier crash of a process with our pid
	db, err := bolt.Open(tmp, 0o600, &bolt.Options{Timeout: time.Second})
	if err != nil {
		return fmt.Errorf("store: create %s: %w", tmp, err)
	}
	err = db.Update(func(tx *bolt.Tx) error { return initBuckets(tx, path, now) })
	if cerr := db.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Link(tmp, path)
		if errors.Is(err, os.ErrExist) {
			err = nil
		}
	}
	os.Remove(tmp)
	if err != nil {
		return fmt.Errorf("store: create %s: %w", path, err)
	}
	return syncDir(filepath.Dir(path))
}

// syncDir makes a new directory entry durable.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return fmt.Errorf("store: sync directory %s: %w", dir, err)
	}
	defer d.Close()
	if err := d.Sync(); err != nil {
		return fmt.Errorf("store: sync directory %s: %w", dir, err)
	}
	return nil
}
