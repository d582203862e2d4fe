package mechanics

import "math"

// StandardGravity is the standard acceleration of free fall, g_n = 9.80665
// m/s², exact by definition (3rd CGPM, 1901). It is used whenever no venue
// is set.
const StandardGravity = 9.80665

// WGS84 normal-gravity constants (NIMA TR8350.2, 3rd ed., ch. 4).
const (
	WGS84EquatorGravity = 9.7803253359     // γe, m/s², normal gravity at the equator
	WGS84PoleGravity    = 9.8321849378     // γp, m/s², normal gravity at the poles
	WGS84K              = 0.00193185265241 // k = (b·γp)/(a·γe) − 1, dimensionless
	WGS84E2             = 0.00669437999013 // first eccentricity squared, dimensionless
	wgs84A              = 6378137.0        // semi-major axis a, m (defining constant)
	wgs84F              = 1 / 298.257223563
	wgs84M              = 0.00344978650684 // m = ω²a²b/GM, dimensionless (from memory; matches public TR8350.2 implementations)
)

// FreeAirGradient is the magnitude of the vertical gradient of normal gravity
// near the Earth's surface, about 3.086e-6 (m/s²) per metre of height. It is
// given for display; NormalGravity uses the second-order TR8350.2 expression.
const FreeAirGradient = 3.086e-6

// NormalGravity returns WGS84 normal gravity in m/s² at geodetic latitude
// latDeg (degrees, −90..90) and height altM (metres above the ellipsoid,
// −1000..9000; the geoid-ellipsoid separation, under 110 m, changes g by
// under 0.4 mm/s², which is ignored).
//
// On the ellipsoid (Somigliana's closed formula, TR8350.2 eq. 4-1):
//
//	γ0 = γe·(1 + k·sin²φ) / √(1 − e²·sin²φ)
//
// and above it (TR8350.2 eq. 4-3, the free-air correction to second order):
//
//	γh = γ0·[1 − (2/a)(1 + f + m − 2f·sin²φ)·h + (3/a²)·h²]
//
// The linear term is about −3.086e-6 m/s² per metre. Normal gravity is the
// field of the reference ellipsoid: real local gravity differs from it by
// anomalies of typically a few 1e-4 m/s², far below anything that matters
// for a jump.
func NormalGravity(latDeg, altM float64) (float64, error) {
	if err := inRange(FieldLatitude, latDeg, -90, 90, "degrees"); err != nil {
		return 0, err
	}
	if err := inRange(FieldAltitude, altM, minAltitudeM, maxAltitudeM, "m"); err != nil {
		return 0, err
	}
	s := math.Sin(Radians(latDeg))
	s2 := s * s
	g0 := WGS84EquatorGravity * (1 + WGS84K*s2) / math.Sqrt(1-WGS84E2*s2)
	h := altM
	return g0 * (1 - 2/wgs84A*(1+wgs84F+wgs84M-2*wgs84F*s2)*h + 3/(wgs84A*wgs84A)*h*h), nil
}

// Venue is where a jump happens, for local gravity: geodetic latitude in
// degrees (north positive) and height above sea level in metres.
type Venue struct {
	LatDeg float64
	AltM   float64
}

// GravityAt returns the gravity to use at venue v in m/s²: WGS84 normal
// gravity (NormalGravity) when v is set, StandardGravity when v is nil.
func GravityAt(v *Venue) (float64, error) {
	if v == nil {
		return StandardGravity, nil
	}
	return NormalGravity(v.LatDeg, v.AltM)
}

// RiseChange returns how much higher, in metres, the same take-off carries
// the c.m. in gravity gToMS2 than in gFromMS2 (negative: lower):
//
//	Δrise = vz²/2 · (1/g_to − 1/g_from)
//
// vzMS is the take-off vertical velocity (0..7 m/s); either gravity may be 0,
// meaning StandardGravity. Example: vz = 4.4 m/s rises about 5 mm more at the
// equator than at the poles.
func RiseChange(vzMS, gFromMS2, gToMS2 float64) (float64, error) {
	if err := checkVz(vzMS); err != nil {
		return 0, err
	}
	gFrom, err := gravityOrStandard(gFromMS2)
	if err != nil {
		return 0, err
	}
	gTo, err := gravityOrStandard(gToMS2)
	if err != nil {
		return 0, err
	}
	// (1/gTo − 1/gFrom) = (gFrom − gTo)/(gFrom·gTo), free of cancellation
	// between two nearly equal reciprocals.
	return vzMS * vzMS / 2 * (gFrom - gTo) / (gFrom * gTo), nil
}

// Radians converts degrees to radians.
func Radians(deg float64) float64 { return deg * math.Pi / 180 }

// Degrees converts radians to degrees.
func Degrees(rad float64) float64 { return rad * 180 / math.Pi }
