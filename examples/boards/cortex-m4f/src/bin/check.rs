//! Cortex-M4F, f32: runs every routine of the crate on the host-made table in f32
//! and requires agreement with `f64` on the host within 2e-6 (same errors for
//! invalid rows), and I8F24 bit-exact with the host. Prints over semihosting;
//! exits QEMU with failure on any difference.
#![no_std]
#![no_main]

use board_kit::report::{check_chains_type, check_type};
use cortex_m_rt::entry;
use fixed::types::I8F24;

#[entry]
fn main() -> ! {
    let ok = check_type::<f32>("f32", "x 1e-9")
        & check_type::<I8F24>("I8F24", "LSB")
        & check_chains_type::<f32>("f32", "x 1e-9");
    board_kit::finish(ok)
}
