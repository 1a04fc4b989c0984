package main

import (
	"github.com/spf13/cobra"
)

func init() { addCommand(newCompletionCmd) }

// completionShells are the shells `lidscope completion` writes scripts for.
var completionShells = []string{"bash", "zsh", "fish", "powershell"}

func newCompletionCmd(e *env) *cobra.Command {
	var noDescriptions bool
	cmd := &cobra.Command{
		Use:   "completion bash|zsh|fish|powershell",
		Short: "write the shell completion script for bash, zsh, fish or powershell",
		Long: `Writes the script that completes lidscope's commands, flags and file arguments in
your shell, on stdout. To load it:

  bash        source <(lidscope completion bash)       (in ~/.bashrc; needs bash-completion)
  zsh         lidscope completion zsh > "${fpath[1]}/_lidscope"   (then start a new shell)
  fish        lidscope completion fish > ~/.config/fish/completions/lidscope.fish
  powershell  lidscope completion powershell | Out-String | Invoke-Expression`,
		ValidArgs: completionShells,
		Args:      exactArgs(1, "give the shell: bash, zsh, fish or powershell"),
		RunE: func(cmd *cobra.Command, args []string) error {
			root, w := cmd.Root(), e.stdout
			switch args[0] {
			case "bash":
				return root.GenBashCompletionV2(w, !noDescriptions)
			case "zsh":
				if noDescriptions {
					return root.GenZshCompletionNoDesc(w)
				}
				return root.GenZshCompletion(w)
			case "fish":
				return root.GenFishCompletion(w, !noDescriptions)
			case "powershell":
				if noDescriptions {
					return root.GenPowerShellCompletion(w)
				}
				return root.GenPowerShellCompletionWithDesc(w)
			}
			return usageErr("no completion for the shell %q: give bash, zsh, fish or powershell", args[0])
		},
	}
	cmd.Flags().BoolVar(&noDescriptions, "no-descriptions", false, "complete without the descriptions of commands and flags")
	return cmd
}
