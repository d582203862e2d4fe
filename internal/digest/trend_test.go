package digest

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Anscombe F.J. (1973), Graphs in statistical analysis, The American
// Statistician 27(1):17-21, the paper's data table: four sets of 11 points that share
// the fitted line y = 3.00 + 0.500x. The values below are the published table
// (as distributed in R's datasets::anscombe). The paper's summary also gives
// the estimated standard error of the slope as 0.118 (from memory; it agrees
// with the same table's residual sum of squares 13.75 on 9 d.f. and
// Σ(x − x̄)² = 110: √(13.75/9/110) = 0.1179).
func TestFitLineAnscombe(t *testing.T) {
	anscombe := []struct {
		name string
		x, y []float64
	}{
		{"I", []float64{10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5},
			[]float64{8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68}},
		{"II", []float64{10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5},
			[]float64{9.14, 8.14, 8.74, 8.77, 9.26, 8.10, 6.13, 3.10, 9.13, 7.26, 4.74}},
		{"III", []float64{10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5},
			[]float64{7.46, 6.77, 12.74, 7.11, 7.81, 8.84, 6.08, 5.39, 8.15, 6.42, 5.73}},
		{"IV", []float64{8, 8, 8, 8, 8, 8, 8, 19, 8, 8, 8},
			[]float64{6.58, 5.76, 7.71, 8.84, 8.47, 7.04, 5.25, 12.50, 5.56, 7.91, 6.89}},
	}
	for _, set := range anscombe {
		l, err := fitLine(set.x, set.y)
		if err != nil {
			t.Fatalf("set %s: %v", set.name, err)
		}
		// The paper prints three significant figures: 3.00, 0.500, 0.118.
		if math.Abs(l.intercept-3.00) > 0.005 {
			t.Errorf("set %s: intercept %.4f, want 3.00", set.name, l.intercept)
		}
		if math.Abs(l.slope-0.500) > 0.0005 {
			t.Errorf("set %s: slope %.5f, want 0.500", set.name, l.slope)
		}
		if math.Abs(l.stdErr-0.118) > 0.0005 {
			t.Errorf("set %s: SE(slope) %.5f, want 0.118", set.name, l.stdErr)
		}
	}
}

// Worked by hand from the least-squares formulas b = Sxy/Sxx, a = ȳ − b·x̄:
// points (0, 1), (1, 3), (2, 2): x̄ = 1, ȳ = 2,
// Sxy = (−1)(−1) + (0)(1) + (1)(0) = 1, Sxx = 1 + 0 + 1 = 2, so b = 0.5, a = 1.5;
// fitted 1.5, 2.0, 2.5, residuals −0.5, 1.0, −0.5, Σr² = 1.5, s² = 1.5/(3 − 2),
// SE(b) = √(s²/Sxx) = √0.75 = 0.8660254.
func TestFitLineByHand(t *testing.T) {
	l, err := fitLine([]float64{0, 1, 2}, []float64{1, 3, 2})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(l.slope-0.5) > 1e-12 || math.Abs(l.intercept-1.5) > 1e-12 || math.Abs(l.stdErr-math.Sqrt(0.75)) > 1e-12 {
		t.Errorf("fit = %+v, want slope 0.5, intercept 1.5, SE 0.8660254", l)
	}
}

func TestFitLineTooFew(t *testing.T) {
	for _, xs := range [][]float64{nil, {1}, {2, 2, 2}} {
		ys := make([]float64, len(xs))
		if _, err := fitLine(xs, ys); !errors.Is(err, errFewPoints) {
			t.Errorf("fitLine(%v) err = %v, want errFewPoints", xs, err)
		}
	}
	if _, err := fitLine([]float64{1, 2}, []float64{1}); err == nil {
		t.Error("mismatched lengths accepted")
	}
	// Two points: a slope but no standard error.
	l, err := fitLine([]float64{0, 1}, []float64{190, 192})
	if err != nil || l.slope != 2 || !math.IsNaN(l.stdErr) {
		t.Errorf("two points: %+v, %v; want slope 2, SE NaN", l, err)
	}
}

