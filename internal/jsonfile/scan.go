package jsonfile

import (
	"bytes"
	"fmt"
	"strconv"
	"unicode/utf16"
	"unicode/utf8"
)

// The scanner reads JSON text from a byte slice. It accepts what
// RFC 8259 accepts and, where a value stands, the bare tokens NaN,
// Infinity and their kin that hand-edited files and other programs
// write, so that they can be refused as values at their path instead of
// as a syntax error.

// nonFiniteTokens are recognised where a value stands, longest first.
var nonFiniteTokens = []string{"-Infinity", "+Infinity", "Infinity", "-NaN", "+NaN", "NaN", "-inf", "+inf", "inf", "-nan", "nan"}

// maxSkipDepth bounds the nesting of values the scanner skips over
// (unknown fields, values of the wrong type): deeper input is refused as
// a syntax error rather than walked.
const maxSkipDepth = 1000

// syntaxError is a fatal problem at an offset.
type syntaxError struct {
	off int
	msg string
	eof bool
}

type scanner struct {
	data []byte
	pos  int
	err  *syntaxError // the first syntax error; scanning stops there
}

func (s *scanner) fail(off int, format string, args ...any) {
	if s.err == nil {
		s.err = &syntaxError{off: off, msg: fmt.Sprintf(format, args...)}
	}
	s.pos = len(s.data)
}

func (s *scanner) failEOF() {
	if s.err == nil {
		s.err = &syntaxError{off: len(s.data), eof: true}
	}
	s.pos = len(s.data)
}

func isSpace(c byte) bool { return c == ' ' || c == '\t' || c == '\n' || c == '\r' }

func (s *scanner) skipSpace() {
	for s.pos < len(s.data) && isSpace(s.data[s.pos]) {
		s.pos++
	}
}

// peek returns the next non-space byte, or 0 at the end.
func (s *scanner) peek() byte {
	s.skipSpace()
	if s.pos >= len(s.data) {
		return 0
	}
	return s.data[s.pos]
}

// expect consumes c or records a syntax error naming what was wanted.
func (s *scanner) expect(c byte, want string) bool {
	if s.err != nil {
		return false
	}
	got := s.peek()
	if got == c {
		s.pos++
		return true
	}
	if got == 0 {
		s.failEOF()
	} else {
		s.fail(s.pos, "%s where %s should be", describeByte(s.data[s.pos:]), want)
	}
	return false
}

func describeByte(b []byte) string {
	r, _ := utf8.DecodeRune(b)
	switch {
	case r == utf8.RuneError:
		return fmt.Sprintf("byte 0x%02x", b[0])
	case r < ' ' || r == 0x7f:
		return fmt.Sprintf("control character %U", r)
	}
	return fmt.Sprintf("%q", r)
}

func isDelimiter(c byte) bool {
	switch c {
	case ' ', '\t', '\n', '\r', ',', ':', '[', ']', '{', '}':
		return true
	}
	return false
}

// nonFinite returns the non-finite token at the position, or "".
func (s *scanner) nonFinite() string {
	rest := s.data[s.pos:]
	for _, tok := range nonFiniteTokens {
		if len(rest) >= len(tok) && string(rest[:len(tok)]) == tok && (len(rest) == len(tok) || isDelimiter(rest[len(tok)])) {
			return tok
		}
	}
	return ""
}

// number scans a JSON number at the position and returns its text, or
// records a syntax error.
func (s *scanner) number() []byte {
	d, start := s.data, s.pos
	i := start
	if i < len(d) && d[i] == '-' {
		i++
	}
	switch {
	case i < len(d) && d[i] == '0':
		i++
	case i < len(d) && d[i] >= '1' && d[i] <= '9':
		i, _ = digits(d, i)
	default:
		s.badNumber(start, i)
		return nil
	}
	var ok bool
	if i < len(d) && d[i] == '.' {
		if i, ok = digits(d, i+1); !ok {
			s.badNumber(start, i)
			return nil
		}
	}
	if i < len(d) && (d[i] == 'e' || d[i] == 'E') {
		i++
		if i < len(d) && (d[i] == '+' || d[i] == '-') {
			i++
		}
		if i, ok = digits(d, i); !ok {
			s.badNumber(start, i)
			return nil
		}
	}
	if i < len(d) && !isDelimiter(d[i]) {
		s.badNumber(start, i)
		return nil
	}
	s.pos = i
	return d[start:i]
}

// digits returns the end of the run of decimal digits at d[i:] and
// whether it holds at least one.
func digits(d []byte, i int) (end int, ok bool) {
	end = i
	for end < len(d) && d[end] >= '0' && d[end] <= '9' {
		end++
	}
	return end, end > i
}

