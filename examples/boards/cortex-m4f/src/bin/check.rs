//! Cortex-M4F, f32: runs every routine of the crate on the host-made table in f32
//! and requires agreement with `f64` on the host within 2e-6 (same errors for
//! invalid rows), and I8F24 bit-exact with the host. Prints over semihosting;
//! exits QEMU with failure on any difference.
#![no_std]
#![no_main]

use board_kit::{Tabled, check, check_chains, rows::OUTPUT_NAMES};
use cortex_m_rt::entry;
use cortex_m_semihosting::hprintln;
use fixed::types::I8F24;

/// Checks one type and prints the outcome; `true` when within budget.
/// `unit` names the unit of [`Tabled::deviation`].
fn check_type<S: Tabled>(name: &str, unit: &str) -> bool {
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

/// Runs both chains in one type and prints the outcome; `true` when within budget.
fn check_chains_type<S: Tabled>(name: &str) -> bool {
    let c = check_chains::<S>();
    match c.failure {
        None => {
            hprintln!(
                "{} chains: {} results within budget of the host (refractometer, autofocus; worst nD {} x 1e-9)",
                name,
                c.compared,
                c.worst
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

#[entry]
fn main() -> ! {
    let ok = check_type::<f32>("f32", "x 1e-9")
        & check_type::<I8F24>("I8F24", "LSB")
        & check_chains_type::<f32>("f32");
    board_kit::finish(ok)
}
