package gzin

import (
	"bytes"
	"compress/gzip"
	"io"
	"strings"
	"testing"
)

// TestReader: plain text passes through; gzip (two members, written by
// the standard library's writer, RFC 1952) is inflated; a stream cut in
// its header or its data is Cut, a flipped checksum Damaged.
func TestReader(t *testing.T) {
	var z bytes.Buffer
	for _, part := range []string{"alpha\n", "beta\n"} {
		w := gzip.NewWriter(&z)
		w.Write([]byte(part))
		w.Close()
	}
	read := func(b []byte) (string, bool, error) {
		br, gz, err := Reader(bytes.NewReader(b), 4096)
		if err != nil {
			return "", gz, err
		}
		out, err := io.ReadAll(br)
		return string(out), gz, err
	}
	if s, gz, err := read([]byte("plain\n")); s != "plain\n" || gz || err != nil {
		t.Errorf("plain: %q %v %v", s, gz, err)
	}
	if s, gz, err := read(z.Bytes()); s != "alpha\nbeta\n" || !gz || err != nil {
		t.Errorf("gzip: %q %v %v", s, gz, err)
	}
	for _, cut := range []int{2, 5, z.Len() - 3} {
		if _, _, err := read(z.Bytes()[:cut]); !Cut(err) || Damaged(err) {
			t.Errorf("cut at %d: %v, want Cut", cut, err)
		}
	}
	bad := bytes.Clone(z.Bytes())
	bad[len(bad)-6] ^= 1 // CRC32 of the second member
	if _, _, err := read(bad); !Damaged(err) || !strings.Contains(err.Error(), "checksum") {
		t.Errorf("bad CRC: %v, want Damaged", err)
	}
}