func (s *scanner) badNumber(start, at int) {
	if at >= len(s.data) {
		s.failEOF()
		return
	}
	end := at
	for end < len(s.data) && !isDelimiter(s.data[end]) && end-start < MaxQuote {
		end++
	}
	s.fail(at, "%q is not a number", Prefix(string(s.data[start:end]), MaxQuote))
}

// literal consumes true, false or null, reporting which; ok is false
// (and a syntax error recorded) for anything else.
func (s *scanner) literal() (word string, ok bool) {
	for _, w := range []string{"true", "false", "null"} {
		rest := s.data[s.pos:]
		if len(rest) >= len(w) && string(rest[:len(w)]) == w && (len(rest) == len(w) || isDelimiter(rest[len(w)])) {
			s.pos += len(w)
			return w, true
		}
	}
	s.unexpected()
	return "", false
}

// unexpected records a syntax error at a byte that cannot start a value.
func (s *scanner) unexpected() {
	if s.pos >= len(s.data) {
		s.failEOF()
		return
	}
	end := s.pos
	for end < len(s.data) && !isDelimiter(s.data[end]) && end-s.pos < MaxQuote {
		end++
	}
	if end > s.pos+1 && utf8.Valid(s.data[s.pos:end]) {
		s.fail(s.pos, "%q where a value should be", Prefix(string(s.data[s.pos:end]), MaxQuote))
		return
	}
	s.fail(s.pos, "%s where a value should be", describeByte(s.data[s.pos:]))
}

// stringBytes scans the JSON string at the position (which holds '"')
// and returns its raw content between the quotes and whether it holds
// escapes.
func (s *scanner) stringBytes() (raw []byte, escaped bool) {
	d := s.data
	start := s.pos + 1
	i := start
	for i < len(d) {
		c := d[i]
		switch {
		case c == '"':
			s.pos = i + 1
			return d[start:i], escaped
		case c == '\\':
			escaped = true
			if i+1 >= len(d) {
				s.failEOF()
				return nil, false
			}
			switch d[i+1] {
			case '"', '\\', '/', 'b', 'f', 'n', 'r', 't':
				i += 2
			case 'u':
				if i+6 > len(d) {
					s.failEOF()
					return nil, false
				}
				for _, h := range d[i+2 : i+6] {
					if !isHex(h) {
						s.fail(i, "bad \\u escape in a string")
						return nil, false
					}
				}
				i += 6
			default:
				s.fail(i, "bad escape \\%c in a string", d[i+1])
				return nil, false
			}
		case c < ' ':
			s.fail(i, "control character %U in a string (write it escaped)", rune(c))
			return nil, false
		default:
			i++
		}
	}
	s.failEOF()
	return nil, false
}

func isHex(c byte) bool {
	return (c >= '0' && c <= '9') || (c >= 'a' && c <= 'f') || (c >= 'A' && c <= 'F')
}

// unescape decodes the content of a JSON string; each byte of invalid
// UTF-8 becomes U+FFFD, as encoding/json does (bytes.ToValidUTF8 would
// give one U+FFFD for a run of them).
func unescape(raw []byte, escaped bool) string {
	if !escaped && utf8.Valid(raw) {
		return string(raw)
	}
	out := make([]byte, 0, len(raw))
	for i := 0; i < len(raw); {
		c := raw[i]
		if c != '\\' {
			r, n := utf8.DecodeRune(raw[i:])
			out = utf8.AppendRune(out, r)
			i += n
			continue
		}
		switch raw[i+1] {
		case 'b':
			out = append(out, '\b')
		case 'f':
			out = append(out, '\f')
		case 'n':
			out = append(out, '\n')
		case 'r':
			out = append(out, '\r')
		case 't':
			out = append(out, '\t')
		case 'u':
			r := hexRune(raw[i+2 : i+6])
			i += 6
			if utf16.IsSurrogate(r) {
				r2 := rune(-1)
				if i+6 <= len(raw) && raw[i] == '\\' && raw[i+1] == 'u' {
					r2 = hexRune(raw[i+2 : i+6])
				}
				if dec := utf16.DecodeRune(r, r2); dec != utf8.RuneError {
					r = dec
					i += 6
				} else {
					r = utf8.RuneError
				}
			}
			out = utf8.AppendRune(out, r)
			continue
		default: // " \ /
			out = append(out, raw[i+1])
		}
		i += 2
	}
	return string(out)
}

