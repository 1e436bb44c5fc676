//! The checks' outcome printed over semihosting, for images that do not log
//! with defmt (Cortex-M4F, RISC-V). `.ci/boards` reads these lines.

use crate::platform::hprintln;
use crate::{Tabled, check, check_chains, rows::OUTPUT_NAMES};

/// Checks one type and prints the outcome; `true` when within budget.
/// `unit` names the unit of [`Tabled::deviation`].
pub fn check_type<S: Tabled>(name: &str, unit: &str) -> bool {
    let c = check::<S>();
    match c.failure {
        None => {
            hprintln!(
                "{}: {} outputs within {} {} of the host (worst {})",
                name,
                c.compared,
                S::BUDGET,
                unit,
                c.worst
            );
            true
        }
        Some((row, output)) => {
            let what = OUTPUT_NAMES
                .get(usize::from(output))
                .copied()
                .unwrap_or("?");
            hprintln!(
                "{}: row {}, {} outside {} {} of the host",
                name,
                row,
                what,
                S::BUDGET,
                unit
            );
            false
        }
    }
}

/// Runs both chains in one type and prints the outcome; `true` when within
/// budget. `unit` as for [`check_type`].
pub fn check_chains_type<S: Tabled>(name: &str, unit: &str) -> bool {
    let c = check_chains::<S>();
    match c.failure {
        None => {
            hprintln!(
                "{} chains: {} results within budget of the host (refractometer, autofocus; worst nD {} {})",
                name,
                c.compared,
                c.worst,
                unit
            );
            true
        }
        Some((run, chain)) => {
            let what = if chain == 0 {
                "refractometer output"
            } else {
                "autofocus run"
            };
            hprintln!(
                "{} chains: {} {} outside budget of the host",
                name,
                what,
                run
            );
            false
        }
    }
}
