package workers

import (
	"context"
	"sync/atomic"
	"testing"
)

func TestEachRunsEveryIndexOnce(t *testing.T) {
	for _, n := range []int{0, 1, 7, 1000} {
		seen := make([]int32, n)
		var scratches atomic.Int32
		Each(context.Background(), n, func() *int { scratches.Add(1); return new(int) }, func(i int, s *int) {
			atomic.AddInt32(&seen[i], 1)
			*s++
		})
		for i, c := range seen {
			if c != 1 {
				t.Fatalf("n = %d: index %d ran %d times", n, i, c)
			}
		}
		if n == 0 && scratches.Load() != 0 {
			t.Errorf("n = 0 started %d workers", scratches.Load())
		}
	}
}

func TestEachStopsWhenCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	var ran atomic.Int64
	Each(ctx, 1_000_000, func() struct{} { return struct{}{} }, func(i int, _ struct{}) {
		if ran.Add(1) == 10 {
			cancel()
		}
	})
	// Each goroutine may finish the job it holds when cancel happens.
	if n := ran.Load(); n > 10+64 {
		t.Errorf("ran %d jobs after cancelling at the 10th", n)
	}
}

func TestCounterReportsEveryJobInOrder(t *testing.T) {
	var got []int
	finished := Counter(func(done int) { got = append(got, done) })
	Each(context.Background(), 500, func() struct{} { return struct{}{} }, func(int, struct{}) { finished() })
	if len(got) != 500 {
		t.Fatalf("%d reports for 500 jobs", len(got))
	}
	for i, d := range got {
		if d != i+1 {
			t.Fatalf("report %d said %d", i, d)
		}
	}
	Counter(nil)() // no report: does nothing
}
