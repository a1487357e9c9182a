package cases

import (
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/BurntSushi/toml"
)

// path is a key path into the decoded TOML tree. An element of an array
// (an entry of [[transfer]]) is written as an index element made by idx.
type path []string

// idx returns the path element for array index i. The leading NUL cannot
// start a bare TOML key, so it does not collide with real keys in practice.
func idx(i int) string { return "\x00" + strconv.Itoa(i) }

func (p path) add(k ...string) path {
	q := make(path, 0, len(p)+len(k))
	return append(append(q, p...), k...)
}

// key is the map key of p in a line index.
func (p path) key() string { return strings.Join(p, "\x1f") }

// String formats p as a dotted key, with array entries numbered from 1:
// transfer[2].sweep.start.
func (p path) String() string {
	var b strings.Builder
	for i, e := range p {
		if strings.HasPrefix(e, "\x00") {
			n, _ := strconv.Atoi(e[1:])
			b.WriteString("[" + strconv.Itoa(n+1) + "]")
			continue
		}
		if i > 0 {
			b.WriteByte('.')
		}
		b.WriteString(toml.Key{e}.String())
	}
	return b.String()
}

// scanLines finds the 1-based line of every key, table header and array
// entry of a TOML document. BurntSushi/toml v1.6.0 keeps key positions
// unexported (and keeps one position per key name, not per [[array]]
// entry), so this is a small structural scan of the source. It is run only
// on text the TOML parser has accepted; on anything else it still ends and
// never panics, but lines may be wrong.
func scanLines(src string) map[string]int {
	s := &lineScanner{src: src, line: 1, out: map[string]int{}, aot: map[string]int{}}
	s.document()
	return s.out
}

type lineScanner struct {
	src  string
	pos  int
	line int
	out  map[string]int
	aot  map[string]int // resolved path of an array of tables → entries so far
	ctx  path
}

func (s *lineScanner) eof() bool { return s.pos >= len(s.src) }

func (s *lineScanner) peek() byte {
	if s.eof() {
		return 0
	}
	return s.src[s.pos]
}

func (s *lineScanner) advance() {
	if s.eof() {
		return
	}
	if s.src[s.pos] == '\n' {
		s.line++
	}
	s.pos++
}

// record sets the line of p and of its prefixes that have none yet.
func (s *lineScanner) record(p path, line int) {
	for i := 1; i <= len(p); i++ {
		k := p[:i].key()
		if _, ok := s.out[k]; !ok {
			s.out[k] = line
		}
	}
}

func (s *lineScanner) skipSpace() {
	for c := s.peek(); c == ' ' || c == '\t' || c == '\r'; c = s.peek() {
		s.advance()
	}
}

// skipBlank skips spaces, newlines and comments.
func (s *lineScanner) skipBlank() {
	for !s.eof() {
		switch s.peek() {
		case ' ', '\t', '\r', '\n':
			s.advance()
		case '#':
			for !s.eof() && s.peek() != '\n' {
				s.advance()
			}
		default:
			return
		}
	}
}

func (s *lineScanner) document() {
	for {
		s.skipBlank()
		if s.eof() {
			return
		}
		start := s.pos
		line := s.line
		if s.peek() == '[' {
			s.advance()
			array := s.peek() == '['
			if array {
				s.advance()
			}
			keys := s.keyPath()
			s.skipSpace()
			for s.peek() == ']' {
				s.advance()
			}
			s.ctx = s.resolve(keys, array)
			s.record(s.ctx, line)
		} else {
			keys := s.keyPath()
			s.skipSpace()
			if len(keys) > 0 && s.peek() == '=' {
				s.advance()
				p := s.ctx.add(keys...)
				s.record(p, line)
				s.value(p)
			}
		}
		if s.pos == start {
			s.advance()
		}
	}
}

// resolve turns a table header's key into a path, inserting the current
// entry index after every array of tables it passes through.
func (s *lineScanner) resolve(keys []string, array bool) path {
	var p path
	for i, k := range keys {
		p = p.add(k)
		n, isArray := s.aot[p.key()]
		if i == len(keys)-1 && array {
			s.aot[p.key()] = n + 1
			p = p.add(idx(n))
		} else if isArray && n > 0 {
			p = p.add(idx(n - 1))
		}
	}
	return p
}

