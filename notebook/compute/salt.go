package compute

import (
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
