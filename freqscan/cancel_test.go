package freqscan

import (
	"context"
	"errors"
	"testing"
)

// ScanContext gives the points of Scan on a grid of several chunks, and a cancelled
// context stops it with context.Canceled.
func TestScanContext(t *testing.T) {
	t.Parallel()
	n := referenceNetwork(false)
	freqs := LinearGrid(nil, 1, 2500, 2*ScanChunk+17) // three chunks, the last partial
	want := Scan(nil, n, freqs)
	got, err := ScanContext(context.Background(), nil, n, freqs)
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("point %d: %+v, want %+v (identical: the same evaluation)", i, got[i], want[i])
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := ScanContext(ctx, nil, n, freqs); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: error %v, want context.Canceled", err)
	}
}
