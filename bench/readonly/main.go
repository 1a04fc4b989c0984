// Command readonly is the baseline of the scaling benchmark
// (bench/scaling.sh): it reads what `lidscope run` reads from a set of
// NetCDF files, and nothing else — every time step of every gridded data
// variable, one [lat][lon] slab at a time, through lidscope/netcdf with
// Var.ReadFloat32 — so that the run's wall time and memory can be set next
// to the cost of the I/O alone (HDF5 decompression included).
//
//	go run ./bench/readonly [-all-levels] DIR
//
// Every *.nc file below DIR is read. Data variables are those with a
// latitude and a longitude dimension (coordinate and bounds variables are
// skipped). A variable with a vertical dimension is read at the level
// nearest 700 hPa only, as the run reads it for T700; -all-levels reads
// every level.
package main

import (
	"flag"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"

	"lidscope/netcdf"
	"lidscope/units"
)

func main() {
	if err := run(os.Args[1:]); err != nil {
		fmt.Fprintln(os.Stderr, "readonly:", err)
		os.Exit(1)
	}
}

type stats struct {
	files, vars, slabs int
	values             int64
	sum                float64 // of the finite values: the reads cannot be skipped
}

func run(args []string) error {
	flags := flag.NewFlagSet("readonly", flag.ContinueOnError)
	allLevels := flags.Bool("all-levels", false, "read every vertical level (default: the level nearest 700 hPa)")
	if err := flags.Parse(args); err != nil {
		return err
	}
	if flags.NArg() != 1 {
		return fmt.Errorf("usage: readonly [-all-levels] DIR")
	}
	var paths []string
	err := filepath.WalkDir(flags.Arg(0), func(p string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if !d.IsDir() && strings.HasSuffix(p, ".nc") {
			paths = append(paths, p)
		}
		return nil
	})
	if err != nil {
		return err
	}
	if len(paths) == 0 {
		return fmt.Errorf("no .nc files below %s", flags.Arg(0))
	}
	sort.Strings(paths)
	start := time.Now()
	var st stats
	for _, p := range paths {
		if err := readFile(p, *allLevels, &st); err != nil {
			return err
		}
	}
	el := time.Since(start)
	mb := float64(st.values) * 4 / 1e6
	fmt.Printf("read %d files, %d variables, %d slabs, %.1f MB as float32, in %s (%.0f MB/s); checksum %.6g\n",
		st.files, st.vars, st.slabs, mb, el.Round(time.Millisecond), mb/el.Seconds(), st.sum)
	return nil
}

func readFile(path string, allLevels bool, st *stats) error {
	f, err := netcdf.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	vars, err := f.Vars()
	if err != nil {
		return err
	}
	st.files++
	for _, v := range vars {
		y, x, z := -1, -1, -1
		for i, d := range v.Dims {
			switch axisOf(f, d.Name) {
			case "Y":
				y = i
			case "X":
				x = i
			case "Z":
				z = i
			}
		}
		if y < 0 || x < 0 || len(v.Dims) < 2 || v.Name == v.Dims[0].Name {
			continue
		}
		levels := []int{0}
		if z >= 0 {
			levels, err = pickLevels(f, v.Dims[z].Name, v.Dims[z].Len, allLevels)
			if err != nil {
				return fmt.Errorf("%s: %s: %w", path, v.Name, err)
			}
		}
		if err := readVar(v, y, x, z, levels, st); err != nil {
			return fmt.Errorf("%s: %w", path, err)
		}
		st.vars++
	}
	return nil
}

// axisOf classifies a dimension by its coordinate variable (CF axis or
// units), "" when it is none of X, Y, Z.
func axisOf(f *netcdf.File, dim string) string {
	cv, err := f.Var(dim)
	if err != nil {
		return ""
	}
	text := func(name string) string {
		a, err := cv.Attr(name)
		if err != nil {
			return ""
		}
		s, _ := a.Text()
		return s
	}
	if a := strings.ToUpper(text("axis")); a == "X" || a == "Y" || a == "Z" {
		return a
	}
	switch text("units") {
	case "degrees_north", "degree_north":
		return "Y"
	case "degrees_east", "degree_east":
		return "X"
	}
	return ""
}

// pickLevels returns the level nearest 700 hPa, or all of them.
func pickLevels(f *netcdf.File, dim string, n int, all bool) ([]int, error) {
	if all {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out, nil
	}
	cv, err := f.Var(dim)
	if err != nil {
		return nil, err
	}
	vals, err := cv.ReadAllFloat64()
	if err != nil {
		return nil, err
	}
	u := "Pa"
	if a, err := cv.Attr("units"); err == nil {
		if s, ok := a.Text(); ok {
			u = s
		}
	}
	conv, err := units.Parse(units.Pressure, u)
	if err != nil {
		return nil, err
	}
	best := 0
	for i, p := range vals {
		if math.Abs(conv.Apply(p)-70000) < math.Abs(conv.Apply(vals[best])-70000) {
			best = i
		}
	}
	return []int{best}, nil
}

// readVar reads v one [lat][lon] slab at a time: every index of every
// other dimension (time), at the given levels.
func readVar(v *netcdf.Var, y, x, z int, levels []int, st *stats) error {
	shape := v.Shape()
	for _, n := range shape {
		if n == 0 {
			return nil // no records yet
		}
	}
	nslab := shape[y] * shape[x]
	buf := make([]float32, nslab)
	count := make([]int, len(shape))
	var outer []int // dimensions other than y, x and z
	for i := range shape {
		switch i {
		case y, x:
			count[i] = shape[i]
		case z:
			count[i] = 1
		default:
			count[i] = 1
			outer = append(outer, i)
		}
	}
	start := make([]int, len(shape))
	for {
		for _, lev := range levels {
			if z >= 0 {
				start[z] = lev
			}
			if err := v.ReadFloat32(start, count, buf); err != nil {
				return fmt.Errorf("%s at %v: %w", v.Name, start, err)
			}
			for _, a := range buf {
				if !math.IsInf(float64(a), 0) && a == a && a < 1e19 {
					st.sum += float64(a)
				}
			}
			st.slabs++
			st.values += int64(nslab)
		}
		// next index of the outer dimensions (row-major)
		k := len(outer) - 1
		for ; k >= 0; k-- {
			d := outer[k]
			start[d]++
			if start[d] < shape[d] {
				break
			}
			start[d] = 0
		}
		if k < 0 {
			return nil
		}
	}
}
