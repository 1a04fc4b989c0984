package cf

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"os"
)

// A classic-format file (CDF-1, CDF-2 or CDF-5) cut short in its data part
// still opens, and netCDF-C (like ncdump) then returns zeros for the
// missing bytes: silently wrong numbers. checkClassicSize reads the header
// as laid out in the NetCDF Classic Format Specification (NetCDF User
// Guide, "File Format Specifications"), works out how many bytes the data
// need, and reports a file shorter than that. It says nothing about other
// formats (NetCDF-4/HDF5 detects truncation itself) or headers it cannot
// parse (netCDF-C then decides).

// errNotClassic: not a classic header this parser reads.
var errNotClassic = errors.New("not a classic netCDF header")

// classicSize returns the bytes a classic file's data need, from its
// header; ok is false when the header is not classic or unreadable, or the
// record count is "streaming" (unknown).
func classicSize(r io.Reader) (need int64, ok bool) {
	need, ok, _ = classicHeader(r)
	return need, ok
}

// classicHeader is classicSize that also says whether the header ended
// early (cut: the bytes ran out inside a classic header).
func classicHeader(r io.Reader) (need int64, ok, cut bool) {
	h := &hdr{r: r}
	var magic [4]byte
	if _, err := io.ReadFull(r, magic[:]); err != nil || string(magic[:3]) != "CDF" {
		return 0, false, false
	}
	switch magic[3] {
	case 1:
	case 2:
		h.off64 = true
	case 5:
		h.off64, h.cdf5 = true, true
	default:
		return 0, false, false
	}
	defer func() {
		if p := recover(); p != nil { // a malformed header: no verdict on the size
			need, ok = 0, false
			err, _ := p.(error)
			cut = errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF)
		}
	}()
	numrecs := h.count()
	if (!h.cdf5 && numrecs == 0xFFFFFFFF) || (h.cdf5 && numrecs == -1) {
		return 0, false, false // streaming: record count unknown
	}
	// dimensions
	var dims []int64
	if n := h.list(0x0A); n > 0 {
		for i := int64(0); i < n; i++ {
			h.name()
			dims = append(dims, h.count())
		}
	}
	h.attrs()
	vars := h.vars(dims)
	return extentOf(vars, numrecs), true, false
}

// classicVar is where a variable's data lie in a classic file.
type classicVar struct {
	size, begin int64 // bytes of one record (record vars) or of all data
	record      bool
}

// vars reads the variable list of a classic header (panicking on a
// malformed one, as the other readers of hdr do).
func (h *hdr) vars(dims []int64) []classicVar {
	var vars []classicVar
	n := h.list(0x0B)
	for i := int64(0); i < n; i++ {
		h.name()
		nd := h.count()
		size := int64(1)
		rec := false
		for k := int64(0); k < nd; k++ {
			id := h.count()
			if id < 0 || id >= int64(len(dims)) {
				panic(errNotClassic)
			}
			if dims[id] == 0 {
				if k != 0 {
					panic(errNotClassic) // the record dimension must come first
				}
				rec = true
				continue
			}
			size = mulCap(size, dims[id])
		}
		h.attrs()
		ts := typeSize(h.u32())
		if ts == 0 {
			panic(errNotClassic)
		}
		h.count() // vsize (may overflow for large variables; recomputed)
		var begin int64
		if h.off64 {
			begin = int64(h.u64())
		} else {
			begin = int64(h.u32())
		}
		vars = append(vars, classicVar{mulCap(size, ts), begin, rec})
	}
	return vars
}

// extentOf is the file size the variables need: the end of the last
// one's data, records included.
func extentOf(vars []classicVar, numrecs int64) (need int64) {
	// Records hold every record variable in turn, each padded to 4 bytes,
	// except when there is only one record variable.
	var recsize int64
	nrec := 0
	for _, v := range vars {
		if v.record {
			nrec++
			recsize += pad4(v.size)
		}
	}
	if nrec == 1 {
		for _, v := range vars {
			if v.record {
				recsize = v.size
			}
		}
	}
	for _, v := range vars {
		end := v.begin + v.size
		if v.record {
			if numrecs == 0 {
				continue
			}
			end = v.begin + mulCap(numrecs-1, recsize) + v.size
		}
		if end > need {
			need = end
		}
	}
	return need
}

