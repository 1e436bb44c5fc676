//! Cortex-M0 cost benchmark: prints SysTick counts per item (see board_kit::bench)
//! over semihosting; `.ci/bench-report` turns them into docs/cost.md.
#![no_std]
#![no_main]

use cortex_m_rt::entry;
use cortex_m_semihosting::debug::{EXIT_SUCCESS, exit};

#[entry]
fn main() -> ! {
    let mut p = cortex_m::Peripherals::take().unwrap_or_else(|| loop {});
    board_kit::bench::run(&mut p.SYST);
    exit(EXIT_SUCCESS);
    loop {}
}
