package main

import (
	"crypto/rand"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"time"
)

// One writer at a time. Every command that writes a site holds a lock
// file in SITE/.gtpack/locks/ for as long as it runs: a whole-site lock
// (build, build --only, index) or a shard lock (build --shard K/N). Shards
// of the same N may hold their locks together, since their units never
// meet; any other pair overlaps and the second writer is refused at once,
// naming the first.
//
// A lock file is held with flock(2), which the kernel releases when its
// process ends however it ends, so a lock left by a killed build is told
// from a live one without guessing from times or process ids: whoever can
// take the flock of a lock file knows its writer is gone and removes it.
// Taking a lock, recovering what a dead build left and removing its
// temporary files all happen under one short-lived guard flock
// (locks/guard), so that two builds starting at the same moment see each
// other.

// lockScope is what a writer covers: the whole site (n == 0) or shard k of
// n.
type lockScope struct{ k, n int }

func (l lockScope) String() string {
	if l.n == 0 {
		return "the whole site"
	}
	return fmt.Sprintf("shard %d/%d", l.k, l.n)
}

func (l lockScope) overlaps(o lockScope) bool {
	return l.n == 0 || o.n == 0 || l.n != o.n || l.k == o.k
}

// lockInfo is written into a lock file, for the message that names the
// holder.
type lockInfo struct {
	BuildID string `json:"build_id"`
	PID     int    `json:"pid"`
	Host    string `json:"host"`
	Command string `json:"command"`
	Started string `json:"started"`
	ShardK  int    `json:"shard_k"`
	ShardN  int    `json:"shard_n"`
}

// lockedError is returned when another live writer holds an overlapping
// lock.
type lockedError struct {
	site   string
	holder lockInfo
}

func (e *lockedError) Error() string {
	h := e.holder
	return fmt.Sprintf("%s is being written by another gtpack (%q, %s, process %d on %s, since %s); wait for it to finish, or build a shard of the same count beside it",
		e.site, h.Command, lockScope{h.ShardK, h.ShardN}, h.PID, h.Host, h.Started)
}

// siteLock is this process's lock on a site.
type siteLock struct {
	f    *os.File
	path string
}

// newBuildID names this process in its lock file and in the names of its
// temporary files: the process id and random bits (process ids repeat
// across machines sharing a site).
func newBuildID() string {
	var b [4]byte
	if _, err := rand.Read(b[:]); err != nil {
		panic(err) // crypto/rand does not fail on a supported system
	}
	return fmt.Sprintf("%d-%s", os.Getpid(), hex.EncodeToString(b[:]))
}

func flock(f *os.File, how int) error {
	for {
		err := syscall.Flock(int(f.Fd()), how)
		if !errors.Is(err, syscall.EINTR) {
			return err
		}
	}
}

// acquireLock takes the lock of scope on the site at dir (its .gtpack
// folder exists) and, while the guard is held, calls cleanup with the
// build ids of every live writer, this one's included, so that what dead
// builds left can be recovered and removed without touching a live
// build's files.
func acquireLock(dir, buildID, command string, scope lockScope, cleanup func(live map[string]bool) error) (*siteLock, error) {
	locks := filepath.Join(dir, stateDir, "locks")
	if err := os.MkdirAll(locks, 0o755); err != nil {
		return nil, err
	}
	guard, err := os.OpenFile(filepath.Join(locks, "guard"), os.O_RDWR|os.O_CREATE, 0o644)
	if err != nil {
		return nil, err
	}
	defer guard.Close()
	if err := flock(guard, syscall.LOCK_EX); err != nil {
		return nil, fmt.Errorf("%s: %w", guard.Name(), err)
	}
	defer flock(guard, syscall.LOCK_UN)

	entries, err := os.ReadDir(locks)
	if err != nil {
		return nil, err
	}
	live := map[string]bool{buildID: true}
	for _, e := range entries {
		if !strings.HasSuffix(e.Name(), ".lock") {
			continue
		}
		p := filepath.Join(locks, e.Name())
		f, err := os.OpenFile(p, os.O_RDWR, 0)
		if err != nil {
			continue // removed by its writer meanwhile
		}
		if flock(f, syscall.LOCK_EX|syscall.LOCK_NB) == nil {
			// Nobody holds it: its writer was killed. Remove it while
			// holding it, so that nobody else takes it for live.
			os.Remove(p)
			f.Close()
			continue
		}
		var info lockInfo
		data, _ := os.ReadFile(p)
		f.Close()
		if json.Unmarshal(data, &info) != nil {
			// Written under the guard, so complete once visible; a lock
			// file that does not parse is still a live writer's.
			info = lockInfo{Command: "unknown", Started: "unknown", BuildID: strings.TrimSuffix(e.Name(), ".lock")}
		}
		live[info.BuildID] = true
		if scope.overlaps(lockScope{info.ShardK, info.ShardN}) {
			return nil, &lockedError{site: dir, holder: info}
		}
	}

	host, _ := os.Hostname()
	info := lockInfo{BuildID: buildID, PID: os.Getpid(), Host: host, Command: command,
		Started: time.Now().UTC().Format(time.RFC3339), ShardK: scope.k, ShardN: scope.n}
	data, _ := json.Marshal(info)
	p := filepath.Join(locks, buildID+".lock")
	f, err := os.OpenFile(p, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o644)
	if err != nil {
		return nil, err
	}
	if err := flock(f, syscall.LOCK_EX|syscall.LOCK_NB); err != nil {
		f.Close()
		os.Remove(p)
		return nil, err
	}
	l := &siteLock{f: f, path: p}
	if _, err := f.Write(data); err != nil {
		l.release()
		return nil, err
	}
	if err := cleanup(live); err != nil {
		l.release()
		return nil, err
	}
	return l, nil
}

// release removes the lock file, then lets go of it.
func (l *siteLock) release() {
	if l == nil || l.f == nil {
		return
	}
	os.Remove(l.path)
	flock(l.f, syscall.LOCK_UN)
	l.f.Close()
	l.f = nil
}
