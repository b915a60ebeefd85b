package perf

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
)

// Grid is a table of one value on a full rectangular grid: Axes[i].Values
// strictly ascending, Values in row-major order (the last axis varies
// fastest). Build one with ReadGridCSV, which validates it.
type Grid struct {
	Name   string // table name used in errors, e.g. "cruise_fuel_flow.csv"
	Axes   []Axis
	Value  string // value column in SI, e.g. "fuel_flow_kg_s"
	Values []float64
	Lines  []int // file line of each value (ReadGridCSV), nil for a computed grid
}

// Axis is one dimension of a Grid, in SI (or FL for levels).
type Axis struct {
	Name   string // SI column name, e.g. "mass_kg", "fl", "mach", "isa_dev_k"
	Values []float64
}

// OutOfTableError reports a query outside a table: the axis, the value and
// the table's range on that axis. Tables are never extrapolated.
type OutOfTableError struct {
	Table, Axis string
	Value       float64
	Min, Max    float64
}

func (e *OutOfTableError) Error() string {
	return fmt.Sprintf("perf: table %s: %s %.6g outside the table's %g..%g (no extrapolation)", e.Table, e.Axis, e.Value, e.Min, e.Max)
}

// At returns the value at x (one coordinate per axis) by multilinear
// interpolation between the 2^n surrounding grid points (exact at grid
// points, linear along each axis between them). A coordinate outside its
// axis, or NaN, is an *OutOfTableError naming the axis. Cost: n binary
// searches and 2^n - 1 linear interpolations; no allocation for n <= 6.
func (g *Grid) At(x ...float64) (float64, error) {
	n := len(g.Axes)
	if len(x) != n {
		return math.NaN(), fmt.Errorf("perf: table %s: %d coordinates for %d axes", g.Name, len(x), n)
	}
	if n > 6 {
		return math.NaN(), fmt.Errorf("perf: table %s: %d axes, at most 6 supported", g.Name, n)
	}
	var frac [6]float64
	var step [6]int // offset to the upper neighbour along each axis (0 for one value)
	base, stride := 0, 1
	for i := n - 1; i >= 0; i-- {
		ax := g.Axes[i]
		v := ax.Values
		lo, hi := v[0], v[len(v)-1]
		xi := x[i]
		// A coordinate off an end by rounding only (1e-9 relative) is
		// taken at that end; anything further is outside.
		if tol := 1e-9 * (1 + math.Abs(lo)); xi < lo && xi >= lo-tol {
			xi = lo
		} else if tol := 1e-9 * (1 + math.Abs(hi)); xi > hi && xi <= hi+tol {
			xi = hi
		}
		if !(xi >= lo && xi <= hi) {
			return math.NaN(), &OutOfTableError{Table: g.Name, Axis: ax.Name, Value: x[i], Min: lo, Max: hi}
		}
		if len(v) > 1 {
			j := sort.SearchFloat64s(v, xi) // first v[j] >= x
			if j == 0 {
				j = 1
			}
			base += (j - 1) * stride
			frac[i] = (xi - v[j-1]) / (v[j] - v[j-1])
			step[i] = stride
		}
		stride *= len(v)
	}
	// Sum over the corners of the cell, weights the products of fractions;
	// a corner of zero weight is skipped (its value may be NaN, blank).
	var sum float64
	for c := 0; c < 1<<n; c++ {
		w, off := 1.0, base
		for i := range n {
			if c&(1<<i) != 0 {
				if step[i] == 0 {
					w = 0
					break
				}
				off += step[i]
				w *= frac[i]
			} else {
				w *= 1 - frac[i]
			}
		}
		if w != 0 {
			sum += w * g.Values[off]
		}
	}
	return sum, nil
}

// TableError reports an invalid table file: file, line (1-based, 0 for
// the whole file) and column.
type TableError struct {
	File   string
	Line   int
	Column string
	Reason string
}

func (e *TableError) Error() string {
	s := e.File
	if e.Line > 0 {
		s += ":" + strconv.Itoa(e.Line)
	}
	if e.Column != "" {
		s += ": column " + e.Column
	}
	return s + ": " + e.Reason
}

