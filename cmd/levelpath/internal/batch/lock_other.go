//go:build !unix

package batch

const lockName = ".lock"

// lockDir does not lock on systems without flock(2): two runs on one
// output directory are not kept apart there.
func lockDir(dir string) (unlock func(), err error) { return func() {}, nil }
