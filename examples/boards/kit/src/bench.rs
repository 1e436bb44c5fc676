//! The benchmark run shared by the per-core images: calibration, then every item
//! of [`ITEMS`](crate::items::ITEMS), printed over semihosting one line each for
//! `.ci/bench-report`:
//!
//! `cal|<nop instructions>|<ticks of the nop block>|<ticks of an empty call>|<calls>`
//! `item|<name>|<units>|<calls>|<ticks>|<stack bytes>|<ticks of the base, if any>`

use crate::items::ITEMS;
use crate::platform::{self, hprintln};
use crate::{ROWS, meter};

/// Calls per item: every table row, four times.
const CALLS: usize = 4 * ROWS;

fn nothing(_: usize) {}

/// The whole benchmark image: measures, prints, ends QEMU.
pub fn main() -> ! {
    let ok = platform::start_counter();
    if ok {
        run();
    }
    crate::finish(ok)
}

/// Measures and prints everything (the counter running).
pub fn run() {
    let cal = meter::ticks(meter::nops_1000, CALLS);
    let call = meter::ticks(nothing, CALLS);
    hprintln!("cal|{}|{}|{}|{}", 1000 * CALLS, cal, call, CALLS);
    for item in ITEMS.iter() {
        let t = meter::ticks(item.run, CALLS);
        let s = meter::stack_bytes(item.run, ROWS);
        let b = item.base.map(|b| meter::ticks(b, CALLS));
        match b {
            Some(b) => hprintln!(
                "item|{}|{}|{}|{}|{}|{}",
                item.name,
                item.units,
                CALLS,
                t,
                s,
                b
            ),
            None => hprintln!("item|{}|{}|{}|{}|{}|", item.name, item.units, CALLS, t, s),
        }
    }
}
