package structured

import (
	"math"
	"os"
	"os/exec"
	"strconv"
	"strings"
	"testing"
)

// GrowthFor against scipy.optimize.brentq (Debian python3-scipy) solving
// h (rⁿ − 1)/(r − 1) = D for the same cases; under CI a missing scipy fails.
func TestGrowthForAgainstScipy(t *testing.T) {
	cases := [][3]float64{{1e-5, 120, 20}, {2e-4, 100, 20}, {1e-3, 40, 0.5}, {0.01, 10, 0.3}}
	var prog strings.Builder
	prog.WriteString("from scipy.optimize import brentq\n")
	for _, c := range cases {
		prog.WriteString("print(repr(brentq(lambda r: " + ftoa(c[0]) + "*(r**" + ftoa(c[1]) + "-1)/(r-1)-" + ftoa(c[2]) + ", 1+1e-9, 3, xtol=1e-15, rtol=1e-15)))\n")
	}
	out, err := exec.Command("/usr/bin/python3", "-c", prog.String()).Output()
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("scipy reference not available under CI: %v", err)
		}
		t.Skipf("scipy reference not available: %v", err)
	}
	lines := strings.Fields(string(out))
	for k, c := range cases {
		want, err := strconv.ParseFloat(lines[k], 64)
		if err != nil {
			t.Fatal(err)
		}
		got, err := GrowthFor(c[0], int(c[1]), c[2])
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(got-want) > 1e-12*want {
			t.Errorf("GrowthFor(%g, %g, %g) = %.15g, scipy %.15g", c[0], c[1], c[2], got, want)
		}
	}
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// LayersFor: the fewest layers reaching D, checked by summing the series
// directly (the definition), and the error cases.
func TestLayersFor(t *testing.T) {
	for _, c := range [][3]float64{{1e-3, 1.1, 0.5}, {1e-3, 1, 0.05}, {2e-4, 1.2, 20}} {
		n, err := LayersFor(c[0], c[1], c[2])
		if err != nil {
			t.Fatal(err)
		}
		total := 0.0
		for _, h := range GeometricHeights(c[0], c[1], n) {
			total += h
		}
		prev := total - c[0]*math.Pow(c[1], float64(n-1))
		if total < c[2]*(1-1e-12) || prev >= c[2] {
			t.Errorf("LayersFor%v = %d: %d layers reach %g, %d reach %g", c, n, n, total, n-1, prev)
		}
	}
	if _, err := LayersFor(1, 1.1, 0.5); err == nil || !strings.Contains(err.Error(), "larger than the outer distance") {
		t.Errorf("error %v", err)
	}
	if _, err := GrowthFor(1e-3, 0, 1); err == nil {
		t.Error("zero layers accepted")
	}
}
