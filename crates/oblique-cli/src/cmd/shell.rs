//! `oblique completions SHELL` and `oblique manpage`: shell completion scripts and man pages,
//! both generated from the same clap definitions as `--help`, so they never drift from it.

use crate::common::write_output;
use crate::fail::{CmdResult, Fail};
use crate::output::emit;
use clap::{Args, ValueEnum};
use std::path::PathBuf;

/// A shell to complete in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ShellArg {
    /// GNU bash.
    Bash,
    /// Z shell.
    Zsh,
    /// fish.
    Fish,
    /// PowerShell.
    Powershell,
}

/// Flags of `oblique completions`.
#[derive(Debug, Args)]
#[command(
    after_help = "Install (bash): oblique completions bash > ~/.local/share/bash-completion/completions/oblique
Install (zsh):  oblique completions zsh > ~/.zfunc/_oblique   (with fpath+=~/.zfunc in ~/.zshrc)
Install (fish): oblique completions fish > ~/.config/fish/completions/oblique.fish
In bash and fish, material ids and pair names complete too (asked of `oblique material list --ids`
and `oblique pair list --names` when you press TAB, with your OBLIQUE_LIBRARY)."
)]
pub struct CompletionsArgs {
    /// The shell.
    #[arg(value_enum, ignore_case = true)]
    pub shell: ShellArg,
}

/// Flags of `oblique manpage`.
#[derive(Debug, Args)]
#[command(
    after_help = "Example: oblique manpage --out man/man1 && man -l man/man1/oblique-check.1"
)]
pub struct ManpageArgs {
    /// Write one page per command and subcommand (oblique.1, oblique-check.1,
    /// oblique-pair-observe.1, ...) into this folder; without it, print the top page.
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
}

/// Flags whose values are material ids or pair names, for the dynamic part of completions.
const MATERIAL_FLAGS: &str = "--flyer|--parent";
const PAIR_FLAGS: &str = "--pair";