// keyPath reads a dotted key: bare, "basic" or 'literal' parts.
func (s *lineScanner) keyPath() []string {
	var keys []string
	for {
		s.skipSpace()
		switch c := s.peek(); {
		case c == '"':
			keys = append(keys, unescapeBasic(s.quoted('"')))
		case c == '\'':
			keys = append(keys, s.quoted('\''))
		default:
			start := s.pos
			for !s.eof() && !strings.ContainsRune(" \t\r\n.=[]#\"'{},", rune(s.peek())) {
				s.advance()
			}
			if s.pos == start {
				return keys
			}
			keys = append(keys, s.src[start:s.pos])
		}
		s.skipSpace()
		if s.peek() != '.' {
			return keys
		}
		s.advance()
	}
}

// quoted reads a one-line string starting at the quote q and returns its raw
// contents.
func (s *lineScanner) quoted(q byte) string {
	s.advance()
	start := s.pos
	for !s.eof() && s.peek() != q && s.peek() != '\n' {
		if q == '"' && s.peek() == '\\' {
			s.advance()
		}
		s.advance()
	}
	end := min(s.pos, len(s.src))
	s.advance()
	return s.src[start:end]
}

// value skips one value, recording the keys of inline tables and the
// entries of arrays under p.
func (s *lineScanner) value(p path) {
	s.skipSpace()
	switch {
	case strings.HasPrefix(s.src[s.pos:], `"""`), strings.HasPrefix(s.src[s.pos:], `'''`):
		q := s.src[s.pos : s.pos+3]
		s.pos += 3
		for !s.eof() && !strings.HasPrefix(s.src[s.pos:], q) {
			if q == `"""` && s.peek() == '\\' {
				s.advance()
			}
			s.advance()
		}
		s.pos = min(s.pos+3, len(s.src))
		for n := 0; n < 2 && s.peek() == q[0]; n++ { // up to two quotes may close the content
			s.advance()
		}
	case s.peek() == '"' || s.peek() == '\'':
		s.quoted(s.peek())
	case s.peek() == '[':
		s.advance()
		for i := 0; ; {
			s.skipBlank()
			if s.eof() {
				return
			}
			switch s.peek() {
			case ']':
				s.advance()
				return
			case ',':
				s.advance()
				i++
				continue
			}
			start := s.pos
			e := p.add(idx(i))
			s.record(e, s.line)
			s.value(e)
			if s.pos == start {
				s.advance()
			}
		}
	case s.peek() == '{':
		s.advance()
		for {
			s.skipBlank()
			if s.eof() {
				return
			}
			switch s.peek() {
			case '}':
				s.advance()
				return
			case ',':
				s.advance()
				continue
			}
			start, line := s.pos, s.line
			keys := s.keyPath()
			s.skipSpace()
			if len(keys) > 0 && s.peek() == '=' {
				s.advance()
				k := p.add(keys...)
				s.record(k, line)
				s.value(k)
			}
			if s.pos == start {
				s.advance()
			}
		}
	default:
		for !s.eof() && !strings.ContainsRune(",]}#\n", rune(s.peek())) {
			s.advance()
		}
	}
}

// unescapeBasic decodes the escapes of a TOML basic string. Unknown escapes
// are kept as written (the TOML parser has already rejected them).
func unescapeBasic(raw string) string {
	if !strings.Contains(raw, `\`) {
		return raw
	}
	var b strings.Builder
	for i := 0; i < len(raw); i++ {
		c := raw[i]
		if c != '\\' || i+1 >= len(raw) {
			b.WriteByte(c)
			continue
		}
		i++
		switch raw[i] {
		case 'b':
			b.WriteByte('\b')
		case 't':
			b.WriteByte('\t')
		case 'n':
			b.WriteByte('\n')
		case 'f':
			b.WriteByte('\f')
		case 'r':
			b.WriteByte('\r')
		case 'e':
			b.WriteByte(0x1b)
		case '"', '\\':
			b.WriteByte(raw[i])
		case 'x', 'u', 'U':
			n := map[byte]int{'x': 2, 'u': 4, 'U': 8}[raw[i]]
			if i+n <= len(raw)-1 {
				if v, err := strconv.ParseUint(raw[i+1:i+1+n], 16, 32); err == nil && utf8.ValidRune(rune(v)) {
					b.WriteRune(rune(v))
					i += n
					continue
				}
			}
			b.WriteByte('\\')
			b.WriteByte(raw[i])
		default:
			b.WriteByte('\\')
			b.WriteByte(raw[i])
		}
	}
	return b.String()
}
