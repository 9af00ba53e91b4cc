package parallel

import (
	"fmt"
	"sync/atomic"
	"testing"
)

// Every index is visited exactly once, for any number of workers and items.
func TestForNVisitsEachIndexOnce(t *testing.T) {
	for _, workers := range []int{0, 1, 2, 3, 8, 100} {
		for _, n := range []int{0, 1, 2, 7, 1000} {
			seen := make([]atomic.Int32, n)
			ForN(workers, n, func(i int) { seen[i].Add(1) })
			for i := range seen {
				if c := seen[i].Load(); c != 1 {
					t.Fatalf("workers %d, n %d: index %d visited %d times", workers, n, i, c)
				}
			}
		}
	}
}

func ExampleFor() {
	squares := make([]int, 5)
	For(len(squares), func(i int) { squares[i] = i * i }) // each call writes its own slot
	fmt.Println(squares)
	// Output: [0 1 4 9 16]
}
