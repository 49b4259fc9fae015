package main

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
)

// Where an output really goes. Atomic replacement (a temporary file renamed
// over the target) is for regular files only: a symlink is followed and
// its target replaced atomically in the target's folder, so the link stays
// a link; a device, FIFO or socket is written in place, so /dev/null stays
// a device and a FIFO's reader gets the report.

// resolveTarget follows symlinks at path, dangling ones too, and returns
// the final path and what is there (nil when nothing is).
func resolveTarget(path string) (string, fs.FileInfo, error) {
	for hops := 0; hops < 40; hops++ {
		st, err := os.Lstat(path)
		if errors.Is(err, fs.ErrNotExist) {
			return path, nil, nil
		}
		if err != nil {
			return path, nil, err
		}
		if st.Mode()&fs.ModeSymlink == 0 {
			return path, st, nil
		}
		link, err := os.Readlink(path)
		if err != nil {
			return path, nil, err
		}
		if !filepath.IsAbs(link) {
			link = filepath.Join(filepath.Dir(path), link)
		}
		path = link
	}
	return path, nil, fmt.Errorf("too many levels of symbolic links")
}

// checkWritable says, before any work, whether an output can be written at
// path: its folder exists and takes a new file (a regular target), or the
// non-regular file there opens for writing (a FIFO is not opened: that
// would wait for a reader). A folder is refused.
func checkWritable(path, what string) error {
	target, st, err := resolveTarget(path)
	if err != nil {
		return usagef("%s %s: %v", what, path, err)
	}
	switch {
	case st != nil && st.IsDir():
		return usagef("%s %s is a folder; give a file name", what, path)
	case st != nil && st.Mode()&fs.ModeNamedPipe != 0:
		return nil
	case st != nil && !st.Mode().IsRegular():
		f, err := os.OpenFile(target, os.O_WRONLY, 0)
		if err != nil {
			return usagef("%s %s cannot be written: %v", what, path, unwrapPathError(err))
		}
		return f.Close()
	}
	dir := filepath.Dir(target)
	if dst, err := os.Stat(dir); err != nil || !dst.IsDir() {
		return usagef("%s %s: the folder %s does not exist; create it first", what, path, dir)
	}
	probe, err := os.CreateTemp(dir, ".borel-probe-*")
	if err != nil {
		return usagef("%s %s cannot be written: %v", what, path, unwrapPathError(err))
	}
	probe.Close()
	return os.Remove(probe.Name())
}

// checkPlotFolder says, before any work, whether the plots can go to dir:
// an existing folder that takes files, or a new one whose nearest existing
// parent does.
func checkPlotFolder(dir string) error {
	st, err := os.Stat(dir)
	if err == nil && !st.IsDir() {
		return usagef("--plots %s is a file, not a folder; give a folder (it is created if missing)", dir)
	}
	probeDir := dir
	for err != nil {
		parent := filepath.Dir(probeDir)
		if parent == probeDir {
			break
		}
		probeDir = parent
		st, err = os.Stat(probeDir)
		if err == nil && !st.IsDir() {
			return usagef("--plots %s: %s is a file, not a folder", dir, probeDir)
		}
	}
	probe, err := os.CreateTemp(probeDir, ".borel-probe-*")
	if err != nil {
		return usagef("--plots %s cannot be written: %v", dir, unwrapPathError(err))
	}
	probe.Close()
	return os.Remove(probe.Name())
}

// writeInPlace writes data into a non-regular file (a device, a FIFO).
func writeInPlace(path string, data []byte) error {
	return writeInPlaceFunc(path, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}

// writeInPlaceFunc is writeInPlace for output made as it is written.
func writeInPlaceFunc(path string, write func(io.Writer) error) error {
	f, err := os.OpenFile(path, os.O_WRONLY, 0)
	if err != nil {
		return fmt.Errorf("cannot write %s: %v", path, unwrapPathError(err))
	}
	if err := write(f); err != nil {
		f.Close()
		return fmt.Errorf("cannot write %s: %v", path, err)
	}
	return f.Close()
}
