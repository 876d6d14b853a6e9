package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestWrite(t *testing.T) {
	errWrite := errors.New("disk on fire")
	tests := []struct {
		name    string
		old     string // existing content; "" for no file
		write   func(w io.Writer) error
		wantErr error  // nil: success
		want    string // the file's content afterwards
	}{
		{
			name:  "new file",
			write: func(w io.Writer) error { _, err := io.WriteString(w, "hello\n"); return err },
			want:  "hello\n",
		},
		{
			name:  "replaces an existing file",
			old:   "old content that is longer\n",
			write: func(w io.Writer) error { _, err := io.WriteString(w, "new\n"); return err },
			want:  "new\n",
		},
		{
			name: "more than the buffer",
			write: func(w io.Writer) error {
				_, err := io.WriteString(w, strings.Repeat("x", 200_000))
				return err
			},
			want: strings.Repeat("x", 200_000),
		},
		{
			name:  "empty file",
			write: func(w io.Writer) error { return nil },
			want:  "",
		},
		{
			name: "failing writer keeps the old file",
			old:  "old\n",
			write: func(w io.Writer) error {
				io.WriteString(w, "half")
				return errWrite
			},
			wantErr: errWrite,
			want:    "old\n",
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, "out.txt")
			if tc.old != "" {
				if err := os.WriteFile(path, []byte(tc.old), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			err := Write(path, tc.write)
			switch {
			case tc.wantErr == nil && err != nil:
				t.Fatalf("Write: %v", err)
			case tc.wantErr != nil && !errors.Is(err, tc.wantErr):
				t.Fatalf("Write: error %v, want %v", err, tc.wantErr)
			case err != nil && !strings.Contains(err.Error(), path):
				t.Errorf("error %q does not name %s", err, path)
			}
			got, rerr := os.ReadFile(path)
			if tc.wantErr != nil && tc.old == "" {
				if !os.IsNotExist(rerr) {
					t.Errorf("a failed write left %s behind", path)
				}
			} else if rerr != nil {
				t.Fatal(rerr)
			} else if string(got) != tc.want {
				t.Errorf("content %.40q, want %.40q", got, tc.want)
			}
			if err == nil {
				fi, err := os.Stat(path)
				if err != nil {
					t.Fatal(err)
				}
				if fi.Mode().Perm() != 0o644 {
					t.Errorf("mode %v, want 0644", fi.Mode().Perm())
				}
			}
			entries, err := os.ReadDir(dir)
			if err != nil {
				t.Fatal(err)
			}
			for _, e := range entries {
				if e.Name() != "out.txt" {
					t.Errorf("left behind: %s", e.Name())
				}
			}
		})
	}
}

func TestWriteFailuresNameThePath(t *testing.T) {
	dir := t.TempDir()
	tests := []struct {
		name string
		path string
	}{
		{"missing folder", filepath.Join(dir, "no", "such", "folder", "out.txt")},
		{"target is a folder", dir},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			called := false
			err := Write(tc.path, func(w io.Writer) error { called = true; return nil })
			if err == nil {
				t.Fatalf("Write(%s) succeeded", tc.path)
			}
			if !strings.Contains(err.Error(), tc.path) {
				t.Errorf("error %q does not name %s", err, tc.path)
			}
			if tc.name == "missing folder" && called {
				t.Error("write was called although no temporary file could be made")
			}
			if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
				t.Errorf("the folder was harmed: %v", err)
			}
		})
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		t.Errorf("left behind: %s", e.Name())
	}
}

// A name of the file system's longest length can be written: the
// temporary name stays within the limit too.
func TestWriteLongName(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, strings.Repeat("n", maxNameBytes-5)+".xlsx")
	if err := Write(path, func(w io.Writer) error { _, err := io.WriteString(w, "x"); return err }); err != nil {
		t.Fatalf("Write of a %d-byte name: %v", maxNameBytes, err)
	}
	if got, err := os.ReadFile(path); err != nil || string(got) != "x" {
		t.Fatalf("read back %q, %v", got, err)
	}
}

// Stale finds the temporary files of the named target only.
func TestStale(t *testing.T) {
	dir := t.TempDir()
	long := strings.Repeat("l", maxNameBytes-5) + ".xlsx"
	files := map[string]bool{ // name: is a stale temporary file of its target
		".report.xlsx.tmp-123456":      true,
		".report.xlsx.tmp-9":           true,
		".report.xlsx.tmp-":            false, // no digits: not CreateTemp's
		".report.xlsx.tmp-12a":         false,
		".report.xlsx.bak":             false,
		".other.xlsx.tmp-123":          false, // another target's
		"report.xlsx":                  false,
		tempPrefix(long)[0:] + "77889": true,
	}
	for name := range files {
		if err := os.WriteFile(filepath.Join(dir, name), nil, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	got := map[string]bool{}
	for _, target := range []string{"report.xlsx", long} {
		stale, err := Stale(filepath.Join(dir, target))
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range stale {
			got[filepath.Base(p)] = true
		}
	}
	for name, want := range files {
		if got[name] != want {
			t.Errorf("%s: stale %v, want %v", name, got[name], want)
		}
	}
	if stale, err := Stale(filepath.Join(dir, "missing", "x")); err != nil || len(stale) != 0 {
		t.Errorf("missing folder: %v, %v", stale, err)
	}
}
