package partition

import (
	"bytes"
	"context"
	"io"
	"math/rand/v2"
	"os"
	"strconv"
	"testing"
)

// benchExtract measures what the regions command does with an extract:
// decoding, noding, faces, cleaning unless exact, and writing GeoJSON.
func benchExtract(b *testing.B, name string, exact bool) {
	data, err := os.ReadFile(extractPath(b, name))
	if err != nil {
		b.Fatal(err)
	}
	o := DefaultOptions()
	o.Exact = exact
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		p, err := Build(context.Background(), bytes.NewReader(data), name, o)
		if err != nil {
			b.Fatal(err)
		}
		if err := p.WriteGeoJSON(io.Discard); err != nil {
			b.Fatal(err)
		}
	}
}

// benchArrangement measures steps 3-4 of the reference recipe alone
// (clip, node, faces), the part timed as geos_seconds.
func benchArrangement(b *testing.B, name string) {
	f, err := os.Open(extractPath(b, name))
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	o := DefaultOptions()
	o.Exact = true
	ex, err := readOSM(context.Background(), f, &o)
	if err != nil {
		b.Fatal(err)
	}
	ref := loadGEOSRef(b)[name]
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		p, err := fromExtract(context.Background(), ex, o)
		if err != nil {
			b.Fatal(err)
		}
		if len(p.Regions) != ref.Faces {
			b.Fatalf("%d faces, GEOS %d", len(p.Regions), ref.Faces)
		}
	}
	b.ReportMetric(ref.GEOSSeconds*1e9, "geos-ns/op")
}

func BenchmarkRegions(b *testing.B) {
	for _, name := range []string{"baltimore.osm.pbf", "liechtenstein-latest.osm.pbf"} {
		b.Run("exact-faces/"+name, func(b *testing.B) { benchArrangement(b, name) })
		b.Run("exact/"+name, func(b *testing.B) { benchExtract(b, name, true) })
		b.Run("default/"+name, func(b *testing.B) { benchExtract(b, name, false) })
	}
}

// BenchmarkNode nodes a synthetic street grid of n x n long lines with
// jittered ends, n² crossings, to show that noding and face tracing grow
// about linearly with the number of crossings.
func BenchmarkNode(b *testing.B) {
	for _, n := range []int{50, 200} {
		rng := rand.New(rand.NewPCG(1, 2))
		const step = 100_000_000 // 100 m
		var segs []seg
		for i := range n {
			j := func() int64 { return int64(rng.IntN(1000)) }
			c := int64(i)*step + j()
			segs = append(segs, seg{ipt{-step + j(), c}, ipt{int64(n) * step, c + j()}, int32(i)})
			segs = append(segs, seg{ipt{c, -step + j()}, ipt{c + j(), int64(n) * step}, int32(n + i)})
		}
		b.Run(strconv.Itoa(n*n)+"-crossings", func(b *testing.B) {
			for b.Loop() {
				a, err := node(context.Background(), append([]seg(nil), segs...))
				if err != nil {
					b.Fatal(err)
				}
				fs, err := a.faces(context.Background())
				if err != nil {
					b.Fatal(err)
				}
				if want := (n - 1) * (n - 1); len(fs.faces) != want {
					b.Fatalf("%d faces, want %d", len(fs.faces), want)
				}
			}
		})
	}
}
