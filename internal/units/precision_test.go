package units

import "testing"

// The typed precision of a bar, in decimals of a metre. Imperial values are
// exact in metres because the international inch is 0.0254 m exactly
// (international yard and pound agreement, 1959): 64 in = 1.6256 m,
// 64.25 in = 1.63195 m, 72 in = 1.8288 m.
func TestMetreDecimals(t *testing.T) {
	tests := []struct {
		word string
		want int
	}{
		{"1.8", 2}, // a bar typed to the tenth still reads in centimetres
		{"1.80", 2},
		{"1.785", 3},
		{"178", 2},
		{"178.5", 3},
		{"178cm", 2},
		{"178.5cm", 3},
		{"1785mm", 3},
		{"1.78m", 2},
		{"5-4", 4},
		{"5-4.5", 4},
		{"5-4½", 4},
		{"5-4¼", 5},
		{"5' 4 1/4\"", 5},
		{"6-0", 4},
		{"nonsense", 0},
	}
	for _, tt := range tests {
		m, _ := ParseLength(tt.word)
		if got := MetreDecimals(tt.word, m); got != tt.want {
			t.Errorf("MetreDecimals(%q) = %d, want %d", tt.word, got, tt.want)
		}
	}
}