// ColumnSpec is one accepted column of a table: the SI name and the header
// names accepted with their factor to SI (e.g. "mass_lb": 0.45359237).
// For a value column, Signed accepts negative numbers and Blank accepts an
// empty field, read as NaN ("not possible here", e.g. a level a climb does
// not reach); an axis column takes neither.
type ColumnSpec struct {
	SI     string
	Units  map[string]float64
	Signed bool
	Blank  bool
}

// Standard columns of the table format (see aircraft/TABLES.md).
var (
	ColMass   = ColumnSpec{SI: "mass_kg", Units: map[string]float64{"mass_kg": 1, "mass_lb": lbToKg}}
	ColLevel  = ColumnSpec{SI: "fl", Units: map[string]float64{"fl": 1, "altitude_ft": 0.01}}
	ColMach   = ColumnSpec{SI: "mach", Units: map[string]float64{"mach": 1}}
	ColISADev = ColumnSpec{SI: "isa_dev_k", Units: map[string]float64{"isa_dev_c": 1, "isa_dev_k": 1}}
	ColFuelFF = ColumnSpec{SI: "fuel_flow_kg_s", Units: map[string]float64{"fuel_flow_kg_h": 1.0 / 3600, "fuel_flow_lb_h": lbToKg / 3600}}
	// Residual rates of climb (m/s of pressure altitude) at the max climb
	// and max cruise ratings; negative where drag exceeds that thrust.
	ColROCClimb  = ColumnSpec{SI: "roc_climb_m_s", Units: map[string]float64{"roc_climb_ft_min": FtToM / 60, "roc_climb_m_s": 1}, Signed: true}
	ColROCCruise = ColumnSpec{SI: "roc_cruise_m_s", Units: map[string]float64{"roc_cruise_ft_min": FtToM / 60, "roc_cruise_m_s": 1}, Signed: true}
	// Climb and descent from or to 1,500 ft; blank where not possible.
	ColTime     = ColumnSpec{SI: "time_s", Units: map[string]float64{"time_min": 60, "time_s": 1}, Blank: true}
	ColFuel     = ColumnSpec{SI: "fuel_kg", Units: map[string]float64{"fuel_kg": 1, "fuel_lb": lbToKg}, Blank: true}
	ColDistance = ColumnSpec{SI: "distance_m", Units: map[string]float64{"distance_nm": NMToM, "distance_km": 1000}, Blank: true}
	ColBuffetCL = ColumnSpec{SI: "cl", Units: map[string]float64{"cl": 1}}
	// Level-flight thrust (= drag), all engines: 1 lbf is 1 lb × standard
	// gravity 9.80665 m/s² (ICAO Annex 5).
	ColThrust = ColumnSpec{SI: "thrust_n", Units: map[string]float64{"thrust_kn": 1000, "thrust_lbf": lbToKg * G0}}
)

// toSI converts v by factor f, dividing by 1/f when that is a whole number
// (feet to FL: 35000/100 is exactly 350, 35000*0.01 need not be).
func toSI(v, f float64) float64 {
	if inv := 1 / f; f < 1 && inv == math.Round(inv) {
		return v / inv
	}
	return v * f
}

// lbToKg is the international avoirdupois pound in kg (exact by
// definition, International Yard and Pound Agreement of 1959).
const lbToKg = 0.45359237

// maxTableRows bounds a table file's rows before anything is allocated for
// the grid.
const maxTableRows = 1 << 20

// ReadGridCSV reads one table: a header naming each axis column (in the
// order of axes, any unit each ColumnSpec accepts) and then the value
// column, and one row per grid point in any order. It checks, naming the
// file, line and column: the header, numbers (finite; the value also
// non-negative unless value.Signed), each axis's values (at most 1,000
// distinct), duplicated rows, and holes (every combination of axis values
// must be present).
func ReadGridCSV(r io.Reader, file string, axes []ColumnSpec, value ColumnSpec) (*Grid, error) {
	gs, err := ReadGridsCSV(r, file, axes, []ColumnSpec{value})
	if err != nil {
		return nil, err
	}
	return gs[0], nil
}

