package planjson

import (
	"math"

	"levelpath/optimizer"
	"levelpath/perf"
)

// EnvelopeRow is one level of the envelope document.
type EnvelopeRow struct {
	FL                  float64  `json:"fl"`
	PressureHPa         float64  `json:"pressure_hpa"`
	OATC                float64  `json:"oat_c"`
	SoundKt             float64  `json:"sound_kt"`
	LowBuffetMach1g     *float64 `json:"low_buffet_mach_1g"`
	HighBuffetMach1g    *float64 `json:"high_buffet_mach_1g"`
	LowBuffetMachFloor  *float64 `json:"low_buffet_mach_floor"`
	HighBuffetMachFloor *float64 `json:"high_buffet_mach_floor"`
	// HighBuffet1gBeyondData and HighBuffetFloorBeyondData mark a
	// high-speed value that is the last Mach of the aircraft's buffet
	// table, not an onset: the boundary lies beyond the data.
	HighBuffet1gBeyondData    bool     `json:"high_buffet_1g_beyond_data"`
	HighBuffetFloorBeyondData bool     `json:"high_buffet_floor_beyond_data"`
	MMO                       float64  `json:"mmo"`
	VMOMach                   *float64 `json:"vmo_mach"`
	BandLowMach               *float64 `json:"band_low_mach"`
	BandHighMach              *float64 `json:"band_high_mach"`
	BandLowLimit              string   `json:"band_low_limit"`
	BandHighLimit             string   `json:"band_high_limit"`
	LRCMach                   *float64 `json:"lrc_mach"`
	ResidualClimbFPM          *float64 `json:"residual_climb_fpm"`
}

// Envelope is the JSON form of perf.Envelope, as levelpath envelope and
// the service print it.
type Envelope struct {
	Caution        string        `json:"caution"`
	Aircraft       string        `json:"aircraft"`
	MassKg         float64       `json:"mass_kg"`
	ISADevC        float64       `json:"isa_dev_c"`
	FloorG         float64       `json:"floor_g"`
	MaxFLBuffet    *float64      `json:"max_fl_buffet"`
	MaxFLThrust    *float64      `json:"max_fl_thrust"`
	MaxFLCertified float64       `json:"max_fl_certified"`
	MaxFL          *float64      `json:"max_fl"`
	OptimumFL      *float64      `json:"optimum_fl"`
	Rows           []EnvelopeRow `json:"rows"`
	// MaxFLThrustAtTableTop: operator tables end at max_fl_thrust, so the
	// thrust ceiling is at least that (perf.Envelope); only when true.
	MaxFLThrustAtTableTop bool `json:"max_fl_thrust_at_table_top,omitempty"`
}

// FromEnvelope converts an envelope to its JSON form.
func FromEnvelope(e perf.Envelope) Envelope {
	d := Envelope{Caution: optimizer.Caution, Aircraft: e.Aircraft, MassKg: e.Mass, ISADevC: e.ISADev, FloorG: e.Floor,
		MaxFLBuffet: Number(e.MaxFLBuffet), MaxFLThrust: Number(e.MaxFLThrust), MaxFLThrustAtTableTop: e.MaxFLThrustAtTableTop, MaxFLCertified: e.MaxFLCertified,
		MaxFL: Number(e.MaxFL), OptimumFL: Number(e.OptimumFL), Rows: []EnvelopeRow{}}
	for _, r := range e.Rows {
		var rc *float64
		if !math.IsNaN(r.ResidualClimb) {
			rc = Number(r.ResidualClimb * fpmPerMS)
		}
		d.Rows = append(d.Rows, EnvelopeRow{FL: r.FL, PressureHPa: r.Pressure / 100, OATC: r.OAT - 273.15,
			SoundKt: r.SoundSpeed / msPerKt, LowBuffetMach1g: Number(r.LowBuffet1g), HighBuffetMach1g: Number(r.HighBuffet1g),
			LowBuffetMachFloor: Number(r.LowBuffetFloor), HighBuffetMachFloor: Number(r.HighBuffetFloor),
			HighBuffet1gBeyondData: r.HighBuffet1gBeyondData, HighBuffetFloorBeyondData: r.HighBuffetFloorBeyondData,
			MMO: r.MMO, VMOMach: Number(r.VMOMach), BandLowMach: Number(r.Band.Lo), BandHighMach: Number(r.Band.Hi),
			BandLowLimit: r.Band.LoLimit, BandHighLimit: r.Band.HiLimit,
			LRCMach: Number(r.LRCMach), ResidualClimbFPM: rc})
	}
	return d
}