// The reading rule documented on Trend, on hand-made series.
func TestTrendReading(t *testing.T) {
	tests := []struct {
		name string
		x, y []float64
		want Reading
		text string
	}{
		{"none", nil, nil, NotEnoughData, "not enough data (0 weeks)"},
		{"one week", []float64{7}, []float64{200}, NotEnoughData, "not enough data (1 week)"},
		{"three weeks rising", []float64{0, 1, 2}, []float64{190, 192, 194}, NotEnoughData, "not enough data (3 weeks)"},
		// Exactly on a line: SE = 0 < |b| = 2.
		{"four weeks rising", []float64{0, 1, 2, 3}, []float64{190, 192, 194, 196}, Rising, "rising +2.0 ± 0.0 cm/wk (4 weeks)"},
		{"four weeks falling", []float64{0, 2, 5, 7}, []float64{200, 199, 197.5, 196.5}, Falling, "falling −0.5 ± 0.0 cm/wk (4 weeks)"},
		// b = 0 ≤ SE: flat.
		{"zig-zag", []float64{0, 1, 2, 3}, []float64{190, 194, 194, 190}, Flat, ""},
		// By hand: x̄ = 1.5, ȳ = 191.5, Sxy = (−1.5)(−1.5) + (−0.5)(2.5) + (0.5)(−1.5) + (1.5)(0.5) = 1,
		// Sxx = 5, b = 0.2, a = 191.2; residuals −1.2, 2.6, −1.6, 0.2, Σr² = 10.8,
		// SE = √(10.8/2/5) = 1.04 > 0.2: flat.
		{"noisy", []float64{0, 1, 2, 3}, []float64{190, 194, 190, 192}, Flat, "flat +0.2 ± 1.0 cm/wk (4 weeks)"},
		// By hand: Sxy = 4, Sxx = 5, b = 0.8, a = 190.3; residuals −0.3, 0.9, −0.9, 0.3,
		// Σr² = 1.8, SE = √(1.8/2/5) = 0.424: |b| = 1.9·SE, above one SE but not two: flat.
		{"between one and two SE", []float64{0, 1, 2, 3}, []float64{190, 192, 191, 193}, Flat, "flat +0.8 ± 0.4 cm/wk (4 weeks)"},
		// By hand: Sxy = 8, Sxx = 5, b = 1.6, a = 190.1; residuals −0.1, 0.3, −0.3, 0.1,
		// Σr² = 0.2, SE = √(0.2/2/5) = 0.141: |b| = 11·SE: rising.
		{"clearly rising", []float64{0, 1, 2, 3}, []float64{190, 192, 193, 195}, Rising, "rising +1.6 ± 0.1 cm/wk (4 weeks)"},
	}
	for _, tt := range tests {
		tr := trendOf(tt.x, tt.y)
		if tr.Reading != tt.want || tr.Points != len(tt.x) {
			t.Errorf("%s: %+v, want %v on %d points", tt.name, tr, tt.want, len(tt.x))
		}
		if tt.text != "" && tr.Text(false) != tt.text {
			t.Errorf("%s: Text = %q, want %q", tt.name, tr.Text(false), tt.text)
		}
	}
}

func TestMedian(t *testing.T) {
	tests := []struct {
		in   []float64
		want float64
	}{
		{[]float64{0.03}, 0.03},
		{[]float64{0.05, -0.02, 0.01}, 0.01},
		{[]float64{0.04, -0.02, 0.01, 0.02}, 0.015}, // even count: mean of 0.01 and 0.02
		{[]float64{-0.03, -0.01}, -0.02},
	}
	for _, tt := range tests {
		if got := median(append([]float64(nil), tt.in...)); math.Abs(got-tt.want) > 1e-15 {
			t.Errorf("median(%v) = %v, want %v", tt.in, got, tt.want)
		}
	}
	if !math.IsNaN(median(nil)) {
		t.Error("median of nothing is not NaN")
	}
}

// TestFitLineAgainstMatrixLeastSquares checks the fit against an independent
// computation written differently: the least-squares solution of the design
// matrix [1 x] by gonum's QR factorisation, and SE(b) from the covariance
// s²·(XᵀX)⁻¹ (Draper and Smith, Applied Regression Analysis, ch. 5), on
// uneven, gappy weeks like a digest's.
func TestFitLineAgainstMatrixLeastSquares(t *testing.T) {
	xs := []float64{0, 1, 3, 4, 5, 7}
	ys := []float64{171.5, 172, 174, 173.5, 176, 176.5}
	n := len(xs)
	X := mat.NewDense(n, 2, nil)
	for i, x := range xs {
		X.Set(i, 0, 1)
		X.Set(i, 1, x)
	}
	Y := mat.NewDense(n, 1, ys)
	var qr mat.QR
	qr.Factorize(X)
	var beta mat.Dense
	if err := qr.SolveTo(&beta, false, Y); err != nil {
		t.Fatal(err)
	}
	var fit, res mat.Dense
	fit.Mul(X, &beta)
	res.Sub(Y, &fit)
	s2 := mat.Dot(res.ColView(0), res.ColView(0)) / float64(n-2)
	var xtx, inv mat.Dense
	xtx.Mul(X.T(), X)
	if err := inv.Inverse(&xtx); err != nil {
		t.Fatal(err)
	}
	wantA, wantB, wantSE := beta.At(0, 0), beta.At(1, 0), math.Sqrt(s2*inv.At(1, 1))
	l, err := fitLine(xs, ys)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(l.intercept-wantA) > 1e-9 || math.Abs(l.slope-wantB) > 1e-9 || math.Abs(l.stdErr-wantSE) > 1e-9 {
		t.Errorf("fit a %.6f b %.6f SE %.6f; matrix a %.6f b %.6f SE %.6f", l.intercept, l.slope, l.stdErr, wantA, wantB, wantSE)
	}
}
