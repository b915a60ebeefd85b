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
	return fmt.Sprintf("perf: table %s: %s %g outside the table's %g..%g (no extrapolation)", e.Table, e.Axis, e.Value, e.Min, e.Max)
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
	var idx [6]int
	var frac [6]float64
	for i, ax := range g.Axes {
		v := ax.Values
		lo, hi := v[0], v[len(v)-1]
		if !(x[i] >= lo && x[i] <= hi) {
			return math.NaN(), &OutOfTableError{Table: g.Name, Axis: ax.Name, Value: x[i], Min: lo, Max: hi}
		}
		if len(v) == 1 {
			continue
		}
		j := sort.SearchFloat64s(v, x[i]) // first v[j] >= x
		if j == 0 {
			j = 1
		}
		idx[i] = j - 1
		frac[i] = (x[i] - v[j-1]) / (v[j] - v[j-1])
	}
	// Sum over the corners of the cell, weights the products of fractions.
	var sum float64
	for c := 0; c < 1<<n; c++ {
		w, off := 1.0, 0
		for i := range n {
			k := idx[i]
			if c&(1<<i) != 0 {
				if len(g.Axes[i].Values) == 1 {
					w = 0
					break
				}
				k++
				w *= frac[i]
			} else {
				w *= 1 - frac[i]
			}
			off = off*len(g.Axes[i].Values) + k
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
type ColumnSpec struct {
	SI    string
	Units map[string]float64
}

// Standard columns of the table format (see aircraft/TABLES.md).
var (
	ColMass   = ColumnSpec{"mass_kg", map[string]float64{"mass_kg": 1, "mass_lb": 0.45359237}}
	ColLevel  = ColumnSpec{"fl", map[string]float64{"fl": 1, "altitude_ft": 0.01}}
	ColMach   = ColumnSpec{"mach", map[string]float64{"mach": 1}}
	ColISADev = ColumnSpec{"isa_dev_k", map[string]float64{"isa_dev_c": 1, "isa_dev_k": 1}}
	ColFuelFF = ColumnSpec{"fuel_flow_kg_s", map[string]float64{"fuel_flow_kg_h": 1.0 / 3600, "fuel_flow_lb_h": 0.45359237 / 3600}}
)

// maxTableRows bounds a table file's rows before anything is allocated for
// the grid.
const maxTableRows = 1 << 20

// ReadGridCSV reads one table: a header naming each axis column (in the
// order of axes, any unit each ColumnSpec accepts) and then the value
// column, and one row per grid point in any order. It checks, naming the
// file, line and column: the header, numbers (finite; the value also
// non-negative), each axis's values (at most 1,000 distinct), duplicated
// rows, and holes (every combination of axis values must be present).
func ReadGridCSV(r io.Reader, file string, axes []ColumnSpec, value ColumnSpec) (*Grid, error) {
	data, err := io.ReadAll(io.LimitReader(r, maxFileSize*16+1))
	if err != nil {
		return nil, &TableError{File: file, Reason: err.Error()}
	}
	if len(data) > maxFileSize*16 {
		return nil, &TableError{File: file, Reason: fmt.Sprintf("more than %d bytes", maxFileSize*16)}
	}
	cr := csv.NewReader(bytes.NewReader(data))
	cr.Comment = '#'
	cr.FieldsPerRecord = len(axes) + 1
	cr.ReuseRecord = true
	head, err := cr.Read()
	if err != nil {
		return nil, csvErr(file, err)
	}
	head = slices.Clone(head) // ReuseRecord overwrites it

	specs := append(append([]ColumnSpec(nil), axes...), value)
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
	type row struct {
		line int
		x    []float64
	}
	var rows []row
	distinct := make([]map[float64]bool, len(axes))
	for i := range distinct {
		distinct[i] = map[float64]bool{}
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
		if len(rows) >= maxTableRows {
			return nil, &TableError{File: file, Line: line, Reason: fmt.Sprintf("more than %d rows", maxTableRows)}
		}
		x := make([]float64, len(specs))
		for i, f := range rec {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, &TableError{File: file, Line: line, Column: head[i], Reason: fmt.Sprintf("%q is not a finite number", f)}
			}
			if i == len(axes) && v < 0 {
				return nil, &TableError{File: file, Line: line, Column: head[i], Reason: fmt.Sprintf("%g is negative", v)}
			}
			x[i] = v * factor[i]
		}
		for i := range axes {
			distinct[i][x[i]] = true
			if len(distinct[i]) > 1000 {
				return nil, &TableError{File: file, Line: line, Column: head[i], Reason: "more than 1,000 distinct values on one axis"}
			}
		}
		rows = append(rows, row{line, x})
	}
	if len(rows) == 0 {
		return nil, &TableError{File: file, Reason: "no rows"}
	}
	g := &Grid{Name: file, Value: value.SI, Axes: make([]Axis, len(axes))}
	size := 1
	for i := range axes {
		vals := make([]float64, 0, len(distinct[i]))
		for v := range distinct[i] {
			vals = append(vals, v)
		}
		slices.Sort(vals)
		g.Axes[i] = Axis{Name: axes[i].SI, Values: vals}
		size *= len(vals)
		if size > maxTableRows {
			return nil, &TableError{File: file, Reason: fmt.Sprintf("the grid has more than %d points", maxTableRows)}
		}
	}
	g.Values = make([]float64, size)
	seen := make([]int, size) // line of the row that set each point
	for _, r := range rows {
		off := 0
		for i, ax := range g.Axes {
			k, _ := slices.BinarySearch(ax.Values, r.x[i])
			off = off*len(ax.Values) + k
		}
		if seen[off] != 0 {
			return nil, &TableError{File: file, Line: r.line, Reason: fmt.Sprintf("duplicates the grid point of line %d", seen[off])}
		}
		seen[off] = r.line
		g.Values[off] = r.x[len(axes)]
	}
	for off, l := range seen {
		if l == 0 {
			return nil, &TableError{File: file, Reason: "hole in the grid: no row for " + g.pointName(off)}
		}
	}
	g.Lines = seen
	return g, nil
}

// checkRising returns a *TableError naming the line (and column) of the
// first value that is lower than the value at the previous grid point
// along axis 0, the others held: for a fuel-flow table by mass, fuel flow
// must not fall as mass rises.
func (g *Grid) checkRising(column string) error {
	stride := len(g.Values) / len(g.Axes[0].Values)
	for off := stride; off < len(g.Values); off++ {
		if g.Values[off] < g.Values[off-stride] {
			line := 0
			if g.Lines != nil {
				line = g.Lines[off]
			}
			return &TableError{File: g.Name, Line: line, Column: column, Reason: fmt.Sprintf("falls as %s rises (%s): want a value that does not fall with %s", g.Axes[0].Name, g.pointName(off), g.Axes[0].Name)}
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
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return err
	}
	n := len(g.Axes)
	rec := make([]string, n+1)
	for off, v := range g.Values {
		o := off
		for i := n - 1; i >= 0; i-- {
			k := len(g.Axes[i].Values)
			rec[i] = strconv.FormatFloat(g.Axes[i].Values[o%k]/factors[i], 'g', -1, 64)
			o /= k
		}
		rec[n] = strconv.FormatFloat(v/factors[n], 'g', 10, 64)
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// CruiseFuelFlowGrid tabulates the model's level-flight fuel flow (Point,
// thrust = drag, including the performance factor) on the grid of masses
// (kg), flight levels, Mach numbers and ISA deviations (K), each ascending.
// Points where the model is thrust- or buffet-limited are tabulated too:
// the table holds fuel flow, not limits. Cost: one Point per grid point.
func (a *Aircraft) CruiseFuelFlowGrid(masses, fls, machs, devs []float64) (*Grid, error) {
	axes := [][]float64{masses, fls, machs, devs}
	size := 1
	for _, v := range axes {
		if len(v) == 0 || !slices.IsSorted(v) || len(slices.Compact(slices.Clone(v))) != len(v) {
			return nil, fmt.Errorf("perf: grid axis %v is empty or not strictly ascending", v)
		}
		size *= len(v)
	}
	if size > maxTableRows {
		return nil, fmt.Errorf("perf: grid of %d points, more than %d", size, maxTableRows)
	}
	g := &Grid{Name: "cruise_fuel_flow.csv", Value: ColFuelFF.SI, Values: make([]float64, 0, size), Axes: []Axis{
		{ColMass.SI, slices.Clone(masses)}, {ColLevel.SI, slices.Clone(fls)}, {ColMach.SI, slices.Clone(machs)}, {ColISADev.SI, slices.Clone(devs)}}}
	for _, m := range masses {
		for _, fl := range fls {
			p := FLToPressure(fl)
			for _, mach := range machs {
				for _, dev := range devs {
					g.Values = append(g.Values, a.Point(State{Mass: m, Pressure: p, Mach: mach, ISADev: dev}).FuelFlow)
				}
			}
		}
	}
	return g, nil
}
