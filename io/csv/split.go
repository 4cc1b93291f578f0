package csv

import (
	"bytes"
	"errors"
	"fmt"
	"unsafe"
)

// Errors in a record's quoting, reported as bad rows.
var (
	ErrQuote      = errors.New("bad quoting")
	ErrFieldCount = errors.New("wrong number of fields")
)

// splitRecord splits one record (its bytes without the line terminator) into
// fields, appending to dst. Unquoted fields and quoted fields without doubled
// quotes are views into rec (no copy): rec must not change while they are used.
// A quoted field may hold delimiters, quotes (doubled) and newlines.
func splitRecord(dst []string, rec []byte, delim byte) ([]string, error) {
	dst = dst[:0]
	i := 0
	for {
		if i < len(rec) && rec[i] == '"' {
			// Quoted field.
			j := i + 1
			hasDouble := false
			for {
				k := bytes.IndexByte(rec[j:], '"')
				if k < 0 {
					return dst, fmt.Errorf("%w: field %d: quoted field not closed", ErrQuote, len(dst)+1)
				}
				j += k
				if j+1 < len(rec) && rec[j+1] == '"' {
					hasDouble = true
					j += 2
					continue
				}
				break
			}
			body := rec[i+1 : j]
			if hasDouble {
				dst = append(dst, string(bytes.ReplaceAll(body, []byte(`""`), []byte(`"`))))
			} else {
				dst = append(dst, view(body))
			}
			j++ // past the closing quote
			if j == len(rec) {
				return dst, nil
			}
			if rec[j] != delim {
				return dst, fmt.Errorf("%w: field %d: text after the closing quote; a quote inside a field must be doubled (\"\")", ErrQuote, len(dst))
			}
			i = j + 1
			if i == len(rec) {
				return append(dst, ""), nil
			}
			continue
		}
		k := bytes.IndexByte(rec[i:], delim)
		end := len(rec)
		if k >= 0 {
			end = i + k
		}
		f := rec[i:end]
		if bytes.IndexByte(f, '"') >= 0 {
			return dst, fmt.Errorf("%w: field %d: a quote inside an unquoted field; quote the field and double the quote (\"\")", ErrQuote, len(dst)+1)
		}
		dst = append(dst, view(f))
		if k < 0 {
			return dst, nil
		}
		i = end + 1
		if i == len(rec) {
			return append(dst, ""), nil
		}
	}
}

// view returns b as a string without copying. The caller keeps b unchanged
// for as long as the string is used.
func view(b []byte) string {
	if len(b) == 0 {
		return ""
	}
	return unsafe.String(&b[0], len(b))
}

// appendField appends s as one CSV field, quoted only where CSV needs it.
func appendField(dst []byte, s string, delim byte) []byte {
	needs := false
	for i := 0; i < len(s); i++ {
		switch c := s[i]; c {
		case '"', '\n', '\r', delim:
			needs = true
		}
		if needs {
			break
		}
	}
	if !needs && (len(s) == 0 || (s[0] != ' ' && s[0] != '\t')) {
		return append(dst, s...)
	}
	dst = append(dst, '"')
	for i := 0; i < len(s); i++ {
		if s[i] == '"' {
			dst = append(dst, '"')
		}
		dst = append(dst, s[i])
	}
	return append(dst, '"')
}
