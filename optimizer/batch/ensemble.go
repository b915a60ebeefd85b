package batch

import (
	"github.com/parquet-go/parquet-go"
)

// ensembleNames are the columns an ensemble run adds at the end of
// results.csv and results.parquet (after the arrival columns of a run
// with arrival targets): the members' 10th and 90th percentiles of trip
// fuel and the least buffet margin over every member.
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

// ensembleCells are r's cells of the ensemble columns.
func ensembleCells(r record) []string {
	return []string{fmtR(r.FuelP10Kg, decKg), fmtR(r.FuelP90Kg, decKg), fmtR(r.MinMarginAllG, decG)}
}

// ensembleCols are the ensemble columns of results.parquet.
type ensembleCols struct {
	FuelP10Kg     *float64 `parquet:"fuel_p10_kg,optional"`
	FuelP90Kg     *float64 `parquet:"fuel_p90_kg,optional"`
	MinMarginAllG *float64 `parquet:"min_margin_all_members_g,optional"`
}

type parquetEnsembleRow struct {
	parquetRow
	ensembleCols
}

type parquetArrivalEnsembleRow struct {
	parquetArrivalRow
	ensembleCols
}

type parquetEnsembleRowPF struct {
	parquetRowPF
	ensembleCols
}

type parquetArrivalEnsembleRowPF struct {
	parquetArrivalRowPF
	ensembleCols
}

// ensembleParquet writes rows, or arows when not nil (one per result),
// with the ensemble columns, and perf_factor_pct before them when withPF.
func ensembleParquet(rows []parquetRow, arows []parquetArrivalRow, results []record, opts []parquet.WriterOption, withPF bool) ([]byte, error) {
	cols := func(i int) ensembleCols {
		e := results[i]
		return ensembleCols{FuelP10Kg: e.FuelP10Kg, FuelP90Kg: e.FuelP90Kg, MinMarginAllG: e.MinMarginAllG}
	}
	switch {
	case arows != nil && withPF:
		out := make([]parquetArrivalEnsembleRowPF, len(arows))
		for i := range arows {
			out[i] = parquetArrivalEnsembleRowPF{parquetArrivalRowPF{arows[i], perfFactorOf(&results[i])}, cols(i)}
		}
		return writeParquet(out, opts)
	case arows != nil:
		out := make([]parquetArrivalEnsembleRow, len(arows))
		for i := range arows {
			out[i] = parquetArrivalEnsembleRow{arows[i], cols(i)}
		}
		return writeParquet(out, opts)
	case withPF:
		out := make([]parquetEnsembleRowPF, len(rows))
		for i := range rows {
			out[i] = parquetEnsembleRowPF{parquetRowPF{rows[i], perfFactorOf(&results[i])}, cols(i)}
		}
		return writeParquet(out, opts)
	}
	out := make([]parquetEnsembleRow, len(rows))
	for i := range rows {
		out[i] = parquetEnsembleRow{rows[i], cols(i)}
	}
	return writeParquet(out, opts)
}
