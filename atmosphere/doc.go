// Package atmosphere computes the U.S. Standard Atmosphere, 1976 from -5 km to 86 km
// geometric altitude, with a temperature offset for non-standard days, the
// conversions between Mach number and true, calibrated and equivalent airspeed, and
// the isentropic and pitot relations of NACA Report 1135 that those conversions and
// the test-section state use.
//
// Everything is SI: metres, kelvin, pascals, kg/m³, m/s, Pa·s.
package atmosphere
