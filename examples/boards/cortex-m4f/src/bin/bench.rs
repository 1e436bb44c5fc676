//! Cortex-M4F cost benchmark: prints SysTick counts per item (see board_kit::bench)
//! over semihosting; `.ci/bench-report` turns them into docs/cost.md.
#![no_std]
#![no_main]

use cortex_m_rt::entry;

#[entry]
fn main() -> ! {
    board_kit::bench::main()
}
