package watch

import (
	"errors"
	"os"
	"path/filepath"
)

// WriteAtomic writes data to path via a temp file in the same directory and a
// rename, so readers see either the old content or the new content and never a
// partially written file. An existing file keeps its permission bits; a new
// file is created with mode 0644. On failure the temp file is removed and the
// original file is left untouched.
func WriteAtomic(path string, data []byte) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	if base == "" {
		return &os.PathError{Op: "write", Path: path, Err: errors.New("no file name")}
	}
	mode := os.FileMode(0o644)
	if fi, statErr := os.Stat(path); statErr == nil {
		if !fi.Mode().IsRegular() {
			return &os.PathError{Op: "write", Path: path, Err: errors.New("not a regular file")}
		}
		mode = fi.Mode().Perm()
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return err
	}
	tmp := f.Name()
	defer func() {
		if err != nil {
			f.Close()
			os.Remove(tmp)
		}
	}()
	if _, err = f.Write(data); err != nil {
		return err
	}
	if err = f.Chmod(mode); err != nil {
		return err
	}
	if err = f.Sync(); err != nil {
		return err
	}
	if err = f.Close(); err != nil {
		return err
	}
	if err = os.Rename(tmp, path); err != nil {
		return err
	}
	syncDir(dir)
	return nil
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
