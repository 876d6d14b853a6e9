package stats

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// Reference: SciPy 1.10.1, scipy.stats.mannwhitneyu and
// scipy.stats.fisher_exact, with NumPy for the Hodges-Lehmann shift;
// ../../../shared/reference/stats-scipy.json (see the README beside it).
var referencePath = filepath.Join("..", "..", "..", "shared", "reference", "stats-scipy.json")

type scipyReference struct {
	SciPyVersion string `json:"scipy_version"`
	MannWhitneyU []struct {
		X, Y        []float64
		Alternative string
		Method      string
		Continuity  bool    `json:"continuity_correction"`
		UX          float64 `json:"U_x"`
		P           float64
		Shift       float64 `json:"hodges_lehmann_shift_x_minus_y"`
	} `json:"mann_whitney_u"`
	FisherExact []struct {
		Table       [2][2]int
		Alternative string
		OddsRatio   float64 `json:"odds_ratio"`
		P           float64
	} `json:"fisher_exact"`
}

func loadReference(t *testing.T) scipyReference {
	t.Helper()
	data, err := os.ReadFile(referencePath)
	if err != nil {
		t.Skipf("reference values not available: %v", err)
	}
	var ref scipyReference
	if err := json.Unmarshal(data, &ref); err != nil {
		t.Fatalf("%s: %v", referencePath, err)
	}
	if len(ref.MannWhitneyU) == 0 || len(ref.FisherExact) == 0 {
		t.Fatalf("%s: no cases", referencePath)
	}
	return ref
}

func relErr(got, want float64) float64 {
	if got == want {
		return 0
	}
	return math.Abs(got-want) / math.Max(math.Abs(want), math.SmallestNonzeroFloat64)
}

func TestMannWhitneyUAgainstSciPy(t *testing.T) {
	ref := loadReference(t)
	var worstExact, worstAsymptotic, worstShift float64
	for i, c := range ref.MannWhitneyU {
		if c.Alternative != "two-sided" || !c.Continuity {
			t.Fatalf("case %d: unsupported alternative %q / continuity %v", i, c.Alternative, c.Continuity)
		}
		method, tol := Asymptotic, 1e-6
		if c.Method == "exact" {
			method, tol = Exact, 1e-9
		}
		got, err := MannWhitneyU(c.X, c.Y, method)
		if err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		if got.U != c.UX {
			t.Errorf("case %d (%s): U = %v, SciPy %v", i, c.Method, got.U, c.UX)
		}
		e := relErr(got.P, c.P)
		if e > tol {
			t.Errorf("case %d (%s): p = %.17g, SciPy %.17g (relative error %.3g > %g)", i, c.Method, got.P, c.P, e, tol)
		}
		if method == Exact {
			worstExact = math.Max(worstExact, e)
		} else {
			worstAsymptotic = math.Max(worstAsymptotic, e)
		}
		shift := HodgesLehmann(c.X, c.Y)
		if e := relErr(shift, c.Shift); e > 1e-9 {
			t.Errorf("case %d: Hodges-Lehmann shift = %.17g, NumPy %.17g", i, shift, c.Shift)
		} else {
			worstShift = math.Max(worstShift, e)
		}
	}
	t.Logf("SciPy %s: max relative error exact p %.2g, asymptotic p %.2g, HL shift %.2g",
		ref.SciPyVersion, worstExact, worstAsymptotic, worstShift)
}

func TestFisherExactAgainstSciPy(t *testing.T) {
	ref := loadReference(t)
	var worst float64
	for i, c := range ref.FisherExact {
		if c.Alternative != "two-sided" {
			t.Fatalf("case %d: unsupported alternative %q", i, c.Alternative)
		}
		p, odds := FisherExact(c.Table)
		e := relErr(p, c.P)
		if e > 1e-9 {
			t.Errorf("case %d %v: p = %.17g, SciPy %.17g (relative error %.3g)", i, c.Table, p, c.P, e)
		}
		worst = math.Max(worst, e)
		if relErr(odds, c.OddsRatio) > 1e-12 {
			t.Errorf("case %d %v: odds ratio = %v, SciPy %v", i, c.Table, odds, c.OddsRatio)
		}
	}
	t.Logf("SciPy %s: max relative error Fisher p %.2g", ref.SciPyVersion, worst)
}