// ReadGridsCSV is ReadGridCSV for a table of several value columns on one
// grid: the header names the axes, then the values, and it returns one
// Grid per value column (sharing the axes). Cost: O(rows log rows) time,
// memory for the rows and the grid, both bounded by 2^20 rows.
func ReadGridsCSV(r io.Reader, file string, axes []ColumnSpec, values []ColumnSpec) ([]*Grid, error) {
	data, err := io.ReadAll(io.LimitReader(r, maxFileSize*16+1))
	if err != nil {
		return nil, &TableError{File: file, Reason: err.Error()}
	}
	if len(data) > maxFileSize*16 {
		return nil, &TableError{File: file, Reason: fmt.Sprintf("more than %d bytes", maxFileSize*16)}
	}
	na := len(axes)
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comment = '#'
	cr.FieldsPerRecord = na + len(values)
	cr.ReuseRecord = true
	head, err := cr.Read()
	if err != nil {
		return nil, csvErr(file, err)
	}
	head = slices.Clone(head) // ReuseRecord overwrites it

	specs := append(append([]ColumnSpec(nil), axes...), values...)
	factor := make([]float64, len(specs))
	for i, s := range specs {
		name := strings.ToLower(strings.TrimSpace(head[i]))
		f, ok := s.Units[name]
		if !ok {
			var want []string
			for k := range s.Units {
				want = append(want, k)
			}
			slices.Sort(want)
			return nil, &TableError{File: file, Line: 1, Column: strconv.Quote(head[i]), Reason: "unrecognised column or unit; want " + strings.Join(want, " or ")}
		}
		factor[i] = f
	}
	// Rows are kept in one flat slice, nc numbers each (one allocation
	// per doubling, not per row), and their lines beside it.
	nc := len(specs)
	// Sized from the line count, so the rows are not copied as they grow;
	// a row takes at least 2 bytes a column, which bounds it too.
	nl := min(bytes.Count(data, []byte{'\n'})+1, len(data)/(2*nc)+1, maxTableRows+1)
	flat := make([]float64, 0, nl*nc)
	lines := make([]int, 0, nl)
	// distinct[i] counts the rows of each value of axis i; first[i] is the
	// line where each first appears (to name a stray value).
	distinct := make([]map[float64]int, na)
	first := make([]map[float64]int, na)
	for i := range distinct {
		distinct[i], first[i] = map[float64]int{}, map[float64]int{}
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvErr(file, err)
		}
		line, _ := cr.FieldPos(0)
		if len(lines) >= maxTableRows {
			return nil, &TableError{File: file, Line: line, Reason: fmt.Sprintf("more than %d rows", maxTableRows)}
		}
		flat = append(flat, make([]float64, nc)...)
		x := flat[len(flat)-nc:]
		for i, f := range rec {
			f = strings.TrimSpace(f)
			if f == "" && i >= na && specs[i].Blank {
				x[i] = math.NaN()
				continue
			}
			v, err := strconv.ParseFloat(f, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, &TableError{File: file, Line: line, Column: head[i], Reason: fmt.Sprintf("%q is not a finite number", f)}
			}
			if i >= na && v < 0 && !specs[i].Signed {
				return nil, &TableError{File: file, Line: line, Column: head[i], Reason: fmt.Sprintf("%g is negative", v)}
			}
			x[i] = toSI(v, factor[i])
		}
		for i := range axes {
			if distinct[i][x[i]]++; distinct[i][x[i]] == 1 {
				first[i][x[i]] = line
			}
			if len(distinct[i]) > 1000 {
				return nil, &TableError{File: file, Line: line, Column: head[i], Reason: "more than 1,000 distinct values on one axis"}
			}
		}
		lines = append(lines, line)
	}
	if len(lines) == 0 {
		return nil, &TableError{File: file, Reason: "no rows"}
	}
	ax := make([]Axis, na)
	size := 1
	for i := range axes {
		vals := make([]float64, 0, len(distinct[i]))
		for v := range distinct[i] {
			vals = append(vals, v)
		}
		slices.Sort(vals)
		ax[i] = Axis{Name: axes[i].SI, Values: vals}
		size *= len(vals)
		if size > maxTableRows {
			return nil, &TableError{File: file, Reason: fmt.Sprintf("the grid has more than %d points", maxTableRows)}
		}
	}
	gs := make([]*Grid, len(values))
	for j, v := range values {
		gs[j] = &Grid{Name: file, Value: v.SI, Axes: ax, Values: make([]float64, size)}
	}
	seen := make([]int, size) // line of the row that set each point
	for r, line := range lines {
		x := flat[r*nc : (r+1)*nc]
		off := 0
		for i, a := range ax {
			k, _ := slices.BinarySearch(a.Values, x[i])
			off = off*len(a.Values) + k
		}
		if seen[off] != 0 {
			return nil, &TableError{File: file, Line: line, Reason: fmt.Sprintf("duplicates the grid point of line %d", seen[off])}
		}
		seen[off] = line
		for j := range gs {
			gs[j].Values[off] = x[na+j]
		}
	}
	for off, l := range seen {
		if l == 0 {
			// An axis value on less than half the rows of another is most
			// likely mistyped on its first line (FL 3500 for 350): name it.
			for i := range axes {
				most, least, lv := 0, math.MaxInt, 0.0
				for v, c := range distinct[i] {
					most = max(most, c)
					if c < least || c == least && v < lv {
						least, lv = c, v
					}
				}
				if 2*least < most {
					return nil, &TableError{File: file, Line: first[i][lv], Column: head[i], Reason: fmt.Sprintf("hole in the grid: %g (first on this line) is on only %d rows, other values of this column on up to %d (a mistyped value?); no row for %s", lv/factor[i], least, most, gs[0].pointName(off))}
				}
			}
			return nil, &TableError{File: file, Reason: "hole in the grid: no row for " + gs[0].pointName(off)}
		}
	}
	for _, g := range gs {
		g.Lines = seen
	}
	return gs, nil
}