// checkClassicSize returns an error when path is a classic-format file
// shorter than its header says.
func checkClassicSize(path string) error {
	f, err := os.Open(path)
	if err != nil {
		return nil // netcdf.Open reports it
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return nil
	}
	const limit = 1 << 26
	need, ok, cut := classicHeader(&limitedReader{r: f, n: limit})
	if cut && st.Size() < limit {
		return fmt.Errorf("%s is damaged or truncated: the file (%d bytes) ends inside its classic NetCDF header, before the description of its variables is complete; copy or download the file again", QuotePath(path), st.Size())
	}
	if !ok || st.Size() >= need {
		return nil
	}
	return fmt.Errorf("%s is truncated: its header describes %d bytes of data but the file has %d bytes (netCDF-C would return zeros for the rest); copy or download the file again", QuotePath(path), need, st.Size())
}

// hdr reads big-endian header fields; it panics on a short or malformed
// header (classicSize recovers).
type hdr struct {
	r           io.Reader
	off64, cdf5 bool
}

func (h *hdr) u32() uint32 {
	var b [4]byte
	if _, err := io.ReadFull(h.r, b[:]); err != nil {
		panic(err)
	}
	return binary.BigEndian.Uint32(b[:])
}

func (h *hdr) u64() uint64 {
	var b [8]byte
	if _, err := io.ReadFull(h.r, b[:]); err != nil {
		panic(err)
	}
	return binary.BigEndian.Uint64(b[:])
}

// count reads a NON_NEG count: 4 bytes, or 8 in CDF-5.
func (h *hdr) count() int64 {
	if h.cdf5 {
		v := h.u64()
		if v > 1<<62 {
			if v == 0xFFFFFFFFFFFFFFFF {
				return -1
			}
			panic(errNotClassic)
		}
		return int64(v)
	}
	return int64(h.u32())
}

// list reads ABSENT or tag nelems, returning nelems.
func (h *hdr) list(tag uint32) int64 {
	t := h.u32()
	n := h.count()
	if t == 0 && n == 0 {
		return 0
	}
	if t != tag || n < 0 || n > 1<<24 {
		panic(errNotClassic)
	}
	return n
}

func (h *hdr) skip(n int64) {
	if n < 0 || n > 1<<26 {
		panic(errNotClassic)
	}
	if _, err := io.CopyN(io.Discard, h.r, n); err != nil {
		panic(err)
	}
}

func (h *hdr) name() { h.skip(pad4(h.count())) }

func (h *hdr) attrs() {
	n := h.list(0x0C)
	for i := int64(0); i < n; i++ {
		h.name()
		ts := typeSize(h.u32())
		if ts == 0 {
			panic(errNotClassic)
		}
		h.skip(pad4(mulCap(h.count(), ts)))
	}
}

// typeSize is the external size of a classic nc_type (0 if unknown).
func typeSize(t uint32) int64 {
	switch t {
	case 1, 2, 7: // byte, char, ubyte
		return 1
	case 3, 8: // short, ushort
		return 2
	case 4, 5, 9: // int, float, uint
		return 4
	case 6, 10, 11: // double, int64, uint64
		return 8
	}
	return 0
}

func pad4(n int64) int64 { return (n + 3) &^ 3 }

// mulCap multiplies non-negative sizes, saturating instead of overflowing.
func mulCap(a, b int64) int64 {
	const max = 1 << 62
	if a == 0 || b == 0 {
		return 0
	}
	if a > max/b {
		return max
	}
	return a * b
}

// limitedReader stops after n bytes (a header is never that long).
type limitedReader struct {
	r io.Reader
	n int64
}

func (l *limitedReader) Read(p []byte) (int, error) {
	if l.n <= 0 {
		return 0, io.EOF
	}
	if int64(len(p)) > l.n {
		p = p[:l.n]
	}
	k, err := l.r.Read(p)
	l.n -= int64(k)
	return k, err
}
