package main

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"flag"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"slices"
	"sort"
	"strings"

	"golang.org/x/term"

	"gtpack.example/gtpack/render"
)

// cmdVerify checks a package as its receiver would: every file against
// SHA256SUMS, every file of the folder in it, the manifests against both,
// the signature, and with --archive the inputs against the archive. It
// only reads: a package on read-only media, or without its .gtpack cache,
// is checked as well.
func cmdVerify(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("verify", flag.ContinueOnError)
	archive := fs.String("archive", "", "check every input the manifests list against this archive")
	signers := fs.String("allowed-signers", "", "an OpenSSH allowed signers file: SHA256SUMS.sig must be a good signature by a key it lists for namespace gtpack")
	pos, err := parseArgs(fs, args, "SITE")
	if err != nil {
		return exitUsage, err
	}
	dir := pos[0]
	if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
		return exitUsage, usageError("%s is not a folder; expected a package that gtpack build wrote", dir)
	}
	var allowed []render.AllowedSigner
	if *signers != "" {
		data, err := os.ReadFile(*signers)
		if err != nil {
			return exitUsage, usageError("--allowed-signers: %v", err)
		}
		if allowed, err = render.ParseAllowedSigners(*signers, data); err != nil {
			return exitUsage, usageError("--allowed-signers: %v", err)
		}
	}
	v := &verifier{dir: dir, stderr: stderr}
	v.run(*archive, *signers != "", allowed)
	if len(v.problems) > 0 {
		fmt.Fprintf(stdout, "gtpack verify: %s does NOT hold: %d problem(s) (listed above); %d file(s) checked\n", dir, len(v.problems), v.checked)
		return exitRefused, nil
	}
	fmt.Fprintf(stdout, "gtpack verify: %s holds: %d file(s) match SHA256SUMS and the manifests%s%s\n", dir, v.checked, v.signed, v.inputs)
	return exitOK, nil
}

type verifier struct {
	dir      string
	stderr   io.Writer
	problems []string
	checked  int
	signed   string // what the signature check found, for the last line
	inputs   string // what the archive check found
}

func (v *verifier) fail(p, format string, a ...any) {
	msg := fmt.Sprintf(format, a...)
	if p != "" {
		msg = filepath.Join(v.dir, filepath.FromSlash(p)) + ": " + msg
	}
	v.problems = append(v.problems, msg)
	fmt.Fprintln(v.stderr, msg)
}

// read reads a package file, refusing links (a package holds files only).
func (v *verifier) read(rel string) ([]byte, error) {
	full := filepath.Join(v.dir, filepath.FromSlash(rel))
	fi, err := os.Lstat(full)
	if err != nil {
		return nil, err
	}
	if !fi.Mode().IsRegular() {
		return nil, fmt.Errorf("is not a regular file (a link or a folder)")
	}
	return os.ReadFile(full)
}

