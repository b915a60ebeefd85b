//go:build !unix

package batch

const lockName = ".lock"

// lockDir does not lock on systems without flock(2), and says so.
func lockDir(dir string) (unlock func(), warning string, err error) {
	return func() {}, "batch: warning: no file locks on this system: two runs on " + dir + " are not kept apart", nil
}
