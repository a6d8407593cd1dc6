//go:build linux

package ingest

import (
	"io/fs"
	"syscall"
)

// statOf takes the stat fields of fi, the change time, inode and device
// included.
func statOf(fi fs.FileInfo) FileStat {
	s := FileStat{Size: fi.Size(), ModNS: fi.ModTime().UnixNano()}
	if st, ok := fi.Sys().(*syscall.Stat_t); ok {
		s.ChangeNS = st.Ctim.Nano()
		s.Inode, s.Device = uint64(st.Ino), uint64(st.Dev)
	}
	return s
}
