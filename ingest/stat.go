package ingest

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"time"
)

// FileStat is what the file system says of a file: enough for a build to
// tell, without reading the file, that it is still the one it read. Size
// and modification time can be set back by user tools (touch -r, rsync -a,
// a restore from backup); the change time, inode and device cannot: any
// write, any change of the time stamps and any replacement of the file
// give a new change time or a new inode. This is the rule git's index
// follows.
//
// ChangeNS 0 means the stat cannot be trusted and the file's content must
// be compared: on a system without change times, or for a file that was
// changed so shortly before it was read that a later change could carry
// the same time stamp (see racyWindow).
type FileStat struct {
	Size     int64  `json:"size"`
	ModNS    int64  `json:"mtime_ns"`
	ChangeNS int64  `json:"ctime_ns"`
	Inode    uint64 `json:"ino,omitempty"`
	Device   uint64 `json:"dev,omitempty"`
}

// Trusted says whether s, when the file still has it, proves the file
// unchanged.
func (s FileStat) Trusted() bool { return s.ChangeNS != 0 }

// racyWindow: a file whose change or modification time is this close to
// the moment it was read gets an untrusted stat. File times come from a
// coarse clock (a few milliseconds on Linux, up to 2 s on some network
// and removable file systems), so a second change in the same tick as the
// one before the read would leave every stat field as it was read.
const racyWindow = 2 * time.Second

// readStable reads the file at full (a path on disk) whole, when it holds
// at most limit bytes (a *tooLargeError otherwise, before it is read or as
// soon as it grows past), and returns its bytes with the stat taken before
// the read. A file that changes while
// it is read (its stat after the read differs from the one before, or the
// bytes read are not its size) is read again, up to three times, then
// refused: the bytes returned are always the bytes of one version of the
// file, and the stat is one that version had.
func readStable(full string, limit int64) ([]byte, FileStat, error) {
	for attempt := 0; attempt < 3; attempt++ {
		now := time.Now()
		f, err := os.Open(full)
		if err != nil {
			return nil, FileStat{}, err
		}
		fi, err := f.Stat()
		if err != nil {
			f.Close()
			return nil, FileStat{}, err
		}
		before := statOf(fi)
		if before.Size > limit {
			f.Close()
			return nil, FileStat{}, &tooLargeError{before.Size}
		}
		data := make([]byte, 0, before.Size+1)
		data, err = readAll(f, data, limit)
		if err != nil {
			f.Close()
			return nil, FileStat{}, err
		}
		fi, err = f.Stat()
		f.Close()
		if err != nil {
			return nil, FileStat{}, err
		}
		if statOf(fi) != before || int64(len(data)) != before.Size {
			continue
		}
		limit := now.Add(-racyWindow).UnixNano()
		if before.ChangeNS >= limit || before.ModNS >= limit {
			before.ChangeNS = 0
		}
		return data, before, nil
	}
	return nil, FileStat{}, fmt.Errorf("changed while it was read, three times over; expected it to stay as it is during a build")
}

// readAll reads r to its end into buf, and stops past limit bytes (a
// file that grew while it was read).
func readAll(r io.Reader, buf []byte, limit int64) ([]byte, error) {
	for {
		if len(buf) == cap(buf) {
			buf = append(buf, 0)[:len(buf)]
		}
		n, err := r.Read(buf[len(buf):cap(buf)])
		buf = buf[:len(buf)+n]
		if int64(len(buf)) > limit {
			return nil, &tooLargeError{int64(len(buf))}
		}
		if err == io.EOF {
			return buf, nil
		}
		if err != nil {
			return buf, err
		}
	}
}

// inputOf is the InputFile of bytes read from rel with stat st.
func inputOf(rel string, data []byte, st FileStat) InputFile {
	sum := sha256.Sum256(data)
	return InputFile{Path: rel, Size: int64(len(data)), SHA256: hex.EncodeToString(sum[:]), Stat: st}
}

// Recheck says whether the input in, as a build recorded it, is still the
// file at its path, and returns the input as the file is now. A document
// discovery read (a run.yaml, a station, reference, reference table or
// spec) is compared by the SHA-256 of the bytes discovery parsed. Any
// other file is compared by its stat when the recorded one is trusted and
// still the file's; otherwise by its content: a file whose bytes are the
// same is unchanged, and now carries its new stat for the build to record.
func (a *Archive) Recheck(in InputFile) (now InputFile, same bool) {
	if doc, ok := a.Documents[in.Path]; ok {
		return doc, doc.Size == in.Size && doc.SHA256 == in.SHA256
	}
	fsys := newArchiveFS(a.Root)
	full, why := fsys.resolve(in.Path)
	if why != "" {
		return InputFile{}, false
	}
	if in.Stat.Trusted() {
		if fi, err := os.Stat(full); err == nil && statOf(fi) == in.Stat {
			return in, true
		}
	}
	data, st, why := readStableLimited(full, in.Path)
	if why != "" {
		return InputFile{}, false
	}
	now = inputOf(in.Path, data, st)
	return now, now.Size == in.Size && now.SHA256 == in.SHA256
}

// Readable says whether rel (relative to the archive root) can now be
// opened as a file inside the archive: a file a run named that could not
// be read before makes the build redo the unit once this holds.
func (a *Archive) Readable(rel string) bool {
	full, why := newArchiveFS(a.Root).resolve(rel)
	if why != "" {
		return false
	}
	f, err := os.Open(full)
	if err != nil {
		return false
	}
	f.Close()
	return true
}

// FolderListing is a digest of the names (and kinds) of the entries of
// the archive folder rel (a run's folder), as a build records it before
// reading the run: a file added to or removed from it (a file a beam
// plan's glob would now match, say) changes it. ok is false when the
// folder cannot be read.
func (a *Archive) FolderListing(rel string) (digest string, ok bool) {
	entries, err := os.ReadDir(filepath.Join(a.Root, filepath.FromSlash(rel)))
	if err != nil {
		return "", false
	}
	h := sha256.New()
	for _, e := range entries { // ReadDir sorts by name
		fmt.Fprintf(h, "%s %v\n", e.Name(), e.Type())
	}
	return hex.EncodeToString(h.Sum(nil)), true
}