/// The bash lines that complete material ids and pair names, wrapped around clap's function.
/// The `--library` folders already typed on the line are passed on, so that a shop's own pairs
/// and materials complete too.
const BASH_DYNAMIC: &str = r#"
# Material ids and pair names, asked of oblique itself (with your OBLIQUE_LIBRARY and the
# --library folders on the line).
_oblique_dynamic() {
    local cur prev i w
    local -a libs=() sub=()
    cur="${COMP_WORDS[COMP_CWORD]}"
    prev="${COMP_WORDS[COMP_CWORD-1]}"
    for ((i = 1; i < COMP_CWORD; i++)); do
        w="${COMP_WORDS[i]}"
        case "$w" in
            --library) libs+=(--library "${COMP_WORDS[i+1]}"); ((i++)); continue ;;
            --library=*) libs+=("$w"); continue ;;
            -*) continue ;;
        esac
        sub+=("$w")
    done
    case "$prev" in
        MATERIAL_FLAGS)
            COMPREPLY=( $(compgen -W "$(oblique "${libs[@]}" material list --ids 2>/dev/null)" -- "$cur") )
            return 0 ;;
        PAIR_FLAGS)
            COMPREPLY=( $(compgen -W "$(oblique "${libs[@]}" pair list --names 2>/dev/null)" -- "$cur") )
            return 0 ;;
    esac
    if [[ "$cur" != -* && ${#sub[@]} -eq 2 && "${sub[0]}" == "material" && "${sub[1]}" == "show" ]]; then
        COMPREPLY=( $(compgen -W "$(oblique "${libs[@]}" material list --ids 2>/dev/null)" -- "$cur") )
        return 0
    fi
    if [[ "$cur" != -* && "${sub[0]}" == "pair" ]] && {
        [[ ${#sub[@]} -eq 2 && "${sub[1]}" =~ ^(show|observe|import|agreement|fit|next-shot|export|validate|remove-shot)$ ]] ||
        [[ ${#sub[@]} -eq 3 && "${sub[1]}" == "boundary" && "${sub[2]}" =~ ^(add|remove)$ ]]
    }; then
        COMPREPLY=( $(compgen -W "$(oblique "${libs[@]}" pair list --names 2>/dev/null)" -- "$cur") )
        return 0
    fi
    _oblique "$@"
}
complete -F _oblique_dynamic -o bashdefault -o default oblique
"#;

const FISH_DYNAMIC: &str = r#"
# Material ids and pair names, asked of oblique itself (with your OBLIQUE_LIBRARY and the
# --library folders on the line).
function __oblique_ask
    set -l toks (commandline -opc)
    set -l libs
    for i in (seq (count $toks))
        if test "$toks[$i]" = --library; and test $i -lt (count $toks)
            set -a libs --library $toks[(math $i + 1)]
        else if string match -q -- '--library=*' $toks[$i]
            set -a libs $toks[$i]
        end
    end
    oblique $libs $argv 2>/dev/null
end
complete -c oblique -l flyer -f -a '(__oblique_ask material list --ids)'
complete -c oblique -l parent -f -a '(__oblique_ask material list --ids)'
complete -c oblique -l pair -f -a '(__oblique_ask pair list --names)'
complete -c oblique -n '__fish_seen_subcommand_from material; and __fish_seen_subcommand_from show' -f -a '(__oblique_ask material list --ids)'
complete -c oblique -n '__fish_seen_subcommand_from pair; and __fish_seen_subcommand_from show observe import agreement fit next-shot export validate remove-shot' -f -a '(__oblique_ask pair list --names)'
complete -c oblique -n '__fish_seen_subcommand_from boundary; and __fish_seen_subcommand_from add remove' -f -a '(__oblique_ask pair list --names)'
"#;

/// The completion script for `shell`, from the top-level command `cmd`.
pub fn completion_script(mut cmd: clap::Command, shell: ShellArg) -> String {
    let mut buf = Vec::new();
    let gen = |g, buf: &mut Vec<u8>, cmd: &mut clap::Command| {
        clap_complete::generate(g, cmd, "oblique", buf);
    };
    match shell {
        ShellArg::Bash => gen(clap_complete::Shell::Bash, &mut buf, &mut cmd),
        ShellArg::Zsh => gen(clap_complete::Shell::Zsh, &mut buf, &mut cmd),
        ShellArg::Fish => gen(clap_complete::Shell::Fish, &mut buf, &mut cmd),
        ShellArg::Powershell => gen(clap_complete::Shell::PowerShell, &mut buf, &mut cmd),
    }
    let mut s = String::from_utf8_lossy(&buf).into_owned();
    match shell {
        ShellArg::Bash => s.push_str(
            &BASH_DYNAMIC
                .replace("MATERIAL_FLAGS", MATERIAL_FLAGS)
                .replace("PAIR_FLAGS", PAIR_FLAGS),
        ),
        ShellArg::Fish => s.push_str(FISH_DYNAMIC),
        _ => {}
    }
    s
}

/// Run `oblique completions` for the top-level command `cmd`.
pub fn run_completions(cmd: clap::Command, a: CompletionsArgs) -> CmdResult {
    emit(&completion_script(cmd, a.shell))
}

/// Every command and subcommand with its page name (`oblique`, `oblique-check`, ...).
fn pages(cmd: &clap::Command, prefix: &str, out: &mut Vec<(String, clap::Command)>) {
    let name = if prefix.is_empty() {
        cmd.get_name().to_string()
    } else {
        format!("{prefix}-{}", cmd.get_name())
    };
    let page = cmd.clone().name(name.clone());
    out.push((name.clone(), page));
    for sub in cmd.get_subcommands() {
        if sub.get_name() == "help" {
            continue;
        }
        pages(sub, &name, out);
    }
}

/// The sections every page ends with: exit status, environment and the caution.
const COMMON_SECTIONS: &str = r#".SH "EXIT STATUS"
.TP
.B 0
The command ran (a verdict of OUTSIDE is still 0), or its output pipe was closed (| head).
.TP
.B 2
Bad input: the message names the flag, the file and line and column, or the CSV row and field.
.TP
.B 1
Anything else, for example a file that cannot be written.
.SH ENVIRONMENT
.TP
.B OBLIQUE_LIBRARY
Extra library folders, separated like PATH, after those given with --library.
.TP
.B OBLIQUE_LOCK_WAIT_MS
How long a writer waits for another writer's lock on a library folder (default 30000).
.SH CAUTION
Results are screening estimates from published relations and the trials on file, never a
guarantee of a weld or of safety. Pulsed-power banks work at lethal voltages and store lethal
energy, explosives kill, flyers and fragments fly: follow local codes and licensed practice
before any shot.
"#;

/// The roff text of one man page.
fn render(cmd: clap::Command) -> CmdResult<Vec<u8>> {
    let mut buf = Vec::new();
    clap_mangen::Man::new(cmd)
        .render(&mut buf)
        .map_err(|e| Fail::other(format!("man page: {e}")))?;
    buf.extend_from_slice(COMMON_SECTIONS.as_bytes());
    Ok(buf)
}

/// Run `oblique manpage` for the top-level command `cmd`.
pub fn run_manpage(mut cmd: clap::Command, a: ManpageArgs) -> CmdResult {
    cmd.build();
    let Some(dir) = a.out else {
        let top = render(cmd)?;
        return emit(&String::from_utf8_lossy(&top));
    };
    let mut all = Vec::new();
    pages(&cmd, "", &mut all);
    std::fs::create_dir_all(&dir)
        .map_err(|e| Fail::input(format!("--out: cannot create {}: {e}", dir.display())))?;
    for (name, page) in &all {
        write_output(&dir.join(format!("{name}.1")), &render(page.clone())?)?;
    }
    emit(&format!(
        "wrote {} man page(s) into {} (read one with: man -l {}/oblique-check.1)\n",
        all.len(),
        dir.display(),
        dir.display()
    ))
}
