package report

import (
	"math"
	"math/rand/v2"
	"testing"
)

// linearPlace is the brute-force oracle of labeller.place: every
// candidate inside the picture tested against every box placed.
func linearPlace(w, h float64, placed *[]labelBox, cands []labelBox) (labelBox, bool) {
	for _, c := range cands {
		if c.X < 1 || c.Y < 1 || c.X+c.W > w-1 || c.Y+c.H > h-1 {
			continue
		}
		free := true
		for _, q := range *placed {
			if c.overlaps(q) {
				free = false
				break
			}
		}
		if free {
			*placed = append(*placed, c)
			return c, true
		}
	}
	return labelBox{}, false
}

// TestLabellerGridMatchesLinearScan places random labels, with boxes
// placed directly between them as mapLabels does (some reaching past the
// picture, some not numbers), with the grid and one by one: every label
// must land in the same box or be left off alike.
func TestLabellerGridMatchesLinearScan(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 11))
	for trial := range 40 {
		w, h := 100+rng.Float64()*900, 100+rng.Float64()*700
		lb := &labeller{W: w, H: h}
		var oracle []labelBox
		kept := 0
		for i := range 400 {
			if i%50 == 0 { // a box placed directly: the scale bar, a scheme's segment
				b := labelBox{rng.Float64()*w*1.2 - 0.1*w, rng.Float64()*h*1.2 - 0.1*h, rng.Float64() * 120, rng.Float64() * 40}
				switch i % 200 {
				case 50:
					b.X = math.NaN()
				case 100:
					b.W = math.Inf(1)
				}
				lb.placed, oracle = append(lb.placed, b), append(oracle, b)
				continue
			}
			x, y := rng.Float64()*w, rng.Float64()*h
			cw, ch := 6+rng.Float64()*40, 8+rng.Float64()*10
			cands := candidates(x, y, cw, ch, []float64{3, 7, 12, 18})
			got, gotOK := lb.place(cands)
			want, wantOK := linearPlace(w, h, &oracle, cands)
			if got != want || gotOK != wantOK {
				t.Fatalf("trial %d, label %d: placed %v %v, want %v %v (one by one)", trial, i, got, gotOK, want, wantOK)
			}
			if gotOK {
				kept++
			}
		}
		if kept == 0 || kept == 392 {
			t.Errorf("trial %d: %d of 392 labels placed: the check shows little", trial, kept)
		}
	}
}
