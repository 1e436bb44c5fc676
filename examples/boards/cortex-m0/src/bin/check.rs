//! Cortex-M0, fixed point: runs every routine of the crate on the host-made table
//! in I8F24 and I32F32 and requires bit-exact agreement with the same types on the
//! host. Logs with defmt (decoded on the host by defmt-print); exits QEMU with
//! failure on any difference.
#![no_std]
#![no_main]

use board_kit::{Tabled, check, check_chains, rows::OUTPUT_NAMES};
use core::cell::UnsafeCell;
use cortex_m_rt::entry;
use cortex_m_semihosting::hio;
use critical_section::RestoreState;
use fixed::types::{I8F24, I32F32};

/// Checks one type and logs the outcome; `true` when bit-exact.
fn check_type<S: Tabled>(name: &str) -> bool {
    let c = check::<S>();
    match c.failure {
        None => {
            defmt::info!(
                "{=str}: {=u32} outputs bit-exact with the host",
                name,
                c.compared
            );
            true
        }
        Some((row, output)) => {
            let what = OUTPUT_NAMES
                .get(usize::from(output))
                .copied()
                .unwrap_or("?");
            defmt::error!(
                "{=str}: row {=u16}, {=str} differs from the host",
                name,
                row,
                what
            );
            false
        }
    }
}

/// Runs both chains in one type and logs the outcome; `true` when bit-exact.
fn check_chains_type<S: Tabled>(name: &str) -> bool {
    let c = check_chains::<S>();
    match c.failure {
        None => {
            defmt::info!(
                "{=str} chains: {=u32} results bit-exact with the host (refractometer, autofocus)",
                name,
                c.compared
            );
            true
        }
        Some((run, chain)) => {
            let what = if chain == 0 {
                "refractometer output"
            } else {
                "autofocus run"
            };
            defmt::error!(
                "{=str} chains: {=str} {=u16} differs from the host",
                name,
                what,
                run
            );
            false
        }
    }
}

// The defmt global logger: frames go to the host's stdout through semihosting,
// where `defmt-print -e <this ELF>` decodes them. No panic path, unlike a logger
// that checks for re-entrance: this image has no interrupts.
#[defmt::global_logger]
struct SemihostingLogger;

/// A static the logger owns between `acquire` and `release` (single core,
/// inside a critical section).
struct Owned<T>(UnsafeCell<T>);
// SAFETY: only touched inside the logger's critical section.
unsafe impl<T> Sync for Owned<T> {}

static ENCODER: Owned<defmt::Encoder> = Owned(UnsafeCell::new(defmt::Encoder::new()));
static RESTORE: Owned<RestoreState> = Owned(UnsafeCell::new(RestoreState::invalid()));

fn to_host(bytes: &[u8]) {
    if let Ok(mut out) = hio::hstdout() {
        let _ = out.write_all(bytes);
    }
}

// SAFETY: acquire/release are paired by defmt and bracket every write.
unsafe impl defmt::Logger for SemihostingLogger {
    fn acquire() {
        // SAFETY: released in `release`.
        let restore = unsafe { critical_section::acquire() };
        // SAFETY: inside the critical section, nobody else holds these.
        unsafe {
            *RESTORE.0.get() = restore;
            (*ENCODER.0.get()).start_frame(to_host);
        }
    }
    unsafe fn flush() {}
    unsafe fn release() {
        // SAFETY: still inside the critical section opened by `acquire`.
        unsafe {
            (*ENCODER.0.get()).end_frame(to_host);
            critical_section::release(*RESTORE.0.get());
        }
    }
    unsafe fn write(bytes: &[u8]) {
        // SAFETY: between acquire and release.
        unsafe { (*ENCODER.0.get()).write(bytes, to_host) }
    }
}

#[entry]
fn main() -> ! {
    let ok = check_type::<I8F24>("I8F24")
        & check_type::<I32F32>("I32F32")
        & check_chains_type::<I32F32>("I32F32")
        & check_chains_type::<I8F24>("I8F24");
    board_kit::finish(ok)
}
