package similarity

import (
	"errors"
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"scalematch/atmosphere"
)

// Exact definitions behind the conversion factors, in SI units. Every factor of the
// unit table, and every U.S. customary figure the CLI prints, is built from these, so
// each is exact to the last bit a float64 can hold.
//
//	ft   = 0.3048 m                 (international foot, 1959)
//	lb   = 0.45359237 kg            (international avoirdupois pound, 1959)
//	g_n  = 9.80665 m/s²             (standard gravity, 3rd CGPM 1901)
//	lbf  = lb·g_n                   slug = lbf·s²/ft
//	nmi  = 1852 m                   kt   = nmi/h
//	atm  = 101 325 Pa               Torr = atm/760
//	mmHg = 13 595.1 kg/m³ · g_n · 1 mm   (mercury at 0 °C, conventional density)
//	inHg = 25.4 mmHg               (mercury at 0 °C; 3386.389 Pa)
//	°R   = 5/9 K                    °C: T = t + 273.15 K; °F: T = (t + 459.67)·5/9 K
//	P (poise) = 0.1 Pa·s            rpm = 1/60 revolution per second (a rotation rate
//	                                n as in the advance ratio V/(nD), not 2π/60 rad/s)
//
// Sources: NIST Special Publication 811 (2008), appendix B; the SI Brochure, 9th ed.
// (BIPM 2019). The mercury density 13 595.1 kg/m³ is the conventional value that
// GNU units also uses, so inHg and mmHg agree with it exactly; inHg at 60 °F
// (3376.85 Pa) is a different unit and is not supported.
const (
	Foot                = 0.3048                         // m, international foot
	Inch                = 0.0254                         // m
	Mile                = 1609.344                       // m, statute mile
	NauticalMile        = 1852.0                         // m
	Pound               = 0.45359237                     // kg, avoirdupois pound
	PoundForce          = Pound * atmosphere.G0          // N, lbf (4.4482216152605)
	Slug                = PoundForce / Foot              // kg (14.593902937206)
	PoundPerSquareFoot  = PoundForce / (Foot * Foot)     // Pa, psf (47.880258980336)
	PoundPerSquareInch  = PoundForce / (Inch * Inch)     // Pa, psi (6894.7572931684)
	MillimetreOfMercury = 13595.1 * atmosphere.G0 * 1e-3 // Pa, conventional
	InchOfMercury       = 25.4 * MillimetreOfMercury     // Pa, conventional (3386.389)
	Hour                = 3600.0                         // s
	Knot                = NauticalMile / Hour            // m/s
	Rankine             = 5.0 / 9                        // K per °R (and per °F)
	FahrenheitZero      = 459.67                         // °R at 0 °F
	atmosphereSI        = 101325.0                       // Pa, standard atmosphere
)

// Unit is a parsed unit: the SI value of x of this unit is Factor·x + Offset. Offset
// is non-zero only for the temperature scales degC and degF. Dim is the unit's
// dimension. Angle marks a plane-angle unit (rad, deg): angles are dimensionless in
// the SI, but only angle fields accept them, and their SI unit is the radian. The
// zero value is not a usable unit (Factor 0).
type Unit struct {
	Factor float64   // Factor multiplies a value in this unit to give SI.
	Offset float64   // Offset is added after Factor, in SI units (K); 0 but for degC, degF.
	Dim    Dimension // Dim is the unit's dimension.
	Angle  bool      // Angle marks rad and deg.
}

