package batch

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// WriteFileAtomic writes path through a temporary file in the same
// directory, filled by write: the file is synced, renamed over path and
// the directory synced, so a reader (or a resumed run) sees the old file
// or the whole new one, never a torn one, even after a power loss. On any
// error the temporary file is removed and path is untouched. It is the one
// atomic write of levelpath's outputs (records, plans, charts, reports).
func WriteFileAtomic(path string, write func(io.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, tmpPrefix+base+".*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
			err = fmt.Errorf("writing %s: %w", path, err)
		}
	}()
	bw := bufio.NewWriter(f)
	if err = write(bw); err != nil {
		return err
	}
	if err = bw.Flush(); err != nil {
		return err
	}
	if err = f.Chmod(0o644); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	if err = os.Rename(tmp, path); err != nil {
		return err
	}
	if d, derr := os.Open(dir); derr == nil {
		// The rename is durable once the directory is; a file system that
		// cannot sync a directory still has the whole file.
		d.Sync()
		d.Close()
	}
	return nil
}
