// Package num formats numbers for text outputs quickly.
package num

import (
	"math"
	"slices"
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
	neg := scaled < 0 && n != 0
	if dec == 4 && n < 1000*1e4 {
		return append4(b, n, neg)
	}
	if neg {
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

// append4 appends n/10⁴ with four decimals, for n < 10⁷ (the degrees of
// angles, the commonest case), straight into b's spare room.
func append4(b []byte, n uint64, neg bool) []byte {
	ip, fp := uint32(n/1e4), uint32(n%1e4)
	size := 5 // the point and four decimals
	switch {
	case ip < 10:
		size++
	case ip < 100:
		size += 2
	default:
		size += 3
	}
	if neg {
		size++
	}
	o := len(b)
	b = slices.Grow(b, size)[:o+size]
	out := b[o:]
	if neg {
		out[0] = '-'
		out = out[1:]
	}
	switch {
	case ip < 10:
		out[0] = byte('0' + ip)
		out = out[1:]
	case ip < 100:
		out[0], out[1] = pairs[2*ip], pairs[2*ip+1]
		out = out[2:]
	default:
		r := ip % 100
		out[0], out[1], out[2] = byte('0'+ip/100), pairs[2*r], pairs[2*r+1]
		out = out[3:]
	}
	hi, lo := fp/100, fp%100
	_ = out[4]
	out[0] = '.'
	out[1], out[2] = pairs[2*hi], pairs[2*hi+1]
	out[3], out[4] = pairs[2*lo], pairs[2*lo+1]
	return b
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