func (v *verifier) run(archive string, needSignature bool, allowed []render.AllowedSigner) {
	sumsData, err := v.read(render.SumsName)
	if err != nil {
		v.fail(render.SumsName, "%v; expected the list of the package's files that gtpack build writes", err)
		return
	}
	sums, err := render.ParseSums(sumsData)
	if err != nil {
		v.fail("", "%s: %v", v.dir, err)
		return
	}

	// Every file listed, as listed.
	listed := map[string]string{}
	for _, e := range sums {
		listed[e.Path] = e.SHA256
		data, err := v.read(e.Path)
		switch {
		case errors.Is(err, fs.ErrNotExist):
			v.fail(e.Path, "missing (listed in %s)", render.SumsName)
		case err != nil:
			v.fail(e.Path, "%v", err)
		default:
			v.checked++
			if sha(data) != e.SHA256 {
				v.fail(e.Path, "changed: its SHA-256 is %s, %s lists %s", sha(data), render.SumsName, e.SHA256)
			}
		}
	}

	// Every file of the folder is listed.
	filepath.WalkDir(v.dir, func(p string, d fs.DirEntry, err error) error {
		rel, rerr := filepath.Rel(v.dir, p)
		if rerr != nil || rel == "." {
			return nil
		}
		rel = filepath.ToSlash(rel)
		if err != nil {
			v.fail(rel, "cannot be read (%v)", err)
			return nil
		}
		if d.IsDir() {
			if rel == stateDir {
				return fs.SkipDir // the build's cache, not part of the package
			}
			return nil
		}
		if rel == render.SumsName || rel == render.SignatureName {
			return nil
		}
		if _, ok := listed[rel]; !ok {
			v.fail(rel, "not in the package: %s does not list it", render.SumsName)
		}
		return nil
	})

	// The manifests agree with SHA256SUMS, and list every file in it.
	inManifest := map[string]bool{"manifest.json": true}
	agree := func(where string, e render.ManifestEntry) {
		inManifest[e.Path] = true
		if h, ok := listed[e.Path]; !ok {
			v.fail(where, "lists %s, which %s does not", e.Path, render.SumsName)
		} else if h != e.SHA256 {
			v.fail(where, "lists %s with SHA-256 %s, %s with %s", e.Path, e.SHA256, render.SumsName, h)
		}
	}
	var units []*render.UnitManifest
	if data, err := v.read("manifest.json"); err != nil {
		v.fail("manifest.json", "%v", err)
	} else if m, err := render.ParseManifest(data); err != nil {
		v.fail("", "%s: %v", v.dir, err)
	} else {
		agree("manifest.json", render.ManifestEntry{Path: "manifest.json", SHA256: sha(data)})
		for _, e := range m.Outputs {
			agree("manifest.json", e)
		}
		for _, u := range m.Units {
			agree("manifest.json", u.Manifest)
			data, err := v.read(u.Manifest.Path)
			if err != nil {
				continue // named above
			}
			um, err := render.ParseUnitManifest(u.Manifest.Path, data)
			if err != nil {
				v.fail("", "%s: %v", v.dir, err)
				continue
			}
			if um.Serial != u.Serial || um.InputsSHA256 != u.InputsSHA256 {
				v.fail(u.Manifest.Path, "is of unit %s with inputs %s; manifest.json lists unit %s with inputs %s", um.Serial, um.InputsSHA256, u.Serial, u.InputsSHA256)
			}
			for _, e := range um.Outputs {
				if !strings.HasPrefix(e.Path, unitDir(u.Serial)+"/") {
					v.fail(u.Manifest.Path, "lists %s, outside the unit's folder", e.Path)
				}
				agree(u.Manifest.Path, e)
			}
			units = append(units, um)
		}
	}
	var orphans []string
	for p := range listed {
		if !inManifest[p] {
			orphans = append(orphans, p)
		}
	}
	sort.Strings(orphans)
	for _, p := range orphans {
		v.fail(p, "listed in %s but in no manifest", render.SumsName)
	}

	v.checkSignature(sumsData, needSignature, allowed)
	if archive != "" {
		v.checkInputs(archive, units)
	}
}

func (v *verifier) checkSignature(sums []byte, need bool, allowed []render.AllowedSigner) {
	sig, err := v.read(render.SignatureName)
	if errors.Is(err, fs.ErrNotExist) {
		if need {
			v.fail(render.SignatureName, "missing: the package is not signed (gtpack sign SITE --key FILE signs it)")
		} else {
			v.signed = "; not signed"
		}
		return
	}
	if err != nil {
		v.fail(render.SignatureName, "%v", err)
		return
	}
	c, err := render.CheckSignature(sums, sig, allowed)
	if err != nil {
		v.fail(render.SignatureName, "%v", err)
		return
	}
	switch {
	case !need:
		v.signed = fmt.Sprintf("; signed by key %s (not checked against a list of allowed signers: give --allowed-signers)", c.Fingerprint)
	case len(c.Principals) == 0:
		v.fail(render.SignatureName, "a good signature, but by key %s, which the allowed signers file does not list for namespace %s", c.Fingerprint, render.SignatureNamespace)
	default:
		v.signed = fmt.Sprintf("; signed by %s (key %s)", strings.Join(c.Principals, ", "), c.Fingerprint)
	}
}

// checkInputs compares every input the unit manifests list with the
// archive's file, each file once.
func (v *verifier) checkInputs(archive string, units []*render.UnitManifest) {
	seen := map[string]string{} // path: its SHA-256 in the archive, or "" when unreadable
	n := 0
	for _, u := range units {
		for _, in := range append(slices.Clone(u.Inputs), u.Approvals...) {
			h, done := seen[in.Path]
			if !done {
				h = ""
				if path.IsAbs(in.Path) || strings.HasPrefix(path.Clean(in.Path), "../") {
					v.fail("", "%s: input %s of unit %s lies outside the archive", filepath.Join(v.dir, unitDir(u.Serial), render.UnitManifestName), in.Path, u.Serial)
				} else if data, err := os.ReadFile(filepath.Join(archive, filepath.FromSlash(in.Path))); err != nil {
					v.fail("", "%s: input of unit %s: %v", filepath.Join(archive, filepath.FromSlash(in.Path)), u.Serial, err)
				} else {
					h = sha(data)
					n++
				}
				seen[in.Path] = h
			}
			if h != "" && h != in.SHA256 {
				v.fail("", "%s: input of unit %s changed since the build: its SHA-256 is %s, the unit's manifest lists %s", filepath.Join(archive, filepath.FromSlash(in.Path)), u.Serial, h, in.SHA256)
			}
		}
	}
	v.inputs = fmt.Sprintf("; %d input(s) match %s", n, archive)
}

