package partition

import (
	"bytes"
	"compress/gzip"
	"context"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"sync/atomic"
	"testing"
	"time"
)

// repeatReader yields head, then body n times, then tail.
func repeatReader(head, body, tail string, n int) io.Reader {
	return io.MultiReader(strings.NewReader(head), &repeat{s: body, n: n}, strings.NewReader(tail))
}

type repeat struct {
	s   string
	n   int
	off int
}

func (r *repeat) Read(p []byte) (int, error) {
	w := 0
	for w < len(p) && r.n > 0 {
		c := copy(p[w:], r.s[r.off:])
		w += c
		r.off += c
		if r.off == len(r.s) {
			r.off, r.n = 0, r.n-1
		}
	}
	if w == 0 {
		return 0, io.EOF
	}
	return w, nil
}

// peakHeap runs f and returns the largest heap in use while it ran,
// sampled every few milliseconds.
func peakHeap(f func()) uint64 {
	runtime.GC()
	var peak atomic.Uint64
	done := make(chan struct{})
	go func() {
		var m runtime.MemStats
		for {
			runtime.ReadMemStats(&m)
			if m.HeapInuse > peak.Load() {
				peak.Store(m.HeapInuse)
			}
			select {
			case <-done:
				return
			case <-time.After(5 * time.Millisecond):
			}
		}
	}()
	f()
	close(done)
	return peak.Load()
}

// Hostile extracts, built here and small on disk, end in an error naming
// the file, with the heap bounded: a gzip bomb of nodes, an XML comment
// without end, elements nested without end.
func TestHostileExtractsBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a decompression bomb")
	}
	const node = `<node id="1" lat="51.5" lon="0.1" version="1"/>` + "\n"
	gz := func(r io.Reader) []byte {
		var b bytes.Buffer
		zw, _ := gzip.NewWriterLevel(&b, gzip.BestCompression)
		io.Copy(zw, r)
		zw.Close()
		return b.Bytes()
	}
	tests := []struct {
		name, file string
		data       []byte
		want       string
	}{
		{"gzip bomb of nodes", "bomb.osm.gz", gz(repeatReader(`<?xml version="1.0"?><osm version="0.6">`, node, "</osm>", (80<<20)/len(node))), "grows more than"},
		{"comment without end", "comment.osm", []byte(`<osm version="0.6"><!--` + strings.Repeat("x>", 2<<20)), "token is longer"},
		{"gzip comment bomb", "comment.osm.gz", gz(repeatReader(`<osm version="0.6"><!--`, strings.Repeat("y", 4096), "-->", (128<<20)/4096)), "token is longer"},
		{"nested elements", "deep.osm", []byte(`<osm version="0.6">` + strings.Repeat("<a>", 100_000)), "nest deeper"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), tc.file)
			if err := os.WriteFile(path, tc.data, 0o644); err != nil {
				t.Fatal(err)
			}
			var err error
			peak := peakHeap(func() { _, err = ReadFile(context.Background(), path, DefaultOptions()) })
			if err == nil || !strings.Contains(err.Error(), tc.file) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one naming %s and saying %q", err, tc.file, tc.want)
			}
			if peak > 512<<20 {
				t.Errorf("heap peaked at %d MB", peak>>20)
			}
			t.Logf("%d kB on disk: %v; heap peak %d MB", len(tc.data)>>10, err, peak>>20)
		})
	}
}

// The XML guard passes an ordinary extract's bytes through unchanged.
func TestXMLGuardPassesOSM(t *testing.T) {
	in := `<?xml version="1.0"?><!-- a > b --><osm version="0.6"><node id="1" lat="1" lon="2"><tag k="a" v="x&gt;y"/></node>` +
		`<![CDATA[ <<>> ]]><way id="2"><nd ref="1"/></way></osm>`
	var out bytes.Buffer
	if _, err := io.Copy(&out, newXMLGuard(strings.NewReader(in))); err != nil {
		t.Fatal(err)
	}
	if out.String() != in {
		t.Errorf("changed the bytes")
	}
	g := newXMLGuard(strings.NewReader(in))
	io.Copy(io.Discard, g)
	if g.depth != 0 {
		t.Errorf("depth %d at the end, want 0", g.depth)
	}
}
