package main

import (
	"fmt"
	"os"
	"strings"

	"github.com/spf13/cobra"
	"github.com/spf13/cobra/doc"
)

func init() { addCommand(newManPagesCmd) }

// newManPagesCmd writes a man page (section 1) for every command of the
// tree. It is hidden: `make man` runs it.
func newManPagesCmd(e *env) *cobra.Command {
	var out string
	cmd := &cobra.Command{
		Use:    "man-pages --out DIR",
		Short:  "write the man pages of every command into a folder (make man)",
		Hidden: true,
		Args:   noArgs("man-pages takes no arguments; give the folder with --out DIR"),
		RunE: func(cmd *cobra.Command, args []string) error {
			if out == "" {
				return usageErr("give the folder for the man pages with --out DIR")
			}
			n, err := writeManPages(cmd.Root(), out)
			if err != nil {
				return err
			}
			fmt.Fprintf(e.stdout, "wrote %d man pages into %s\n", n, out)
			return nil
		},
	}
	addOutDir(cmd.Flags(), &out, "", "folder for the man pages (created if missing)")
	return cmd
}

// writeManPages writes root's man pages into dir and returns how many.
func writeManPages(root *cobra.Command, dir string) (int, error) {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return 0, fmt.Errorf("man pages: %w", err)
	}
	root.DisableAutoGenTag = true // no date line: the pages depend only on the tree
	header := &doc.GenManHeader{Title: strings.ToUpper(root.Name()), Section: "1", Source: "lidscope " + version, Manual: "lidscope manual"}
	if err := doc.GenManTree(root, header, dir); err != nil {
		return 0, fmt.Errorf("man pages into %s: %w", dir, err)
	}
	n := 0
	for _, c := range allCommands(root) {
		if c == root || c.IsAvailableCommand() {
			n++
		}
	}
	return n, nil
}
