package serve

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"sync"
	"time"

	"levelpath/perf"
	"levelpath/winds"
)

// dataDir resolves the names a request gives (route, aircraft and weather
// files) inside one directory. A name is a plain file name or a relative
// path below the directory; an absolute path, a ".." element, a
// backslash, a NUL or a symlink whose target lies outside the directory
// is refused. Resolution is by filepath.EvalSymlinks of the joined name,
// then a prefix check against the (evaluated) directory.
type dataDir struct {
	root string // absolute, symlinks evaluated
}

func newDataDir(dir string) (*dataDir, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return nil, err
	}
	real, err := filepath.EvalSymlinks(abs)
	if err != nil {
		return nil, fmt.Errorf("--data %s: %w", dir, err)
	}
	st, err := os.Stat(real)
	if err != nil {
		return nil, fmt.Errorf("--data %s: %w", dir, err)
	}
	if !st.IsDir() {
		return nil, fmt.Errorf("--data %s: not a directory", dir)
	}
	return &dataDir{root: real}, nil
}

// checkName refuses a name that looks like a filesystem path leaving the
// directory; it does not look at the disk.
func checkName(name string) error {
	switch {
	case name == "":
		return errors.New("empty name")
	case len(name) > 255:
		return fmt.Errorf("name of %d bytes, more than 255", len(name))
	case strings.ContainsAny(name, "\\\x00"), filepath.IsAbs(name), strings.HasPrefix(name, "/"):
		return fmt.Errorf("%q is a path, not a name of a file in the data directory", name)
	}
	for el := range strings.SplitSeq(name, "/") {
		if el == ".." || el == "." || el == "" {
			return fmt.Errorf("%q is a path, not a name of a file in the data directory", name)
		}
	}
	return nil
}

// resolve returns the real path of name inside the directory, or an
// error naming it: a path-like name, a missing file, a directory, or a
// symlink leaving the directory.
func (d *dataDir) resolve(name string) (string, error) {
	if err := checkName(name); err != nil {
		return "", err
	}
	p, err := filepath.EvalSymlinks(filepath.Join(d.root, filepath.FromSlash(name)))
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return "", fmt.Errorf("%q: no such file in the data directory", name)
		}
		return "", fmt.Errorf("%q: cannot be read", name)
	}
	if rel, err := filepath.Rel(d.root, p); err != nil || rel == ".." || strings.HasPrefix(rel, ".."+string(filepath.Separator)) {
		return "", fmt.Errorf("%q: leads outside the data directory", name)
	}
	st, err := os.Stat(p)
	if err != nil || !st.Mode().IsRegular() {
		return "", fmt.Errorf("%q: not a regular file in the data directory", name)
	}
	return p, nil
}

// resolveTables is resolve for a directory of operator tables
// (perf/aircraft/TABLES.md): the directory and every file of the table
// format in it must lie inside the data directory. isDir reports whether
// name is a directory at all (so that its error is the one to report).
func (d *dataDir) resolveTables(name string) (p string, isDir bool, err error) {
	if err := checkName(name); err != nil {
		return "", false, err
	}
	p, err = filepath.EvalSymlinks(filepath.Join(d.root, filepath.FromSlash(name)))
	if err != nil {
		return "", false, fmt.Errorf("%q: no such file or directory in the data directory", name)
	}
	inside := func(p string) bool {
		rel, err := filepath.Rel(d.root, p)
		return err == nil && rel != ".." && !strings.HasPrefix(rel, ".."+string(filepath.Separator))
	}
	if st, err := os.Stat(p); err != nil || !st.IsDir() {
		return "", false, fmt.Errorf("%q: not a table directory", name)
	}
	if !inside(p) {
		return "", true, fmt.Errorf("%q: leads outside the data directory", name)
	}
	for _, f := range []string{perf.TablesManifest, perf.CruiseFuelFlowFile, perf.ThrustLimitsFile, perf.ClimbFile, perf.DescentFile, perf.BuffetFile} {
		if q, err := filepath.EvalSymlinks(filepath.Join(p, f)); err == nil && !inside(q) {
			return "", true, fmt.Errorf("%q: %s leads outside the data directory", name, f)
		}
	}
	return p, true, nil
}

// list returns the names of regular files directly in the directory
// whose extension is one of exts (lower case, with the dot).
func (d *dataDir) list(exts ...string) []string {
	ents, err := os.ReadDir(d.root)
	if err != nil {
		return nil
	}
	var out []string
	for _, e := range ents {
		ext := strings.ToLower(filepath.Ext(e.Name()))
		if slices.Contains(exts, ext) {
			if _, err := d.resolve(e.Name()); err == nil {
				out = append(out, e.Name())
			}
		}
	}
	sort.Strings(out)
	return out
}

// fileDigest returns the SHA-256 of a file as hex.
func fileDigest(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}

// stamp identifies a file's version by size and modification time.
type stamp struct {
	size  int64
	mtime time.Time
}

func stampOf(path string) (stamp, error) {
	st, err := os.Stat(path)
	if err != nil {
		return stamp{}, err
	}
	return stamp{st.Size(), st.ModTime()}, nil
}

// weatherSet is a decoded set of weather files shared by requests.
type weatherSet struct {
	field   *winds.Field
	names   []string
	digests []string
	stamps  []stamp
}

// weatherCache decodes each set of weather files once and shares it; a
// set is decoded again when any of its files changes size or
// modification time. Concurrent first requests for one set wait for a
// single decode. Memory: one decoded field per distinct set asked for.
type weatherCache struct {
	dir     *dataDir
	mu      sync.Mutex
	sets    map[string]*weatherEntry
	decodes func() // counts decodes (metrics)
}

type weatherEntry struct {
	mu  sync.Mutex
	set *weatherSet
}

// get returns the decoded set for names (each resolved in the data
// directory); the error is the caller's to map (a bad name or a file
// the decoder refuses is bad input).
func (c *weatherCache) get(names []string) (*weatherSet, error) {
	paths := make([]string, len(names))
	stamps := make([]stamp, len(names))
	for i, n := range names {
		p, err := c.dir.resolve(n)
		if err != nil {
			return nil, err
		}
		if stamps[i], err = stampOf(p); err != nil {
			return nil, fmt.Errorf("%q: cannot be read", n)
		}
		paths[i] = p
	}
	key := strings.Join(names, "\x00")
	c.mu.Lock()
	e := c.sets[key]
	if e == nil {
		e = &weatherEntry{}
		c.sets[key] = e
	}
	c.mu.Unlock()
	e.mu.Lock()
	defer e.mu.Unlock()
	if e.set != nil && sameStamps(e.set.stamps, stamps) {
		return e.set, nil
	}
	// Cruise levels lie between FL050 and FL600, as the command line keeps.
	f, err := winds.OpenBetween(perf.FLToPressure(600), perf.FLToPressure(50), paths...)
	if err != nil {
		// Name the files as the request did, not by where the data
		// directory lies.
		msg := err.Error()
		for i, p := range paths {
			msg = strings.ReplaceAll(msg, p, names[i])
		}
		return nil, errors.New(msg)
	}
	ws := &weatherSet{field: f, names: append([]string(nil), names...), stamps: stamps}
	for _, p := range paths {
		d, err := fileDigest(p)
		if err != nil {
			return nil, err
		}
		ws.digests = append(ws.digests, d)
	}
	if c.decodes != nil {
		c.decodes()
	}
	e.set = ws
	return ws, nil
}

func sameStamps(a, b []stamp) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i].size != b[i].size || !a[i].mtime.Equal(b[i].mtime) {
			return false
		}
	}
	return true
}
