//go:build !unix

package main

import "errors"

// mkfifo: no named pipes here.
func mkfifo(string) error { return errors.New("no FIFOs on this system") }
