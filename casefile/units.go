package casefile

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
	"strings"
)

// dimension holds the exponents of the SI base dimensions length (m), mass
// (kg), time (s), amount of substance (mol) and temperature (K), in this
// order. The zero value is dimensionless.
type dimension [5]int

// Indices into a dimension.
const (
	dimLength = iota
	dimMass
	dimTime
	dimAmount
	dimTemperature
)

// baseNames name the base dimensions in messages.
var baseNames = [5]string{"length", "mass", "time", "amount", "temperature"}

// dim builds a dimension from exponents (length, mass, time, amount,
// temperature).
func dim(l, m, t, n, th int) dimension { return dimension{l, m, t, n, th} }

func (d dimension) mul(e dimension) dimension {
	for i := range d {
		d[i] += e[i]
	}
	return d
}

func (d dimension) pow(p int) dimension {
	for i := range d {
		d[i] *= p
	}
	return d
}

// String names the dimension in words, e.g. "mass/amount" or
// "mass/(length time^2)"; the dimensionless dimension is "dimensionless".
func (d dimension) String() string {
	var num, den []string
	for i, e := range d {
		switch {
		case e == 1:
			num = append(num, baseNames[i])
		case e > 1:
			num = append(num, fmt.Sprintf("%s^%d", baseNames[i], e))
		case e == -1:
			den = append(den, baseNames[i])
		case e < -1:
			den = append(den, fmt.Sprintf("%s^%d", baseNames[i], -e))
		}
	}
	if len(num) == 0 && len(den) == 0 {
		return "dimensionless"
	}
	s := strings.Join(num, " ")
	if s == "" {
		s = "1"
	}
	switch len(den) {
	case 0:
		return s
	case 1:
		return s + "/" + den[0]
	}
	return s + "/(" + strings.Join(den, " ") + ")"
}

// Dimensions of derived quantities.
var (
	dimNone         = dimension{}
	dimL            = dim(1, 0, 0, 0, 0)
	dimArea         = dim(2, 0, 0, 0, 0)
	dimVolume       = dim(3, 0, 0, 0, 0)
	dimT            = dim(0, 0, 1, 0, 0)
	dimTheta        = dim(0, 0, 0, 0, 1)
	dimForce        = dim(1, 1, -2, 0, 0)
	dimPressure     = dim(-1, 1, -2, 0, 0)
	dimEnergy       = dim(2, 1, -2, 0, 0)
	dimPower        = dim(2, 1, -3, 0, 0)
	dimVelocity     = dim(1, 0, -1, 0, 0)
	dimAccel        = dim(1, 0, -2, 0, 0)
	dimMolarMass    = dim(0, 1, 0, -1, 0)
	dimDiffusivity  = dim(2, 0, -1, 0, 0)
	dimViscosity    = dim(-1, 1, -1, 0, 0)
	dimMolarVolume  = dim(3, 0, 0, -1, 0)
	dimMolarFlux    = dim(-2, 0, -1, 1, 0)
	dimMassFlux     = dim(-2, 1, -1, 0, 0)
	dimAmountPerLen = dim(-1, 0, 0, 1, 0)
)

// kind is what a quantity key expects: its dimension, a name for messages
// and an example SI unit. A temperature kind (absolute) is the only one that
// accepts degC.
type kind struct {
	name        string
	dim         dimension
	example     string
	temperature bool
}

// Quantity kinds of the case format.
var (
	kindNumber      = kind{name: "number", dim: dimNone, example: "a plain number"}
	kindLength      = kind{name: "length", dim: dimL, example: "m"}
	kindArea        = kind{name: "area", dim: dimArea, example: "m^2"}
	kindTemperature = kind{name: "temperature", dim: dimTheta, example: "K", temperature: true}
	kindPressure    = kind{name: "pressure", dim: dimPressure, example: "Pa"}
	kindMolarMass   = kind{name: "molar mass", dim: dimMolarMass, example: "kg/mol"}
	kindDiffusivity = kind{name: "diffusivity", dim: dimDiffusivity, example: "m^2/s"}
	kindViscosity   = kind{name: "viscosity", dim: dimViscosity, example: "Pa s"}
	kindVelocity    = kind{name: "velocity", dim: dimVelocity, example: "m/s"}
	kindAccel       = kind{name: "acceleration", dim: dimAccel, example: "m/s^2"}
	kindMolarVolume = kind{name: "molar volume", dim: dimMolarVolume, example: "m^3/mol"}
	kindMolarFlux   = kind{name: "molar flux", dim: dimMolarFlux, example: "mol/(m^2 s)"}
	kindMassFlux    = kind{name: "mass flux", dim: dimMassFlux, example: "kg/(m^2 s)"}
	kindInventory   = kind{name: "amount per unit depth", dim: dimAmountPerLen, example: "mol/m"}
)

