package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"sort"
	"strings"
)

const completionHelp = `Prints a completion script for bash, zsh or fish, made from the command
table and each command's flags, so it never drifts from them. Install it
as the shell expects, e.g.

  seine completion bash > ~/.local/share/bash-completion/completions/seine
  seine completion zsh > "${fpath[1]}/_seine"
  seine completion fish > ~/.config/fish/completions/seine.fish

Flags that take a file complete file names; others complete nothing.
`

func runCompletion(ctx context.Context, e *env, args []string) error {
	fs := newFlags("completion", e)
	if err := parseFlags(fs, nil); err != nil {
		return err
	}
	if len(args) != 1 {
		if len(args) == 1 && (args[0] == "-h" || args[0] == "-help") {
			fs.Usage()
			return flag.ErrHelp
		}
		return usagef("want one shell: bash, zsh or fish")
	}
	switch args[0] {
	case "-h", "-help", "--help":
		fs.Usage()
		return flag.ErrHelp
	case "bash":
		writeBash(e.stdout, completionTable())
	case "zsh":
		writeZsh(e.stdout, completionTable())
	case "fish":
		writeFish(e.stdout, completionTable())
	default:
		return usagef("unknown shell %q: want bash, zsh or fish", args[0])
	}
	return nil
}

// compFlag is one flag of a command, for completion.
type compFlag struct {
	name, usage string
	file        bool // takes a file name
	boolean     bool
}

// compCommand is a command and its flags, for completion.
type compCommand struct {
	name, summary string
	flags         []compFlag
}

// completionTable lists every command with its flags, from the commands
// themselves.
func completionTable() []compCommand {
	var out []compCommand
	for _, c := range commandList() {
		cc := compCommand{name: c.name, summary: c.summary}
		if c.name != "completion" {
			if fs := flagsOf(c); fs != nil {
				fs.VisitAll(func(f *flag.Flag) {
					name, usage := flag.UnquoteUsage(f)
					b, _ := f.Value.(interface{ IsBoolFlag() bool })
					cc.flags = append(cc.flags, compFlag{
						name: f.Name, usage: firstLine(usage),
						file:    strings.EqualFold(name, "file") || strings.HasSuffix(f.Name, "spec") || f.Name == "data" || f.Name == "model" || f.Name == "out",
						boolean: b != nil && b.IsBoolFlag(),
					})
				})
			}
		}
		out = append(out, cc)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].name < out[j].name })
	return out
}

func firstLine(s string) string {
	s, _, _ = strings.Cut(s, "\n")
	return strings.ReplaceAll(s, "'", "")
}

func writeBash(w io.Writer, cs []compCommand) {
	var names []string
	for _, c := range cs {
		names = append(names, c.name)
	}
	fmt.Fprintf(w, `# bash completion for seine, made by "seine completion bash"
_seine() {
  local cur prev cmd
  cur="${COMP_WORDS[COMP_CWORD]}"
  prev="${COMP_WORDS[COMP_CWORD-1]}"
  cmd="${COMP_WORDS[1]}"
  if [ "$COMP_CWORD" -eq 1 ]; then
    COMPREPLY=($(compgen -W "%s help" -- "$cur"))
    return
  fi
  case "$cmd" in
`, strings.Join(names, " "))
	for _, c := range cs {
		var flags, files []string
		for _, f := range c.flags {
			flags = append(flags, "-"+f.name)
			if f.file {
				files = append(files, "-"+f.name)
			}
		}
		if c.name == "completion" {
			fmt.Fprintf(w, "  completion) COMPREPLY=($(compgen -W \"bash zsh fish\" -- \"$cur\"));;\n")
			continue
		}
		if c.name == "help" {
			continue
		}
		fmt.Fprintf(w, "  %s)\n    case \"$prev\" in\n", c.name)
		if len(files) > 0 {
			fmt.Fprintf(w, "      %s) COMPREPLY=($(compgen -f -- \"$cur\")); return;;\n", strings.Join(files, "|"))
		}
		fmt.Fprintf(w, "    esac\n    COMPREPLY=($(compgen -W \"%s\" -- \"$cur\"));;\n", strings.Join(flags, " "))
	}
	fmt.Fprintf(w, "  help) COMPREPLY=($(compgen -W \"%s\" -- \"$cur\"));;\n  esac\n}\ncomplete -o default -F _seine seine\n", strings.Join(names, " "))
}

func writeZsh(w io.Writer, cs []compCommand) {
	fmt.Fprint(w, "#compdef seine\n# zsh completion for seine, made by \"seine completion zsh\"\n_seine() {\n  local -a commands\n  commands=(\n")
	for _, c := range cs {
		fmt.Fprintf(w, "    '%s:%s'\n", c.name, strings.ReplaceAll(c.summary, "'", ""))
	}
	fmt.Fprint(w, "  )\n  if (( CURRENT == 2 )); then\n    _describe 'command' commands\n    return\n  fi\n  case $words[2] in\n")
	for _, c := range cs {
		if c.name == "completion" {
			fmt.Fprint(w, "    completion) _values 'shell' bash zsh fish;;\n")
			continue
		}
		fmt.Fprintf(w, "    %s) _arguments", c.name)
		for _, f := range c.flags {
			spec := fmt.Sprintf(" '-%s[%s]'", f.name, strings.ReplaceAll(strings.ReplaceAll(f.usage, "[", "("), "]", ")"))
			if !f.boolean {
				action := ": "
				if f.file {
					action = ":file:_files"
				}
				spec = fmt.Sprintf(" '-%s[%s]:%s'", f.name, strings.ReplaceAll(strings.ReplaceAll(f.usage, "[", "("), "]", ")"), strings.TrimPrefix(action, ":"))
			}
			fmt.Fprint(w, spec)
		}
		fmt.Fprint(w, ";;\n")
	}
	fmt.Fprint(w, "  esac\n}\ncompdef _seine seine\n")
}

func writeFish(w io.Writer, cs []compCommand) {
	fmt.Fprint(w, "# fish completion for seine, made by \"seine completion fish\"\ncomplete -c seine -f\n")
	var names []string
	for _, c := range cs {
		names = append(names, c.name)
	}
	first := "not __fish_seen_subcommand_from " + strings.Join(names, " ")
	for _, c := range cs {
		fmt.Fprintf(w, "complete -c seine -n '%s' -a %s -d '%s'\n", first, c.name, strings.ReplaceAll(c.summary, "'", ""))
	}
	for _, c := range cs {
		if c.name == "completion" {
			fmt.Fprint(w, "complete -c seine -n '__fish_seen_subcommand_from completion' -a 'bash zsh fish'\n")
			continue
		}
		for _, f := range c.flags {
			extra := ""
			if f.file {
				extra = " -r -F"
			} else if !f.boolean {
				extra = " -r"
			}
			fmt.Fprintf(w, "complete -c seine -n '__fish_seen_subcommand_from %s' -o %s%s -d '%s'\n", c.name, f.name, extra, f.usage)
		}
	}
}
