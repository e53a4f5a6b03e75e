package gui

import (
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/storage/repository"
)

// Fyne's save dialog asks the repository of the "file" scheme for a
// writer as soon as the user confirms a name, and Fyne's own file
// repository opens that writer with os.Create: an existing file is
// emptied before the application sees it. dimerpath writes every file
// through a temporary file renamed into place (internal/atomicfile), so
// it only wants the chosen path. lazyFiles wraps the registered
// repository and hands out writers that open nothing until their first
// Write: the application takes the URI's path, closes the writer
// unwritten, which leaves the file exactly as it was, and writes
// atomically. A write that then fails (a cancelled export, a full disk,
// a design that does not validate) keeps the old file.
//
// Everything else is passed to the wrapped repository unchanged, so the
// dialogs list, create folders and read files as Fyne does.

// installLazyFiles registers lazyFiles over the repository Fyne
// registered for "file" (the GL driver does that when the app is made,
// and so does the test driver). It is idempotent.
func installLazyFiles() {
	lazyFilesMu.Lock()
	defer lazyFilesMu.Unlock()
	base, err := repository.ForScheme("file")
	if err != nil {
		return // no file scheme: nothing to wrap
	}
	if _, done := base.(*lazyFiles); done {
		return
	}
	// Register calls Destroy on the repository it replaces, which is
	// base, kept here. Fyne's file repository's Destroy does nothing
	// (internal/repository/file.go), so base keeps working.
	repository.Register("file", &lazyFiles{base: base})
}

var lazyFilesMu sync.Mutex

// lazyFiles is the "file" repository with deferred writers.
type lazyFiles struct{ base repository.Repository }

var (
	_ repository.Repository             = (*lazyFiles)(nil)
	_ repository.WritableRepository     = (*lazyFiles)(nil)
	_ repository.AppendableRepository   = (*lazyFiles)(nil)
	_ repository.ListableRepository     = (*lazyFiles)(nil)
	_ repository.HierarchicalRepository = (*lazyFiles)(nil)
	_ repository.DeleteAllRepository    = (*lazyFiles)(nil)
	_ repository.CopyableRepository     = (*lazyFiles)(nil)
	_ repository.MovableRepository      = (*lazyFiles)(nil)
)

func (r *lazyFiles) Exists(u fyne.URI) (bool, error)               { return r.base.Exists(u) }
func (r *lazyFiles) Reader(u fyne.URI) (fyne.URIReadCloser, error) { return r.base.Reader(u) }
func (r *lazyFiles) CanRead(u fyne.URI) (bool, error)              { return r.base.CanRead(u) }
func (r *lazyFiles) Destroy(scheme string)                         { r.base.Destroy(scheme) }

func (r *lazyFiles) writable() (repository.WritableRepository, bool) {
	w, ok := r.base.(repository.WritableRepository)
	return w, ok
}

// Writer returns a writer that opens the wrapped repository's (truncating)
// writer on its first Write. Closed without a write, it leaves the file
// as it was and creates none.
func (r *lazyFiles) Writer(u fyne.URI) (fyne.URIWriteCloser, error) {
	w, ok := r.writable()
	if !ok {
		return nil, repository.ErrOperationNotSupported
	}
	return &lazyWriter{uri: u, open: func() (fyne.URIWriteCloser, error) { return w.Writer(u) }}, nil
}

func (r *lazyFiles) CanWrite(u fyne.URI) (bool, error) {
	if w, ok := r.writable(); ok {
		return w.CanWrite(u)
	}
	return false, nil
}

func (r *lazyFiles) Delete(u fyne.URI) error {
	if w, ok := r.writable(); ok {
		return w.Delete(u)
	}
	return repository.ErrOperationNotSupported
}

func (r *lazyFiles) Appender(u fyne.URI) (fyne.URIWriteCloser, error) {
	if a, ok := r.base.(repository.AppendableRepository); ok {
		return a.Appender(u)
	}
	return nil, repository.ErrOperationNotSupported
}

func (r *lazyFiles) CanList(u fyne.URI) (bool, error) {
	if l, ok := r.base.(repository.ListableRepository); ok {
		return l.CanList(u)
	}
	return false, nil
}

func (r *lazyFiles) List(u fyne.URI) ([]fyne.URI, error) {
	if l, ok := r.base.(repository.ListableRepository); ok {
		return l.List(u)
	}
	return nil, repository.ErrOperationNotSupported
}

func (r *lazyFiles) CreateListable(u fyne.URI) error {
	if l, ok := r.base.(repository.ListableRepository); ok {
		return l.CreateListable(u)
	}
	return repository.ErrOperationNotSupported
}

func (r *lazyFiles) Parent(u fyne.URI) (fyne.URI, error) {
	if h, ok := r.base.(repository.HierarchicalRepository); ok {
		return h.Parent(u)
	}
	return repository.GenericParent(u)
}

func (r *lazyFiles) Child(u fyne.URI, component string) (fyne.URI, error) {
	if h, ok := r.base.(repository.HierarchicalRepository); ok {
		return h.Child(u, component)
	}
	return repository.GenericChild(u, component)
}

func (r *lazyFiles) DeleteAll(u fyne.URI) error {
	if d, ok := r.base.(repository.DeleteAllRepository); ok {
		return d.DeleteAll(u)
	}
	return repository.ErrOperationNotSupported
}

func (r *lazyFiles) Copy(src, dst fyne.URI) error {
	if c, ok := r.base.(repository.CopyableRepository); ok {
		return c.Copy(src, dst)
	}
	return repository.GenericCopy(src, dst)
}

func (r *lazyFiles) Move(src, dst fyne.URI) error {
	if m, ok := r.base.(repository.MovableRepository); ok {
		return m.Move(src, dst)
	}
	return repository.GenericMove(src, dst)
}

// lazyWriter opens its file on the first Write.
type lazyWriter struct {
	uri  fyne.URI
	open func() (fyne.URIWriteCloser, error)
	w    fyne.URIWriteCloser
	err  error
}

func (l *lazyWriter) URI() fyne.URI { return l.uri }

func (l *lazyWriter) Write(p []byte) (int, error) {
	if l.w == nil {
		if l.err != nil {
			return 0, l.err
		}
		if l.w, l.err = l.open(); l.err != nil {
			l.w = nil
			return 0, l.err
		}
	}
	return l.w.Write(p)
}

func (l *lazyWriter) Close() error {
	if l.w == nil {
		return nil
	}
	return l.w.Close()
}