// unitDef is one unit symbol: its size in SI units and its dimension.
// Prefixable units accept the prefixes of prefixes (and c only where
// centiOK).
type unitDef struct {
	scale      float64
	dim        dimension
	prefixable bool
	centiOK    bool
}

// units is the table of unit symbols. Sources: the SI brochure (BIPM, 9th
// ed., 2019, tables 2, 4 and 8) and NIST SP 811 (2008), appendix B: min =
// 60 s, h = 3600 s, L = 1e-3 m^3, bar = 1e5 Pa, atm = 101325 Pa (standard
// atmosphere, exact by definition).
var units = map[string]unitDef{
	"m":   {1, dimL, true, true},
	"s":   {1, dimT, true, false},
	"min": {60, dimT, false, false},
	"h":   {3600, dimT, false, false},
	"g":   {1e-3, dim(0, 1, 0, 0, 0), true, false},
	"mol": {1, dim(0, 0, 0, 1, 0), true, false},
	"K":   {1, dimTheta, false, false},
	"Pa":  {1, dimPressure, true, false},
	"bar": {1e5, dimPressure, true, false},
	"atm": {101325, dimPressure, false, false},
	"J":   {1, dimEnergy, true, false},
	"N":   {1, dimForce, true, false},
	"W":   {1, dimPower, true, false},
	"L":   {1e-3, dimVolume, true, true},
}

// prefixes are the SI prefixes the parser knows (SI brochure, table 7).
// Both the micro sign U+00B5 and the Greek small mu U+03BC stand for micro,
// as does u.
var prefixes = map[string]float64{
	"n": 1e-9,
	"u": 1e-6,
	"µ": 1e-6,
	"μ": 1e-6,
	"m": 1e-3,
	"c": 1e-2,
	"k": 1e3,
	"M": 1e6,
	"G": 1e9,
}

// degCOffset is the offset of the Celsius scale: t/degC = T/K - 273.15
// (SI brochure, section 2.3.1; NIST SP 811, section 4.2.1.1).
const degCOffset = 273.15

// numberRE matches the decimal number at the start of a quantity.
var numberRE = regexp.MustCompile(`^[+-]?([0-9]+(\.[0-9]*)?|\.[0-9]+)([eE][+-]?[0-9]+)?`)

// quantity is a parsed number with its unit converted to SI.
type quantity struct {
	value float64   // in SI units
	dim   dimension // of the unit given; dimensionless when no unit
	unit  string    // the unit text as given, "" when none
}

// parseQuantity parses "number [unit]", e.g. "8.48e-6 m^2/s", "2mm",
// "99.4 kPa" or "55 degC", and returns the value in SI units. A number
// without a unit is returned as it is, dimensionless: the caller decides
// that it is already in SI units. degC is accepted only when affine is
// true and only on its own (an absolute temperature).
func parseQuantity(s string, affine bool) (quantity, error) {
	s = strings.TrimSpace(s)
	loc := numberRE.FindStringIndex(s)
	if loc == nil {
		return quantity{}, fmt.Errorf("%q does not start with a number", s)
	}
	v, err := strconv.ParseFloat(s[:loc[1]], 64)
	if err != nil {
		return quantity{}, fmt.Errorf("number %q is out of the range of float64", s[:loc[1]])
	}
	u := strings.TrimSpace(s[loc[1]:])
	if u == "" {
		return quantity{value: v}, nil
	}
	if u == "degC" {
		if !affine {
			return quantity{}, fmt.Errorf("unit %q is a temperature scale, allowed only for absolute temperatures; for a temperature difference use K", u)
		}
		return quantity{value: v + degCOffset, dim: dimTheta, unit: u}, nil
	}
	if strings.Contains(u, "degC") {
		return quantity{}, fmt.Errorf("unit %q: degC is a temperature scale and cannot be combined with other units; use K", u)
	}
	scale, d, err := parseUnit(u)
	if err != nil {
		return quantity{}, err
	}
	sv := v * scale
	if math.IsInf(sv, 0) || (sv == 0 && v != 0) {
		return quantity{}, fmt.Errorf("%q is out of the range of float64 in SI units", s)
	}
	return quantity{value: sv, dim: d, unit: u}, nil
}

