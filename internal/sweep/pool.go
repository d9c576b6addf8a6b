package sweep

import (
	"context"
	"runtime"
	"sync"
)

// Map calls step(ctx, i) for i = 0…n−1 on at most workers goroutines
// (workers ≤ 0 means GOMAXPROCS) and waits for them. It stops handing out
// steps once ctx ends or a step fails, and returns the first error (or the
// context's error). Steps must check ctx themselves to stop inside a long
// step.
//
// progress, if not nil, is called after each completed step with the number
// done so far and n. The calls never overlap and done increases by one each
// time, so progress may write to a shared writer without a lock; it runs on
// a worker goroutine, so it should be quick.
func Map(ctx context.Context, n, workers int, step func(ctx context.Context, i int) error, progress func(done, total int)) error {
	if n < 0 {
		panic("sweep: negative number of steps")
	}
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, n)
	ctx, cancel := context.WithCancelCause(ctx)
	defer cancel(nil)

	next := make(chan int)
	var (
		wg       sync.WaitGroup
		mu       sync.Mutex // serialises progress and guards done
		done     int
		firstErr error
		errOnce  sync.Once
	)
	fail := func(err error) {
		errOnce.Do(func() { firstErr = err; cancel(err) })
	}
	for range workers {
		wg.Go(func() {
			for i := range next {
				if ctx.Err() != nil {
					continue // drain: the feeder stops soon
				}
				if err := step(ctx, i); err != nil {
					fail(err)
					continue
				}
				mu.Lock()
				done++
				if progress != nil {
					progress(done, n)
				}
				mu.Unlock()
			}
		})
	}
feed:
	for i := range n {
		select {
		case next <- i:
		case <-ctx.Done():
			break feed
		}
	}
	close(next)
	wg.Wait()
	if firstErr != nil {
		return firstErr
	}
	if done < n {
		// Only the context stops steps without an error of their own.
		return ctx.Err()
	}
	return nil
}