// unitTable holds the units by name. Product, quotient and power forms (N*m, m/s,
// ft^2) are built by ParseUnit from these.
var unitTable = map[string]Unit{
	// Length.
	"m": {Factor: 1, Dim: DimLength}, "meter": {Factor: 1, Dim: DimLength},
	"meters": {Factor: 1, Dim: DimLength}, "metre": {Factor: 1, Dim: DimLength},
	"metres": {Factor: 1, Dim: DimLength},
	"mm":     {Factor: 1e-3, Dim: DimLength}, "cm": {Factor: 1e-2, Dim: DimLength},
	"km": {Factor: 1e3, Dim: DimLength},
	// Micrometre: the micro sign (U+00B5), the Greek mu (U+03BC) and ASCII "um".
	"\u00b5m": {Factor: 1e-6, Dim: DimLength}, "\u03bcm": {Factor: 1e-6, Dim: DimLength},
	"um": {Factor: 1e-6, Dim: DimLength},
	"ft": {Factor: Foot, Dim: DimLength}, "foot": {Factor: Foot, Dim: DimLength},
	"feet": {Factor: Foot, Dim: DimLength},
	"in":   {Factor: Inch, Dim: DimLength}, "inch": {Factor: Inch, Dim: DimLength},
	"inches": {Factor: Inch, Dim: DimLength},
	"yd":     {Factor: 3 * Foot, Dim: DimLength},
	"mi":     {Factor: Mile, Dim: DimLength}, "mile": {Factor: Mile, Dim: DimLength},
	"miles": {Factor: Mile, Dim: DimLength},
	"nmi":   {Factor: NauticalMile, Dim: DimLength},
	// Mass.
	"kg": {Factor: 1, Dim: DimMass}, "g": {Factor: 1e-3, Dim: DimMass},
	"lb": {Factor: Pound, Dim: DimMass}, "lbm": {Factor: Pound, Dim: DimMass},
	"slug": {Factor: Slug, Dim: DimMass}, "slugs": {Factor: Slug, Dim: DimMass},
	// Time.
	"s": {Factor: 1, Dim: DimTime}, "sec": {Factor: 1, Dim: DimTime},
	"ms":  {Factor: 1e-3, Dim: DimTime},
	"min": {Factor: 60, Dim: DimTime},
	"h":   {Factor: Hour, Dim: DimTime}, "hr": {Factor: Hour, Dim: DimTime},
	// Temperature: absolute scales, then the offset scales (alone only).
	"K": {Factor: 1, Dim: DimTemperature}, "degR": {Factor: Rankine, Dim: DimTemperature},
	"°R":   {Factor: Rankine, Dim: DimTemperature},
	"degC": {Factor: 1, Offset: 273.15, Dim: DimTemperature},
	"°C":   {Factor: 1, Offset: 273.15, Dim: DimTemperature},
	"degF": {Factor: Rankine, Offset: FahrenheitZero * Rankine, Dim: DimTemperature},
	"°F":   {Factor: Rankine, Offset: FahrenheitZero * Rankine, Dim: DimTemperature},
	// Speed.
	"kt": {Factor: NauticalMile / Hour, Dim: DimVelocity}, "kn": {Factor: NauticalMile / Hour, Dim: DimVelocity},
	"kts": {Factor: NauticalMile / Hour, Dim: DimVelocity}, "knot": {Factor: NauticalMile / Hour, Dim: DimVelocity},
	"knots": {Factor: NauticalMile / Hour, Dim: DimVelocity},
	"mph":   {Factor: Mile / Hour, Dim: DimVelocity}, "kph": {Factor: 1e3 / Hour, Dim: DimVelocity},
	// Force.
	"N": {Factor: 1, Dim: DimForce}, "kN": {Factor: 1e3, Dim: DimForce},
	"MN":  {Factor: 1e6, Dim: DimForce},
	"lbf": {Factor: PoundForce, Dim: DimForce}, "kgf": {Factor: atmosphere.G0, Dim: DimForce},
	// Pressure.
	"Pa": {Factor: 1, Dim: DimPressure}, "hPa": {Factor: 1e2, Dim: DimPressure},
	"kPa": {Factor: 1e3, Dim: DimPressure}, "MPa": {Factor: 1e6, Dim: DimPressure},
	"bar": {Factor: 1e5, Dim: DimPressure}, "mbar": {Factor: 1e2, Dim: DimPressure},
	"atm":  {Factor: atmosphereSI, Dim: DimPressure},
	"psi":  {Factor: PoundForce / (Inch * Inch), Dim: DimPressure},
	"psf":  {Factor: PoundForce / (Foot * Foot), Dim: DimPressure},
	"inHg": {Factor: MillimetreOfMercury * 25.4, Dim: DimPressure}, "mmHg": {Factor: MillimetreOfMercury, Dim: DimPressure},
	"Torr": {Factor: atmosphereSI / 760, Dim: DimPressure}, "torr": {Factor: atmosphereSI / 760, Dim: DimPressure},
	// Energy and power.
	"J": {Factor: 1, Dim: DimEnergy}, "kJ": {Factor: 1e3, Dim: DimEnergy},
	"W": {Factor: 1, Dim: DimPower}, "kW": {Factor: 1e3, Dim: DimPower},
	"MW": {Factor: 1e6, Dim: DimPower},
	// Viscosity.
	"poise": {Factor: 0.1, Dim: DimViscosity}, "cP": {Factor: 1e-3, Dim: DimViscosity},
	"centipoise": {Factor: 1e-3, Dim: DimViscosity},
	// Frequency and rotation rate.
	"Hz": {Factor: 1, Dim: DimFrequency}, "rpm": {Factor: 1.0 / 60, Dim: DimFrequency},
	"rps": {Factor: 1, Dim: DimFrequency},
	// Plane angle (alone only) and pure numbers.
	"rad": {Factor: 1, Angle: true}, "radian": {Factor: 1, Angle: true},
	"radians": {Factor: 1, Angle: true},
	"deg":     {Factor: math.Pi / 180, Angle: true}, "degree": {Factor: math.Pi / 180, Angle: true},
	"degrees": {Factor: math.Pi / 180, Angle: true}, "°": {Factor: math.Pi / 180, Angle: true},
	"%": {Factor: 0.01},
}

