package scatter

import (
	"context"
	"errors"
	"fmt"
	"sync/atomic"
	"testing"
)

// TestForEach checks the worker pool: every index runs once, at most the
// given number at a time, and the error reported is that of the smallest
// failed index whatever the scheduling (common practice for deterministic
// error reports from parallel loops).
func TestForEach(t *testing.T) {
	for _, workers := range []int{1, 2, 5} {
		var ran [40]int32
		var live, peak int32
		err := forEach(context.Background(), len(ran), workers, func(_ context.Context, i int) error {
			n := atomic.AddInt32(&live, 1)
			for {
				p := atomic.LoadInt32(&peak)
				if n <= p || atomic.CompareAndSwapInt32(&peak, p, n) {
					break
				}
			}
			atomic.AddInt32(&ran[i], 1)
			atomic.AddInt32(&live, -1)
			return nil
		})
		if err != nil {
			t.Fatalf("%d workers: %v", workers, err)
		}
		for i, n := range ran {
			if n != 1 {
				t.Fatalf("%d workers: index %d ran %d times, want once", workers, i, n)
			}
		}
		if peak > int32(workers) {
			t.Errorf("%d workers: %d calls at once", workers, peak)
		}
	}
	// Indices 3 and 7 fail; with one worker 7 never runs, with two it may:
	// either way the error is index 3's.
	for _, workers := range []int{1, 2, 4} {
		err := forEach(context.Background(), 10, workers, func(_ context.Context, i int) error {
			if i == 3 || i == 7 {
				return fmt.Errorf("index %d", i)
			}
			return nil
		})
		if err == nil || err.Error() != "index 3" {
			t.Errorf("%d workers: error %v, want index 3", workers, err)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var calls int32
	err := forEach(ctx, 10, 2, func(context.Context, int) error { atomic.AddInt32(&calls, 1); return nil })
	if !errors.Is(err, context.Canceled) || calls != 0 {
		t.Errorf("cancelled: error %v after %d calls, want context.Canceled and none", err, calls)
	}
}
