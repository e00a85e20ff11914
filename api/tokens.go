package api

import (
	"bytes"
	"crypto/sha256"
	"crypto/subtle"
	"encoding/base64"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"regexp"
	"strings"
	"sync"

	"sigs.k8s.io/yaml"
)

// Role is what a bearer token may do. Roles are ordered: each may do
// everything the one before it may.
//
//	reader     GetJob, ListJobs, WatchJob, GetFront
//	submitter  the reader's calls, SubmitJob, EvaluateSetups, CompareSetup,
//	           GetDamperCurves, and CancelJob of the jobs it submitted
//	admin      every call, CancelJob of any job included
type Role int8

// The roles, in order.
const (
	RoleReader Role = iota + 1
	RoleSubmitter
	RoleAdmin
)

var roleNames = map[Role]string{RoleReader: "reader", RoleSubmitter: "submitter", RoleAdmin: "admin"}

// String is the role's name as a tokens file spells it.
func (r Role) String() string {
	if n, ok := roleNames[r]; ok {
		return n
	}
	return fmt.Sprintf("Role(%d)", int8(r))
}

// ParseRole returns the role named s: reader, submitter or admin.
func ParseRole(s string) (Role, error) {
	for r, n := range roleNames {
		if n == s {
			return r, nil
		}
	}
	return 0, fmt.Errorf("role %q is not reader, submitter or admin", s)
}

// tokenName is the syntax of a token's name. The name becomes the value
// of a job's OwnerLabel and appears in logs, so it is kept to characters
// that need no quoting in either.
var tokenName = regexp.MustCompile(`^[a-z0-9][a-z0-9._-]{0,62}$`)

// CheckTokenName reports whether name may name a token: 1 to 63 of a-z,
// 0-9, '.', '_', '-', starting with a letter or a digit.
func CheckTokenName(name string) error {
	if !tokenName.MatchString(name) {
		return fmt.Errorf("token name %q must be 1 to 63 of a-z, 0-9, '.', '_', '-', starting with a letter or digit", name)
	}
	return nil
}

// TokenPrefix starts every token NewToken makes, so that a leaked one is
// recognisable (by secret scanners, in logs) for what it is.
const TokenPrefix = "dft_"

// TokenBytes is the number of random bytes in a token NewToken makes:
// 256 bits.
const TokenBytes = 32

// NewToken returns a new bearer token: TokenPrefix and TokenBytes read
// from random, base64url-encoded without padding (43 characters). random
// must be a cryptographic source, crypto/rand.Reader outside tests.
func NewToken(random io.Reader) (string, error) {
	b := make([]byte, TokenBytes)
	if _, err := io.ReadFull(random, b); err != nil {
		return "", fmt.Errorf("api: read %d random bytes for a token: %w", TokenBytes, err)
	}
	return TokenPrefix + base64.RawURLEncoding.EncodeToString(b), nil
}

// HashToken is the hash a tokens file stores of a token: SHA-256 (FIPS
// 180-4) of the token's bytes, as 64 lower-case hex digits.
//
// A fast hash is enough here, where passwords need a slow one (bcrypt,
// scrypt, Argon2): a slow hash multiplies the work of trying a dictionary
// of likely human choices against a stolen hash, but a token has no
// likely values. Against the hash of a random 128-bit token, a guesser
// computing 2⁴⁰ SHA-256 a second needs 2¹²⁷ guesses, about 2⁸⁷ s or
// 5×10¹⁸ years, on average; NewToken's 256 bits are further beyond reach.
// A slow hash would instead cost the server CPU on every call, refused
// ones included. Tokens must therefore be random, 128 bits or more, made
// by NewToken ("dampfront token new"), never chosen by a person.
func HashToken(token string) string {
	h := sha256.Sum256([]byte(token))
	return hex.EncodeToString(h[:])
}

// tokenEntry is one accepted token.
type tokenEntry struct {
	name string
	role Role
	hash [sha256.Size]byte
}

// Tokens is the set of bearer tokens a Server accepts, each with a name
// and a Role. Only the tokens' SHA-256 hashes are held. Replace swaps in
// a new set while the server runs; calls in flight finish with the set
// they were checked against.
type Tokens struct {
	mu      sync.RWMutex
	entries []tokenEntry
}

