//go:build !unix && !windows

package hooks

import "os"

// tryLockFile has no advisory lock to take on this system: runs are not serialised.
func tryLockFile(*os.File) (bool, error) { return true, nil }

func unlockFile(*os.File) error { return nil }
