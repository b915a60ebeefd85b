//go:build unix

package batch

import (
	"errors"
	"os"
	"path/filepath"

	"golang.org/x/sys/unix"
)

// lockName is the lock file of an output directory.
const lockName = ".lock"

// lockDir takes an exclusive, non-blocking flock(2) on dir/.lock, held
// until unlock is called or the process ends (the kernel drops it then, so
// a killed run leaves no stale lock). A directory locked by another
// process (or another Run in this one) is an *InputError naming it.
func lockDir(dir string) (unlock func(), err error) {
	f, err := os.OpenFile(filepath.Join(dir, lockName), os.O_RDWR|os.O_CREATE|unix.O_CLOEXEC, 0o644)
	if err != nil {
		return nil, err
	}
	if err := unix.Flock(int(f.Fd()), unix.LOCK_EX|unix.LOCK_NB); err != nil {
		f.Close()
		if errors.Is(err, unix.EWOULDBLOCK) {
			return nil, inputErrorf("batch: output directory %s is in use by another levelpath run (it holds the lock on %s): wait for that run to end, or choose another --out", dir, lockName)
		}
		return nil, err
	}
	return func() { f.Close() }, nil
}
