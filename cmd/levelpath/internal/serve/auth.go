package serve

import (
	"bufio"
	"crypto/sha256"
	"crypto/subtle"
	"encoding/hex"
	"fmt"
	"io"
	"strings"
)

// token is one accepted bearer token: a name and the SHA-256 of the
// secret.
type token struct {
	name   string
	digest [sha256.Size]byte
}

// parseTokens reads "name:sha256-hex" lines; blank lines and lines
// starting with '#' are skipped. Errors name the line.
func parseTokens(r io.Reader, source string) ([]token, error) {
	var out []token
	sc := bufio.NewScanner(r)
	seen := map[string]bool{}
	for line := 1; sc.Scan(); line++ {
		s := strings.TrimSpace(sc.Text())
		if s == "" || strings.HasPrefix(s, "#") {
			continue
		}
		name, hexd, ok := strings.Cut(s, ":")
		if !ok || name == "" || strings.ContainsAny(name, " \t") {
			return nil, fmt.Errorf("%s:%d: want name:sha256-hex", source, line)
		}
		b, err := hex.DecodeString(strings.ToLower(hexd))
		if err != nil || len(b) != sha256.Size {
			return nil, fmt.Errorf("%s:%d: token %q: the digest must be 64 hex digits (SHA-256 of the secret)", source, line, name)
		}
		if seen[name] {
			return nil, fmt.Errorf("%s:%d: token name %q given twice", source, line, name)
		}
		seen[name] = true
		t := token{name: name}
		copy(t.digest[:], b)
		out = append(out, t)
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("%s: %w", source, err)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%s: no tokens", source)
	}
	return out, nil
}

// authenticate returns the name of the token whose digest matches the
// SHA-256 of secret. Every token is compared, each in constant time
// (crypto/subtle), so the time taken does not tell which matched.
func authenticate(tokens []token, secret string) (string, bool) {
	d := sha256.Sum256([]byte(secret))
	name, found := "", 0
	for _, t := range tokens {
		if subtle.ConstantTimeCompare(d[:], t.digest[:]) == 1 {
			name, found = t.name, 1
		}
	}
	return name, found == 1
}
