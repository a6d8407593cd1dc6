// Command gtpack reduces an archive of active-antenna range measurements to
// G/T, gain and range loss with an uncertainty budget and a verdict, and
// writes acceptance reports, workbooks and a fleet overview.
package main

import (
	"fmt"
	"os"
)

func main() {
	os.Exit(run(os.Args[1:]))
}

func run(args []string) int {
	fmt.Fprintln(os.Stderr, "usage: gtpack build|index|check|inspect|demo|version")
	return 2
}
