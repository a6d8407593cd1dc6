package ingest

import (
	"os"
	"path/filepath"
	"runtime"
	"testing"
	"time"
)

// A file read just after it was written gets an untrusted stat (racy:
// a second write in the same clock tick would leave every field as it
// was), and Recheck then compares its bytes; a changed file is found even
// with its size and modification time set back.
func TestRecheck(t *testing.T) {
	dir := t.TempDir()
	a := &Archive{Root: dir, Documents: map[string]InputFile{}}
	p := filepath.Join(dir, "b00.s2p")
	if err := os.WriteFile(p, []byte("# Hz S RI R 50\n1e9 1 0 0 0 0 0 1 0\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	data, st, err := readStable(p, 1<<20)
	if err != nil {
		t.Fatal(err)
	}
	if st.Trusted() {
		t.Errorf("stat of a file written just now is trusted: %+v", st)
	}
	in := inputOf("b00.s2p", data, st)
	if now, same := a.Recheck(in); !same || now.SHA256 != in.SHA256 {
		t.Errorf("unchanged file: same %v, %+v", same, now)
	}

	// Same size, same modification time, other bytes.
	fi, _ := os.Stat(p)
	edited := append([]byte(nil), data...)
	edited[len(edited)-2] = '2'
	if err := os.WriteFile(p, edited, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Chtimes(p, fi.ModTime(), fi.ModTime()); err != nil {
		t.Fatal(err)
	}
	if _, same := a.Recheck(in); same {
		t.Error("a file edited in place with its time set back is taken as unchanged")
	}
	if runtime.GOOS == "linux" {
		// A trusted stat that no longer holds (the change time moved) is
		// checked by content, and the file's new stat comes back.
		trusted := in
		trusted.Stat.ChangeNS = 1
		if err := os.WriteFile(p, data, 0o644); err != nil {
			t.Fatal(err)
		}
		now, same := a.Recheck(trusted)
		if !same || now.Stat == trusted.Stat || now.Stat.Size != int64(len(data)) {
			t.Errorf("same bytes, new stat: same %v, stat %+v", same, now.Stat)
		}
	}

	// Documents are compared by the bytes discovery read.
	doc := InputFile{Path: "stations/a.yaml", Size: 3, SHA256: "x"}
	a.Documents[doc.Path] = doc
	if _, same := a.Recheck(doc); !same {
		t.Error("a document with the hash discovery read is taken as changed")
	}
	a.Documents[doc.Path] = InputFile{Path: doc.Path, Size: 3, SHA256: "y"}
	if _, same := a.Recheck(doc); same {
		t.Error("a document with another hash is taken as unchanged")
	}

	// Missing, then readable.
	if a.Readable("later.csv") {
		t.Error("a missing file is readable")
	}
	if _, same := a.Recheck(InputFile{Path: "later.csv"}); same {
		t.Error("a missing file is unchanged")
	}
	os.WriteFile(filepath.Join(dir, "later.csv"), nil, 0o644)
	if !a.Readable("later.csv") {
		t.Error("a file that appeared is not readable")
	}
}

// readStable returns the bytes of one version of a file: a file that
// keeps changing while it is read is refused.
func TestReadStableRefusesAFileThatKeepsChanging(t *testing.T) {
	p := filepath.Join(t.TempDir(), "growing.csv")
	if err := os.WriteFile(p, []byte("1,2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	stop := make(chan struct{})
	done := make(chan struct{})
	go func() {
		defer close(done)
		f, err := os.OpenFile(p, os.O_APPEND|os.O_WRONLY, 0)
		if err != nil {
			return
		}
		defer f.Close()
		for {
			select {
			case <-stop:
				return
			default:
				f.Write([]byte("3,4\n"))
			}
		}
	}()
	deadline := time.Now().Add(5 * time.Second)
	refused := false
	for time.Now().Before(deadline) && !refused {
		data, st, err := readStable(p, 1<<20)
		if err != nil {
			refused = true
			break
		}
		if int64(len(data)) != st.Size {
			t.Fatalf("read %d bytes with a stat of %d", len(data), st.Size)
		}
	}
	close(stop)
	<-done
	if !refused {
		t.Log("the writer never caught a read in the act (a fast machine): only the size check above ran")
	}
}
