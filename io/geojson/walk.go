package geojson

import (
	"bytes"
	"encoding/json"
	"unicode/utf8"
)

// The functions here walk JSON text that has already been checked to be
// well-formed (by a json.Decoder or json.Valid). They do not allocate, keep
// no recursion (so nesting depth costs nothing), and never read past the
// slice: on text that is not well-formed they return positions within it
// and results that the caller does not rely on.

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\n' || c == '\r' }

// skipSpace returns the index of the first non-space byte at or after i.
func skipSpace(b []byte, i int) int {
	for i < len(b) && isSpace(b[i]) {
		i++
	}
	return i
}

// skipString returns the index after the string starting at b[i] == '"'.
func skipString(b []byte, i int) int {
	i++
	for {
		j := bytes.IndexByte(b[i:], '"')
		if j < 0 {
			return len(b)
		}
		i += j
		// An escaped quote has an odd number of backslashes before it.
		n := 0
		for k := i - 1; k >= 0 && b[k] == '\\'; k-- {
			n++
		}
		i++
		if n%2 == 0 {
			return i
		}
	}
}

// skipValue returns the index after the value starting at b[i].
func skipValue(b []byte, i int) int {
	if i >= len(b) {
		return i
	}
	switch b[i] {
	case '"':
		return skipString(b, i)
	case '{', '[':
		depth := 0
		for i < len(b) {
			switch b[i] {
			case '"':
				i = skipString(b, i)
				continue
			case '{', '[':
				depth++
			case '}', ']':
				depth--
				if depth == 0 {
					return i + 1
				}
			}
			i++
		}
		return i
	}
	for i < len(b) {
		switch b[i] {
		case ',', '}', ']', ' ', '\t', '\n', '\r':
			return i
		}
		i++
	}
	return i
}

// member is one member of an object: b[key0:key1] is the key with its
// quotes, b[val0:val1] the value.
type member struct {
	key0, key1, val0, val1 int
}

// nextMember reads the member at or after i in an object (i just after '{'
// or after the previous member's value). ok is false at the closing '}',
// whose index is then returned as end.
func nextMember(b []byte, i int) (m member, end int, ok bool) {
	i = skipSpace(b, i)
	if i < len(b) && b[i] == ',' {
		i = skipSpace(b, i+1)
	}
	if i >= len(b) || b[i] != '"' {
		return m, i, false
	}
	m.key0 = i
	m.key1 = skipString(b, i)
	i = skipSpace(b, m.key1)
	if i < len(b) && b[i] == ':' {
		i++
	}
	m.val0 = skipSpace(b, i)
	m.val1 = skipValue(b, m.val0)
	return m, m.val1, true
}

// keyIs reports whether the quoted key q (with quotes) reads as name.
func keyIs(q []byte, name string) bool {
	if len(q) == len(name)+2 && string(q[1:len(q)-1]) == name {
		return true
	}
	if bytes.IndexByte(q, '\\') < 0 {
		return false
	}
	return unquote(q) == name
}

// unquote returns the text of a JSON string (with its quotes).
func unquote(q []byte) string {
	if len(q) >= 2 && bytes.IndexByte(q, '\\') < 0 {
		return string(q[1 : len(q)-1])
	}
	var s string
	if err := json.Unmarshal(q, &s); err != nil {
		return string(q)
	}
	return s
}

// valueText renders a JSON value as field text: a string's text, null as
// "", anything else (numbers, booleans, objects, arrays) as written.
func valueText(v []byte) string {
	if len(v) == 0 {
		return ""
	}
	switch v[0] {
	case '"':
		return unquote(v)
	case 'n':
		return ""
	}
	return string(v)
}

// kindName names the JSON type of the value starting with c, for messages.
func kindName(c byte) string {
	switch c {
	case '{':
		return "an object"
	case '[':
		return "an array"
	case '"':
		return "a string"
	case 't', 'f':
		return "a boolean"
	case 'n':
		return "null"
	}
	return "a number"
}

// appendString appends s as a JSON string. Invalid UTF-8 becomes U+FFFD.
func appendString(b []byte, s string) []byte {
	const hex = "0123456789abcdef"
	b = append(b, '"')
	start := 0
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf {
			if c >= 0x20 && c != '"' && c != '\\' {
				i++
				continue
			}
			b = append(b, s[start:i]...)
			switch c {
			case '"', '\\':
				b = append(b, '\\', c)
			case '\n':
				b = append(b, '\\', 'n')
			case '\r':
				b = append(b, '\\', 'r')
			case '\t':
				b = append(b, '\\', 't')
			default:
				b = append(b, '\\', 'u', '0', '0', hex[c>>4], hex[c&0xF])
			}
			i++
			start = i
			continue
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		if r == utf8.RuneError && size == 1 {
			b = append(b, s[start:i]...)
			b = append(b, `\ufffd`...)
			i += size
			start = i
			continue
		}
		i += size
	}
	b = append(b, s[start:]...)
	return append(b, '"')
}
