//! What differs between the cores, and nothing else: the instruction counter,
//! the stack pointer, semihosting output and exit, and sleeping.
//!
//! - Cortex-M: SysTick (24 bits, counting down from the core clock); under QEMU
//!   `-icount` it advances in proportion to executed instructions.
//! - RISC-V: the `mcycle` CSR (machine mode); under QEMU `-icount` it is derived
//!   from the instruction counter too.

// The two semihosting crates have the same interface.
#[cfg(target_arch = "arm")]
use cortex_m_semihosting as semihosting;
#[cfg(target_arch = "arm")]
pub use cortex_m_semihosting::hprintln;
#[cfg(target_arch = "riscv32")]
use riscv_semihosting as semihosting;
#[cfg(target_arch = "riscv32")]
pub use riscv_semihosting::hprintln;

/// Ends the image: QEMU exits with success or failure (semihosting), a real
/// board without a debugger sleeps.
pub fn exit(ok: bool) -> ! {
    use semihosting::debug;
    debug::exit(if ok {
        debug::EXIT_SUCCESS
    } else {
        debug::EXIT_FAILURE
    });
    sleep()
}

/// Starts the counter; `false` if it cannot be had.
#[cfg(target_arch = "arm")]
pub fn start_counter() -> bool {
    use cortex_m::peripheral::syst::SystClkSource;
    let Some(mut p) = cortex_m::Peripherals::take() else {
        return false;
    };
    p.SYST.set_clock_source(SystClkSource::Core);
    p.SYST.set_reload(SYSTICK_RELOAD);
    p.SYST.clear_current();
    p.SYST.enable_counter();
    true
}

/// SysTick counts down from this 24-bit reload.
#[cfg(target_arch = "arm")]
const SYSTICK_RELOAD: u32 = 0x00FF_FFFF;

/// Reads the counter.
#[cfg(target_arch = "arm")]
#[inline(always)]
pub fn counter() -> u32 {
    cortex_m::peripheral::SYST::get_current()
}

/// Ticks from `start` to `end` (one wrap at most).
#[cfg(target_arch = "arm")]
#[inline(always)]
pub fn elapsed(start: u32, end: u32) -> u32 {
    start.wrapping_sub(end) & SYSTICK_RELOAD
}

/// The current stack pointer.
#[cfg(target_arch = "arm")]
#[inline(always)]
pub fn stack_pointer() -> usize {
    cortex_m::register::msp::read() as usize
}

/// Sleeps forever.
#[cfg(target_arch = "arm")]
pub fn sleep() -> ! {
    loop {
        cortex_m::asm::wfi();
    }
}

/// Starts the counter: `mcycle` runs from reset in machine mode.
#[cfg(target_arch = "riscv32")]
pub fn start_counter() -> bool {
    true
}

/// Reads the low word of `mcycle`.
#[cfg(target_arch = "riscv32")]
#[inline(always)]
pub fn counter() -> u32 {
    riscv::register::mcycle::read() as u32
}

/// Ticks from `start` to `end` (counting up; one wrap of the low word at most).
#[cfg(target_arch = "riscv32")]
#[inline(always)]
pub fn elapsed(start: u32, end: u32) -> u32 {
    end.wrapping_sub(start)
}

/// The current stack pointer.
#[cfg(target_arch = "riscv32")]
#[inline(always)]
pub fn stack_pointer() -> usize {
    let sp: usize;
    // SAFETY: reads a register, touches no memory.
    unsafe { core::arch::asm!("mv {}, sp", out(reg) sp, options(nomem, nostack)) };
    sp
}

/// Sleeps forever.
#[cfg(target_arch = "riscv32")]
pub fn sleep() -> ! {
    loop {
        riscv::asm::wfi();
    }
}
