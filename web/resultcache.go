package web

import "golang.org/x/sync/singleflight"

// resultCache is an LRU of values by canonical key whose concurrent misses
// on one key share a single computation: a page and the figures it embeds,
// asked for at once, compute their result once, and two colleagues opening
// the same shared link do too. Safe for concurrent use.
type resultCache[V any] struct {
	lru   *lru[V]
	group singleflight.Group
}

// newResultCache returns an empty cache holding at most capacity values.
func newResultCache[V any](capacity int) *resultCache[V] {
	return &resultCache[V]{lru: newLRU[V](capacity)}
}

// get returns the value for key, calling run on a miss. Concurrent calls
// with one key share a single run and its result, so the run has the
// context of the first caller; if that caller is canceled the others get
// its error too. Errors are not kept, so a canceled or failed run is
// retried by the next call.
func (c *resultCache[V]) get(key string, run func() (V, error)) (V, error) {
	if v, ok := c.lru.Get(key); ok {
		return v, nil
	}
	v, err, _ := c.group.Do(key, func() (any, error) {
		// A caller that lost the race to the previous Do may find it filled.
		if v, ok := c.lru.Get(key); ok {
			return v, nil
		}
		v, err := run()
		if err != nil {
			return nil, err
		}
		c.lru.Add(key, v)
		return v, nil
	})
	if err != nil {
		var zero V
		return zero, err
	}
	return v.(V), nil
}
