package hooks

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os/exec"
	"strconv"
	"strings"
	"sync"
)

// catFile reads objects through one long-running `git cat-file --batch`: a request is an
// object id on a line, the answer a header line and the object's bytes. It is safe for
// concurrent use (requests are served one at a time).
type catFile struct {
	mu   sync.Mutex
	cmd  *exec.Cmd
	in   io.WriteCloser
	out  *bufio.Reader
	errb strings.Builder
	dead error
}

func startCatFile(g gitCmd) (*catFile, error) {
	c := &catFile{cmd: g.command("cat-file", "--batch")}
	var err error
	if c.in, err = c.cmd.StdinPipe(); err != nil {
		return nil, err
	}
	stdout, err := c.cmd.StdoutPipe()
	if err != nil {
		return nil, err
	}
	c.cmd.Stderr = &c.errb
	if err := c.cmd.Start(); err != nil {
		if errors.Is(err, exec.ErrNotFound) {
			return nil, ErrNoGit
		}
		return nil, err
	}
	c.out = bufio.NewReaderSize(stdout, 1<<16)
	return c, nil
}

// read returns the content of the blob with the given id.
func (c *catFile) read(oid string) ([]byte, error) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.dead != nil {
		return nil, c.dead
	}
	if _, err := io.WriteString(c.in, oid+"\n"); err != nil {
		return nil, c.fail(err)
	}
	return c.answer(oid)
}

// readMany reads several objects in one stream: the requests are written while the answers are
// read, so the cost is one pass through git rather than one round trip per object.
func (c *catFile) readMany(oids []string) ([][]byte, error) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.dead != nil {
		return nil, c.dead
	}
	werr := make(chan error, 1)
	go func() {
		w := bufio.NewWriterSize(c.in, 1<<16)
		for _, id := range oids {
			if _, err := w.WriteString(id + "\n"); err != nil {
				werr <- err
				return
			}
		}
		werr <- w.Flush()
	}()
	out := make([][]byte, len(oids))
	for i, id := range oids {
		var err error
		if out[i], err = c.answer(id); err != nil {
			// Stop git reading the rest of the requests, so the writer cannot block.
			c.in.Close()
			<-werr
			return nil, err
		}
	}
	if err := <-werr; err != nil {
		return nil, c.fail(err)
	}
	return out, nil
}

// answer reads the answer to a request for oid.
func (c *catFile) answer(oid string) ([]byte, error) {
	head, err := c.out.ReadString('\n')
	if err != nil {
		return nil, c.fail(err)
	}
	f := strings.Fields(head)
	if len(f) == 2 && f[1] == "missing" {
		return nil, fmt.Errorf("object %s is missing from the repository", oid)
	}
	if len(f) != 3 {
		return nil, c.fail(fmt.Errorf("unexpected answer %q", head))
	}
	size, err := strconv.Atoi(f[2])
	if err != nil {
		return nil, c.fail(fmt.Errorf("unexpected answer %q", head))
	}
	b := make([]byte, size+1) // the object and its newline
	if _, err := io.ReadFull(c.out, b); err != nil {
		return nil, c.fail(err)
	}
	return b[:size], nil
}

func (c *catFile) fail(err error) error {
	c.dead = fmt.Errorf("git cat-file --batch: %w %s", err, strings.TrimSpace(c.errb.String()))
	return c.dead
}

// close ends the git process.
func (c *catFile) close() error {
	c.mu.Lock()
	defer c.mu.Unlock()
	c.in.Close()
	err := c.cmd.Wait()
	if c.dead == nil {
		c.dead = errors.New("git cat-file: closed")
	}
	return err
}
