//! Flash probe images: link exactly one item of [`ITEMS`], chosen at build time
//! by `BOARD_PROBE=<index>` (unset: none, the empty image). `arm-none-eabi-size`
//! of probes with and without an item gives the item's flash.
//!
//! `BOARD_PROBE_PANIC=1` adds a reachable panic: the image must then fail to
//! link, which shows that the no-panic check of the release images is live.

use crate::items::ITEMS;
use core::hint::black_box;

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

/// The chosen item (an index past the list is a compile error).
const RUN: Option<fn(usize)> = match probe_index() {
    Some(i) => Some(ITEMS[i].run),
    None => None,
};

/// The probe image's body.
pub fn main() -> ! {
    if let Some(run) = RUN {
        run(black_box(0));
    }
    if option_env!("BOARD_PROBE_PANIC").is_some() {
        let nothing: Option<u8> = black_box(None);
        black_box(nothing.unwrap());
    }
    crate::platform::sleep()
}
