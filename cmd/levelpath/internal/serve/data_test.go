package serve

import (
	"os"
	"path/filepath"
	"testing"
	"time"
)

func TestResolve(t *testing.T) {
	root := t.TempDir()
	outside := t.TempDir()
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	must(os.WriteFile(filepath.Join(root, "route.csv"), []byte("x"), 0o644))
	must(os.MkdirAll(filepath.Join(root, "sub"), 0o755))
	must(os.WriteFile(filepath.Join(root, "sub", "r.csv"), []byte("x"), 0o644))
	must(os.WriteFile(filepath.Join(outside, "secret.csv"), []byte("x"), 0o644))
	must(os.Symlink(filepath.Join(outside, "secret.csv"), filepath.Join(root, "leak.csv")))
	must(os.Symlink(outside, filepath.Join(root, "leakdir")))
	must(os.Symlink("route.csv", filepath.Join(root, "alias.csv")))
	d, err := newDataDir(root)
	must(err)
	for name, ok := range map[string]bool{
		"route.csv": true, "sub/r.csv": true, "alias.csv": true,
		"../" + filepath.Base(outside) + "/secret.csv": false, "leak.csv": false, "leakdir/secret.csv": false,
		"/etc/passwd": false, "sub/../route.csv": false, "./route.csv": false, "sub": false, "": false,
		"missing.csv": false, `sub\r.csv`: false, "route.csv\x00": false, "sub//r.csv": false,
	} {
		p, err := d.resolve(name)
		if (err == nil) != ok {
			t.Errorf("resolve(%q) = %q, %v; want ok %v", name, p, err, ok)
		}
	}
	if got := d.list(".csv"); len(got) != 2 || got[0] != "alias.csv" || got[1] != "route.csv" {
		t.Errorf("list: %v (the symlink out of the directory must not be listed)", got)
	}
}

// TestWeatherShared: a set is decoded once for many requests, and again
// when its file's modification time or size changes.
func TestWeatherShared(t *testing.T) {
	src, err := demoDir()
	if err != nil {
		t.Fatal(err)
	}
	root := t.TempDir()
	b, err := os.ReadFile(filepath.Join(src, "weather.grib2"))
	if err != nil {
		t.Fatal(err)
	}
	wpath := filepath.Join(root, "wx.grib2")
	if err := os.WriteFile(wpath, b, 0o644); err != nil {
		t.Fatal(err)
	}
	d, _ := newDataDir(root)
	n := 0
	c := &weatherCache{dir: d, sets: map[string]*weatherEntry{}, decodes: func() { n++ }}
	a1, err := c.get([]string{"wx.grib2"})
	if err != nil {
		t.Fatal(err)
	}
	a2, _ := c.get([]string{"wx.grib2"})
	if n != 1 || a1 != a2 {
		t.Fatalf("%d decodes for two gets of one file", n)
	}
	later := time.Now().Add(time.Hour)
	if err := os.Chtimes(wpath, later, later); err != nil {
		t.Fatal(err)
	}
	a3, _ := c.get([]string{"wx.grib2"})
	if n != 2 || a3 == a1 {
		t.Errorf("%d decodes after the file's time changed, want 2", n)
	}
	if err := os.WriteFile(wpath, b[:len(b)/2], 0o644); err != nil {
		t.Fatal(err)
	}
	os.Chtimes(wpath, later, later) // same time, other size
	if _, err := c.get([]string{"wx.grib2"}); err == nil {
		t.Errorf("a truncated GRIB file decoded without error")
	}
	if n != 2 {
		t.Errorf("%d decodes counted, want 2 (a failed decode is not shared)", n)
	}
}
