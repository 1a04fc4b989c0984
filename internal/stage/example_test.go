package stage_test

import (
	"fmt"
	"os"
	"path/filepath"

	"lidscope/internal/stage"
)

// Two files appear in the destination together, or not at all.
func Example() {
	dest, _ := os.MkdirTemp("", "stage-example-")
	defer os.RemoveAll(dest)
	names := []string{"table.csv", "summary.json"}

	if exist, _ := stage.Existing(dest, names); len(exist) > 0 {
		fmt.Println("refusing: already there:", exist)
		return
	}
	d, err := stage.New(dest, ".example-")
	if err != nil {
		fmt.Println(err)
		return
	}
	defer d.Remove()
	d.WriteFile("table.csv", []byte("x,y\n1,2\n"))
	d.WriteFile("summary.json", []byte("{}\n"))
	if err := d.Commit(names, false); err != nil {
		fmt.Println(err)
		return
	}
	for _, n := range names {
		b, _ := os.ReadFile(filepath.Join(dest, n))
		fmt.Printf("%s: %d bytes\n", n, len(b))
	}
	// Output:
	// table.csv: 8 bytes
	// summary.json: 3 bytes
}
