//go:build unix

package main

import "syscall"

// mkfifo makes a named pipe (a FIFO) at p.
func mkfifo(p string) error { return syscall.Mkfifo(p, 0o644) }
