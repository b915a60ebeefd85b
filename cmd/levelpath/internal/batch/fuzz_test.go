package batch

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzReadSchedule: any schedule text gives rows, bad rows or a fatal
// error naming the file, never a panic; every bad row names its line.
func FuzzReadSchedule(f *testing.F) {
	f.Add("flight,departure,route,aircraft,tow_kg,ci\nA1,2026-06-01T08:00:00Z,r.csv,demo-regional,36000,10\n")
	f.Add("flight,departure,route,aircraft,tow_kg,ci,zfw_kg,fuel_kg\nB2,2026-06-01T08:00:00+02:00,r.csv,x,,5,30000,6000\n")
	f.Add("flight,departure,route,aircraft,tow_kg,ci\n\"A,1\",bad,r.csv,x,NaN,-1\n")
	f.Add("# comment\nflight;departure\n")
	f.Fuzz(func(t *testing.T, text string) {
		dir := t.TempDir()
		if err := os.WriteFile(filepath.Join(dir, "r.csv"), []byte("name,lat,lon\nA,1,2\nB,3,4\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(dir, "s.csv")
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		rows, bad, err := ReadSchedule(path)
		if err != nil {
			var fe *FormatError
			if !errors.As(err, &fe) && !strings.Contains(err.Error(), "s.csv") {
				t.Fatalf("fatal error does not name the file: %v", err)
			}
			return
		}
		for _, b := range bad {
			if b.Line <= 0 {
				t.Fatalf("bad row without a line: %+v", b)
			}
		}
		for _, r := range rows {
			if r.Flight == "" || r.Line <= 0 {
				t.Fatalf("row without flight or line: %+v", r)
			}
		}
	})
}
