package watch

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"time"
)

// WriteAtomic writes data to path via a temp file in the same directory and a
// rename, so readers see either the old content or the new content and never a
// partially written file. An existing file keeps its permission bits; a new
// file gets 0666 less the process's umask, as any file the user creates. On
// failure the temp file is removed and the original file is left untouched.
// Temp files of path left by a run that was killed are removed first. The data
// and the rename are forced to the disk before it returns.
func WriteAtomic(path string, data []byte) error { return writeAtomic(path, data, true) }

// WriteLive is WriteAtomic for what watch writes again on every save (the page and its
// charts): the same temp file and rename, so that a reader never sees a partial file and a
// process killed at any point leaves the old file or the new one, but without waiting for
// the disk (on a 5 MB page that wait is a sixth of a save's turnaround). Only an operating
// system crash or a power cut just after a save can lose the latest page, which the next
// save, or the next start of watch, writes again.
func WriteLive(path string, data []byte) error { return writeAtomic(path, data, false) }

func writeAtomic(path string, data []byte, durable bool) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	if base == "" {
		return &os.PathError{Op: "write", Path: path, Err: errors.New("no file name")}
	}
	keep := os.FileMode(0)
	if fi, statErr := os.Stat(path); statErr == nil {
		if !fi.Mode().IsRegular() {
			return &os.PathError{Op: "write", Path: path, Err: errors.New("not a regular file")}
		}
		keep = fi.Mode().Perm()
	}
	RemoveStale(dir, base)
	var b [6]byte
	rand.Read(b[:])
	tmp := filepath.Join(dir, tempPrefix(base)+strconv.Itoa(os.Getpid())+"-"+hex.EncodeToString(b[:]))
	f, err := os.OpenFile(tmp, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o666) // the umask applies
	if err != nil {
		return err
	}
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	if _, err = f.Write(data); err != nil {
		return err
	}
	if keep != 0 {
		if err = f.Chmod(keep); err != nil {
			return err
		}
	}
	if durable {
		if err = f.Sync(); err != nil {
			return err
		}
	}
	if err = f.Close(); err != nil {
		return err
	}
	if err = os.Rename(tmp, path); err != nil {
		return err
	}
	if durable {
		syncDir(dir)
	}
	return nil
}

// tempPrefix is how WriteAtomic's temp files for base begin: ".base.tmp-PID-RANDOM".
func tempPrefix(base string) string { return "." + base + ".tmp-" }

// RemoveStale removes, in dir, the temp files WriteAtomic made for names starting with
// prefix whose process is gone (a run killed between writing and renaming). Temp files of
// running processes, this one included, are left alone; so is everything else.
func RemoveStale(dir, prefix string) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return
	}
	for _, e := range entries {
		name := e.Name()
		if !strings.HasPrefix(name, "."+prefix) || !e.Type().IsRegular() {
			continue
		}
		i := strings.LastIndex(name, ".tmp-")
		if i < 0 {
			continue
		}
		pidText, _, ok := strings.Cut(name[i+len(".tmp-"):], "-")
		pid, err := strconv.Atoi(pidText)
		if !ok || err != nil || pid <= 0 || pid == os.Getpid() || alive(pid) {
			continue
		}
		if fi, err := e.Info(); err != nil || time.Since(fi.ModTime()) < 0 {
			continue
		}
		os.Remove(filepath.Join(dir, name))
	}
}

// alive reports whether process pid is running (or cannot be probed: then it is kept).
func alive(pid int) bool {
	p, err := os.FindProcess(pid)
	if err != nil {
		return false
	}
	if runtime.GOOS == "windows" {
		p.Release()
		return true // FindProcess opens only a running process there
	}
	err = p.Signal(syscall.Signal(0))
	return err == nil || errors.Is(err, syscall.EPERM)
}

// syncDir flushes the directory entry after a rename where the platform
// supports it. Errors are ignored: the data itself is already on disk.
func syncDir(dir string) {
	d, err := os.Open(dir)
	if err != nil {
		return
	}
	d.Sync()
	d.Close()
}
