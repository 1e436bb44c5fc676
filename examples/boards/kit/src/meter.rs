//! Cost without a cycle counter. Under QEMU `-icount shift=5` every executed
//! instruction advances virtual time by 32 ns, and the core's counter (SysTick on
//! Cortex-M, `mcycle` on RISC-V; see [`platform`](crate::platform)) counts that
//! time, so a tick count is proportional to instructions executed and identical
//! on every run. The factor is measured in the same image with a block of
//! `nop`s ([`nops_1000`]).

use crate::platform;
use core::hint::black_box;

/// Counter ticks spent by `calls` calls of `run(i)` for i = 0..calls, read
/// around each call (one call must stay below one wrap of the counter: 2^24
/// ticks for SysTick).
#[inline(never)]
pub fn ticks(run: fn(usize), calls: usize) -> u64 {
    let run = black_box(run);
    let mut sum = 0u64;
    for i in 0..calls {
        let start = platform::counter();
        run(black_box(i));
        let end = platform::counter();
        sum += u64::from(platform::elapsed(start, end));
    }
    sum
}

/// Exactly 1000 `nop`s: the calibration block.
#[inline(never)]
pub fn nops_1000(_: usize) {
    // SAFETY: `nop` has no effect on memory or registers.
    unsafe { core::arch::asm!(".rept 1000", "nop", ".endr", options(nomem, nostack)) }
}

/// Fill pattern for the stack painter.
const PAINT: u32 = 0xC0FF_EE55;

unsafe extern "C" {
    /// First free RAM word after .data/.bss (cortex-m-rt and riscv-rt): the stack may grow down to here.
    static __sheap: u32;
}

fn stack_floor() -> usize {
    core::ptr::addr_of!(__sheap) as usize
}

/// Paints the free stack below this function's own frame.
#[inline(never)]
fn paint() {
    let top = platform::stack_pointer() - 16;
    let mut a = stack_floor();
    while a < top {
        // SAFETY: [floor, sp - 16) is unused stack, word aligned, in RAM.
        unsafe { core::ptr::write_volatile(a as *mut u32, PAINT) };
        a += 4;
    }
}

/// Lowest address written since [`paint`].
fn high_water() -> usize {
    let mut a = stack_floor();
    // SAFETY: reads of the same painted region; stops at the first touched word.
    while unsafe { core::ptr::read_volatile(a as *const u32) } == PAINT {
        a += 4;
    }
    a
}

/// Stack bytes used below the caller's frame by `run(i)` for i = 0..calls: the
/// deepest of those calls, plus the few bytes of this function's call.
#[inline(never)]
pub fn stack_bytes(run: fn(usize), calls: usize) -> u32 {
    paint();
    let sp = platform::stack_pointer();
    let run = black_box(run);
    for i in 0..calls {
        run(black_box(i));
    }
    sp.saturating_sub(high_water()) as u32
}
