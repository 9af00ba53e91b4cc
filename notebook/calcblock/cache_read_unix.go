//go:build unix

package calcblock

import (
	"io/fs"
	"sync"
	"syscall"
)

// scratch holds the buffers ReadFile reads small files into before copying them to a slice
// of their exact length: ten thousand small files then allocate what they hold, not 4 KiB
// each.
var scratch = sync.Pool{New: func() any { b := make([]byte, 16<<10); return &b }}

// ReadFile reads the whole named file, like os.ReadFile, with fewer system
// calls: open, read until end of file, close (and one fstat for a file larger
// than 16 KiB). os.ReadFile also sets and
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
	sp := scratch.Get().(*[]byte)
	defer scratch.Put(sp)
	buf := (*sp)[:0]
	owned := false // buf is our own allocation, not the scratch buffer
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
			buf, owned = nb, true
		}
		n, err := syscall.Read(fd, buf[len(buf):cap(buf)])
		if err == syscall.EINTR {
			continue
		}
		if err != nil {
			return nil, &fs.PathError{Op: "read", Path: name, Err: err}
		}
		if n == 0 {
			if owned {
				return buf, nil
			}
			out := make([]byte, len(buf))
			copy(out, buf)
			return out, nil
		}
		buf = buf[:len(buf)+n]
	}
}
