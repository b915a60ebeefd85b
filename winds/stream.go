package winds

import (
	"bufio"
	"bytes"
	"compress/bzip2"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"os"
)

// readMessages streams messages from r, reading each whole message into
// scratch's buffer, and calls fn for each field. The buffer grows with the
// bytes actually read, never to a declared length alone. With
// scratch.reuse, the Values given to fn are scratch buffers, overwritten
// by the next field.
//
// A gzip (RFC 1952) or bzip2 stream is recognised by its magic bytes, not
// by the file name, and decompressed on the fly; offsets in errors are then
// offsets in the decompressed stream. Runs of zero bytes before, between
// and after messages (record padding) are skipped in constant memory with
// a warning, up to the budget's worth in all; any other bytes where a message should start are a
// *FormatError. A message longer than the budget is refused once the
// budget's worth of it has been read.
//
// The indicator section of each message (its first 16 bytes) is copied out
// of the buffered reader before the message is read, so that the edition
// and length used to dispatch a message are its own whatever the sizes of
// the messages before it.
func readMessages(r io.Reader, source string, values bool, scratch *decodeScratch, fn func(*Message) error) error {
	cr := &countReader{r: r}
	raw := bufio.NewReaderSize(cr, 1<<16)
	br, kind, err := decompressor(raw)
	if err != nil {
		return &FormatError{source, 0, 0, fmt.Sprintf("%s header: %v", kind, err)}
	}
	var streamErr error // the last error of the decompressor
	readErr := func(index int, off int64, err error) error {
		if cr.err != nil && cr.err != io.EOF {
			return fmt.Errorf("winds: %s: read at byte %d: %w", source, cr.n, cr.err)
		}
		if kind != "" {
			streamErr = &FormatError{source, index, off, fmt.Sprintf("%s stream corrupt or truncated (found at compressed byte %d): %v",
				kind, cr.n-int64(raw.Buffered()), err)}
			return streamErr
		}
		return &FormatError{source, index, off, "read: " + err.Error()}
	}
	if values && scratch.warn != nil {
		fn = scratch.checked(fn)
	}
	err = scan(br, source, values, scratch, fn, readErr)
	var fe *FormatError
	if kind != "" && errors.As(err, &fe) && err != streamErr {
		// A corrupt compressed stream may decode to garbage before its
		// checksum fails: read on (up to the budget's worth) to tell.
		if _, derr := io.CopyN(io.Discard, br, max(scratch.budget, 1<<20)); derr != nil && derr != io.EOF {
			return readErr(fe.Message, fe.Offset, derr)
		}
	}
	return err
}

// scan reads the messages of the (decompressed) stream br; see readMessages.
func scan(br *bufio.Reader, source string, values bool, scratch *decodeScratch, fn func(*Message) error, readErr func(int, int64, error) error) error {
	buf := &scratch.msg
	var off, zeros int64
	for index := 1; ; index++ {
		nz, err := skipZeros(br)
		if err != nil {
			return readErr(index, off, err)
		}
		if zeros += nz; scratch.budget > 0 && zeros > scratch.budget {
			// Not memory, but time: a small bzip2 stream can expand to
			// terabytes of zeros.
			return &BudgetError{Source: fmt.Sprintf("%s at byte %d", source, off), What: "skipping zero padding",
				Need: uint64(zeros), Budget: uint64(scratch.budget)}
		}
		head, err := br.Peek(16)
		if err != nil && err != io.EOF {
			return readErr(index, off+nz, err)
		}
		if nz > 0 {
			where := "before message"
			if len(head) == 0 {
				where = "at the end of the file"
			}
			scratch.warning(Warning{source, 0, off, fmt.Sprintf("skipped %d zero bytes (padding) %s", nz, where)})
			off += nz
		}
		if len(head) == 0 {
			if index == 1 {
				if off == 0 {
					return &FormatError{source, 0, 0, "empty input"}
				}
				return &FormatError{source, 0, 0, fmt.Sprintf("no GRIB message in %d zero bytes", off)}
			}
			return nil
		}
		if len(head) < 8 {
			return &FormatError{source, index, off, fmt.Sprintf("truncated indicator section: %d bytes", len(head))}
		}
		if string(head[:4]) != "GRIB" {
			if off == 0 {
				if name, cmd := otherCompression(head); name != "" {
					return &FormatError{source, 0, 0, fmt.Sprintf("%s-compressed input, which levelpath does not decompress (it reads gzip and bzip2 itself); decompress it first with: %s", name, cmd)}
				}
			}
			return &FormatError{source, index, off, fmt.Sprintf("wrong magic %q, want \"GRIB\"", head[:4])}
		}
		// Copy the indicator section: head aliases the reader's buffer,
		// which reading the message overwrites.
		var ind [16]byte
		copy(ind[:], head)
		edition := ind[7]
		var length uint64
		switch edition {
		case 1:
			length = uint64(u24(ind[4:7]))
		case 2:
			if len(head) < 16 {
				return &FormatError{source, index, off, "truncated indicator section"}
			}
			length = u64(ind[8:16])
		default:
			return &UnsupportedError{source, index, off, fmt.Sprintf("GRIB edition %d", edition), "levelpath reads GRIB editions 1 and 2 only"}
		}
		if length < 20 || length > 1<<40 {
			return &FormatError{source, index, off, fmt.Sprintf("total length %d out of range", length)}
		}
		// A message longer than the budget is read up to the budget only:
		// to its end if the file is truncated there, else refused.
		limit := length
		if b := scratch.budget; b > 0 && length > uint64(b) {
			limit = uint64(b) + 1
		}
		buf.Reset()
		n, err := buf.ReadFrom(io.LimitReader(br, int64(limit)))
		if err != nil {
			return readErr(index, off, err)
		}
		if limit < length && uint64(n) == limit {
			return &BudgetError{Source: fmt.Sprintf("%s message %d at byte %d", source, index, off), What: "reading the message",
				Need: length, Budget: uint64(scratch.budget)}
		}
		if uint64(n) != length {
			return &FormatError{source, index, off, fmt.Sprintf("truncated: declared length %d, %d bytes present", length, n)}
		}
		msg := buf.Bytes()
		if edition == 1 {
			err = decodeGRIB1(msg, source, index, off, values, scratch, fn)
		} else {
			d := grib2Decoder{src: source, index: index, base: off, msg: msg, values: values, fn: fn, scratch: scratch}
			err = d.decode()
		}
		if err != nil {
			return err
		}
		off += int64(length)
	}
}

