// Command gtpack reduces an archive of active-antenna range measurements to
// G/T, gain and range loss with an uncertainty budget and a verdict, and
// writes acceptance reports, workbooks and a fleet overview.
//
// This package only wires the stages (ingest -> reduce -> render), runs
// units in parallel, reports progress and sets the exit code.
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"runtime/pprof"
	"strings"
)

// Exit codes of the contract.
const (
	exitOK      = 0
	exitRefused = 1
	exitUsage   = 2
	exitSite    = 3 // the site could not be written: what was there is kept whole
)

const usage = `gtpack: G/T acceptance packages from range measurement archives

usage:
  gtpack build ARCHIVE [-o SITE] [-j N] [--only SERIAL] [--force] [--quiet] [--shard K/N]
  gtpack index SITE                       rebuild the fleet pages from the units already in SITE
  gtpack check ARCHIVE                    validate only; exit 1 when anything is wrong
  gtpack verify SITE [--archive ARCHIVE] [--allowed-signers FILE]
                                          check a package: files, manifests, signature, inputs
  gtpack sign SITE --key FILE             sign SHA256SUMS with an OpenSSH ed25519 key
  gtpack approve ARCHIVE SERIAL --by NAME [--role R] [--comment C] [--date T]
                                          approve the unit's report as it is now (adds approvals/SERIAL/*.yaml)
  gtpack inspect FILE [--json]            what the tool reads from one input file
  gtpack demo DIR [--units N] [--seed S]  write a synthetic archive from a physical model
  gtpack schema run|station|reference|spec|lab|approval
                                          print the JSON Schema of a YAML kind (for editors)
  gtpack init DIR                         a new archive: commented templates, schemas, no runs
  gtpack version

exit codes: 0 done; 1 done, but some inputs were refused; 2 usage error;
  3 the site could not be written (no space, no permission, locked by another build)
`

func main() {
	// GTPACK_CPUPROFILE=FILE writes a CPU profile of the whole command, for
	// developers measuring a build (DEVELOPERS.md, "Benchmarks").
	if p := os.Getenv("GTPACK_CPUPROFILE"); p != "" {
		f, err := os.Create(p)
		if err == nil && pprof.StartCPUProfile(f) == nil {
			code := run(os.Args[1:], os.Stdout, os.Stderr)
			pprof.StopCPUProfile()
			f.Close()
			os.Exit(code)
		}
		fmt.Fprintf(os.Stderr, "gtpack: GTPACK_CPUPROFILE=%s: no profile written\n", p)
	}
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return exitUsage
	}
	var code int
	var err error
	switch args[0] {
	case "build":
		code, err = cmdBuild(args[1:], stdout, stderr)
	case "index":
		code, err = cmdIndex(args[1:], stdout, stderr)
	case "check":
		code, err = cmdCheck(args[1:], stdout, stderr)
	case "approve":
		code, err = cmdApprove(args[1:], stdout, stderr)
	case "verify":
		code, err = cmdVerify(args[1:], stdout, stderr)
	case "sign":
		code, err = cmdSign(args[1:], stdout, stderr)
	case "inspect":
		code, err = cmdInspect(args[1:], stdout, stderr)
	case "demo":
		code, err = cmdDemo(args[1:], stdout, stderr)
	case "schema":
		code, err = cmdSchema(args[1:], stdout, stderr)
	case "init":
		code, err = cmdInit(args[1:], stdout, stderr)
	case "version", "--version", "-version":
		code, err = cmdVersion(args[1:], stdout, stderr)
	case "help", "-h", "--help", "-help":
		fmt.Fprint(stdout, usage)
		return exitOK
	default:
		err = usageError("unknown command %q", args[0])
	}
	var ue *usageErr
	if errors.As(err, &ue) {
		fmt.Fprintf(stderr, "gtpack %s: %s\n\n%s", args[0], ue.msg, usage)
		return exitUsage
	}
	if err != nil {
		fmt.Fprintf(stderr, "gtpack %s: %v\n", args[0], err)
		if code == exitOK {
			code = exitRefused
		}
	}
	return code
}

type usageErr struct{ msg string }

func (e *usageErr) Error() string { return e.msg }

func usageError(format string, a ...any) error {
	return &usageErr{msg: fmt.Sprintf(format, a...)}
}

// parseArgs parses flags that may stand before, between or after the
// positional arguments, and checks the number of positionals.
func parseArgs(fs *flag.FlagSet, args []string, positional ...string) ([]string, error) {
	fs.SetOutput(io.Discard)
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, usageError("%v", err)
		}
		args = fs.Args()
		if len(args) == 0 {
			break
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
	if len(pos) != len(positional) {
		return nil, usageError("expected %s, got %d argument(s)", strings.Join(positional, " "), len(pos))
	}
	return pos, nil
}
