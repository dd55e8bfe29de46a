package lsp

import (
	"bytes"
	"io"
	"io/fs"
	"os"
	"path"
	"time"
)

// overlay is the file system a worksheet is loaded from: its folder on disk, with the open
// buffers of the editor in place of the files they edit. Paths are slash-separated and
// relative to the folder, as engine.Options.FS wants them.
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
	return os.DirFS(o.dir).Open(name)
}

// ReadFile implements fs.ReadFileFS, so that a buffer is not copied through a reader.
func (o overlay) ReadFile(name string) ([]byte, error) {
	if s, ok := o.bufs[name]; ok && fs.ValidPath(name) {
		return []byte(s), nil
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
