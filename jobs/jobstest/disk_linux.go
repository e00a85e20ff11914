// Package jobstest has helpers for tests of the job engine and of the
// programs on it: a small disk that a test can fill, for real disk-full
// faults rather than simulated ones.
package jobstest

import (
	"errors"
	"os"
	"path/filepath"
	"syscall"
	"testing"
)

// MountSmallDisk mounts a tmpfs of size (in mount(8)'s notation, e.g.
// "16m") on a new temporary directory and returns it; the cleanup
// unmounts it. Mount it before starting anything whose own cleanup must
// run while it is still mounted (cleanups run last registered first).
// Mounting needs root and CAP_SYS_ADMIN: without them the test is
// skipped, saying why.
func MountSmallDisk(t testing.TB, size string) string {
	t.Helper()
	if os.Geteuid() != 0 {
		t.Skip("mounting a small tmpfs to fill needs root")
	}
	dir := t.TempDir()
	if err := syscall.Mount("tmpfs", dir, "tmpfs", 0, "size="+size+",mode=0700"); err != nil {
		t.Skipf("cannot mount a tmpfs to fill (%v); this kernel or container does not allow it", err)
	}
	t.Cleanup(func() {
		if err := syscall.Unmount(dir, syscall.MNT_DETACH); err != nil {
			t.Errorf("unmount %s: %v", dir, err)
		}
	})
	return dir
}

// Fill writes a file into dir until at most headroom bytes are left free
// on its file system (0: until it is full), and returns the file's path;
// removing the file makes the room again.
func Fill(t testing.TB, dir string, headroom int64) string {
	t.Helper()
	var fs syscall.Statfs_t
	if err := syscall.Statfs(dir, &fs); err != nil {
		t.Fatal(err)
	}
	free := int64(fs.Bavail) * fs.Bsize
	if free < headroom {
		t.Fatalf("only %d bytes free on %s; want more than %d", free, dir, headroom)
	}
	path := filepath.Join(dir, "filler")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	block := make([]byte, 64<<10)
	for left := free - headroom; left > 0; left -= int64(len(block)) {
		n := min(left, int64(len(block)))
		if _, err := f.Write(block[:n]); errors.Is(err, syscall.ENOSPC) {
			break // full a little early: other files grew meanwhile
		} else if err != nil {
			t.Fatalf("fill %s: %v", dir, err)
		}
	}
	if err := f.Close(); err != nil && !errors.Is(err, syscall.ENOSPC) {
		t.Fatal(err)
	}
	return path
}
