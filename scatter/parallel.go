package scatter

import (
	"context"
	"sync"
)

// forEach calls do(ctx, i) for every i in [0, n) on at most workers
// goroutines at once and waits for them. It stops handing out indices once
// ctx is done or a call has failed, and returns the error of the smallest
// failed index (ctx's error when cancellation stopped it first), so that
// the error does not depend on the scheduling.
func forEach(ctx context.Context, n, workers int, do func(ctx context.Context, i int) error) error {
	workers = max(1, min(workers, n))
	errs := make([]error, n)
	var (
		mu     sync.Mutex
		next   int
		failed bool
		wg     sync.WaitGroup
	)
	take := func() (int, bool) {
		mu.Lock()
		defer mu.Unlock()
		if failed || next >= n || ctx.Err() != nil {
			return 0, false
		}
		next++
		return next - 1, true
	}
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i, ok := take()
				if !ok {
					return
				}
				if err := do(ctx, i); err != nil {
					errs[i] = err
					mu.Lock()
					failed = true
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return ctx.Err()
}
