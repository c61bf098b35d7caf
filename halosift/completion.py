"""Shell completion scripts for bash, zsh and fish, generated from the command line's argparse parser.

The scripts are written from the parser itself, so a new subcommand or option is
completed without anyone editing a script. Only argparse is used: printing a
script must stay as light as ``--help``.
"""

from __future__ import annotations

import argparse
from dataclasses import dataclass

#: Option destinations whose value is a file name (completed as files).
FILE_DESTS = frozenset({"output", "ids"})
#: Positional destinations that are files (the library); any other positional (a SMILES) is free text.
FILE_POSITIONALS = frozenset({"input"})


@dataclass(frozen=True)
class Option:
    """One option of a command, as completion needs it."""

    flags: tuple[str, ...]
    """Its spellings, e.g. ('-o', '--output')."""
    takes_value: bool
    """True when a value follows it."""
    choices: tuple[str, ...]
    """The values it accepts, when argparse lists them (else empty)."""
    is_file: bool
    """True when its value is a file name."""
    help: str
    """Its help text, one line."""


@dataclass(frozen=True)
class Command:
    """A subcommand (or the bare program, name ''), as completion needs it."""

    name: str
    """The subcommand, '' for the program itself."""
    help: str
    """Its one-line help."""
    options: tuple[Option, ...]
    """Its options, --help included."""
    positional_choices: tuple[str, ...]
    """Values its first positional accepts when argparse lists them; empty: files (or nothing)."""
    takes_files: bool
    """True when a positional is a file, the library (completed as files)."""


def _one_line(text: str | None) -> str:
    """Help text on one line, without argparse's %-formatting."""
    return " ".join((text or "").replace("%%", "%").split())


def _options(parser: argparse.ArgumentParser) -> tuple[Option, ...]:
    """The options of one parser, in the order it declares them (suppressed ones left out)."""
    out = []
    for action in parser._actions:  # argparse offers no public walk of its actions
        if not action.option_strings or action.help == argparse.SUPPRESS:
            continue
        out.append(Option(
            flags=tuple(action.option_strings),
            takes_value=action.nargs != 0,
            choices=tuple(str(c) for c in action.choices or ()),
            is_file=action.dest in FILE_DESTS or action.metavar == "FILE",
            help=_one_line(action.help),
        ))
    return tuple(out)


def _subparsers(parser: argparse.ArgumentParser) -> argparse._SubParsersAction | None:
    """The parser's subcommand action, if it has one."""
    return next((a for a in parser._actions if isinstance(a, argparse._SubParsersAction)), None)


def commands(parser: argparse.ArgumentParser) -> tuple[Command, ...]:
    """The program ('' first) and each subcommand, with their options."""
    sub = _subparsers(parser)
    helps = {c.dest: _one_line(c.help) for c in sub._choices_actions} if sub else {}
    found = [Command("", _one_line(parser.description), _options(parser), (), False)]
    for name, child in (sub.choices.items() if sub else ()):
        positionals = [a for a in child._actions if not a.option_strings]
        choices = next((tuple(str(c) for c in a.choices) for a in positionals if a.choices), ())
        found.append(Command(
            name=name, help=helps.get(name, ""), options=_options(child), positional_choices=choices,
            takes_files=any(a.dest in FILE_POSITIONALS for a in positionals),
        ))
    return tuple(found)


