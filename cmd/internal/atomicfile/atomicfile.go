// Package atomicfile writes output files so that a reader, or a run that
// fails half-way, never sees a half-written file: the content goes to a
// temporary file beside the target, which is synced to disk and renamed
// over the target only once it is complete.
package atomicfile

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// Write writes the file at path with the bytes that write produces.
//
// The bytes go through a buffered writer into a temporary file in path's
// folder (a rename is atomic only within one file system); the file is
// synced, closed and renamed over path, and then the folder is synced so
// that the rename itself survives a crash. On any error, write's included,
// the temporary file is removed and an existing file at path is left as it
// was. The folder must exist. Errors name path.
//
// The file gets mode 0644, as an ordinary output does, not the private
// mode of a temporary file.
func Write(path string, write func(w io.Writer) error) (err error) {
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	name := tmp.Name()
	defer func() {
		if err != nil {
			tmp.Close() // may already be closed; the write error matters
			os.Remove(name)
			err = fmt.Errorf("writing %s: %w", path, err)
		}
	}()
	bw := bufio.NewWriterSize(tmp, 1<<16)
	if err := write(bw); err != nil {
		return err
	}
	if err := bw.Flush(); err != nil {
		return err
	}
	// CreateTemp makes the file private; outputs are ordinary files.
	if err := tmp.Chmod(0o644); err != nil {
		return err
	}
	if err := tmp.Sync(); err != nil {
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	if err := os.Rename(name, path); err != nil {
		return err
	}
	return syncDir(dir)
}

// syncDir makes a rename within dir durable.
func syncDir(dir string) error {
	d, err := os.Open(dir)
	if err != nil {
		return err
	}
	err = d.Sync()
	if cerr := d.Close(); err == nil {
		err = cerr
	}
	return err
}
