package catalogue

import "strconv"

// pow10 holds the powers of ten a float64 represents exactly.
var pow10 = [...]float64{1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// exactDecimal converts a decimal float token (sign, digits, fraction,
// exponent, no underscores) of at most 15 significant digits and a power
// of ten within 10^±22 the short way: the digits as an integer m and the
// power 10^e are both exact in a float64, so m x 10^e or m / 10^-e,
// rounded once by the hardware, is the correctly rounded value, the one
// strconv.ParseFloat gives (Clinger 1990, "How to read floating point
// numbers accurately", PLDI '90, the fast path). Composition tables are
// such numbers ("44.0", "0.25"); any other token (ok false) goes to
// strconv.ParseFloat. A text that is not such a number at all (no digit,
// a second point, a letter) is declined too, so that ok true means
// strconv.ParseFloat reads the text as this same value. TestExactDecimal
// holds the two to the same bits.
func exactDecimal[T string | []byte](text T) (float64, bool) {
	i, neg := 0, false
	if i < len(text) && (text[i] == '+' || text[i] == '-') {
		neg = text[i] == '-'
		i++
	}
	var m uint64
	digits, exp, dot, seen := 0, 0, false, false
	for ; i < len(text); i++ {
		switch b := text[i]; {
		case b >= '0' && b <= '9':
			seen = true
			if dot {
				exp--
			}
			if digits == 0 && b == '0' {
				continue // a leading zero
			}
			if digits == 15 {
				return 0, false
			}
			m = m*10 + uint64(b-'0')
			digits++
		case b == '.' && !dot:
			dot = true
		case (b == 'e' || b == 'E') && seen:
			e, err := strconv.Atoi(string(text[i+1:]))
			if err != nil || e < -len(pow10) || e > len(pow10) {
				return 0, false
			}
			exp += e
			i = len(text)
		default:
			return 0, false
		}
	}
	if !seen || exp <= -len(pow10) || exp >= len(pow10) {
		return 0, false
	}
	f := float64(m)
	if exp < 0 {
		f /= pow10[-exp]
	} else {
		f *= pow10[exp]
	}
	if neg {
		f = -f
	}
	return f, true
}
