package render

import (
	"bufio"
	"bytes"
	"crypto/ed25519"
	"errors"
	"fmt"
	"path"
	"sort"
	"strings"

	"github.com/hiddeco/sshsig"
	"golang.org/x/crypto/ssh"

	"gtpack.example/gtpack/ingest"
)

// The package files: SHA256SUMS lists every file of the package in the
// form `sha256sum -c` reads, and SHA256SUMS.sig is its SSH signature
// (ssh-keygen -Y sign, namespace SignatureNamespace).
const (
	SumsName           = "SHA256SUMS"
	SignatureName      = "SHA256SUMS.sig"
	SignatureNamespace = "gtpack"
)

// SumsFile is SHA256SUMS of the given files: a line "<sha256>  <path>"
// each (two spaces: text mode, as coreutils' sha256sum writes it), sorted
// by path. A path that sha256sum would have to escape (a backslash or a
// line break), an absolute path or one with "..", is refused: a site's
// paths never have them.
func SumsFile(files []ManifestEntry) ([]byte, error) {
	sorted := sortedEntries(files)
	var b bytes.Buffer
	for i, f := range sorted {
		if f.Path == "" || strings.ContainsAny(f.Path, "\\\n\r") || path.IsAbs(f.Path) || path.Clean(f.Path) != f.Path || strings.HasPrefix(f.Path, "../") {
			return nil, fmt.Errorf("render: %s: the path %q cannot be listed as it is", SumsName, f.Path)
		}
		if !isSHA256Hex(f.SHA256) {
			return nil, fmt.Errorf("render: %s: %s has no SHA-256", SumsName, f.Path)
		}
		if i > 0 && sorted[i-1].Path == f.Path {
			return nil, fmt.Errorf("render: %s: %s is listed twice", SumsName, f.Path)
		}
		b.WriteString(f.SHA256)
		b.WriteString("  ")
		b.WriteString(f.Path)
		b.WriteByte('\n')
	}
	return b.Bytes(), nil
}

// ParseSums reads a SHA256SUMS: one "<sha256> <mode><path>" line per
// file, mode ' ' (text) or '*' (binary), as sha256sum writes them. Sizes
// are -1 (the file does not give them). Problems name the line.
func ParseSums(data []byte) ([]ManifestEntry, error) {
	var out []ManifestEntry
	seen := map[string]int{}
	sc := bufio.NewScanner(bytes.NewReader(data))
	sc.Buffer(make([]byte, 0, 64<<10), 1<<20)
	for line := 1; sc.Scan(); line++ {
		t := sc.Text()
		if len(t) < 67 || !isSHA256Hex(t[:64]) || t[64] != ' ' || (t[65] != ' ' && t[65] != '*') {
			return nil, ingest.Problemf(SumsName, line, "%q is not a line of sha256sum; expected 64 lower-case hex digits, two spaces and a path", limitText(t, 80))
		}
		p := t[66:]
		if strings.HasPrefix(t, "\\") || path.IsAbs(p) || path.Clean(p) != p || p == ".." || strings.HasPrefix(p, "../") {
			return nil, ingest.Problemf(SumsName, line, "path %q; expected a clean path inside the package", limitText(p, 80))
		}
		if first, dup := seen[p]; dup {
			return nil, ingest.Problemf(SumsName, line, "%s is listed twice (first at line %d)", p, first)
		}
		seen[p] = line
		out = append(out, ManifestEntry{Path: p, Size: -1, SHA256: t[:64]})
	}
	if err := sc.Err(); err != nil {
		return nil, ingest.Problemf(SumsName, 0, "%v", err)
	}
	return out, nil
}

func limitText(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return s[:n] + "..."
}

// ErrEncryptedKey is returned by ParseSigningKey for a key file protected
// by a passphrase, when none was given.
var ErrEncryptedKey = errors.New("the key is protected by a passphrase")

// ParseSigningKey reads an OpenSSH private key file (the format
// ssh-keygen writes) holding an ed25519 key; passphrase is used when the
// key is encrypted (nil: none given). Other key types are refused: the
// contract names ed25519.
func ParseSigningKey(data, passphrase []byte) (ssh.Signer, error) {
	var key any
	var err error
	if passphrase == nil {
		key, err = ssh.ParseRawPrivateKey(data)
		var missing *ssh.PassphraseMissingError
		if errors.As(err, &missing) {
			return nil, ErrEncryptedKey
		}
	} else {
		key, err = ssh.ParseRawPrivateKeyWithPassphrase(data, passphrase)
	}
	if err != nil {
		return nil, fmt.Errorf("not an OpenSSH private key that can be read (%v)", err)
	}
	var signer ssh.Signer
	switch k := key.(type) {
	case *ed25519.PrivateKey:
		signer, err = ssh.NewSignerFromKey(*k)
	case ed25519.PrivateKey:
		signer, err = ssh.NewSignerFromKey(k)
	default:
		return nil, fmt.Errorf("a %T key; expected an ed25519 key (ssh-keygen -t ed25519)", key)
	}
	if err != nil {
		return nil, err
	}
	return signer, nil
}

// Fingerprint is the SHA-256 fingerprint of the signer's public key, as
// ssh-keygen -l prints it.
func Fingerprint(s ssh.Signer) string { return ssh.FingerprintSHA256(s.PublicKey()) }

