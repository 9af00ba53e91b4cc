package compute

import (
	"fmt"
	"path/filepath"
	"strings"

	"cleave/notebook/calcblock"
	"crypto/sha256"
	"encoding/hex"
	"io"
	"os"
	"sync"
)

// EngineSalt is Version plus a hash of the running executable, so that results cached or
// digested by one build of cleave are never reused by another (a changed formula or display
// rule changes the binary even when nobody remembered to bump Version). When the executable
// cannot be read, Version alone is used.
var EngineSalt = sync.OnceValue(func() string {
	p, err := os.Executable()
	if err != nil {
		return Version
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

// saltIn is EngineSalt, with the executable's hash kept in stateDir keyed by the executable's
// path, size, modification time and inode (a rebuilt binary has another), so that a check of
// an unchanged notebook does not read the whole executable every time.
func saltIn(stateDir string) string {
	if stateDir == "" {
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
