package peaks

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"os"
	"unicode/utf8"
)

// ReadFile reads the scan at path, choosing the reader from the content:
// pdCIF when the file has a data_ block with powder items, plain text
// otherwise. The file is only read, never written.
func ReadFile(path string) (*Scan, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("reading scan: %w", err)
	}
	return Parse(path, data)
}

// Parse reads a scan from the bytes of a file; name labels errors and becomes
// the scan's Path.
func Parse(name string, data []byte) (*Scan, error) {
	sum := sha256.Sum256(data)
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, &ParseError{File: name, Err: ErrEmpty}
	}
	if isBinary(data) {
		return nil, &ParseError{File: name, Err: ErrBinary}
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	var s *Scan
	var err error
	if looksLikeCIF(data) {
		s, err = parseCIF(name, data)
	} else {
		s, err = parseText(name, data)
	}
	if err != nil {
		return nil, err
	}
	s.Path = name
	s.SHA256 = hex.EncodeToString(sum[:])
	return s, nil
}

// isBinary reports whether data holds NUL bytes or is mostly not UTF-8 text.
func isBinary(data []byte) bool {
	head := data
	if len(head) > 8192 {
		head = head[:8192]
	}
	if bytes.IndexByte(head, 0) >= 0 {
		return true
	}
	bad := 0
	for len(head) > 0 {
		r, n := utf8.DecodeRune(head)
		if r == utf8.RuneError && n == 1 {
			bad++
		} else if r < 0x20 && r != '\n' && r != '\r' && r != '\t' && r != '\f' {
			bad++
		}
		head = head[n:]
	}
	// Allow a few Latin-1 characters (a degree sign, a name) in headers.
	return bad > 16 && bad*20 > len(data[:min(len(data), 8192)])
}

// looksLikeCIF reports whether a line begins with data_ and a powder item
// appears somewhere.
func looksLikeCIF(data []byte) bool {
	for _, line := range bytes.Split(data, []byte("\n")) {
		l := bytes.TrimSpace(line)
		if len(l) >= 5 && bytes.EqualFold(l[:5], []byte("data_")) {
			return bytes.Contains(data, []byte("_pd_"))
		}
	}
	return false
}
