//go:build !linux

package ingest

import "io/fs"

// statOf takes size and modification time. The change time is read on
// Linux only; without it the stat is never trusted (ChangeNS 0), and a
// build compares contents.
func statOf(fi fs.FileInfo) FileStat {
	return FileStat{Size: fi.Size(), ModNS: fi.ModTime().UnixNano()}
}