// Sentinel errors wrapped by *UnitError; test with errors.Is.
var (
	// ErrSyntax: the quantity or unit is not well formed.
	ErrSyntax = errors.New("bad quantity syntax")
	// ErrUnknownUnit: a unit name is not in the table.
	ErrUnknownUnit = errors.New("unknown unit")
	// ErrMismatch: the unit's dimension is not the one the field wants.
	ErrMismatch = errors.New("dimension mismatch")
	// ErrRange: the number or the converted value is not finite, or an exponent
	// is too large.
	ErrRange = errors.New("value out of range")
)

// UnitError reports a quantity, unit or dimension that cannot be used. Reason is a
// complete sentence fragment meant for the person who wrote Input, such as
// `unit "ft" is a length (L); the field wants a pressure (M L^-1 T^-2, e.g. Pa)`;
// the API shows it as the field's message. errors.Is matches one of ErrSyntax,
// ErrUnknownUnit, ErrMismatch, ErrRange or ErrDimension.
type UnitError struct {
	Input  string
	Reason string
	kind   error
}

// Error returns Reason.
func (e *UnitError) Error() string { return e.Reason }

// Unwrap returns the sentinel error that classifies e.
func (e *UnitError) Unwrap() error { return e.kind }

// maxUnitLen bounds the length of a unit expression in bytes, and maxDepth its
// nesting of parentheses; no real unit comes near either.
const (
	maxUnitLen = 256
	maxDepth   = 8
	maxPower   = 12
)

// ParseUnit parses a unit expression: names from the unit table joined by products
// ('*', '·', '⋅' or a space), at most one quotient ('/') per level followed by a
// single term, so "kg/m^3", "lbf*ft", "in lbf", "1/s", "kg/(m*s)"; integer powers
// written '^2', '^-1', '^(-1)', '**2' or with superscripts ('²', '³', '⁻¹'); and
// parentheses. The ISO 80000-1 rule of one solidus applies: "kg/m/s" and "kg/m*s"
// are refused as ambiguous (write "kg/(m*s)"). The temperature scales degC and degF
// and the angle units deg and rad stand alone only.
func ParseUnit(s string) (Unit, error) {
	if len(s) > maxUnitLen {
		return Unit{}, &UnitError{Input: s, Reason: "unit is longer than " + strconv.Itoa(maxUnitLen) + " bytes", kind: ErrSyntax}
	}
	p := unitParser{s: s}
	u := p.product(0)
	if p.err == "" {
		p.skipSpace()
		if p.pos < len(p.s) {
			p.fail(ErrSyntax, "has an unexpected "+p.quoteNext())
		}
	}
	if p.err != "" {
		return Unit{}, &UnitError{Input: s, Reason: "unit " + strconv.Quote(strings.TrimSpace(s)) + " " + p.err, kind: p.kind}
	}
	return u, nil
}

