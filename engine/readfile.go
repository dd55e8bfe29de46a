package engine

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// sheetFS is the file system Load reads from when Options.FS is nil: the worksheet itself by
// the path it was given (it may be a link or a pipe the user named), and every part through
// an os.Root on the worksheet's folder, which refuses names, symbolic links included, that
// lead outside it.
type sheetFS struct {
	main, mainPath string
	root           fs.FS // nil when the folder could not be opened
	rootErr        error
}

// osFS returns the file system for a worksheet on disk, its name inside it, and a function
// that releases it.
func osFS(path string) (fs.FS, string, func()) {
	base := filepath.Base(path)
	root, err := os.OpenRoot(filepath.Dir(path))
	if err != nil {
		return sheetFS{main: base, mainPath: path, rootErr: err}, base, func() {}
	}
	return sheetFS{main: base, mainPath: path, root: root.FS()}, base, func() { root.Close() }
}

func (s sheetFS) Open(name string) (fs.File, error) {
	if name == s.main {
		return os.Open(s.mainPath)
	}
	if s.root == nil {
		return nil, &fs.PathError{Op: "open", Path: name, Err: s.rootErr}
	}
	return s.root.Open(name)
}

func (s sheetFS) Stat(name string) (fs.FileInfo, error) {
	if name == s.main {
		return os.Stat(s.mainPath)
	}
	if s.root == nil {
		return nil, &fs.PathError{Op: "stat", Path: name, Err: s.rootErr}
	}
	return fs.Stat(s.root, name)
}

// readSheet reads one file of a load, at most maxFileSize+1 bytes of it whatever it claims.
// A part must be a regular file: a named pipe would block, a device would never end.
func readSheet(fsys fs.FS, name string, part bool) ([]byte, error) {
	if part {
		fi, err := fs.Stat(fsys, name)
		if err != nil {
			return nil, readErr(err)
		}
		if !fi.Mode().IsRegular() {
			return nil, fmt.Errorf("not a regular file (%s)", fi.Mode().Type())
		}
	}
	f, err := fsys.Open(name)
	if err != nil {
		return nil, readErr(err)
	}
	defer f.Close()
	fi, err := f.Stat()
	if part && (err != nil || !fi.Mode().IsRegular()) {
		return nil, errors.New("not a regular file")
	}
	// A regular file is read into a buffer of its size and the room of one more read, which
	// finds the end without growing it (io.ReadAll doubles its way up: 17 MB of copies for a
	// 3 MB sheet).
	size := 0
	if err == nil && fi.Mode().IsRegular() {
		size = int(min(fi.Size(), maxFileSize+1))
	}
	buf := bytes.NewBuffer(make([]byte, 0, size+bytes.MinRead))
	if _, err := buf.ReadFrom(io.LimitReader(f, maxFileSize+1)); err != nil {
		return nil, readErr(err)
	}
	return buf.Bytes(), nil
}

// readErr words a read error for the diagnostic "cannot read FILE: …".
func readErr(err error) error {
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return errors.New("no such file")
	case strings.Contains(err.Error(), "path escapes from parent"):
		return errors.New("it leads outside the worksheet's folder (through a symbolic link); parts must stay inside it")
	}
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}
