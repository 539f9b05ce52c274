package scanfile

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
	return ReadFileWith(path, ReadOptions{})
}

// ReadFileWith is ReadFile with options (the CIF block to read).
func ReadFileWith(path string, opt ReadOptions) (*Scan, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("reading scan: %w", err)
	}
	return ParseWith(path, data, opt)
}

// Parse reads a scan from the bytes of a file; name labels errors and becomes
// the scan's Path.
func Parse(name string, data []byte) (*Scan, error) {
	return ParseWith(name, data, ReadOptions{})
}

// ParseWith is Parse with options.
func ParseWith(name string, data []byte, opt ReadOptions) (*Scan, error) {
	digest := Digest(data)
	if len(bytes.TrimSpace(data)) == 0 {
		return nil, &ParseError{File: name, Err: ErrEmpty}
	}
	if isBinary(data) {
		return nil, &ParseError{File: name, Err: ErrBinary}
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	if err := vendorMarkup(name, data); err != nil {
		return nil, err
	}
	var s *Scan
	var err error
	if looksLikeCIF(data) {
		s, err = parseCIF(name, data, opt)
	} else {
		if opt.Block != "" {
			return nil, &ParseError{File: name, Err: fmt.Errorf("%w: a data block (%q) was asked for, but the file is not a CIF", ErrCIFMissing, opt.Block)}
		}
		s, err = parseText(name, data)
		if err == nil && s.ESD != nil {
			s.checkNoise(false)
		}
	}
	if err != nil {
		return nil, err
	}
	s.Path = name
	s.SHA256 = digest
	return s, nil
}

// Digest returns the hex SHA-256 of a file's bytes, as Scan.SHA256 holds it.
func Digest(data []byte) string {
	sum := sha256.Sum256(data)
	return hex.EncodeToString(sum[:])
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

// vendorMarkup refuses files in markup (XML, HTML, JSON): an instrument
// maker's own export, which Reticle does not read. The error names the
// file, what it looks like and the exports Reticle does read.
func vendorMarkup(name string, data []byte) error {
	head := bytes.TrimSpace(data[:min(len(data), 4096)])
	var what string
	switch {
	case bytes.HasPrefix(head, []byte("<?xml")) || bytes.HasPrefix(head, []byte("<")) && bytes.Contains(head, []byte(">")):
		what = "an XML document"
		if root := xmlRoot(head); root != "" {
			what += " (root element <" + root + ">)"
		}
	case bytes.HasPrefix(head, []byte("{")) || bytes.HasPrefix(head, []byte("[{")):
		what = "a JSON document"
	default:
		return nil
	}
	return &ParseError{File: name, Err: fmt.Errorf("%w: the file is %s, an instrument's own format; Reticle reads plain-text columns (2θ in degrees, intensity, optional esd) and the IUCr's pdCIF: export the scan as one of those", ErrVendor, what)}
}

// xmlRoot returns the name of the first element that is not a declaration,
// comment or processing instruction.
func xmlRoot(b []byte) string {
	for {
		i := bytes.IndexByte(b, '<')
		if i < 0 || i+1 >= len(b) {
			return ""
		}
		b = b[i+1:]
		if b[0] == '?' || b[0] == '!' {
			continue
		}
		j := bytes.IndexAny(b, " \t\r\n/>")
		if j <= 0 {
			return ""
		}
		return string(b[:j])
	}
}