func sha(data []byte) string {
	s := sha256.Sum256(data)
	return hex.EncodeToString(s[:])
}

// cmdSign signs the site's SHA256SUMS with an OpenSSH ed25519 key, after
// checking that the package holds (a signature says the files are these).
func cmdSign(args []string, stdout, stderr io.Writer) (int, error) {
	fs := flag.NewFlagSet("sign", flag.ContinueOnError)
	keyFile := fs.String("key", "", "an OpenSSH ed25519 private key file (ssh-keygen -t ed25519)")
	pos, err := parseArgs(fs, args, "SITE")
	if err != nil {
		return exitUsage, err
	}
	if *keyFile == "" {
		return exitUsage, usageError("--key FILE is required")
	}
	keyData, err := os.ReadFile(*keyFile)
	if err != nil {
		return exitUsage, usageError("--key: %v", err)
	}
	signer, err := render.ParseSigningKey(keyData, nil)
	if errors.Is(err, render.ErrEncryptedKey) {
		pass, perr := askPassphrase(*keyFile, stderr)
		if perr != nil {
			return exitUsage, usageError("--key %s: %v", *keyFile, perr)
		}
		signer, err = render.ParseSigningKey(keyData, pass)
	}
	if err != nil {
		return exitUsage, usageError("--key %s: %v", *keyFile, err)
	}
	site, err := openSite(pos[0], false, "sign", lockScope{})
	if err != nil {
		return openSiteCode(err), err
	}
	defer site.close()
	stamp, ok := site.readFleetStamp()
	if !ok {
		return exitRefused, fmt.Errorf("%s has no fleet pages of a finished build; build it first", site.dir)
	}
	var sumsEntry render.ManifestEntry
	for _, o := range stamp.Outputs {
		if o.Path == render.SumsName {
			sumsEntry = o
		}
	}
	if sumsEntry.Path == "" {
		return exitRefused, fmt.Errorf("%s was built by an older gtpack and has no %s; build it again first", site.dir, render.SumsName)
	}
	// The package must hold before it is signed.
	v := &verifier{dir: site.dir, stderr: stderr}
	v.run("", false, nil)
	var bad []string
	for _, p := range v.problems {
		if !strings.Contains(p, render.SignatureName) {
			bad = append(bad, p)
		}
	}
	if len(bad) > 0 {
		return exitRefused, fmt.Errorf("not signed: the package does not hold (%d problem(s) above); build it again, or move away the files that are not in it", len(bad))
	}
	sums, err := site.root.ReadFile(render.SumsName)
	if err != nil {
		return exitSite, err
	}
	if sha(sums) != sumsEntry.SHA256 {
		return exitRefused, fmt.Errorf("%s is not the one gtpack build wrote; build again before signing", filepath.Join(site.dir, render.SumsName))
	}
	sig, err := render.SignSums(sums, signer)
	if err != nil {
		return exitRefused, err
	}
	owned := map[string]bool{}
	var outputs []render.ManifestEntry
	for _, o := range stamp.Outputs {
		owned[o.Path] = true
		if o.Path != render.SignatureName {
			outputs = append(outputs, o)
		}
	}
	if err := site.notAPersonsFile(render.SignatureName, owned); err != nil {
		return exitSite, err
	}
	t := site.begin("fleet")
	e, err := t.put(render.SignatureName, sig)
	if err != nil {
		t.abort()
		return exitSite, err
	}
	stamp.Outputs = append(outputs, e)
	if err := t.putFleetStamp(stamp); err != nil {
		t.abort()
		return exitSite, err
	}
	if err := t.commit(); err != nil {
		return exitSite, err
	}
	fmt.Fprintf(stdout, "gtpack sign: signed %s with key %s -> %s\n", filepath.Join(site.dir, render.SumsName),
		render.Fingerprint(signer), filepath.Join(site.dir, render.SignatureName))
	return exitOK, nil
}

// askPassphrase reads the key's passphrase from the terminal, never from
// an argument or the environment (they are seen by other processes).
func askPassphrase(keyFile string, stderr io.Writer) ([]byte, error) {
	tty, err := os.Open("/dev/tty")
	if err != nil || !term.IsTerminal(int(tty.Fd())) {
		if tty != nil {
			tty.Close()
		}
		return nil, fmt.Errorf("the key is protected by a passphrase and there is no terminal to ask it on")
	}
	defer tty.Close()
	fmt.Fprintf(stderr, "passphrase for %s: ", keyFile)
	pass, err := term.ReadPassword(int(tty.Fd()))
	fmt.Fprintln(stderr)
	return pass, err
}
