package main

import (
	"fmt"

	"github.com/spf13/cobra"
)

func init() { addCommand(newVersionCmd) }

func newVersionCmd(e *env) *cobra.Command {
	return &cobra.Command{
		Use:   "version",
		Short: "print the lidscope version (the one written into every output)",
		Args:  noArgs("version takes no arguments"),
		RunE: func(cmd *cobra.Command, args []string) error {
			_, err := fmt.Fprintln(e.stdout, "lidscope", version)
			return err
		},
	}
}