// unitParser is a recursive-descent parser of unit expressions. It records the first
// error as a message and a sentinel so that the success path allocates nothing.
type unitParser struct {
	s    string
	pos  int
	err  string
	kind error
	// maxPow bounds a power's magnitude; 0 means maxPower.
	maxPow int
}

func (p *unitParser) powerLimit() int {
	if p.maxPow > 0 {
		return p.maxPow
	}
	return maxPower
}

func (p *unitParser) fail(kind error, msg string) {
	if p.err == "" {
		p.err, p.kind = msg, kind
	}
}

func (p *unitParser) quoteNext() string {
	r, _ := utf8.DecodeRuneInString(p.s[p.pos:])
	return "character " + strconv.QuoteRune(r)
}

func (p *unitParser) skipSpace() bool {
	start := p.pos
	for p.pos < len(p.s) && (p.s[p.pos] == ' ' || p.s[p.pos] == '\t') {
		p.pos++
	}
	return p.pos > start
}

// peekOp reports the product or quotient operator at the current position and its
// length in bytes; op is 0 when there is none.
func (p *unitParser) peekOp() (op byte, n int) {
	if p.pos >= len(p.s) {
		return 0, 0
	}
	switch c := p.s[p.pos]; c {
	case '/':
		return '/', 1
	case '*':
		if strings.HasPrefix(p.s[p.pos:], "**") {
			return 0, 0
		}
		return '*', 1
	}
	if strings.HasPrefix(p.s[p.pos:], "·") {
		return '*', len("·")
	}
	if strings.HasPrefix(p.s[p.pos:], "⋅") {
		return '*', len("⋅")
	}
	return 0, 0
}

// product parses term (op term)* up to the end or a closing parenthesis.
func (p *unitParser) product(depth int) Unit {
	u := p.term(depth)
	slash := false
	for p.err == "" {
		space := p.skipSpace()
		if p.pos >= len(p.s) || p.s[p.pos] == ')' {
			return u
		}
		op, n := p.peekOp()
		if op == 0 && !space {
			p.fail(ErrSyntax, "has an unexpected "+p.quoteNext()+"; write powers with ^, e.g. m^2")
			return u
		}
		if slash {
			p.fail(ErrSyntax, "is ambiguous after '/'; use parentheses, e.g. kg/(m*s)")
			return u
		}
		p.pos += n
		t := p.term(depth)
		if op == '/' {
			slash = true
			t = p.pow(t, -1)
		}
		u = p.mul(u, t)
	}
	return u
}