def _bash(parser: argparse.ArgumentParser) -> str:
    """A bash function completing subcommands, options, option values and files, and its `complete` line."""
    prog = parser.prog
    cmds = commands(parser)
    names = " ".join(c.name for c in cmds if c.name)
    func = f"_{prog.replace('-', '_')}_complete"
    option_lists = []
    value_cases = []
    positional_cases = []
    for cmd in cmds:
        key = cmd.name or "__top"
        option_lists.append(f'        {key}) opts="{" ".join(f for o in cmd.options for f in o.flags)}" ;;')
        for opt in cmd.options:
            if not opt.takes_value:
                continue
            pattern = "|".join(f"{key}:{f}" for f in opt.flags)
            if opt.choices:
                action = f'COMPREPLY=( $(compgen -W "{" ".join(opt.choices)}" -- "$cur") )'
            elif opt.is_file:
                action = 'COMPREPLY=( $(compgen -f -- "$cur") )'
            else:
                action = "COMPREPLY=()"  # a free value (a number, a name): nothing to offer
            value_cases.append(f"        {pattern}) {action}; return ;;")
        if cmd.name and cmd.positional_choices:
            words = " ".join(cmd.positional_choices)
            positional_cases.append(f'        {cmd.name}) COMPREPLY=( $(compgen -W "{words}" -- "$cur") ) ;;')
        elif cmd.name and cmd.takes_files:
            positional_cases.append(f'        {cmd.name}) COMPREPLY=( $(compgen -f -- "$cur") ) ;;')
    nl = "\n"
    return f"""# bash completion for {prog} (generated by `{prog} completion bash`)
{func}() {{
    local cur prev cmd opts i
    cur="${{COMP_WORDS[COMP_CWORD]}}"
    prev=""
    [[ $COMP_CWORD -gt 0 ]] && prev="${{COMP_WORDS[COMP_CWORD-1]}}"
    cmd="__top"
    for ((i = 1; i < COMP_CWORD; i++)); do
        case "${{COMP_WORDS[i]}}" in
            {names.replace(" ", "|")}) cmd="${{COMP_WORDS[i]}}"; break ;;
        esac
    done
    case "$cmd:$prev" in
{nl.join(value_cases)}
    esac
    case "$cmd" in
{nl.join(option_lists)}
    esac
    if [[ "$cur" == -* ]]; then
        COMPREPLY=( $(compgen -W "$opts" -- "$cur") )
        return
    fi
    case "$cmd" in
        __top) COMPREPLY=( $(compgen -W "{names}" -- "$cur") ) ;;
{nl.join(positional_cases)}
        *) COMPREPLY=() ;;
    esac
}}
complete -o filenames -F {func} {prog}
"""


def _zsh(parser: argparse.ArgumentParser) -> str:
    """The bash script behind zsh's bash-completion layer (compinit loaded first if needed)."""
    # zsh runs bash completion functions through its bashcompinit layer: one generator for both.
    return (
        f"# zsh completion for {parser.prog} (generated by `{parser.prog} completion zsh`)\n"
        "(( $+functions[compdef] )) || { autoload -U +X compinit && compinit }\n"
        "autoload -U +X bashcompinit && bashcompinit\n" + _bash(parser).split("\n", 1)[1]
    )


def _fish_text(text: str) -> str:
    """``text`` as one single-quoted fish word."""
    return "'" + text.replace("\\", "\\\\").replace("'", "\\'") + "'"


def _fish(parser: argparse.ArgumentParser) -> str:
    """One `complete` line per subcommand, option and positional."""
    prog = parser.prog
    cmds = commands(parser)
    lines = [f"# fish completion for {prog} (generated by `{prog} completion fish`)", f"complete -c {prog} -f"]
    for cmd in cmds:
        cond = "__fish_use_subcommand" if not cmd.name else f"__fish_seen_subcommand_from {cmd.name}"
        if cmd.name:
            lines.append(f"complete -c {prog} -n '__fish_use_subcommand' -a {cmd.name} -d {_fish_text(cmd.help)}")
        for opt in cmd.options:
            parts = [f"complete -c {prog} -n '{cond}'"]
            for flag in opt.flags:
                parts.append(f"-l {flag[2:]}" if flag.startswith("--") else f"-s {flag[1:]}")
            if opt.takes_value:
                parts.append(f"-x -a {_fish_text(' '.join(opt.choices))}" if opt.choices else ("-r -F" if opt.is_file else "-x"))
            parts.append(f"-d {_fish_text(opt.help)}")
            lines.append(" ".join(parts))
        if cmd.name and cmd.positional_choices:
            lines.append(f"complete -c {prog} -n '{cond}' -a {_fish_text(' '.join(cmd.positional_choices))}")
        elif cmd.name and cmd.takes_files:
            lines.append(f"complete -c {prog} -n '{cond}' -F")
    return "\n".join(lines) + "\n"


def completion_script(parser: argparse.ArgumentParser, shell: str) -> str:
    """The completion script for ``shell`` ('bash', 'zsh' or 'fish'); ValueError for another shell."""
    writers = {"bash": _bash, "zsh": _zsh, "fish": _fish}
    if shell not in writers:
        raise ValueError(f"no completion for {shell!r}; use {', '.join(writers)}")
    return writers[shell](parser)
