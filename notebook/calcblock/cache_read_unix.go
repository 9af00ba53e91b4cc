//go:build unix

package calcblock

import (
	"io/fs"
	"syscall"
)

// ReadFile reads the whole named file, like os.ReadFile, with fewer system
// calls: open, read until end of file, close (and one fstat for a file larger
// than 4 KiB). os.ReadFile also sets and
// clears non-blocking mode, tries the network poller and asks for the size,
// which on a virtual machine costs more than the read itself when a check
// reads ten thousand small files.
func ReadFile(name string) ([]byte, error) {
	var fd int
	var err error
	for {
		// O_NONBLOCK: a FIFO put where a file was expected must not block the open (for a
		// regular file the flag changes nothing).
		fd, err = syscall.Open(name, syscall.O_RDONLY|syscall.O_CLOEXEC|syscall.O_NONBLOCK, 0)
		if err != syscall.EINTR {
			break
		}
	}
	if err != nil {
		return nil, &fs.PathError{Op: "open", Path: name, Err: err}
	}
	defer syscall.Close(fd)
	buf := make([]byte, 0, 4096)
	sized := false
	for {
		if len(buf) == cap(buf) {
			// More than a small file: ask for the size once, then grow by doubling.
			want := 2 * cap(buf)
			var st syscall.Stat_t
			if !sized && syscall.Fstat(fd, &st) == nil && int(st.Size) >= cap(buf) {
				want = int(st.Size) + 512
			}
			sized = true
			nb := make([]byte, len(buf), want)
			copy(nb, buf)
			buf = nb
		}
		n, err := syscall.Read(fd, buf[len(buf):cap(buf)])
		if err == syscall.EINTR {
			continue
		}
		if err != nil {
			return nil, &fs.PathError{Op: "read", Path: name, Err: err}
		}
		if n == 0 {
			return buf, nil
		}
		buf = buf[:len(buf)+n]
	}
}
