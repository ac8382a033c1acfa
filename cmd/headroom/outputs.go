package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

// outputs collects rendered output files so that they are written all or
// nothing: each goes to a temporary file in its destination's folder and is
// renamed into place only when every one of them was written. A failure
// leaves no half-written file and an older file of that name untouched.
type outputs struct {
	files []pendingFile
}

type pendingFile struct {
	path string // "" or "-" = stdout
	data []byte
}

func (o *outputs) add(path string, data []byte) {
	o.files = append(o.files, pendingFile{path, data})
}

// commit writes every file, then the stdout ones.
//
// Only regular files are replaced by a rename. A destination that exists
// and is not one (/dev/null, /dev/stdout, a named pipe) is written in
// place, after every regular file is ready: renaming over /dev/null would
// replace the device with a file for everyone on the machine. A symbolic
// link is followed, so the file it points to is replaced and the link
// stays.
func (o *outputs) commit(stdout io.Writer) error {
	type temp struct{ tmp, dst string }
	var temps []temp
	var special []pendingFile
	cleanup := func() {
		for _, t := range temps {
			os.Remove(t.tmp)
		}
	}
	for _, f := range o.files {
		if f.path == "" || f.path == "-" {
			continue
		}
		dst := f.path
		if st, err := os.Stat(dst); err == nil {
			if st.IsDir() {
				cleanup()
				return inputf(f.path, 0, "is a directory; give a file name for the output")
			}
			if !st.Mode().IsRegular() {
				special = append(special, f)
				continue
			}
			if real, err := filepath.EvalSymlinks(dst); err == nil {
				dst = real
			}
		}
		dir := filepath.Dir(dst)
		tf, err := os.CreateTemp(dir, "."+filepath.Base(dst)+".tmp-*")
		if err != nil {
			cleanup()
			return inputf(f.path, 0, "cannot create output: %v", unwrapPath(err))
		}
		temps = append(temps, temp{tf.Name(), dst})
		_, werr := tf.Write(f.data)
		if werr == nil {
			werr = tf.Sync() // on disk before the rename makes it visible
		}
		cerr := tf.Close()
		if werr == nil {
			werr = cerr
		}
		if werr == nil {
			werr = os.Chmod(tf.Name(), 0o644)
		}
		if werr != nil {
			cleanup()
			return inputf(f.path, 0, "cannot write output: %v", unwrapPath(werr))
		}
	}
	for i, t := range temps {
		if err := os.Rename(t.tmp, t.dst); err != nil {
			cleanup()
			return inputf(t.dst, 0, "cannot write output: %v", unwrapPath(err))
		}
		temps[i].tmp = "" // renamed: nothing to clean
	}
	for _, f := range special {
		w, err := os.OpenFile(f.path, os.O_WRONLY, 0)
		if err == nil {
			_, err = w.Write(f.data)
			if cerr := w.Close(); err == nil {
				err = cerr
			}
		}
		if err != nil {
			return inputf(f.path, 0, "cannot write output: %v", unwrapPath(err))
		}
	}
	for _, f := range o.files {
		if f.path == "" || f.path == "-" {
			if _, err := stdout.Write(f.data); err != nil {
				return fmt.Errorf("writing to standard output: %v", err)
			}
		}
	}
	return nil
}

// unwrapPath drops the *PathError wrapper (the path is already in the message).
func unwrapPath(err error) error {
	if pe, ok := err.(*os.PathError); ok {
		return pe.Err
	}
	return err
}

// refuseOverwritingInputs returns a usage error when an output would
// replace one of the inputs (the same file by path or by identity, such as
// a link): the input would be lost and the run could not be repeated.
func refuseOverwritingInputs(outs []pendingFile, inputs []string) error {
	for _, o := range outs {
		if o.path == "" || o.path == "-" {
			continue
		}
		ost, err := os.Stat(o.path)
		if err != nil {
			continue // does not exist yet: cannot be an input
		}
		for _, in := range inputs {
			if in == "-" {
				continue
			}
			if ist, err := os.Stat(in); err == nil && os.SameFile(ost, ist) {
				return usagef("output %s is also an input; write the output to another file", o.path)
			}
		}
	}
	return nil
}

// checkOutputs vets every output before any input is read, so that a long
// run does not end in an error it could have given at once: at most one
// output goes to standard output (the summary does unless -o names a
// file), no two outputs share a file, none is an input, and each can be
// created in its folder. outs are (flag, path) pairs; "" is not asked for,
// "-" is standard output, and the first pair is the summary (or the one
// output of merge).
func checkOutputs(outs [][2]string, inputs []string) error {
	var toStdout []string
	named := map[string]string{}
	for k, o := range outs {
		flag, path := o[0], o[1]
		if path == "-" || k == 0 && path == "" {
			toStdout = append(toStdout, flag)
			continue
		}
		if path == "" {
			continue
		}
		p := filepath.Clean(path)
		if prev, ok := named[p]; ok {
			return usagef("%s and %s both write to %s; give each output its own file", prev, flag, path)
		}
		named[p] = flag
		if err := refuseOverwritingInputs([]pendingFile{{path: path}}, inputs); err != nil {
			return err
		}
		if err := checkCreatable(flag, path); err != nil {
			return err
		}
	}
	if len(toStdout) > 1 {
		return usagef("%s all write to standard output; at most one output may be '-' (the summary is there unless -o names a file)", strings.Join(toStdout, ", "))
	}
	return nil
}

// checkCreatable reports whether path can be written as an output: not a
// directory, in a folder that exists and takes new files.
func checkCreatable(flag, path string) error {
	if st, err := os.Stat(path); err == nil {
		if st.IsDir() {
			return usagef("%s %s is a directory; give a file name for the output", flag, path)
		}
		if !st.Mode().IsRegular() {
			return nil // a device or pipe is written in place (commit)
		}
	}
	dir := filepath.Dir(path)
	st, err := os.Stat(dir)
	if err != nil || !st.IsDir() {
		return usagef("%s %s: folder %s does not exist; create it or write elsewhere", flag, path, dir)
	}
	f, err := os.CreateTemp(dir, ".headroom-check-*")
	if err != nil {
		return inputf(path, 0, "cannot create output (%s): %v", flag, unwrapPath(err))
	}
	f.Close()
	os.Remove(f.Name())
	return nil
}
