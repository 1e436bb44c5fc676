//! RISC-V cost benchmark: prints `mcycle` counts per item (see board_kit::bench)
//! over semihosting; `.ci/bench-report` turns them into docs/cost.md.
#![no_std]
#![no_main]

#[riscv_rt::entry]
fn main() -> ! {
    board_kit::bench::main()
}
