package pipeline

import "testing"

func TestPieceBounds(t *testing.T) {
	for _, tc := range []struct {
		n, pieces int
		want      [][2]int
	}{
		{10, 1, [][2]int{{0, 10}}},
		{10, 3, [][2]int{{0, 3}, {3, 6}, {6, 10}}},
		{12, 4, [][2]int{{0, 3}, {3, 6}, {6, 9}, {9, 12}}},
		{5, 5, [][2]int{{0, 1}, {1, 2}, {2, 3}, {3, 4}, {4, 5}}},
		{480, 32, nil},
	} {
		next := 0
		for k := 1; k <= tc.pieces; k++ {
			lo, hi := Piece{K: k, N: tc.pieces}.Bounds(tc.n)
			if lo != next || hi-lo < tc.n/tc.pieces || hi-lo > tc.n/tc.pieces+1 {
				t.Errorf("%d steps, piece %d/%d: [%d, %d) (contiguous from %d, balanced)", tc.n, k, tc.pieces, lo, hi, next)
			}
			if tc.want != nil && [2]int{lo, hi} != tc.want[k-1] {
				t.Errorf("%d steps, piece %d/%d: [%d, %d), want %v", tc.n, k, tc.pieces, lo, hi, tc.want[k-1])
			}
			next = hi
		}
		if next != tc.n {
			t.Errorf("%d steps in %d pieces end at %d", tc.n, tc.pieces, next)
		}
	}
}

func TestParsePiece(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want Piece
		ok   bool
	}{
		{"2/4", Piece{2, 4}, true}, {"/8", Piece{0, 8}, true}, {"1/1", Piece{1, 1}, true},
		{"0/4", Piece{}, false}, {"5/4", Piece{}, false}, {"4", Piece{}, false}, {"a/b", Piece{}, false}, {"1/0", Piece{}, false},
	} {
		p, err := ParsePiece(tc.in)
		if (err == nil) != tc.ok || (tc.ok && p != tc.want) {
			t.Errorf("ParsePiece(%q) = %v, %v", tc.in, p, err)
		}
	}
}
