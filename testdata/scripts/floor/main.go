// Command floor reads every input byte of an archive and parses every
// number in it, with no reduction or rendering: the floor a full build is
// measured against (testdata/scripts/bench-scale.sh). It uses as many
// workers as `gtpack build` does by default.
package main

import (
	"bytes"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"time"

	"gtpack.example/gtpack/ingest"
)

func main() {
	if len(os.Args) != 2 {
		fmt.Fprintln(os.Stderr, "usage: floor ARCHIVE")
		os.Exit(2)
	}
	root := os.Args[1]
	var files []string
	filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			files = append(files, p)
		}
		return nil
	})
	start := time.Now()
	jobs := make(chan string)
	var wg sync.WaitGroup
	var mu sync.Mutex
	var total int64
	var parsed, refused int
	for w := 0; w < runtime.NumCPU(); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for p := range jobs {
				data, err := os.ReadFile(p)
				if err != nil {
					continue
				}
				name := filepath.Base(p)
				ext := strings.ToLower(filepath.Ext(name))
				switch {
				case name == "run.yaml":
					_, err = ingest.ParseRun(data, p)
				case ext == ".ts" || (strings.HasPrefix(ext, ".s") && strings.HasSuffix(ext, "p")):
					_, err = ingest.ReadTouchstone(bytes.NewReader(data), p)
				case ext == ".csv" && name != "elements.csv":
					_, err = ingest.ReadTrace(bytes.NewReader(data), p)
				case name == "elements.csv":
					_, err = ingest.ReadElements(bytes.NewReader(data), p)
				}
				mu.Lock()
				total += int64(len(data))
				parsed++
				if err != nil {
					refused++
				}
				mu.Unlock()
			}
		}()
	}
	for _, f := range files {
		jobs <- f
	}
	close(jobs)
	wg.Wait()
	s := time.Since(start).Seconds()
	fmt.Printf("floor: %d files, %.1f MB read and parsed in %.2f s (%.0f MB/s), %d refused\n",
		parsed, float64(total)/1e6, s, float64(total)/1e6/s, refused)
}
