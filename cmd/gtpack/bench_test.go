package main

import (
	"bytes"
	"path/filepath"
	"testing"
)

// BenchmarkBuildSampleArchive is a full build (--force) of sample-archive/
// with one worker: 8 units of 16 beams of 801 points, one retest.
func BenchmarkBuildSampleArchive(b *testing.B) {
	site := filepath.Join(b.TempDir(), "site")
	for i := 0; i < b.N; i++ {
		var out, errb bytes.Buffer
		if code := run([]string{"build", "../../sample-archive", "-o", site, "--quiet", "--force", "-j", "1"}, &out, &errb); code != exitOK {
			b.Fatalf("exit %d: %s", code, errb.String())
		}
	}
}
