package serve

import (
	"math"

	"levelpath/optimizer"
	"levelpath/optimizer/planjson"
	"levelpath/perf"
)

// The envelope document has the envelope command's JSON field names (the
// command line's envelopeJSON, which lives in package main; the two
// should become one in planjson).
type envelopeRowJSON struct {
	FL                  float64  `json:"fl"`
	PressureHPa         float64  `json:"pressure_hpa"`
	OATC                float64  `json:"oat_c"`
	SoundKt             float64  `json:"sound_kt"`
	LowBuffetMach1g     *float64 `json:"low_buffet_mach_1g"`
	HighBuffetMach1g    *float64 `json:"high_buffet_mach_1g"`
	LowBuffetMachFloor  *float64 `json:"low_buffet_mach_floor"`
	HighBuffetMachFloor *float64 `json:"high_buffet_mach_floor"`
	MMO                 float64  `json:"mmo"`
	LRCMach             *float64 `json:"lrc_mach"`
	ResidualClimbFPM    *float64 `json:"residual_climb_fpm"`
}

type envelopeJSON struct {
	Caution        string            `json:"caution"`
	Aircraft       string            `json:"aircraft"`
	MassKg         float64           `json:"mass_kg"`
	ISADevC        float64           `json:"isa_dev_c"`
	FloorG         float64           `json:"floor_g"`
	MaxFLBuffet    *float64          `json:"max_fl_buffet"`
	MaxFLThrust    *float64          `json:"max_fl_thrust"`
	MaxFLCertified float64           `json:"max_fl_certified"`
	MaxFL          *float64          `json:"max_fl"`
	OptimumFL      *float64          `json:"optimum_fl"`
	Rows           []envelopeRowJSON `json:"rows"`
}

func envelopeDoc(e perf.Envelope) envelopeJSON {
	d := envelopeJSON{Caution: optimizer.Caution, Aircraft: e.Aircraft, MassKg: e.Mass, ISADevC: e.ISADev, FloorG: e.Floor,
		MaxFLBuffet: planjson.Number(e.MaxFLBuffet), MaxFLThrust: planjson.Number(e.MaxFLThrust), MaxFLCertified: e.MaxFLCertified,
		MaxFL: planjson.Number(e.MaxFL), OptimumFL: planjson.Number(e.OptimumFL), Rows: []envelopeRowJSON{}}
	for _, r := range e.Rows {
		var rc *float64
		if !math.IsNaN(r.ResidualClimb) {
			v := r.ResidualClimb / perf.FtToM * 60
			rc = &v
		}
		d.Rows = append(d.Rows, envelopeRowJSON{FL: r.FL, PressureHPa: r.Pressure / 100, OATC: r.OAT - 273.15,
			SoundKt: r.SoundSpeed / perf.KtToMS, LowBuffetMach1g: planjson.Number(r.LowBuffet1g), HighBuffetMach1g: planjson.Number(r.HighBuffet1g),
			LowBuffetMachFloor: planjson.Number(r.LowBuffetFloor), HighBuffetMachFloor: planjson.Number(r.HighBuffetFloor), MMO: r.MMO,
			LRCMach: planjson.Number(r.LRCMach), ResidualClimbFPM: rc})
	}
	return d
}