// Replace makes t accept exactly the tokens of from (as read by
// ParseTokens), from the next call on.
func (t *Tokens) Replace(from *Tokens) {
	from.mu.RLock()
	entries := from.entries
	from.mu.RUnlock()
	t.mu.Lock()
	t.entries = entries
	t.mu.Unlock()
}

// tokenFileEntry is one element of a tokens file.
type tokenFileEntry struct {
	Name   string `json:"name"`
	Role   string `json:"role"`
	SHA256 string `json:"sha256"`
}

// ParseTokens reads a tokens file: a YAML or JSON list of entries with a
// name (see CheckTokenName), a role (reader, submitter or admin) and the
// token's sha256 (HashToken), in YAML's flow or block style:
//
//	# tokens.yaml: hashes only, the tokens themselves are the clients'
//	- {name: "ci", role: "submitter", sha256: "9f2c…"}
//	- name: "alice"
//	  role: "admin"
//	  sha256: "41d0…"
//
// Names and hashes are unique; an empty list is an error, since it would
// let no one in. Errors name the entry and field, as "[2].role".
func ParseTokens(data []byte) (*Tokens, error) {
	j, err := yaml.YAMLToJSON(data)
	if err != nil {
		return nil, fmt.Errorf("tokens file is not YAML or JSON: %w", err)
	}
	var list []tokenFileEntry
	dec := json.NewDecoder(bytes.NewReader(j))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&list); err != nil {
		return nil, fmt.Errorf("tokens file must be a list of {name, role, sha256} (quote names and hashes YAML would read as numbers): %w", err)
	}
	if len(list) == 0 {
		return nil, errors.New("tokens file lists no tokens; make one with: dampfront token new --name NAME --role ROLE")
	}
	var problems []string
	bad := func(i int, field, format string, args ...any) {
		problems = append(problems, fmt.Sprintf("[%d].%s: %s", i, field, fmt.Sprintf(format, args...)))
	}
	t := &Tokens{entries: make([]tokenEntry, 0, len(list))}
	names := map[string]int{}
	hashes := map[[sha256.Size]byte]int{}
	for i, f := range list {
		e := tokenEntry{name: f.Name}
		if err := CheckTokenName(f.Name); err != nil {
			bad(i, "name", "%v", err)
		} else if k, dup := names[f.Name]; dup {
			bad(i, "name", "%q is also the name of entry %d", f.Name, k)
		}
		names[f.Name] = i
		if e.role, err = ParseRole(f.Role); err != nil {
			bad(i, "role", "%v", err)
		}
		h, err := hex.DecodeString(strings.ToLower(f.SHA256))
		switch {
		case err != nil || len(h) != sha256.Size:
			bad(i, "sha256", "must be the 64 hex digits of the token's SHA-256, as dampfront token new prints it")
		default:
			copy(e.hash[:], h)
			if k, dup := hashes[e.hash]; dup {
				bad(i, "sha256", "is also the hash of entry %d: two names for one token", k)
			}
			hashes[e.hash] = i
		}
		t.entries = append(t.entries, e)
	}
	if len(problems) > 0 {
		return nil, fmt.Errorf("tokens file: %s", strings.Join(problems, "; "))
	}
	return t, nil
}

// Len is the number of tokens.
func (t *Tokens) Len() int {
	t.mu.RLock()
	defer t.mu.RUnlock()
	return len(t.entries)
}

// lookup returns the entry of token, or false. It hashes token and
// compares the hash with every entry's in constant time
// (crypto/subtle), without stopping at a match, so that the time taken
// tells nothing of how many leading bytes matched nor which entry did.
func (t *Tokens) lookup(token string) (tokenEntry, bool) {
	h := sha256.Sum256([]byte(token))
	t.mu.RLock()
	entries := t.entries
	t.mu.RUnlock()
	found := -1
	for i := range entries {
		if subtle.ConstantTimeCompare(h[:], entries[i].hash[:]) == 1 {
			found = i
		}
	}
	if found < 0 {
		return tokenEntry{}, false
	}
	return entries[found], true
}
