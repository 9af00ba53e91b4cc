//go:build !unix

package calcblock

import "os"

// ReadFile reads the whole named file (os.ReadFile; see the Unix version).
func ReadFile(name string) ([]byte, error) { return os.ReadFile(name) }
