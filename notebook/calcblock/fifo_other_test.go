//go:build !unix

package calcblock

import "errors"

func mkfifo(string) error { return errors.New("no FIFOs on this system") }
