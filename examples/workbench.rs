//! Instrument workbench: simulate a refractometer before hardware exists.
//!
//! Renders frames of a unit built to a scenario with the crate's forward
//! model, runs the crate's firmware chain on them (f64 and I32F32), and prints
//! readings against truth and a Monte Carlo error budget; writes SVG plots.
//!
//! Run: `cargo run --release --example workbench -- [scenario.toml] [--out DIR]
//! [--trials N] [--no-plots]`. Without a file: the juice-line scenario.
//! A file with `instrument = "autofocus"` simulates a camera module instead.

#[path = "workbench/autofocus.rs"]
mod autofocus;
#[path = "workbench/budget.rs"]
mod budget;
#[path = "workbench/end_of_line.rs"]
mod end_of_line;
#[path = "workbench/plots.rs"]
mod plots;
#[path = "workbench/report.rs"]
mod report;
#[path = "workbench/scenario.rs"]
mod scenario;
#[path = "workbench/sim.rs"]
mod sim;

use std::path::PathBuf;
use std::process::ExitCode;

/// The scenario run when no file is given.
const DEFAULT_SCENARIO: &str = include_str!("scenarios/juice_line.toml");

struct Options {
    file: Option<PathBuf>,
    out: PathBuf,
    trials: Option<usize>,
    plots: bool,
}

fn options() -> Result<Options, String> {
    let mut o = Options {
        file: None,
        out: PathBuf::from("target/workbench"),
        trials: None,
        plots: true,
    };
    let mut args = std::env::args().skip(1);
    while let Some(a) = args.next() {
        match a.as_str() {
            "--out" => o.out = args.next().ok_or("--out needs a directory")?.into(),
            "--trials" => {
                let n = args.next().ok_or("--trials needs a number")?;
                o.trials = Some(
                    n.parse()
                        .map_err(|_| format!("--trials: `{n}` is not a count"))?,
                );
            }
            "--no-plots" => o.plots = false,
            "-h" | "--help" => {
                return Err(
                    "usage: workbench [scenario.toml] [--out DIR] [--trials N] [--no-plots]".into(),
                );
            }
            s if s.starts_with("--") => return Err(format!("unknown option {s}")),
            _ => o.file = Some(a.into()),
        }
    }
    Ok(o)
}

fn main() -> ExitCode {
    let o = match options() {
        Ok(o) => o,
        Err(e) => {
            eprintln!("{e}");
            return ExitCode::from(2);
        }
    };
    let (text, origin) = match &o.file {
        Some(p) => match std::fs::read_to_string(p) {
            Ok(t) => (t, p.display().to_string()),
            Err(e) => {
                eprintln!("{}: {e}", p.display());
                return ExitCode::from(2);
            }
        },
        None => (
            DEFAULT_SCENARIO.to_string(),
            "built-in juice_line.toml".into(),
        ),
    };
    // The `instrument` key picks the kind of scenario.
    let kind = toml::from_str::<toml::Table>(&text).ok().and_then(|t| {
        t.get("instrument")
            .and_then(|v| v.as_str().map(String::from))
    });
    if kind.as_deref() == Some("autofocus") {
        let fs = match autofocus::parse(&text, &origin) {
            Ok(f) => f,
            Err(e) => {
                eprintln!("{e}");
                return ExitCode::from(2);
            }
        };
        return match autofocus::report(&fs, o.plots.then_some(o.out.as_path())) {
            Ok(()) => ExitCode::SUCCESS,
            Err(e) => {
                eprintln!("simulation stopped: {e}");
                ExitCode::FAILURE
            }
        };
    }
    let mut sc = match scenario::parse(&text, &origin) {
        Ok(s) => s,
        Err(e) => {
            eprintln!("{e}");
            return ExitCode::from(2);
        }
    };
    if let Some(n) = o.trials {
        sc.study.trials = n.max(1);
    }
    match report::run(&sc, o.plots.then_some(o.out.as_path())) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("simulation stopped: {e}");
            ExitCode::FAILURE
        }
    }
}
