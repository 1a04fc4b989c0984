package runfolder_test

import (
	"context"
	"fmt"
	"log"
	"os"
	"path/filepath"

	"lidscope/runfolder"
)

// A run stages every file into one Stage and commits them in one step; a
// reader opens only a committed run.
func Example() {
	dir, err := os.MkdirTemp("", "runfolder-example-")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	target := filepath.Join(dir, "run")

	st, err := runfolder.Create(target, runfolder.Options{})
	if err != nil {
		log.Fatal(err)
	}
	defer st.Close() // removes the staging folder unless committed; releases the lock
	st.WriteFile("summary.json", []byte("{}\n"))
	st.WriteFile("figures/series.png", []byte("(a figure)"))
	if _, err := runfolder.Open(target); err != nil {
		fmt.Println("before the commit:", err != nil)
	}
	if _, err := st.Commit(context.Background()); err != nil {
		log.Fatal(err)
	}
	st.Close()

	f, err := runfolder.Open(target, "summary.json")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	for _, e := range f.Manifest.Files {
		fmt.Println(e.Name, e.Size)
	}
	fmt.Println(len(f.Manifest.Extras), "figure")
	// Output:
	// before the commit: true
	// summary.json 3
	// 1 figure
}
