package batch

import (
	"bytes"
	"maps"
	"slices"

	"github.com/parquet-go/parquet-go"
)

// ensembleNames are the columns an ensemble run adds to results.csv and
// results.parquet, before "error": the members' 10th and 90th
// percentiles of trip fuel and the least buffet margin over every member.
var ensembleNames = []string{"fuel_p10_kg", "fuel_p90_kg", "min_margin_all_members_g"}

// hasEnsemble reports whether any result was planned on an ensemble
// (then the ensemble columns are written; otherwise the files are as
// without ensembles, byte for byte).
func hasEnsemble(results []record) bool {
	for _, r := range results {
		if r.FuelP10Kg != nil || r.FuelP90Kg != nil || r.MinMarginAllG != nil {
			return true
		}
	}
	return false
}

// ensembleColumns is resultColumns with ensembleNames before "error".
func ensembleColumns() []string {
	n := len(resultColumns)
	return slices.Concat(resultColumns[:n-1], ensembleNames, resultColumns[n-1:])
}

// ensembleCells inserts r's ensemble cells before the last (error) cell.
func ensembleCells(row []string, r record) []string {
	n := len(row)
	return slices.Concat(row[:n-1], []string{fmtR(r.FuelP10Kg, decKg), fmtR(r.FuelP90Kg, decKg), fmtR(r.MinMarginAllG, decG)}, row[n-1:])
}

// parquetEnsembleRow is parquetRow with the ensemble columns.
type parquetEnsembleRow struct {
	Flight        string   `parquet:"flight,dict"`
	CI            float64  `parquet:"ci"`
	Status        string   `parquet:"status,dict"`
	Warnings      string   `parquet:"warnings"`
	Departure     int64    `parquet:"departure_utc,timestamp(millisecond)"`
	Arrival       *int64   `parquet:"arrival_utc,optional,timestamp(millisecond)"`
	Aircraft      string   `parquet:"aircraft,dict"`
	Row           int64    `parquet:"row"`
	DistanceNM    *float64 `parquet:"distance_nm,optional"`
	TakeoffMassKg *float64 `parquet:"takeoff_mass_kg,optional"`
	ZFWKg         *float64 `parquet:"zfw_kg,optional"`
	LandingMassKg *float64 `parquet:"landing_mass_kg,optional"`
	FuelKg        *float64 `parquet:"fuel_kg,optional"`
	TimeMin       *float64 `parquet:"time_min,optional"`
	Cost          *float64 `parquet:"cost,optional"`
	CO2Kg         *float64 `parquet:"co2_kg,optional"`
	FloorG        *float64 `parquet:"floor_g,optional"`
	Speed         string   `parquet:"speed"`
	Levels        string   `parquet:"levels"`
	InitialFL     *int64   `parquet:"initial_fl,optional"`
	Steps         *int64   `parquet:"steps,optional"`
	MinMarginG    *float64 `parquet:"min_margin_g,optional"`
	CostSavingPct *float64 `parquet:"cost_saving_pct,optional"`
	Profile       string   `parquet:"profile"`
	BlockKg       *float64 `parquet:"block_kg,optional"`
	LimitedBy     string   `parquet:"limited_by"`
	FuelP10Kg     *float64 `parquet:"fuel_p10_kg,optional"`
	FuelP90Kg     *float64 `parquet:"fuel_p90_kg,optional"`
	MinMarginAllG *float64 `parquet:"min_margin_all_members_g,optional"`
	Error         string   `parquet:"error"`
}

// ensembleParquet writes rows (one per result) with the ensemble columns.
func ensembleParquet(rows []parquetRow, results []record, meta map[string]string) ([]byte, error) {
	out := make([]parquetEnsembleRow, len(rows))
	for i, r := range rows {
		e := results[i]
		out[i] = parquetEnsembleRow{Flight: r.Flight, CI: r.CI, Status: r.Status, Warnings: r.Warnings, Departure: r.Departure,
			Arrival: r.Arrival, Aircraft: r.Aircraft, Row: r.Row, DistanceNM: r.DistanceNM, TakeoffMassKg: r.TakeoffMassKg,
			ZFWKg: r.ZFWKg, LandingMassKg: r.LandingMassKg, FuelKg: r.FuelKg, TimeMin: r.TimeMin, Cost: r.Cost, CO2Kg: r.CO2Kg,
			FloorG: r.FloorG, Speed: r.Speed, Levels: r.Levels, InitialFL: r.InitialFL, Steps: r.Steps, MinMarginG: r.MinMarginG,
			CostSavingPct: r.CostSavingPct, Profile: r.Profile, BlockKg: r.BlockKg, LimitedBy: r.LimitedBy,
			FuelP10Kg: e.FuelP10Kg, FuelP90Kg: e.FuelP90Kg, MinMarginAllG: e.MinMarginAllG, Error: r.Error}
	}
	var opts []parquet.WriterOption
	for _, k := range slices.Sorted(maps.Keys(meta)) {
		opts = append(opts, parquet.KeyValueMetadata(k, meta[k]))
	}
	var buf bytes.Buffer
	if err := parquet.Write(&buf, out, opts...); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
