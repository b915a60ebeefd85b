//go:build unix

package batch

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"golang.org/x/sys/unix"
)

// lockName is the lock file of an output directory.
const lockName = ".lock"

// lockDir takes an exclusive, non-blocking flock(2) on dir/.lock, held
// until unlock is called or the process ends (the kernel drops it then, so
// a killed run leaves no stale lock). A directory locked by another
// process (or another Run in this one) is an *InputError naming it. On a
// file system that does not support locking (flock fails with ENOLCK,
// EOPNOTSUPP or ENOSYS) the run goes on unlocked and warning says so.
func lockDir(dir string) (unlock func(), warning string, err error) {
	f, err := os.OpenFile(filepath.Join(dir, lockName), os.O_RDWR|os.O_CREATE|unix.O_CLOEXEC, 0o644)
	if err != nil {
		return nil, "", fmt.Errorf("batch: lock file: %w", err)
	}
	if err := unix.Flock(int(f.Fd()), unix.LOCK_EX|unix.LOCK_NB); err != nil {
		f.Close()
		switch {
		case errors.Is(err, unix.EWOULDBLOCK):
			return nil, "", inputErrorf("batch: output directory %s is in use by another levelpath run (it holds the lock on %s): wait for that run to end, or choose another output directory", dir, lockName)
		case errors.Is(err, unix.ENOLCK), errors.Is(err, unix.EOPNOTSUPP), errors.Is(err, unix.ENOSYS):
			return func() {}, fmt.Sprintf("batch: warning: the file system of %s does not support locks (%v): two runs on it are not kept apart", dir, err), nil
		}
		return nil, "", fmt.Errorf("batch: locking %s: %w", dir, err)
	}
	return func() { f.Close() }, "", nil
}