// decompressor returns a reader of the decompressed stream when raw starts
// with the gzip magic (1f 8b, RFC 1952) or the bzip2 magic ("BZh" and a
// block size digit), else raw itself, and the name of the compression.
func decompressor(raw *bufio.Reader) (*bufio.Reader, string, error) {
	m, _ := raw.Peek(4)
	switch {
	case len(m) >= 2 && m[0] == 0x1f && m[1] == 0x8b:
		zr, err := gzip.NewReader(raw)
		if err != nil {
			return nil, "gzip", err
		}
		return bufio.NewReaderSize(zr, 1<<16), "gzip", nil
	case len(m) == 4 && string(m[:3]) == "BZh" && m[3] >= '1' && m[3] <= '9':
		return bufio.NewReaderSize(bzip2.NewReader(raw), 1<<16), "bzip2", nil
	}
	return raw, "", nil
}

// skipZeros discards the zero bytes at the head of br, in constant memory,
// and returns how many it discarded. io.EOF is not an error.
func skipZeros(br *bufio.Reader) (int64, error) {
	var n int64
	for {
		if _, err := br.Peek(1); err != nil {
			if err == io.EOF {
				return n, nil
			}
			return n, err
		}
		p, _ := br.Peek(br.Buffered())
		k := 0
		for k < len(p) && p[k] == 0 {
			k++
		}
		br.Discard(k)
		n += int64(k)
		if k < len(p) {
			return n, nil
		}
	}
}

// countReader counts the bytes read from r and keeps its last error, to
// tell an I/O failure from a corrupt compressed stream.
type countReader struct {
	r   io.Reader
	n   int64
	err error
}

func (c *countReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	if err != nil {
		c.err = err
	}
	return n, err
}

// openRegular opens path for reading after checking that it is a regular
// file (or a symbolic link to one): a directory, device (such as
// /dev/zero), FIFO or socket is refused before it is opened, since reading
// one would fail, never end or block.
func openRegular(path string) (*os.File, error) {
	st, err := os.Stat(path)
	if err != nil {
		return nil, fmt.Errorf("winds: %w", err)
	}
	if !st.Mode().IsRegular() {
		kind := "not a regular file"
		switch m := st.Mode(); {
		case m.IsDir():
			kind = "a directory"
		case m&os.ModeNamedPipe != 0:
			kind = "a named pipe (FIFO)"
		case m&os.ModeDevice != 0:
			kind = "a device"
		case m&os.ModeSocket != 0:
			kind = "a socket"
		}
		return nil, &FormatError{path, 0, 0, kind + ", not a GRIB file"}
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("winds: %w", err)
	}
	return f, nil
}

// ScanFile is Scan of the file at path, refused before opening unless it
// is a regular file, with the default Options.
func ScanFile(path string) ([]Message, error) { return Options{}.ScanFile(path) }

// ScanFile is Scan of the file at path with these options, refused before
// opening unless it is a regular file.
func (o Options) ScanFile(path string) ([]Message, error) {
	f, err := openRegular(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return o.Scan(f, path)
}

// otherCompression names the compression or archive format whose magic
// bytes head starts with, among those levelpath does not decompress, and
// the command that decompresses it (tested in TestCompressionHints): xz
// (FD 37 7A 58 5A 00), Zstandard (28 B5 2F FD, RFC 8878) and zip
// ("PK" 03 04).
func otherCompression(head []byte) (name, cmd string) {
	switch {
	case bytes.HasPrefix(head, []byte{0xfd, '7', 'z', 'X', 'Z', 0}):
		return "xz", "xz -dc in.xz > out.grib"
	case bytes.HasPrefix(head, []byte{0x28, 0xb5, 0x2f, 0xfd}):
		return "zstd", "zstd -dc in.zst > out.grib"
	case bytes.HasPrefix(head, []byte{'P', 'K', 3, 4}):
		return "zip", "unzip -p in.zip > out.grib"
	}
	return "", ""
}
