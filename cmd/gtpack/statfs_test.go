package main

import "syscall"

type syscallStatfs struct{ used int64 }

func statfs(p string, out *syscallStatfs) error {
	var st syscall.Statfs_t
	if err := syscall.Statfs(p, &st); err != nil {
		return err
	}
	out.used = int64(st.Blocks-st.Bfree) * st.Bsize
	return nil
}
