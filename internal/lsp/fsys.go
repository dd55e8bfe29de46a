package lsp

import (
	"bytes"
	"errors"
	"io"
	"io/fs"
	"os"
	"path"
	"time"
)

// overlay is the file system a worksheet is loaded from: its folder on disk, with the open
// buffers of the editor in place of the files they edit. Paths are slash-separated and
// relative to the folder, as engine.Options.FS wants them. Files on disk are opened through
// an os.Root on the folder, as render reads parts: a symbolic link that leads outside it is
// refused, and Stat answers without opening, so a named pipe is never opened (it would block).
type overlay struct {
	dir  string            // the worksheet's folder ("" when the document is no file on disk)
	bufs map[string]string // open buffers by path in the folder
}

// Open implements fs.FS.
func (o overlay) Open(name string) (fs.File, error) {
	if !fs.ValidPath(name) {
		return nil, &fs.PathError{Op: "open", Path: name, Err: fs.ErrInvalid}
	}
	if s, ok := o.bufs[name]; ok {
		return &memFile{name: name, r: bytes.NewReader([]byte(s)), size: int64(len(s))}, nil
	}
	if o.dir == "" {
		return nil, &fs.PathError{Op: "open", Path: name, Err: fs.ErrNotExist}
	}
	root, err := os.OpenRoot(o.dir)
	if err != nil {
		return nil, err
	}
	defer root.Close() // a file opened from it stays open
	return root.FS().Open(name)
}

// Stat implements fs.StatFS: the loader asks whether a part is a regular file before it
// opens it.
func (o overlay) Stat(name string) (fs.FileInfo, error) {
	if !fs.ValidPath(name) {
		return nil, &fs.PathError{Op: "stat", Path: name, Err: fs.ErrInvalid}
	}
	if s, ok := o.bufs[name]; ok {
		return memInfo{path.Base(name), int64(len(s))}, nil
	}
	if o.dir == "" {
		return nil, &fs.PathError{Op: "stat", Path: name, Err: fs.ErrNotExist}
	}
	root, err := os.OpenRoot(o.dir)
	if err != nil {
		return nil, err
	}
	defer root.Close()
	return fs.Stat(root.FS(), name)
}

// ReadFile implements fs.ReadFileFS, so that a buffer is not copied through a reader. A file
// on disk must be a regular one (hover and definitions read parts again after a load).
func (o overlay) ReadFile(name string) ([]byte, error) {
	if s, ok := o.bufs[name]; ok && fs.ValidPath(name) {
		return []byte(s), nil
	}
	if fi, err := o.Stat(name); err != nil {
		return nil, err
	} else if !fi.Mode().IsRegular() {
		return nil, &fs.PathError{Op: "read", Path: name, Err: errors.New("not a regular file")}
	}
	f, err := o.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return io.ReadAll(f)
}

// memFile is an open buffer read as a file.
type memFile struct {
	name string
	r    *bytes.Reader
	size int64
}

func (f *memFile) Stat() (fs.FileInfo, error) { return memInfo{path.Base(f.name), f.size}, nil }
func (f *memFile) Read(p []byte) (int, error) { return f.r.Read(p) }
func (f *memFile) Close() error               { return nil }

type memInfo struct {
	name string
	size int64
}

func (i memInfo) Name() string       { return i.name }
func (i memInfo) Size() int64        { return i.size }
func (i memInfo) Mode() fs.FileMode  { return 0o444 }
func (i memInfo) ModTime() time.Time { return time.Time{} }
func (i memInfo) IsDir() bool        { return false }
func (i memInfo) Sys() any           { return nil }
