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
	"strings"
)

// maxNameBytes is the longest file name most file systems take (ext4, XFS,
// APFS, NTFS: 255 bytes). The temporary name is kept within it, so that
// any output name the file system accepts can be written.
const maxNameBytes = 255

// tempSuffix stands between the target's name and CreateTemp's random
// digits (up to 20 of them).
const tempSuffix = ".tmp-"

// tempPrefix is the start of the name of every temporary file for the
// target named base: a dot, base (cut short enough that the whole name
// fits in maxNameBytes) and tempSuffix.
func tempPrefix(base string) string {
	keep := maxNameBytes - 1 - len(tempSuffix) - 20
	if len(base) > keep {
		base = base[:keep]
	}
	return "." + base + tempSuffix
}

// Stale returns the temporary files beside path that a write of path left
// behind when its process was killed before the rename: they are hidden,
// named after path, and never read. A run about to write path may remove
// them.
func Stale(path string) ([]string, error) {
	dir, prefix := filepath.Dir(path), tempPrefix(filepath.Base(path))
	entries, err := os.ReadDir(dir)
	if err != nil {
		if os.IsNotExist(err) {
			return nil, nil
		}
		return nil, err
	}
	var stale []string
	for _, e := range entries {
		rest, ok := strings.CutPrefix(e.Name(), prefix)
		if !ok || rest == "" || strings.Trim(rest, "0123456789") != "" || !e.Type().IsRegular() {
			continue
		}
		stale = append(stale, filepath.Join(dir, e.Name()))
	}
	return stale, nil
}

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
	tmp, err := os.CreateTemp(dir, tempPrefix(filepath.Base(path))+"*")
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
