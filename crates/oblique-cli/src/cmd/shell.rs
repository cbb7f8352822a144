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
    #[arg(value_enum)]
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
const BASH_DYNAMIC: &str = r#"
# Material ids and pair names, asked of oblique itself (with your OBLIQUE_LIBRARY).
_oblique_dynamic() {
    local cur prev words cword
    cur="${COMP_WORDS[COMP_CWORD]}"
    prev="${COMP_WORDS[COMP_CWORD-1]}"
    case "$prev" in
        MATERIAL_FLAGS)
            COMPREPLY=( $(compgen -W "$(oblique material list --ids 2>/dev/null)" -- "$cur") )
            return 0 ;;
        PAIR_FLAGS)
            COMPREPLY=( $(compgen -W "$(oblique pair list --names 2>/dev/null)" -- "$cur") )
            return 0 ;;
    esac
    if [[ ${COMP_CWORD} -ge 3 && "${COMP_WORDS[1]}" == "material" && "${COMP_WORDS[2]}" == "show" ]]; then
        COMPREPLY=( $(compgen -W "$(oblique material list --ids 2>/dev/null)" -- "$cur") )
        return 0
    fi
    if [[ ${COMP_CWORD} -ge 3 && "${COMP_WORDS[1]}" == "pair" && "${COMP_WORDS[2]}" =~ ^(show|observe|import|agreement)$ && "$cur" != -* ]]; then
        COMPREPLY=( $(compgen -W "$(oblique pair list --names 2>/dev/null)" -- "$cur") )
        return 0
    fi
    _oblique "$@"
}
complete -F _oblique_dynamic -o bashdefault -o default oblique
"#;

const FISH_DYNAMIC: &str = r#"
# Material ids and pair names, asked of oblique itself (with your OBLIQUE_LIBRARY).
complete -c oblique -l flyer -f -a '(oblique material list --ids 2>/dev/null)'
complete -c oblique -l parent -f -a '(oblique material list --ids 2>/dev/null)'
complete -c oblique -l pair -f -a '(oblique pair list --names 2>/dev/null)'
complete -c oblique -n '__fish_seen_subcommand_from material; and __fish_seen_subcommand_from show' -f -a '(oblique material list --ids 2>/dev/null)'
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