func hexRune(h []byte) rune {
	n, _ := strconv.ParseUint(string(h), 16, 32)
	return rune(n)
}

// skipValue scans over one value of any kind, checking its syntax, and
// returns its start and end offsets. Non-finite tokens count as values.
func (s *scanner) skipValue() (start, end int) {
	s.skipSpace()
	start = s.pos
	depth := 0
	var stack [maxSkipDepth]byte // the closer each open container waits for
	for s.err == nil {
		// A value.
		c := s.peek()
		switch {
		case c == '{' || c == '[':
			if depth == maxSkipDepth {
				s.fail(s.pos, "values nested deeper than %d levels", maxSkipDepth)
				return start, s.pos
			}
			s.pos++
			closer := byte('}')
			if c == '[' {
				closer = ']'
			}
			stack[depth] = closer
			depth++
			if s.peek() == closer {
				s.pos++
				depth--
				break
			}
			if c == '{' {
				if !s.key() {
					return start, s.pos
				}
			}
			continue
		case c == '"':
			s.stringBytes()
		case c == '-' || (c >= '0' && c <= '9'):
			if tok := s.nonFinite(); tok != "" {
				s.pos += len(tok)
			} else {
				s.number()
			}
		case c == 't' || c == 'f' || c == 'n':
			if tok := s.nonFinite(); tok != "" {
				s.pos += len(tok)
			} else {
				s.literal()
			}
		default:
			if tok := s.nonFinite(); tok != "" {
				s.pos += len(tok)
			} else {
				s.unexpected()
			}
		}
		// After a value: close containers or move to the next member.
		for s.err == nil {
			if depth == 0 {
				return start, s.pos
			}
			closer := stack[depth-1]
			c := s.peek()
			if c == ',' {
				s.pos++
				if closer == '}' && !s.key() {
					return start, s.pos
				}
				break
			}
			if c == closer {
				s.pos++
				depth--
				continue
			}
			if c == 0 {
				s.failEOF()
			} else {
				s.fail(s.pos, "%s where ',' or '%c' should be", describeByte(s.data[s.pos:]), closer)
			}
		}
	}
	return start, s.pos
}

// next reads what follows a member of the object or list that closer
// ends: a comma, and reports true (another member follows), or closer,
// and reports false; anything else is a syntax error (false).
func (s *scanner) next(closer byte) bool {
	switch s.peek() {
	case ',':
		s.pos++
		return true
	case closer:
		s.pos++
		return false
	}
	s.expect(closer, "',' or '"+string(closer)+"'")
	return false
}

// key scans an object key and its colon.
func (s *scanner) key() bool {
	if s.peek() != '"' {
		s.expect('"', "a field name in double quotes")
		return false
	}
	s.stringBytes()
	return s.expect(':', "':' after a field name")
}

// describeValue names the value at the position for a message ("the
// number 7", "the string \"x\"", "a list", "an object", "null", "NaN")
// without consuming it.
func (s *scanner) describeValue() string {
	s.skipSpace()
	if s.pos >= len(s.data) {
		return "nothing"
	}
	if tok := s.nonFinite(); tok != "" {
		return tok
	}
	switch c := s.data[s.pos]; {
	case c == '{':
		return "an object"
	case c == '[':
		return "a list"
	case c == '"':
		save := s.pos
		raw, esc := s.stringBytes()
		s.pos = save
		if s.err != nil {
			return "a string"
		}
		return "the string " + strconv.Quote(Prefix(unescape(raw, esc), MaxQuote))
	case c == 't':
		return "true"
	case c == 'f':
		return "false"
	case c == 'n':
		return "null"
	}
	end := s.pos
	for end < len(s.data) && !isDelimiter(s.data[end]) && end-s.pos <= MaxQuote {
		end++
	}
	return "the number " + Prefix(string(s.data[s.pos:end]), MaxQuote)
}

// lineCounter converts increasing offsets to positions in one pass over
// the data; an offset before the last one asked for starts it again.
type lineCounter struct {
	data            []byte
	off, line, from int // offset reached, its line, where that line starts
}

func (lc *lineCounter) at(off int) (line, col int) {
	off = min(max(off, 0), len(lc.data))
	if lc.line == 0 || off < lc.off {
		lc.off, lc.line, lc.from = 0, 1, 0
	}
	for {
		i := bytes.IndexByte(lc.data[lc.off:off], '\n')
		if i < 0 {
			break
		}
		lc.line++
		lc.from = lc.off + i + 1
		lc.off = lc.from
	}
	lc.off = off
	return lc.line, 1 + utf8.RuneCount(lc.data[lc.from:off])
}
