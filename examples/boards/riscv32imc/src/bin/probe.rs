//! Flash probe: links one measured item alone (see board_kit::probe); built by
//! `.ci/bench-report` with `--features probe BOARD_PROBE=<index>`.
#![no_std]
#![no_main]

#[riscv_rt::entry]
fn main() -> ! {
    board_kit::probe::main()
}
