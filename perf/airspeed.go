package perf

import "math"

// a0 is the sea-level standard speed of sound (m/s), the reference of
// calibrated airspeed.
var a0 = SpeedOfSound(T0)

// Airspeed conversions use the isentropic compressible-flow relations of
// NACA Report 1135 (Ames Research Staff, 1953), eqs. 44-48, for subsonic
// flow (no normal shock ahead of the pitot). Mach numbers at or above 1, and
// calibrated airspeeds at or above the sea-level speed of sound, are outside
// that range: the functions return NaN for them rather than a wrong value.
// Negative inputs also give NaN.

// MachToTAS returns true airspeed (m/s) at Mach m and temperature t (K).
func MachToTAS(m, t float64) float64 { return m * SpeedOfSound(t) }

// TASToMach returns the Mach number of true airspeed v (m/s) at temperature t (K).
func TASToMach(v, t float64) float64 { return v / SpeedOfSound(t) }

// impactPressure returns qc = p ((1 + 0.2 M²)^3.5 - 1), NACA 1135 eq. 44 with
// gamma = 1.4, or NaN outside 0 <= M < 1.
func impactPressure(m, p float64) float64 {
	if !(m >= 0 && m < 1) {
		return math.NaN()
	}
	x := 1 + 0.2*m*m
	return p * (x*x*x*math.Sqrt(x) - 1)
}

// machFromImpact is the inverse of impactPressure: the Mach number whose
// impact pressure at static pressure p is qc, M = sqrt(5 ((qc/p + 1)^(2/7) - 1)).
func machFromImpact(qc, p float64) float64 {
	return math.Sqrt(5 * (math.Pow(qc/p+1, 2.0/7) - 1))
}

// MachToCAS returns calibrated airspeed (m/s) at Mach m and static pressure
// p (Pa): the sea-level speed that produces the same impact pressure.
func MachToCAS(m, p float64) float64 {
	qc := impactPressure(m, p)
	v := a0 * machFromImpact(qc, P0)
	if v >= a0 {
		return math.NaN()
	}
	return v
}

// CASToMach returns the Mach number of calibrated airspeed cas (m/s) at
// static pressure p (Pa).
func CASToMach(cas, p float64) float64 {
	if !(cas >= 0 && cas < a0) {
		return math.NaN()
	}
	m := machFromImpact(impactPressure(cas/a0, P0), p)
	if m >= 1 {
		return math.NaN()
	}
	return m
}

// MachToEAS returns equivalent airspeed (m/s): EAS = TAS sqrt(rho/rho0) =
// M sqrt(gamma p / rho0), independent of temperature.
func MachToEAS(m, p float64) float64 {
	if !(m >= 0 && m < 1) {
		return math.NaN()
	}
	return m * math.Sqrt(Gamma*p/Rho0)
}

// EASToMach is the inverse of MachToEAS.
func EASToMach(eas, p float64) float64 {
	m := eas / math.Sqrt(Gamma*p/Rho0)
	if !(m >= 0 && m < 1) {
		return math.NaN()
	}
	return m
}

// CASToTAS returns the true airspeed (m/s) of calibrated airspeed cas at
// static pressure p (Pa) and temperature t (K).
func CASToTAS(cas, p, t float64) float64 { return MachToTAS(CASToMach(cas, p), t) }

// TASToCAS returns the calibrated airspeed (m/s) of true airspeed tas at
// static pressure p (Pa) and temperature t (K).
func TASToCAS(tas, p, t float64) float64 { return MachToCAS(TASToMach(tas, t), p) }

// EASToTAS returns the true airspeed (m/s) of equivalent airspeed eas at
// static pressure p (Pa) and temperature t (K): TAS = EAS sqrt(rho0/rho).
func EASToTAS(eas, p, t float64) float64 { return MachToTAS(EASToMach(eas, p), t) }

// TASToEAS returns the equivalent airspeed (m/s) of true airspeed tas at
// static pressure p (Pa) and temperature t (K).
func TASToEAS(tas, p, t float64) float64 { return MachToEAS(TASToMach(tas, t), p) }

// CASToEAS returns the equivalent airspeed (m/s) of calibrated airspeed
// cas at static pressure p (Pa); the two differ by compressibility only,
// so temperature does not enter.
func CASToEAS(cas, p float64) float64 { return MachToEAS(CASToMach(cas, p), p) }

// EASToCAS returns the calibrated airspeed (m/s) of equivalent airspeed
// eas at static pressure p (Pa).
func EASToCAS(eas, p float64) float64 { return MachToCAS(EASToMach(eas, p), p) }

// LoadFactor returns the load factor n = 1/cos(bank) of a level coordinated
// turn at bank angle bankRad (radians). It returns NaN for |bank| >= 90°.
func LoadFactor(bankRad float64) float64 {
	if !(math.Abs(bankRad) < math.Pi/2) {
		return math.NaN()
	}
	return 1 / math.Cos(bankRad)
}

// BankAngle returns the bank angle (radians) of a level coordinated turn at
// load factor n, acos(1/n); NaN for n < 1.
func BankAngle(n float64) float64 {
	if !(n >= 1) {
		return math.NaN()
	}
	return math.Acos(1 / n)
}
