package testutil_test

import (
	"fmt"

	"cleave/internal/testutil"
)

// What a golden-file failure says: the first line that differs, both lines quoted.
func ExampleFirstDiff() {
	want := []byte("n = 3.0000e11 cm^-2\nmu = 2.0805e6 cm^2/(V s)\n")
	got := []byte("n = 3.0000e11 cm^-2\nmu = 2.0806e6 cm^2/(V s)\n")
	fmt.Println(testutil.FirstDiff(got, want))
	fmt.Printf("%q\n", testutil.FirstDiff(want, want))
	// Output:
	// line 2:
	//  got: "mu = 2.0806e6 cm^2/(V s)"
	// want: "mu = 2.0805e6 cm^2/(V s)"
	// ""
}

// Tolerances: relative to the larger magnitude, or absolute in the numbers' own unit; a
// want of 0 needs an absolute tolerance.
func ExampleWithin() {
	// l_B at 1 T is 25.6556 nm to the digits given (calc/SOURCES.md [src:W1]).
	fmt.Println(testutil.WithinRel(25.65564e-9, 25.6556e-9, 1e-4))
	fmt.Println(testutil.WithinRel(1e-9, 0, 1e-4))
	fmt.Println(testutil.Within(1e-9, 0, 1e-6, 1e-4))
	// Output:
	// true
	// false
	// true
}