// checkMonotone returns a *TableError naming the line and column of the
// first value that, against the value at the previous grid point along
// axis (the others held), falls when sign > 0 or rises when sign < 0: for
// example fuel flow must not fall as mass rises. NaN (blank) values are
// skipped, and so are pairs with a negative value when positiveOnly.
func (g *Grid) checkMonotone(axis, sign int, column string, positiveOnly bool) error {
	stride := 1
	for i := axis + 1; i < len(g.Axes); i++ {
		stride *= len(g.Axes[i].Values)
	}
	n := len(g.Axes[axis].Values)
	verb, want := "falls", "does not fall"
	if sign < 0 {
		verb, want = "rises", "does not rise"
	}
	for off := range g.Values {
		if (off/stride)%n == 0 {
			continue
		}
		d := g.Values[off] - g.Values[off-stride]
		if positiveOnly && (g.Values[off] < 0 || g.Values[off-stride] < 0) {
			continue
		}
		if (sign > 0 && d < 0) || (sign < 0 && d > 0) {
			line := 0
			if g.Lines != nil {
				line = g.Lines[off]
			}
			name := g.Axes[axis].Name
			return &TableError{File: g.Name, Line: line, Column: column, Reason: fmt.Sprintf("%s as %s rises (%s): want a value that %s with %s", verb, name, g.pointName(off), want, name)}
		}
	}
	return nil
}

// pointName names the grid point at offset off, e.g. "mass_kg=60000, fl=350".
func (g *Grid) pointName(off int) string {
	parts := make([]string, len(g.Axes))
	for i := len(g.Axes) - 1; i >= 0; i-- {
		n := len(g.Axes[i].Values)
		parts[i] = fmt.Sprintf("%s=%g", g.Axes[i].Name, g.Axes[i].Values[off%n])
		off /= n
	}
	return strings.Join(parts, ", ")
}

func csvErr(file string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &TableError{File: file, Line: pe.Line, Reason: pe.Err.Error()}
	}
	return &TableError{File: file, Reason: err.Error()}
}

// WriteGridCSV writes g in the format ReadGridCSV reads: header names the
// columns (axes, then the value) and factors[i] is the SI value of one unit
// of column i (each number written is SI / factor), one row per grid
// point, axes ascending, the last varying fastest.
func WriteGridCSV(w io.Writer, g *Grid, header []string, factors []float64) error {
	return WriteGridsCSV(w, []*Grid{g}, header, factors)
}

