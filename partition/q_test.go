package partition

import (
	"context"
	"image"
	"image/color"
	"image/png"
	"math/rand/v2"
	"os"
	"testing"

	"github.com/paulmach/orb"
	"github.com/paulmach/orb/planar"
)

func TestQuickPNG(t *testing.T) {
	for _, n := range []string{"baltimore.osm.pbf", "campo-grande.osm.gz"} {
		p, err := ReadFile(context.Background(), extractPath(t, n), DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		W := 900
		b := p.Bound
		H := int(float64(W) * (b.Max[1] - b.Min[1]) / (b.Max[0] - b.Min[0]) * 1.3)
		if H > 1400 { H = 1400 }
		img := image.NewRGBA(image.Rect(0, 0, W, H))
		rng := rand.New(rand.NewPCG(1, 1))
		cols := make([]color.RGBA, len(p.Regions))
		for i := range cols {
			cols[i] = color.RGBA{uint8(60 + rng.IntN(190)), uint8(60 + rng.IntN(190)), uint8(60 + rng.IntN(190)), 255}
		}
		bs := make([]orb.Bound, len(p.Regions))
		for i, r := range p.Regions { bs[i] = r.Polygon.Bound() }
		for y := 0; y < H; y++ {
			for x := 0; x < W; x++ {
				pt := orb.Point{b.Min[0] + (float64(x)+0.5)/float64(W)*(b.Max[0]-b.Min[0]), b.Max[1] - (float64(y)+0.5)/float64(H)*(b.Max[1]-b.Min[1])}
				c := color.RGBA{0, 0, 0, 255}
				for i, r := range p.Regions {
					if bs[i].Contains(pt) && planar.PolygonContains(r.Polygon, pt) {
						c = cols[i]
						break
					}
				}
				img.Set(x, y, c)
			}
		}
		for _, r := range p.Regions {
			x := int((r.Point[0] - b.Min[0]) / (b.Max[0] - b.Min[0]) * float64(W))
			y := int((b.Max[1] - r.Point[1]) / (b.Max[1] - b.Min[1]) * float64(H))
			for dx := -2; dx <= 2; dx++ { for dy := -2; dy <= 2; dy++ { img.Set(x+dx, y+dy, color.Black) } }
		}
		f, _ := os.Create("/tmp/" + n + ".png")
		png.Encode(f, img)
		f.Close()
	}
}