// term parses an atom or a parenthesised product, each with an optional power.
func (p *unitParser) term(depth int) Unit {
	p.skipSpace()
	if p.pos >= len(p.s) {
		if p.pos == 0 || strings.TrimSpace(p.s) == "" {
			p.fail(ErrSyntax, "is empty")
		} else {
			p.fail(ErrSyntax, "ends where a unit name was expected")
		}
		return Unit{}
	}
	var u Unit
	switch c := p.s[p.pos]; {
	case c == '(':
		if depth >= maxDepth {
			p.fail(ErrSyntax, "nests parentheses deeper than "+strconv.Itoa(maxDepth))
			return Unit{}
		}
		p.pos++
		u = p.product(depth + 1)
		if p.err != "" {
			return Unit{}
		}
		if p.pos >= len(p.s) || p.s[p.pos] != ')' {
			p.fail(ErrSyntax, "has an unclosed '('")
			return Unit{}
		}
		p.pos++
	case c >= '0' && c <= '9' || c == '.':
		p.pos++
		if c != '1' || p.pos < len(p.s) && (p.s[p.pos] >= '0' && p.s[p.pos] <= '9' || p.s[p.pos] == '.') {
			p.fail(ErrSyntax, "has a number inside the unit; only 1 is allowed, as in 1/s")
			return Unit{}
		}
		u = Unit{Factor: 1}
	default:
		start := p.pos
		if c == '%' {
			p.pos++
		} else {
			for p.pos < len(p.s) {
				r, n := utf8.DecodeRuneInString(p.s[p.pos:])
				if r != '°' && (r == '·' || !unicode.IsLetter(r)) {
					break
				}
				p.pos += n
			}
		}
		if p.pos == start {
			p.fail(ErrSyntax, "has an unexpected "+p.quoteNext()+" where a unit name was expected")
			return Unit{}
		}
		name := p.s[start:p.pos]
		var ok bool
		u, ok = unitTable[name]
		if !ok {
			p.fail(ErrUnknownUnit, "is not known: "+strconv.Quote(name)+" is not a supported unit name"+unitHint(name))
			return Unit{}
		}
	}
	if pw, ok := p.power(); ok && p.err == "" {
		u = p.pow(u, pw)
	}
	return u
}

// unitHint suggests the supported spelling of common variants.
func unitHint(name string) string {
	switch strings.ToLower(name) {
	case "c", "f", "degc", "degf", "celsius", "fahrenheit":
		return " (temperatures: K, degC, degF, degR)"
	case "knot", "kts", "kias", "ktas":
		return " (speeds: kt, m/s, km/h, mph, ft/s)"
	case "lbs":
		return " (mass: lb; force: lbf)"
	case "l", "litre", "liter":
		return " (volumes: m^3)"
	}
	return ""
}

// power parses an optional power after a term. ok is false when there is none.
func (p *unitParser) power() (pw int, ok bool) {
	rest := p.s[p.pos:]
	switch {
	case strings.HasPrefix(rest, "^"):
		p.pos++
	case strings.HasPrefix(rest, "**"):
		p.pos += 2
	default:
		if r, _ := utf8.DecodeRuneInString(rest); isSuperscript(r) {
			return p.superscript(), true
		}
		return 0, false
	}
	paren := p.pos < len(p.s) && p.s[p.pos] == '('
	if paren {
		p.pos++
	}
	neg := false
	if p.pos < len(p.s) && (p.s[p.pos] == '-' || p.s[p.pos] == '+') {
		neg = p.s[p.pos] == '-'
		p.pos++
	}
	start := p.pos
	v := 0
	for p.pos < len(p.s) && p.s[p.pos] >= '0' && p.s[p.pos] <= '9' {
		if v <= p.powerLimit() {
			v = v*10 + int(p.s[p.pos]-'0')
		}
		p.pos++
	}
	if p.pos == start {
		p.fail(ErrSyntax, "has a '^' without an integer power")
		return 0, false
	}
	if paren {
		if p.pos >= len(p.s) || p.s[p.pos] != ')' {
			p.fail(ErrSyntax, "has an unclosed '(' in a power")
			return 0, false
		}
		p.pos++
	}
	if v > p.powerLimit() {
		p.fail(ErrRange, "has a power beyond ±"+strconv.Itoa(p.powerLimit()))
		return 0, false
	}
	if neg {
		v = -v
	}
	return v, true
}

func isSuperscript(r rune) bool {
	return r == '⁻' || r == '⁺' || superscriptDigit(r) >= 0
}

func superscriptDigit(r rune) int {
	switch r {
	case '⁰':
		return 0
	case '¹':
		return 1
	case '²':
		return 2
	case '³':
		return 3
	}
	if r >= '⁴' && r <= '⁹' {
		return int(r-'⁴') + 4
	}
	return -1
}