// SignSums signs a SHA256SUMS with signer: an armored SSH signature
// (SHA-512, namespace gtpack), as `ssh-keygen -Y sign -n gtpack` writes
// it.
func SignSums(sums []byte, signer ssh.Signer) ([]byte, error) {
	sig, err := sshsig.Sign(bytes.NewReader(sums), signer, sshsig.HashSHA512, SignatureNamespace)
	if err != nil {
		return nil, err
	}
	return sshsig.Armor(sig), nil
}

// AllowedSigner is one line of an OpenSSH allowed signers file: the
// principals (patterns) a key may sign as, and the namespaces it may sign
// in (none: any).
type AllowedSigner struct {
	Line       int
	Principals []string
	Namespaces []string
	Key        ssh.PublicKey
}

// ParseAllowedSigners reads an allowed signers file (ssh-keygen(1),
// section ALLOWED SIGNERS): "principals [options] keytype base64-key
// [comment]" per line, '#' comments. Of the options, namespaces="..." is
// applied; a line with cert-authority, valid-after or valid-before is
// refused (gtpack checks plain keys, with no time window), so that no
// line is taken to allow more than it does. file names it in problems.
func ParseAllowedSigners(file string, data []byte) ([]AllowedSigner, error) {
	var out []AllowedSigner
	sc := bufio.NewScanner(bytes.NewReader(data))
	for line := 1; sc.Scan(); line++ {
		t := strings.TrimSpace(sc.Text())
		if t == "" || strings.HasPrefix(t, "#") {
			continue
		}
		principals, rest, _ := strings.Cut(t, " ")
		rest = strings.TrimSpace(rest)
		s := AllowedSigner{Line: line, Principals: strings.Split(principals, ",")}
		// Options come before the key type, comma-separated, with quoted
		// values; the key type starts with a letter and holds no '='.
		if !strings.HasPrefix(rest, "ssh-") && !strings.HasPrefix(rest, "ecdsa-") && !strings.HasPrefix(rest, "sk-") {
			opts, after, err := splitOptions(rest)
			if err != nil {
				return nil, ingest.Problemf(file, line, "%v", err)
			}
			for _, o := range opts {
				name, value, _ := strings.Cut(o, "=")
				switch strings.ToLower(name) {
				case "namespaces":
					s.Namespaces = strings.Split(strings.Trim(value, `"`), ",")
				default:
					return nil, ingest.Problemf(file, line, "option %q is not applied by gtpack verify; expected plain keys with at most namespaces=\"...\"", name)
				}
			}
			rest = after
		}
		key, _, _, _, err := ssh.ParseAuthorizedKey([]byte(rest))
		if err != nil {
			return nil, ingest.Problemf(file, line, "no public key that can be read (%v); expected \"principals [namespaces=\\\"gtpack\\\"] ssh-ed25519 AAAA...\"", err)
		}
		s.Key = key
		out = append(out, s)
	}
	if err := sc.Err(); err != nil {
		return nil, ingest.Problemf(file, 0, "%v", err)
	}
	return out, nil
}

// splitOptions splits the comma-separated options at the start of s (up
// to the first space outside quotes) from the rest.
func splitOptions(s string) ([]string, string, error) {
	var opts []string
	quoted := false
	start := 0
	for i := 0; i < len(s); i++ {
		switch c := s[i]; {
		case c == '"':
			quoted = !quoted
		case c == ',' && !quoted:
			opts = append(opts, s[start:i])
			start = i + 1
		case c == ' ' && !quoted:
			opts = append(opts, s[start:i])
			return opts, strings.TrimSpace(s[i+1:]), nil
		}
	}
	return nil, "", fmt.Errorf("options %q and no key after them", limitText(s, 60))
}

// SignatureCheck is what checking SHA256SUMS.sig found.
type SignatureCheck struct {
	// Fingerprint is the SHA-256 fingerprint of the key that made the
	// signature (as ssh-keygen -l prints it).
	Fingerprint string
	// Principals are the principals of the allowed signers that list the
	// key for the namespace gtpack; empty when none does.
	Principals []string
}

// CheckSignature checks an armored SSH signature of sums: that it is one
// (namespace gtpack) and that it is good for the key it names, and, when
// allowed is not nil, which allowed signers list that key. An error says
// why the signature is not a good one; a good signature by a key no
// allowed signer lists has no Principals.
func CheckSignature(sums, armored []byte, allowed []AllowedSigner) (*SignatureCheck, error) {
	sig, err := sshsig.Unarmor(armored)
	if err != nil {
		return nil, fmt.Errorf("not an SSH signature (%v)", err)
	}
	if sig.Namespace != SignatureNamespace {
		return nil, fmt.Errorf("signed in namespace %q; expected %q", sig.Namespace, SignatureNamespace)
	}
	if err := sshsig.Verify(bytes.NewReader(sums), sig, sig.PublicKey, sig.HashAlgorithm, SignatureNamespace); err != nil {
		return nil, fmt.Errorf("the signature does not match %s (%v): the file was changed after it was signed", SumsName, err)
	}
	c := &SignatureCheck{Fingerprint: ssh.FingerprintSHA256(sig.PublicKey)}
	want := sig.PublicKey.Marshal()
	for _, a := range allowed {
		if !bytes.Equal(a.Key.Marshal(), want) {
			continue
		}
		if len(a.Namespaces) > 0 && !matchAny(a.Namespaces, SignatureNamespace) {
			continue
		}
		c.Principals = append(c.Principals, a.Principals...)
	}
	sort.Strings(c.Principals)
	return c, nil
}

func matchAny(patterns []string, s string) bool {
	for _, p := range patterns {
		if ok, _ := path.Match(p, s); ok {
			return true
		}
	}
	return false
}
