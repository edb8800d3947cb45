package similarity

import (
	"errors"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Base dimensions, the indices of a Dimension.
const (
	Mass        = 0 // M
	Length      = 1 // L
	Time        = 2 // T
	Temperature = 3 // Θ
)

// maxExponent bounds every exponent of a Dimension. Physical quantities never come
// close to it; the bound keeps int8 arithmetic free of overflow.
const maxExponent = 60

// Dimension is a vector of integer exponents over the base dimensions mass, length,
// time and thermodynamic temperature (M L T Θ), indexed by Mass, Length, Time and
// Temperature. The zero value is dimensionless. Plane angles are dimensionless, as in
// the SI. Exponents are integers: every unit and every variable of a physical problem
// has an integer dimension; fractional powers appear only in the exponents of
// dimensionless groups (see Rational).
type Dimension [4]int8

// Common dimensions, named for messages, tests and callers. They are values to read,
// never to assign.
var (
	Dimensionless     = Dimension{}             // Dimensionless is a pure number (or a plane angle).
	DimLength         = Dimension{0, 1, 0, 0}   // DimLength is L (m).
	DimArea           = Dimension{0, 2, 0, 0}   // DimArea is L^2 (m²).
	DimMass           = Dimension{1, 0, 0, 0}   // DimMass is M (kg).
	DimTime           = Dimension{0, 0, 1, 0}   // DimTime is T (s).
	DimTemperature    = Dimension{0, 0, 0, 1}   // DimTemperature is Θ (K).
	DimVelocity       = Dimension{0, 1, -1, 0}  // DimVelocity is L T^-1 (m/s).
	DimAcceleration   = Dimension{0, 1, -2, 0}  // DimAcceleration is L T^-2 (m/s²).
	DimForce          = Dimension{1, 1, -2, 0}  // DimForce is M L T^-2 (N).
	DimPressure       = Dimension{1, -1, -2, 0} // DimPressure is M L^-1 T^-2 (Pa).
	DimEnergy         = Dimension{1, 2, -2, 0}  // DimEnergy is M L^2 T^-2 (J, and N·m of a moment).
	DimPower          = Dimension{1, 2, -3, 0}  // DimPower is M L^2 T^-3 (W).
	DimDensity        = Dimension{1, -3, 0, 0}  // DimDensity is M L^-3 (kg/m³).
	DimViscosity      = Dimension{1, -1, -1, 0} // DimViscosity is M L^-1 T^-1 (Pa·s), dynamic viscosity.
	DimKinematicVisc  = Dimension{0, 2, -1, 0}  // DimKinematicVisc is L^2 T^-1 (m²/s), kinematic viscosity.
	DimFrequency      = Dimension{0, 0, -1, 0}  // DimFrequency is T^-1 (Hz, 1/s).
	DimSurfaceTension = Dimension{1, 0, -2, 0}  // DimSurfaceTension is M T^-2 (N/m).
)

var baseSymbols = [4]string{"M", "L", "T", "Θ"}

// IsDimensionless reports whether every exponent is zero.
func (d Dimension) IsDimensionless() bool { return d == Dimension{} }

// Mul returns the dimension of a product, d·e. ok is false when an exponent would
// leave the range ±60.
func (d Dimension) Mul(e Dimension) (r Dimension, ok bool) {
	for i := range d {
		s := int(d[i]) + int(e[i])
		if s > maxExponent || s < -maxExponent {
			return Dimension{}, false
		}
		r[i] = int8(s)
	}
	return r, true
}

// Pow returns the dimension of d raised to the integer power p. ok is false when an
// exponent would leave the range ±60.
func (d Dimension) Pow(p int) (r Dimension, ok bool) {
	if p > maxExponent || p < -maxExponent {
		return Dimension{}, d.IsDimensionless()
	}
	for i := range d {
		s := int(d[i]) * p
		if s > maxExponent || s < -maxExponent {
			return Dimension{}, false
		}
		r[i] = int8(s)
	}
	return r, true
}

// String formats d as space-separated base symbols with their powers in the order
// M L T Θ, "M L^-1 T^-2" for a pressure, and "dimensionless" for the zero value.
// ParseDimension reads it back.
func (d Dimension) String() string {
	if d.IsDimensionless() {
		return "dimensionless"
	}
	var b strings.Builder
	for i, e := range d {
		if e == 0 {
			continue
		}
		if b.Len() > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(baseSymbols[i])
		if e != 1 {
			b.WriteByte('^')
			b.WriteString(strconv.Itoa(int(e)))
		}
	}
	return b.String()
}

// MarshalText encodes d as its String form.
func (d Dimension) MarshalText() ([]byte, error) { return []byte(d.String()), nil }

// UnmarshalText decodes a dimension written as ParseDimension accepts.
func (d *Dimension) UnmarshalText(b []byte) error {
	v, err := ParseDimension(string(b))
	if err != nil {
		return err
	}
	*d = v
	return nil
}

// ErrDimension is wrapped by every error of ParseDimension.
var ErrDimension = errors.New("bad dimension")

// ParseDimension reads a dimension written as base symbols with optional integer
// powers, separated by spaces, '*' or '·': "M L^-1 T^-1", "L T^-2", "Θ". The
// temperature symbol may be written Θ, θ or Theta. A symbol may repeat; its powers
// add ("L L" is L^2). "dimensionless" and "1" mean the zero Dimension. Exponents
// must stay within ±60.
func ParseDimension(s string) (Dimension, error) {
	t := strings.TrimSpace(s)
	if t == "dimensionless" || t == "1" {
		return Dimension{}, nil
	}
	if t == "" {
		return Dimension{}, dimError(s, "is empty; write base symbols M, L, T, Θ with powers, e.g. \"M L^-1 T^-2\", or \"dimensionless\"")
	}
	var d Dimension
	for t != "" {
		// Separator.
		if r, n := firstRune(t); r == ' ' || r == '\t' || r == '*' || r == '·' || r == '⋅' {
			t = t[n:]
			continue
		}
		idx := -1
		switch {
		case strings.HasPrefix(t, "Theta"):
			idx, t = Temperature, t[len("Theta"):]
		case strings.HasPrefix(t, "Θ"):
			idx, t = Temperature, t[len("Θ"):]
		case strings.HasPrefix(t, "θ"):
			idx, t = Temperature, t[len("θ"):]
		case t[0] == 'M':
			idx, t = Mass, t[1:]
		case t[0] == 'L':
			idx, t = Length, t[1:]
		case t[0] == 'T':
			idx, t = Time, t[1:]
		default:
			r, _ := firstRune(t)
			return Dimension{}, dimError(s, "has unknown symbol "+strconv.QuoteRune(r)+"; the base symbols are M, L, T and Θ")
		}
		p, rest, ok, msg := parsePower(t)
		if !ok {
			return Dimension{}, dimError(s, msg)
		}
		t = rest
		var e Dimension
		e[idx] = 1
		e, ok1 := e.Pow(p)
		nd, ok2 := d.Mul(e)
		if !ok1 || !ok2 {
			return Dimension{}, dimError(s, "has an exponent outside ±60")
		}
		d = nd
	}
	return d, nil
}

func dimError(s, msg string) error {
	return &UnitError{Input: s, Reason: "dimension " + strconv.Quote(s) + " " + msg, kind: ErrDimension}
}

// dimensionNames describes the dimensions the service's fields use, for messages.
var dimensionNames = map[Dimension]string{
	Dimensionless:     "a pure number",
	DimLength:         "a length",
	DimArea:           "an area",
	{0, 3, 0, 0}:      "a volume",
	DimMass:           "a mass",
	DimTime:           "a time",
	DimTemperature:    "a temperature",
	DimVelocity:       "a speed",
	DimAcceleration:   "an acceleration",
	DimForce:          "a force",
	DimPressure:       "a pressure",
	DimEnergy:         "a moment or energy",
	DimPower:          "a power",
	DimDensity:        "a density",
	DimViscosity:      "a dynamic viscosity",
	DimKinematicVisc:  "a kinematic viscosity",
	DimFrequency:      "a frequency",
	{0, -1, 0, 0}:     "a reciprocal length",
	DimSurfaceTension: "a surface tension",
	{1, 0, -1, 0}:     "a mass flow per length",
}

// describe names a dimension for a message: `a length (L)`, or `dimension M^2 L`
// when it has no everyday name. example, when not empty, is added as ", e.g. Pa".
func describe(d Dimension, example string) string {
	name, ok := dimensionNames[d]
	var b strings.Builder
	if ok {
		b.WriteString(name)
		b.WriteString(" (")
		b.WriteString(d.String())
	} else {
		b.WriteString("of dimension ")
		b.WriteString(d.String())
		if example != "" {
			b.WriteString(" (")
		}
	}
	if example != "" {
		if ok {
			b.WriteString(", ")
		}
		b.WriteString("e.g. ")
		b.WriteString(example)
	}
	if ok || example != "" {
		b.WriteByte(')')
	}
	return b.String()
}

func firstRune(s string) (rune, int) { return utf8.DecodeRuneInString(s) }

// parsePower reads an optional power ("^-1", "^(2)", "²") at the start of s with the
// unit parser's rules; the power is 1 when there is none.
func parsePower(s string) (p int, rest string, ok bool, msg string) {
	up := unitParser{s: s, maxPow: maxExponent}
	pw, found := up.power()
	if up.err != "" {
		return 0, s, false, up.err
	}
	if !found {
		return 1, s, true, ""
	}
	return pw, s[up.pos:], true, ""
}