func (p *unitParser) superscript() int {
	neg := false
	if r, n := utf8.DecodeRuneInString(p.s[p.pos:]); r == '⁻' || r == '⁺' {
		neg = r == '⁻'
		p.pos += n
	}
	v, digits := 0, 0
	for p.pos < len(p.s) {
		r, n := utf8.DecodeRuneInString(p.s[p.pos:])
		d := superscriptDigit(r)
		if d < 0 {
			break
		}
		if v <= p.powerLimit() {
			v = v*10 + d
		}
		digits++
		p.pos += n
	}
	if digits == 0 {
		p.fail(ErrSyntax, "has a superscript sign without digits")
		return 0
	}
	if v > p.powerLimit() {
		p.fail(ErrRange, "has a power beyond ±"+strconv.Itoa(p.powerLimit()))
		return 0
	}
	if neg {
		return -v
	}
	return v
}

// alone reports an error when u may not take part in a product or power.
func (p *unitParser) alone(u Unit) bool {
	switch {
	case u.Offset != 0:
		p.fail(ErrSyntax, "combines degC or degF with other units or a power; they are offset scales and stand alone: use K or degR in products, e.g. J/(kg*K)")
		return false
	case u.Angle:
		p.fail(ErrSyntax, "combines an angle unit with other units or a power; deg and rad stand alone: use Hz, 1/s or rpm for rotation rates")
		return false
	}
	return true
}

func (p *unitParser) mul(a, b Unit) Unit {
	if p.err != "" || !p.alone(a) || !p.alone(b) {
		return Unit{}
	}
	d, ok := a.Dim.Mul(b.Dim)
	if !ok {
		p.fail(ErrRange, "has a dimension exponent beyond ±"+strconv.Itoa(maxExponent))
		return Unit{}
	}
	return Unit{Factor: a.Factor * b.Factor, Dim: d}
}

func (p *unitParser) pow(a Unit, pw int) Unit {
	if p.err != "" || !p.alone(a) {
		return Unit{}
	}
	d, ok := a.Dim.Pow(pw)
	if !ok {
		p.fail(ErrRange, "has a dimension exponent beyond ±"+strconv.Itoa(maxExponent))
		return Unit{}
	}
	f := a.Factor
	switch pw {
	case 1:
	case -1:
		f = 1 / f
	case 2:
		f *= f
	case 3:
		f = f * f * f
	default:
		f = math.Pow(f, float64(pw))
	}
	return Unit{Factor: f, Dim: d}
}

// scanNumber returns the length of the decimal number at the start of s: an optional
// sign, digits with an optional decimal point, and an optional exponent. It returns 0
// when s does not start with a number; "NaN" and "Inf" are not numbers here.
func scanNumber(s string) int {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && s[i] >= '0' && s[i] <= '9' {
			i++
			digits++
		}
	}
	if digits == 0 {
		return 0
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && s[k] >= '0' && s[k] <= '9' {
			k++
		}
		if k > j {
			i = k
		}
	}
	return i
}

// parseQuantity splits s into its number and unit. unitText is the unit as written
// (trimmed); u is the dimensionless unit 1 when there is none.
func parseQuantity(s string) (x float64, u Unit, unitText string, err error) {
	t := strings.TrimSpace(s)
	n := scanNumber(t)
	if n == 0 {
		if t == "" {
			return 0, Unit{}, "", &UnitError{Input: s, Reason: "quantity is empty; write a number and a unit, e.g. \"2.5 bar\"", kind: ErrSyntax}
		}
		return 0, Unit{}, "", &UnitError{Input: s, Reason: "quantity " + strconv.Quote(s) + " does not start with a number; write a number and a unit, e.g. \"2.5 bar\"", kind: ErrSyntax}
	}
	x, perr := strconv.ParseFloat(t[:n], 64)
	if perr != nil || math.IsInf(x, 0) || math.IsNaN(x) {
		return 0, Unit{}, "", &UnitError{Input: s, Reason: "number " + strconv.Quote(t[:n]) + " is out of range (magnitude at most 1.8e308)", kind: ErrRange}
	}
	unitText = strings.TrimSpace(t[n:])
	if unitText == "" {
		return x, Unit{Factor: 1}, "", nil
	}
	u, err = ParseUnit(unitText)
	if err != nil {
		return 0, Unit{}, unitText, err
	}
	return x, u, unitText, nil
}

