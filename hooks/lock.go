package hooks

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"
)

// ErrLocked is returned when another cleave run holds a lock for longer than the wait allows.
var ErrLocked = errors.New("another cleave run holds the lock")

// lock is an exclusive advisory lock on a dedicated file (never a notebook file: an atomic
// rename swaps the inode, so a lock on it would guard the old file). The file is kept after
// unlocking: removing it would let a waiting process lock a file nobody else sees.
type lock struct{ f *os.File }

// acquireLock locks the file at p (created if missing), waiting up to wait for another holder
// to let go. The holder's process id is written into the file, so a refusal can name it.
func acquireLock(p string, wait time.Duration) (*lock, error) {
	if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
		return nil, err
	}
	f, err := os.OpenFile(p, os.O_RDWR|os.O_CREATE, 0o644)
	if err != nil {
		return nil, err
	}
	deadline := time.Now().Add(wait)
	for {
		ok, err := tryLockFile(f)
		if err != nil {
			f.Close()
			return nil, fmt.Errorf("locking %s: %w", p, err)
		}
		if ok {
			break
		}
		if time.Now().After(deadline) {
			holder, _ := os.ReadFile(p)
			f.Close()
			return nil, fmt.Errorf("%w (%s, process %s); try again when it has finished", ErrLocked, p, strings.TrimSpace(string(holder)))
		}
		time.Sleep(20 * time.Millisecond)
	}
	if err := f.Truncate(0); err == nil {
		f.WriteAt([]byte(strconv.Itoa(os.Getpid())+"\n"), 0)
	}
	return &lock{f: f}, nil
}

// release lets go of the lock.
func (l *lock) release() error {
	err := unlockFile(l.f)
	return errors.Join(err, l.f.Close())
}
