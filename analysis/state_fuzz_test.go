package analysis

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"testing"
)

// stateFile frames body as a run state file (the header of encodeState).
func stateFile(body []byte) []byte {
	sum := sha256.Sum256(body)
	return append([]byte(fmt.Sprintf("%s\nlength %0*d\nsha256 %s\n\n", stateFormat, stateLengthDigits, len(body), hex.EncodeToString(sum[:]))), body...)
}

// The run state header decoder accepts exactly the files whose header
// names this format and whose length and SHA-256 match the body, and never
// panics.
func FuzzDecodeStateFile(f *testing.F) {
	f.Add(stateFile([]byte("a gob body")))
	f.Add(stateFile(nil))
	f.Add([]byte("lidscope-run-state/3\nlength 1\nsha256 0\n\nx"))
	f.Add([]byte{})
	f.Fuzz(func(t *testing.T, b []byte) {
		body, err := decodeStateFile("fuzz", b)
		if err != nil {
			return
		}
		if !bytes.Equal(stateFile(body), b) {
			t.Errorf("accepted a file that is not the framing of its body: %q", b)
		}
	})
}
