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
	if dec < 0 || dec >= len(pow10) || math.IsNaN(v) || math.Abs(v) >= 1e15/pow10[dec] {
		return strconv.AppendFloat(b, v, 'f', dec, 64)
	}
	scaled := math.Round(v * pow10[dec])
	n := int64(scaled)
	if n < 0 {
		b = append(b, '-')
		n = -n
	}
	var buf [24]byte
	i := len(buf)
	for d := 0; d < dec; d++ {
		i--
		buf[i] = byte('0' + n%10)
		n /= 10
	}
	if dec > 0 {
		i--
		buf[i] = '.'
	}
	if n == 0 {
		i--
		buf[i] = '0'
	}
	for n > 0 {
		i--
		buf[i] = byte('0' + n%10)
		n /= 10
	}
	return append(b, buf[i:]...)
}