// parseUnit parses a unit expression and returns its size in SI units and
// its dimension. Grammar (our own; products by space, '*' or U+00B7 '·',
// powers by '^' with an optional sign, at most one '/' per parenthesis
// level, whose denominator is one factor or a parenthesised group, as the
// SI brochure, section 5.4.6, asks):
//
//	expr    = product [ "/" factor ]
//	product = factor { [ "*" | "·" ] factor }
//	factor  = atom [ "^" integer ]
//	atom    = symbol | "1" | "(" expr ")"
//	symbol  = [ prefix ] unit
func parseUnit(s string) (float64, dimension, error) {
	p := &unitParser{src: s}
	p.toks, p.err = tokenizeUnit(s)
	if p.err != nil {
		return 0, dimension{}, p.err
	}
	scale, d := p.expr()
	if p.err == nil && p.pos < len(p.toks) {
		t := p.toks[p.pos]
		if t.s == ")" {
			p.fail("unbalanced ')'")
		} else if t.s[0] == '-' || t.s[0] == '+' || (t.s[0] >= '0' && t.s[0] <= '9') {
			p.fail("unexpected number %q; write powers with '^', e.g. m^2", t.s)
		} else {
			p.fail("unexpected %q", t.s)
		}
	}
	if p.err != nil {
		return 0, dimension{}, p.err
	}
	return scale, d, nil
}

// maxExponent bounds the exponents of a parsed unit's dimension.
const maxExponent = 12

// unitToken is a symbol, an integer, or one of * / ^ ( ).
type unitToken struct{ s string }

func tokenizeUnit(s string) ([]unitToken, error) {
	var toks []unitToken
	rs := []rune(s)
	for i := 0; i < len(rs); {
		r := rs[i]
		switch {
		case r == ' ' || r == '\t':
			i++
		case r == '*' || r == '·' || r == '/' || r == '^' || r == '(' || r == ')':
			s := string(r)
			if r == '·' {
				s = "*"
			}
			toks = append(toks, unitToken{s: s})
			i++
		case r == '-' || r == '+' || (r >= '0' && r <= '9'):
			j := i + 1
			for j < len(rs) && rs[j] >= '0' && rs[j] <= '9' {
				j++
			}
			toks = append(toks, unitToken{s: string(rs[i:j])})
			i = j
		case isUnitLetter(r):
			j := i + 1
			for j < len(rs) && isUnitLetter(rs[j]) {
				j++
			}
			toks = append(toks, unitToken{s: string(rs[i:j])})
			i = j
		default:
			if r == '°' {
				return nil, fmt.Errorf("unit %q: write degC for degrees Celsius", s)
			}
			return nil, fmt.Errorf("unit %q: unexpected character %q", s, r)
		}
	}
	if len(toks) == 0 {
		return nil, fmt.Errorf("empty unit")
	}
	return toks, nil
}

func isUnitLetter(r rune) bool {
	return (r >= 'a' && r <= 'z') || (r >= 'A' && r <= 'Z') || r == 'µ' || r == 'μ'
}

type unitParser struct {
	src   string
	toks  []unitToken
	pos   int
	depth int // of parentheses
	err   error
}

// maxUnitDepth bounds the nesting of parentheses in a unit.
const maxUnitDepth = 8

func (p *unitParser) fail(format string, args ...any) {
	if p.err == nil {
		p.err = fmt.Errorf("unit %q: %s", p.src, fmt.Sprintf(format, args...))
	}
}

