package num

import "strconv"

// exact10 holds the powers of ten that float64 represents exactly.
var exact10 = [...]float64{1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10,
	1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22}

// ParseDecimal parses s as a float64 exactly like strconv.ParseFloat(s, 64):
// the same value for every input it accepts and an error for every input
// strconv rejects. Plain decimals ([+-]digits[.digits] with at most 15
// significant digits, the form of every coordinate and most numbers in a
// data file) take a fast path: the digits form an integer m below 2^53 and
// the result is m / 10^k, both exact in float64, so one correctly rounded
// division gives the correctly rounded value (the exact case of Clinger's
// algorithm, which strconv uses too). Everything else goes to strconv.
func ParseDecimal(s string) (float64, error) {
	i := 0
	neg := false
	if i < len(s) && (s[i] == '-' || s[i] == '+') {
		neg = s[i] == '-'
		i++
	}
	var m uint64
	digits, frac := 0, 0 // significant digits, digits after the point
	seenDigit, seenPoint := false, false
	for ; i < len(s); i++ {
		c := s[i]
		switch {
		case c >= '0' && c <= '9':
			seenDigit = true
			if seenPoint {
				frac++
			}
			if m == 0 && c == '0' {
				continue // a leading zero is not significant
			}
			m = m*10 + uint64(c-'0')
			digits++
		case c == '.' && !seenPoint:
			seenPoint = true
		default:
			return strconv.ParseFloat(s, 64)
		}
	}
	if !seenDigit || digits > 15 || frac >= len(exact10) {
		return strconv.ParseFloat(s, 64)
	}
	v := float64(m) / exact10[frac]
	if neg {
		v = -v
	}
	return v, nil
}
