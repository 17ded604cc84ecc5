//! `eddyzone completions SHELL` and `eddyzone manpage [COMMAND]`: shell completion scripts
//! (clap_complete) and roff manual pages (clap_mangen), made from the command-line definition.

use super::error::{Error, EXIT_OK};
use super::{emit, Cli};
use clap::{Args, CommandFactory};
use clap_complete::Shell;

/// Options of `completions`.
#[derive(Debug, Args)]
pub struct CompletionsArgs {
    /// The shell (e.g. `eddyzone completions bash > /etc/bash_completion.d/eddyzone`).
    #[arg(value_enum)]
    pub shell: Shell,
}

/// Options of `manpage`.
#[derive(Debug, Args)]
pub struct ManpageArgs {
    /// The page of one command (`eddyzone-run.1`) instead of the main page (`eddyzone.1`).
    pub command: Option<String>,
}

/// Runs `completions`.
pub fn completions(a: &CompletionsArgs) -> Result<i32, Error> {
    let mut cmd = Cli::command();
    let mut out: Vec<u8> = Vec::new();
    clap_complete::generate(a.shell, &mut cmd, "eddyzone", &mut out);
    emit(&String::from_utf8_lossy(&out))?;
    Ok(EXIT_OK)
}

/// Runs `manpage`.
pub fn manpage(a: &ManpageArgs) -> Result<i32, Error> {
    let root = Cli::command();
    let cmd = match &a.command {
        None => root,
        Some(name) => {
            let names: Vec<String> = root
                .get_subcommands()
                .map(|c| c.get_name().to_string())
                .collect();
            let sub = root.find_subcommand(name).cloned().ok_or_else(|| {
                Error::Usage(format!(
                    "manpage: no command named '{name}' (commands: {})",
                    names.join(", ")
                ))
            })?;
            sub.name(format!("eddyzone-{name}"))
        }
    };
    let mut out: Vec<u8> = Vec::new();
    clap_mangen::Man::new(cmd)
        .render(&mut out)
        .map_err(|source| {
            Error::Output(eddyzone::report::OutputError::Write {
                path: "<manual page>".into(),
                source,
            })
        })?;
    emit(&String::from_utf8_lossy(&out))?;
    Ok(EXIT_OK)
}