func (p *unitParser) peek() string {
	if p.pos < len(p.toks) {
		return p.toks[p.pos].s
	}
	return ""
}

// startsFactor reports whether a token can begin a factor.
func startsFactor(t string) bool {
	if t == "" {
		return false
	}
	return t == "(" || t == "1" || isUnitLetter([]rune(t)[0])
}

func (p *unitParser) expr() (float64, dimension) {
	scale, d := p.product()
	if p.err != nil || p.peek() != "/" {
		return scale, d
	}
	p.pos++
	s2, d2 := p.factor()
	if p.err != nil {
		return 0, dimension{}
	}
	if t := p.peek(); t == "/" {
		p.fail("more than one '/' is ambiguous; write the denominator in parentheses, e.g. kg/(m^2 s)")
	} else if t != "" && t != ")" {
		p.fail("ambiguous product after '/'; write the whole denominator in parentheses, e.g. kg/(m^2 s)")
	}
	return scale / s2, p.checkDim(d.mul(d2.pow(-1)))
}

func (p *unitParser) product() (float64, dimension) {
	scale, d := p.factor()
	for p.err == nil {
		t := p.peek()
		if t == "*" {
			p.pos++
			if !startsFactor(p.peek()) {
				p.fail("'*' must be followed by a unit")
				break
			}
		} else if !startsFactor(t) {
			break
		}
		s2, d2 := p.factor()
		scale *= s2
		d = p.checkDim(d.mul(d2))
	}
	return scale, d
}

func (p *unitParser) factor() (float64, dimension) {
	scale, d := p.atom()
	if p.err != nil || p.peek() != "^" {
		return scale, d
	}
	p.pos++
	t := p.peek()
	e, err := strconv.Atoi(t)
	if err != nil || e < -9 || e > 9 || e == 0 {
		p.fail("power %q after '^' must be a non-zero integer between -9 and 9", t)
		return 0, dimension{}
	}
	p.pos++
	return math.Pow(scale, float64(e)), p.checkDim(d.pow(e))
}

// checkDim fails when an exponent of d leaves [-maxExponent, maxExponent],
// so that nested powers cannot overflow.
func (p *unitParser) checkDim(d dimension) dimension {
	for _, e := range d {
		if e < -maxExponent || e > maxExponent {
			p.fail("dimension exponent %d is out of range", e)
			return dimension{}
		}
	}
	return d
}

func (p *unitParser) atom() (float64, dimension) {
	t := p.peek()
	switch {
	case t == "":
		p.fail("a unit is missing at the end")
		return 0, dimension{}
	case t == "(":
		p.pos++
		if p.depth++; p.depth > maxUnitDepth {
			p.fail("parentheses nested deeper than %d", maxUnitDepth)
			return 0, dimension{}
		}
		scale, d := p.expr()
		p.depth--
		if p.err == nil && p.peek() != ")" {
			p.fail("missing ')'")
		}
		p.pos++
		return scale, d
	case t == "1":
		p.pos++
		return 1, dimension{}
	case isUnitLetter([]rune(t)[0]):
		p.pos++
		scale, d, err := lookupUnit(t)
		if err != nil {
			p.fail("%v", err)
		}
		return scale, d
	}
	p.fail("unexpected %q", t)
	return 0, dimension{}
}

// lookupUnit resolves a symbol: an exact unit first, then a prefix followed
// by a prefixable unit.
func lookupUnit(sym string) (float64, dimension, error) {
	if u, ok := units[sym]; ok {
		return u.scale, u.dim, nil
	}
	for pre, f := range prefixes {
		rest, ok := strings.CutPrefix(sym, pre)
		if !ok || rest == "" {
			continue
		}
		u, ok := units[rest]
		if !ok || !u.prefixable || (pre == "c" && !u.centiOK) {
			continue
		}
		return f * u.scale, u.dim, nil
	}
	return 0, dimension{}, fmt.Errorf("unknown symbol %q (known: m, s, min, h, g, mol, K, Pa, bar, atm, J, N, W, L, with prefixes n, u, m, c, k, M, G; degC for temperatures)", sym)
}