// WriteGridsCSV writes grids sharing one set of axes (those of gs[0]) as
// one table, a value column per grid, in the format ReadGridsCSV reads; a
// NaN value is written as an empty field.
func WriteGridsCSV(w io.Writer, gs []*Grid, header []string, factors []float64) error {
	if len(gs) == 0 {
		return errors.New("perf: no grid to write")
	}
	g := gs[0]
	n := len(g.Axes)
	if len(header) != n+len(gs) || len(factors) != len(header) {
		return fmt.Errorf("perf: %d header names and %d factors for %d columns", len(header), len(factors), n+len(gs))
	}
	for _, o := range gs[1:] {
		if len(o.Values) != len(g.Values) {
			return fmt.Errorf("perf: grids of %d and %d points in one table", len(g.Values), len(o.Values))
		}
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	rec := make([]string, n+len(gs))
	for off := range g.Values {
		o := off
		for i := n - 1; i >= 0; i-- {
			k := len(g.Axes[i].Values)
			rec[i] = strconv.FormatFloat(g.Axes[i].Values[o%k]/factors[i], 'g', -1, 64)
			o /= k
		}
		for j, gj := range gs {
			rec[n+j] = ""
			if v := gj.Values[off]; !math.IsNaN(v) {
				rec[n+j] = strconv.FormatFloat(v/factors[n+j], 'g', 10, 64)
			}
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// cell4 is the cell of a 4-axis grid around a query: the offset of its
// lowest corner, the offset to the upper neighbour along each axis (0 on
// an axis of one value) and the fraction along it.
type cell4 struct {
	base int
	step [4]int
	frac [4]float64
}

// locate4 finds the cell of a 4-axis grid around x, false when x lies
// outside the grid on any axis (or is NaN); within 1e-9 relative of an end
// it is taken at that end, as At does. Cost: four binary searches.
func (g *Grid) locate4(x [4]float64) (cell4, bool) {
	var c cell4
	stride := 1
	for i := 3; i >= 0; i-- {
		v := g.Axes[i].Values
		lo, hi := v[0], v[len(v)-1]
		xi := x[i]
		if tol := 1e-9 * (1 + math.Abs(lo)); xi < lo && xi >= lo-tol {
			xi = lo
		} else if tol := 1e-9 * (1 + math.Abs(hi)); xi > hi && xi <= hi+tol {
			xi = hi
		}
		if !(xi >= lo && xi <= hi) {
			return c, false
		}
		if len(v) > 1 {
			j := sort.SearchFloat64s(v, xi)
			if j == 0 {
				j = 1
			}
			c.base += (j - 1) * stride
			c.frac[i] = (xi - v[j-1]) / (v[j] - v[j-1])
			c.step[i] = stride
		}
		stride *= len(v)
	}
	return c, true
}

// lerpCorner interpolates a..b at fraction f, returning an end exactly at
// f = 0 or 1 (so that a blank, NaN, corner of zero weight is not read
// into the result).
func lerpCorner(a, b, f float64) float64 {
	switch f {
	case 0:
		return a
	case 1:
		return b
	}
	return a + f*(b-a)
}

// eval4 is the multilinear interpolation of g's values in cell c (a grid
// of the same axes as the one located), by successive linear
// interpolation along the last axis, then the third, second and first:
// the same function as At's weighted sum of the 16 corners (equal up to
// rounding), with 15 interpolations. No allocation.
func (g *Grid) eval4(c *cell4) float64 {
	v := g.Values
	var l3 [8]float64
	for k := range 8 {
		off := c.base
		if k&4 != 0 {
			off += c.step[0]
		}
		if k&2 != 0 {
			off += c.step[1]
		}
		if k&1 != 0 {
			off += c.step[2]
		}
		a := v[off]
		if c.frac[3] != 0 {
			a = lerpCorner(a, v[off+c.step[3]], c.frac[3])
		}
		l3[k] = a
	}
	var l2 [4]float64
	for k := range 4 {
		l2[k] = lerpCorner(l3[2*k], l3[2*k+1], c.frac[2])
	}
	return lerpCorner(lerpCorner(l2[0], l2[1], c.frac[1]), lerpCorner(l2[2], l2[3], c.frac[1]), c.frac[0])
}
