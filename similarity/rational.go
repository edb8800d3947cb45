package similarity

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/big"
	"strconv"
	"strings"
)

// Rational is an exact fraction, an exponent of a dimensionless group such as -1/2.
// It is kept in lowest terms with a positive denominator. The zero value is 0.
// In JSON it is an integer when whole (-2) and otherwise a string "p/q" ("-1/2").
type Rational struct {
	num int64
	den int64 // 0 in the zero value, read as 1
}

// ErrRational is wrapped by the errors of ParseRational and of Rational's decoding.
var ErrRational = errors.New("bad rational number")

// NewRational returns num/den in lowest terms. ok is false when den is 0 or when the
// fraction cannot be held (num or den is math.MinInt64).
func NewRational(num, den int64) (r Rational, ok bool) {
	if den == 0 || num == math.MinInt64 || den == math.MinInt64 {
		return Rational{}, false
	}
	if den < 0 {
		num, den = -num, -den
	}
	g := gcd(abs64(num), den)
	return Rational{num: num / g, den: den / g}, true
}

// Int returns the whole number n as a Rational.
func Int(n int64) Rational { return Rational{num: n, den: 1} }

func abs64(x int64) int64 {
	if x < 0 {
		return -x
	}
	return x
}

func gcd(a, b int64) int64 {
	for b != 0 {
		a, b = b, a%b
	}
	if a == 0 {
		return 1
	}
	return a
}

// Num returns the numerator.
func (r Rational) Num() int64 { return r.num }

// Den returns the denominator, always positive (1 for the zero value).
func (r Rational) Den() int64 {
	if r.den == 0 {
		return 1
	}
	return r.den
}

// IsInt reports whether r is a whole number.
func (r Rational) IsInt() bool { return r.Den() == 1 }

// Sign returns -1, 0 or +1.
func (r Rational) Sign() int {
	switch {
	case r.num < 0:
		return -1
	case r.num > 0:
		return 1
	}
	return 0
}

// Float64 returns the nearest float64.
func (r Rational) Float64() float64 { return float64(r.num) / float64(r.Den()) }

// String formats r as "3", "-1/2".
func (r Rational) String() string {
	if r.IsInt() {
		return strconv.FormatInt(r.num, 10)
	}
	return strconv.FormatInt(r.num, 10) + "/" + strconv.FormatInt(r.Den(), 10)
}

// ParseRational reads "3", "-2", "-1/2" or "+3/4" (integers with an optional sign and
// an optional positive denominator).
func ParseRational(s string) (Rational, error) {
	ns, ds, frac := strings.Cut(strings.TrimSpace(s), "/")
	num, err := strconv.ParseInt(strings.TrimSpace(ns), 10, 64)
	if err != nil {
		return Rational{}, fmt.Errorf("%q is not an integer or a fraction p/q: %w", s, ErrRational)
	}
	den := int64(1)
	if frac {
		den, err = strconv.ParseInt(strings.TrimSpace(ds), 10, 64)
		if err != nil || den <= 0 {
			return Rational{}, fmt.Errorf("%q: the denominator must be a positive integer: %w", s, ErrRational)
		}
	}
	r, ok := NewRational(num, den)
	if !ok {
		return Rational{}, fmt.Errorf("%q is out of range: %w", s, ErrRational)
	}
	return r, nil
}

// MarshalJSON writes an integer when r is whole, else the string "p/q".
func (r Rational) MarshalJSON() ([]byte, error) {
	if r.IsInt() {
		return strconv.AppendInt(nil, r.num, 10), nil
	}
	return strconv.AppendQuote(nil, r.String()), nil
}

// UnmarshalJSON reads an integer or a string that ParseRational accepts.
func (r *Rational) UnmarshalJSON(b []byte) error {
	var s string
	if len(b) > 0 && b[0] == '"' {
		if err := json.Unmarshal(b, &s); err != nil {
			return err
		}
	} else {
		s = string(b)
	}
	v, err := ParseRational(s)
	if err != nil {
		return err
	}
	*r = v
	return nil
}

// rat returns r as a big.Rat.
func (r Rational) rat() *big.Rat { return big.NewRat(r.num, r.Den()) }

// fromRat converts an exact big.Rat; ok is false when it does not fit in int64.
func fromRat(x *big.Rat) (Rational, bool) {
	if !x.Num().IsInt64() || !x.Denom().IsInt64() {
		return Rational{}, false
	}
	return NewRational(x.Num().Int64(), x.Denom().Int64())
}
