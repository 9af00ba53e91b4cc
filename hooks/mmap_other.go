//go:build !unix

package hooks

import "os"

// mapFile reads a file into memory (no memory mapping on this system).
func mapFile(name string) ([]byte, func() error, error) {
	data, err := os.ReadFile(name)
	return data, func() error { return nil }, err
}
