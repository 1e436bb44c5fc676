//! RISC-V RV32IMC, fixed point: runs every routine of the crate on the host-made
//! table in I8F24 and I32F32, and both measurement chains in both types, and
//! requires bit-exact agreement with the same types on the host (the checks of
//! the Cortex-M0 image). Prints over semihosting; exits QEMU with failure on any
//! difference.
#![no_std]
#![no_main]

use board_kit::report::{check_chains_type, check_type};
use fixed::types::{I8F24, I32F32};

#[riscv_rt::entry]
fn main() -> ! {
    let ok = check_type::<I8F24>("I8F24", "LSB")
        & check_type::<I32F32>("I32F32", "LSB")
        & check_chains_type::<I32F32>("I32F32", "LSB")
        & check_chains_type::<I8F24>("I8F24", "LSB");
    board_kit::finish(ok)
}
