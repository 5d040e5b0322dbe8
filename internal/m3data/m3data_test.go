package m3data

import "testing"

// TestCounts checks the files against the counts in the data's README
// (../shared/data/m3/README.md): 645 yearly series with horizon 6, 756
// quarterly with 8, 1428 monthly with 18, 174 other with 8; series N1 is
// yearly with 14 training values (M3's shortest yearly length).
func TestCounts(t *testing.T) {
	tests := []struct {
		file    string
		series  int
		horizon int
	}{
		{"m3_yearly.csv", 645, 6},
		{"m3_quarterly.csv", 756, 8},
		{"m3_monthly.csv", 1428, 18},
		{"m3_other.csv", 174, 8},
	}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			ss := Load(t, tc.file)
			if len(ss) != tc.series {
				t.Fatalf("%d series, want %d", len(ss), tc.series)
			}
			for _, s := range ss {
				if len(s.Test) != tc.horizon {
					t.Fatalf("%s: %d test values, want %d", s.ID, len(s.Test), tc.horizon)
				}
			}
		})
	}
	if y := Load(t, "m3_yearly.csv"); y[0].ID != "N1" || len(y[0].Train) != 14 {
		t.Errorf("first yearly series %s has %d training values, want N1 with 14", y[0].ID, len(y[0].Train))
	}
}
