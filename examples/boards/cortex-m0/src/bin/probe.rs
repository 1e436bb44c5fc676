//! Flash probe: links exactly one item of board_kit::items::ITEMS, chosen at build
//! time by `BOARD_PROBE=<index>` (unset: none). `arm-none-eabi-size` of probes
//! with and without an item gives the item's flash.
#![no_std]
#![no_main]

use board_kit::items::ITEMS;
use cortex_m_rt::entry;

/// `BOARD_PROBE` as a number, at compile time.
const fn probe_index() -> Option<usize> {
    let Some(s) = option_env!("BOARD_PROBE") else {
        return None;
    };
    let b = s.as_bytes();
    let mut n = 0;
    let mut k = 0;
    while k < b.len() {
        n = n * 10 + (b[k] - b'0') as usize;
        k += 1;
    }
    Some(n)
}

const RUN: Option<fn(usize)> = match probe_index() {
    Some(i) => Some(ITEMS[i].run),
    None => None,
};

#[entry]
fn main() -> ! {
    if let Some(run) = RUN {
        run(core::hint::black_box(0));
    }
    loop {
        cortex_m::asm::wfi();
    }
}
