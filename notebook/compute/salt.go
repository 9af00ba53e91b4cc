package compute

import (
	"bytes"
	"crypto/sha256"
	"debug/elf"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"sync"

	"cleave/notebook/calcblock"
)

// EngineSalt is Version plus a fingerprint of the running executable, so that results cached
// or digested by one build of cleave are never reused by another (a changed formula or display
// rule changes the binary even when nobody remembered to bump Version). The fingerprint is the
// Go build ID the toolchain writes into every binary it links (it changes with any input of
// the build, which is how the go command's own cache tells builds apart); a binary without
// one is hashed whole. When the executable cannot be read, Version alone is used.
var EngineSalt = sync.OnceValue(func() string {
	p, err := os.Executable()
	if err != nil {
		return Version
	}
	if id := goBuildID(p); id != "" {
		sum := sha256.Sum256([]byte(id))
		return Version + " id:" + hex.EncodeToString(sum[:])[:16]
	}
	f, err := os.Open(p)
	if err != nil {
		return Version
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return Version
	}
	return Version + " " + hex.EncodeToString(h.Sum(nil))[:16]
})

// goBuildID reads the Go build ID of the executable at path: from the ELF note the linker
// writes (".note.go.buildid": name "Go", type 4), or, in other formats, from the
// `\xff Go build ID: "…"\n \xff` string the linker puts at the start of the text, within the
// first 32 KiB. It is "" when there is none (a binary linked with -buildid=).
func goBuildID(path string) string {
	if f, err := elf.Open(path); err == nil {
		defer f.Close()
		s := f.Section(".note.go.buildid")
		if s == nil {
			return ""
		}
		d, err := s.Data()
		if err != nil || len(d) < 16 {
			return ""
		}
		bo := f.ByteOrder
		namesz, descsz, typ := bo.Uint32(d[0:]), bo.Uint32(d[4:]), bo.Uint32(d[8:])
		off := 12 + int(namesz+3)&^3
		if typ != 4 || namesz != 4 || string(d[12:15]) != "Go\x00" || off+int(descsz) > len(d) {
			return ""
		}
		return string(d[off : off+int(descsz)])
	}
	f, err := os.Open(path)
	if err != nil {
		return ""
	}
	defer f.Close()
	buf := make([]byte, 32<<10)
	n, _ := io.ReadFull(f, buf)
	buf = buf[:n]
	const start, end = "\xff Go build ID: \"", "\"\n \xff"
	i := bytes.Index(buf, []byte(start))
	if i < 0 {
		return ""
	}
	j := bytes.Index(buf[i+len(start):], []byte(end))
	if j < 0 {
		return ""
	}
	return string(buf[i+len(start) : i+len(start)+j])
}

// saltIn is EngineSalt. When the executable has no build ID and must be hashed whole, the
// hash is kept in stateDir keyed by the executable's path, size, modification time and inode
// (a rebuilt binary has another), so that a check of an unchanged notebook does not read the
// whole executable every time.
func saltIn(stateDir string) string {
	if stateDir == "" || buildIDSalt() {
		return EngineSalt()
	}
	p, err := os.Executable()
	if err != nil {
		return EngineSalt()
	}
	fi, err := os.Stat(p)
	if err != nil {
		return EngineSalt()
	}
	stamp := fmt.Sprintf("%s\x00%d\x00%d\x00%d", p, fi.Size(), fi.ModTime().UnixNano(), inode(fi))
	file := filepath.Join(stateDir, "engine")
	if b, err := os.ReadFile(file); err == nil {
		if st, salt, ok := strings.Cut(string(b), "\n"); ok && st == stamp && strings.HasPrefix(salt, Version+" ") {
			return salt
		}
	}
	salt := EngineSalt()
	if os.MkdirAll(stateDir, 0o755) == nil {
		_ = calcblock.ReplaceFile(file, []byte(stamp+"\n"+salt)) // only saves time
	}
	return salt
}

// buildIDSalt reports whether EngineSalt comes from the build ID (cheap to make every run).
func buildIDSalt() bool { return strings.HasPrefix(EngineSalt(), Version+" id:") }
