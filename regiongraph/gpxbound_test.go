package regiongraph

import (
	"context"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
	"time"
)

// heapPeak runs f and returns the largest heap in use sampled every 5 ms
// while it ran (runtime.ReadMemStats), above the heap before it.
func heapPeak(f func()) uint64 {
	// Two collections: the first moves what sync.Pools hold (the Parquet
	// writer's buffers of a file written just before) to their victim
	// caches, the second frees it. With one, those tens of megabytes are
	// in the heap before f and freed by a collection while f runs, which
	// can hide what f allocates.
	runtime.GC()
	runtime.GC()
	var m runtime.MemStats
	runtime.ReadMemStats(&m)
	base := m.HeapInuse
	var peak atomic.Uint64
	done := make(chan struct{})
	exited := make(chan struct{})
	go func() {
		defer close(exited)
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
	<-exited
	// A last sample: what f returns is still held, and the sampler may
	// not have run since f allocated it.
	runtime.ReadMemStats(&m)
	if m.HeapInuse > peak.Load() {
		peak.Store(m.HeapInuse)
	}
	if p := peak.Load(); p > base {
		return p - base
	}
	return 0
}

// TestHostileGPXBounded reads GPX files of about 7 MB built to take
// memory: elements nested without end, one huge text, a huge comment.
// Each ends in an error naming the file and the bound, with the heap
// bounded; read whole into memory, the nested file took 216 MB.
func TestHostileGPXBounded(t *testing.T) {
	const size = 7 << 20
	p := gridPartition(2, 2, 13.0, 52.0, 0.02)
	for _, tc := range []struct {
		name, data, want string
		limit            uint64
	}{
		{"nested", "<gpx>" + strings.Repeat("<a>", size/3), "nest deeper than 64", 16 << 20},
		{"text", "<gpx><trk><trkseg><trkpt lat=\"52\" lon=\"13\"><time>" + strings.Repeat("9", size), "a text of", 64 << 20},
		{"comment", "<gpx><!--" + strings.Repeat("-x", size/2) + "-->", "a comment of", 64 << 20},
	} {
		t.Run(tc.name, func(t *testing.T) {
			path := writeTemp(t, "track.gpx", tc.data)
			var err error
			peak := heapPeak(func() {
				_, err = Ingest(context.Background(), p, "test", []Input{{Path: path, Format: FormatGPX}}, DefaultOptions())
			})
			if err == nil || !strings.Contains(err.Error(), filepath.Base(path)) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want one naming %s and %q", err, filepath.Base(path), tc.want)
			}
			if peak > tc.limit {
				t.Errorf("heap grew by %d MB, want at most %d MB", peak>>20, tc.limit>>20)
			}
			t.Logf("%d MB file: heap +%d MB: %v", len(tc.data)>>20, peak>>20, err)
		})
	}
}

// TestGPXStreamsValidTracks reads a GPX file of many segments and checks
// every point is counted, as when the file was read whole.
func TestGPXStreamsValidTracks(t *testing.T) {
	var b strings.Builder
	b.WriteString(`<?xml version="1.0"?><gpx version="1.1"><trk>`)
	const segs, per = 300, 20
	for s := 0; s < segs; s++ {
		b.WriteString("<trkseg>")
		for i := 0; i < per; i++ {
			tm := time.Date(2024, 5, 1, 8, 0, 0, 0, time.UTC).Add(time.Duration(s)*time.Hour + time.Duration(i)*30*time.Second)
			b.WriteString(`<trkpt lat="52.01" lon="` + strconv.FormatFloat(13.001+0.0015*float64(i), 'f', 5, 64) + `"><time>` + tm.Format(time.RFC3339) + "</time></trkpt>")
		}
		b.WriteString("</trkseg>")
	}
	b.WriteString("</trk></gpx>")
	p := gridPartition(2, 2, 13.0, 52.0, 0.02)
	s, err := ingestString(t, p, FormatGPX, b.String(), DefaultOptions())
	if err != nil {
		t.Fatal(err)
	}
	checkQuality(t, s.Meta.Quality)
	if s.Meta.Quality.Read != segs*per {
		t.Errorf("read %d points, want %d", s.Meta.Quality.Read, segs*per)
	}
	segsRead, err := readGPX(strings.NewReader(b.String()))
	if err != nil || len(segsRead) != segs || len(segsRead[segs-1].points) != per {
		t.Errorf("readGPX: %d segments, %v", len(segsRead), err)
	}
}
