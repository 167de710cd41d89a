package pitpage

import (
	"bufio"
	"bytes"
	"crypto/hmac"
	"crypto/rand"
	"crypto/sha256"
	"crypto/subtle"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"pitcard/event"
	"pitcard/internal/safefile"
)

// Tokens are the pit page's access: the crew token reads and writes, the
// view token only reads; Secret keys the forms' CSRF tokens. Each is 128
// random bits, hex.
type Tokens struct {
	Crew, View, Secret string
}

// Role is what a request may do.
type Role int

const (
	Nobody Role = iota // no token, or a wrong one
	Viewer             // reads the card, the passes and the weather
	Crew               // reads, and writes readings, slips, the checklist and the other lane's dial
)

// String is the role's name.
func (r Role) String() string {
	switch r {
	case Crew:
		return "crew"
	case Viewer:
		return "view"
	}
	return "nobody"
}

// NewTokens makes a fresh set from the system's random source.
func NewTokens() (Tokens, error) {
	var t Tokens
	for _, dst := range []*string{&t.Crew, &t.View, &t.Secret} {
		b := make([]byte, 16)
		if _, err := rand.Read(b); err != nil {
			return t, fmt.Errorf("making the pit page's tokens: %w", err)
		}
		*dst = hex.EncodeToString(b)
	}
	return t, nil
}

// RoleOf is the role a token gives, compared in constant time.
func (t Tokens) RoleOf(token string) Role {
	switch {
	case token == "":
		return Nobody
	case subtle.ConstantTimeCompare([]byte(token), []byte(t.Crew)) == 1:
		return Crew
	case subtle.ConstantTimeCompare([]byte(token), []byte(t.View)) == 1:
		return Viewer
	}
	return Nobody
}

// CSRF is the form token for a holder of token: a keyed hash, so the server
// keeps no state and a page of another site cannot know it.
func (t Tokens) CSRF(token string) string {
	m := hmac.New(sha256.New, []byte(t.Secret))
	m.Write([]byte("csrf\x00" + token))
	return hex.EncodeToString(m.Sum(nil))[:32]
}

// CheckCSRF reports whether got is token's form token.
func (t Tokens) CheckCSRF(token, got string) bool {
	return got != "" && subtle.ConstantTimeCompare([]byte(got), []byte(t.CSRF(token))) == 1
}

const tokensHeader = `# pitcard serve: the pit page's access tokens for this event folder.
# Anyone holding the crew link can read and write the logbook; the view link
# only reads. Keep this file private: it is mode 0600 and left out of version
# control by the folder's .gitignore. 'pitcard serve --new-tokens' revokes both.
`

// LoadTokens reads the folder's tokens file, or makes one (mode 0600) when
// there is none or renew is set. made reports a new set (old links revoked).
func LoadTokens(dir string, renew bool) (t Tokens, made bool, err error) {
	path := filepath.Join(dir, event.TokensFile)
	if !renew {
		data, err := os.ReadFile(path)
		switch {
		case err == nil:
			t, err := parseTokens(data, path)
			if err != nil {
				return t, false, err
			}
			// A copy made by a sync tool or an archive may be readable by
			// others: tighten it.
			if st, err := os.Stat(path); err == nil && st.Mode().Perm()&0o077 != 0 {
				if err := os.Chmod(path, 0o600); err != nil {
					return t, false, fmt.Errorf("%s is readable by other users and could not be made private: %w", path, err)
				}
			}
			return t, false, nil
		case !errors.Is(err, fs.ErrNotExist):
			return t, false, err
		}
	}
	if t, err = NewTokens(); err != nil {
		return t, false, err
	}
	var b bytes.Buffer
	b.WriteString(tokensHeader)
	fmt.Fprintf(&b, "crew: %s\nview: %s\nsecret: %s\n", t.Crew, t.View, t.Secret)
	if err := safefile.WritePrivate(path, b.Bytes()); err != nil {
		return t, false, fmt.Errorf("writing %s: %w", path, err)
	}
	return t, true, nil
}

func parseTokens(data []byte, path string) (Tokens, error) {
	var t Tokens
	sc := bufio.NewScanner(bytes.NewReader(data))
	line := 0
	for sc.Scan() {
		line++
		s := strings.TrimSpace(sc.Text())
		if s == "" || strings.HasPrefix(s, "#") {
			continue
		}
		k, v, ok := strings.Cut(s, ":")
		v = strings.TrimSpace(v)
		var dst *string
		switch strings.TrimSpace(k) {
		case "crew":
			dst = &t.Crew
		case "view":
			dst = &t.View
		case "secret":
			dst = &t.Secret
		}
		if !ok || dst == nil || len(v) < 32 {
			return t, fmt.Errorf("%s line %d: not a token line (crew:, view: or secret: and 32 hex digits); delete the file or run 'pitcard serve --new-tokens'", path, line)
		}
		*dst = v
	}
	if t.Crew == "" || t.View == "" || t.Secret == "" || t.Crew == t.View {
		return t, fmt.Errorf("%s: needs crew, view and secret tokens, crew and view different; run 'pitcard serve --new-tokens'", path)
	}
	return t, nil
}