// ParseQuantity parses a number with an optional unit, "35000 ft", "250 kt",
// "2.5 bar", "15 degC", "12 ft^2", "300 in*lbf", "1.5e5 Pa", "-3 deg", and returns its
// value in SI units (angles in radians, temperatures in K) with its dimension. The
// number is decimal with an optional sign and exponent; NaN and infinities are
// refused, and so is a converted value that overflows. A number without a unit is
// dimensionless. See ParseUnit for the unit syntax.
func ParseQuantity(s string) (value float64, dim Dimension, err error) {
	x, u, unitText, err := parseQuantity(s)
	if err != nil {
		return 0, Dimension{}, err
	}
	v := u.Factor*x + u.Offset
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, Dimension{}, &UnitError{Input: s, Reason: "quantity " + strconv.Quote(s) + " is out of range in SI units (" + unitText + ")", kind: ErrRange}
	}
	return v, u.Dim, nil
}

// fieldTemperatureDifference is the field unit of a temperature difference.
const fieldTemperatureDifference = "dK"

// ToSI parses a quantity string for a field whose unit is fieldUnit, as a struct's
// `unit:"..."` tag names it ("m", "m^2", "m/s", "Pa", "K", "N", "N*m", "kg",
// "kg/m^3", "Pa*s", "1/m", "s", ...), checks that the dimensions agree, and returns
// the value in fieldUnit. Two field units are special:
//
//   - "deg": an angle, in degrees at the interface. It accepts "deg", "°", "rad" and
//     a bare number (taken as degrees), and returns degrees.
//   - "dK": a temperature difference such as delta_isa, in K. "10 degC" is 10 K and
//     "18 degF" is 10 K: the scales' offsets do not apply.
//
// An empty fieldUnit or "1" is a pure number. A bare number is accepted only by pure
// number and angle fields; a dimensional field needs a unit. A mismatch is an error
// naming both sides, e.g. `unit "ft" is a length (L); the field wants a pressure
// (M L^-1 T^-2, e.g. Pa)`.
func ToSI(s, fieldUnit string) (float64, error) {
	var field Unit
	difference := false
	switch fieldUnit {
	case "", "1":
		field = Unit{Factor: 1}
	case fieldTemperatureDifference:
		field = Unit{Factor: 1, Dim: DimTemperature}
		difference = true
	default:
		var err error
		field, err = ParseUnit(fieldUnit)
		if err != nil {
			return 0, err
		}
	}
	x, u, unitText, err := parseQuantity(s)
	if err != nil {
		return 0, err
	}
	if unitText == "" {
		if !field.Dim.IsDimensionless() {
			return 0, &UnitError{Input: s, Reason: "quantity " + strconv.Quote(s) + " has no unit; the field wants " + wants(field, fieldUnit, difference), kind: ErrMismatch}
		}
		// A bare number is in the field's own unit (degrees for an angle field).
		return x, nil
	}
	if u.Dim != field.Dim || u.Angle != field.Angle {
		return 0, &UnitError{Input: s, Reason: "unit " + strconv.Quote(unitText) + " is " + isWhat(u) + "; the field wants " + wants(field, fieldUnit, difference), kind: ErrMismatch}
	}
	var v float64
	if difference {
		v = u.Factor * x
	} else {
		v = (u.Factor*x + u.Offset - field.Offset) / field.Factor
	}
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, &UnitError{Input: s, Reason: "quantity " + strconv.Quote(s) + " is out of range in " + fieldUnit, kind: ErrRange}
	}
	return v, nil
}

func isWhat(u Unit) string {
	if u.Angle {
		return "an angle"
	}
	return describe(u.Dim, "")
}

func wants(field Unit, fieldUnit string, difference bool) string {
	switch {
	case difference:
		return "a temperature difference (Θ, e.g. K or degC)"
	case field.Angle:
		return "an angle (e.g. deg or rad; a bare number is degrees)"
	case field.Dim.IsDimensionless():
		return "a pure number (a bare number or %)"
	}
	return describe(field.Dim, fieldUnit)
}
