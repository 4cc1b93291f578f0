// Package num formats numbers for text outputs quickly.
package num

import (
	"math"
	"strconv"
)

var pow10 = [...]float64{1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9}

// AppendFixed appends v with exactly dec digits after the decimal point
// (0 ≤ dec ≤ 9), like strconv.AppendFloat(b, v, 'f', dec, 64) but several
// times faster. It rounds v·10^dec to the nearest integer (halves away from
// zero), so a value that lies exactly halfway may differ from strconv's
// round-half-even in the last digit; both are correct to the digits shown.
// NaN, infinities and magnitudes of 1e15/10^dec or more go to strconv. Zero
// after rounding prints without a sign.
func AppendFixed(b []byte, v float64, dec int) []byte {
	if dec < 0 || dec >= len(pow10) || !(math.Abs(v) < limit[dec]) { // NaN fails the test too
		return strconv.AppendFloat(b, v, 'f', dec, 64)
	}
	scaled := math.Round(v * pow10[dec])
	n := uint64(math.Abs(scaled))
	if scaled < 0 && n != 0 {
		b = append(b, '-')
	}
	// Digits are written backwards into buf, two at a time from a table;
	// every division is by a constant (a multiplication once compiled).
	var buf [24]byte
	i := len(buf)
	if dec > 0 {
		d := dec
		for ; d >= 2; d -= 2 {
			q := n % 100
			n /= 100
			i -= 2
			buf[i], buf[i+1] = pairs[2*q], pairs[2*q+1]
		}
		if d == 1 {
			i--
			buf[i] = byte('0' + n%10)
			n /= 10
		}
		i--
		buf[i] = '.'
	}
	for n >= 100 {
		q := n % 100
		n /= 100
		i -= 2
		buf[i], buf[i+1] = pairs[2*q], pairs[2*q+1]
	}
	if n >= 10 {
		i -= 2
		buf[i], buf[i+1] = pairs[2*n], pairs[2*n+1]
	} else {
		i--
		buf[i] = byte('0' + n)
	}
	return append(b, buf[i:]...)
}

// limit[dec] is the magnitude from which AppendFixed leaves a value to
// strconv: v·10^dec must stay below 1e15, well inside uint64 and exact.
var limit = func() (l [len(pow10)]float64) {
	for i, p := range pow10 {
		l[i] = 1e15 / p
	}
	return l
}()

// pairs holds "00" to "99": the two digits of q at pairs[2q:2q+2].
const pairs = "00010203040506070809101112131415161718192021222324252627282930313233343536373839" +
	"40414243444546474849505152535455565758596061626364656667686970717273747576777879" +
	"8081828384858687888990919293949596979899"
