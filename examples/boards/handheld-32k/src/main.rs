//! A whole %Brix firmware for a Cortex-M0+ with 32 KiB of flash and 8 KiB of
//! RAM, on the crate's reading side in I8F24: the example to copy.
//!
//! At power-up the calibration store (the last two 2 KiB flash pages) is
//! read. With no record the unit is calibrated: a water zero and a 40 %Brix
//! span, committed through the store, then the part restarts. With a record
//! it is restored and each sample is read: frame and thermistor code in,
//! nD at 20 °C and %Brix with their standard uncertainties out, logged with
//! defmt. In QEMU the frames come from flash (rendered on the host by the
//! crate's forward model) and every reading must equal the host's bit for
//! bit, else the run fails.
#![no_std]
#![no_main]

use core::cell::UnsafeCell;
use cortex_m_rt::entry;
use cortex_m_semihosting::{debug, hio};
use critical_section::RestoreState;
use embedded_optics::refractometer::reading::meter::{BrixMeter, MeterDesign};
use embedded_optics::refractometer::reading::prepared::{CodeTable, PositionMap, TemperatureLine};
use embedded_optics::refractometer::reading::store::CalibrationStore;
use embedded_optics::refractometer::reading::tables::OIV_GRID;
use embedded_storage::nor_flash::{ErrorType, NorFlash, NorFlashErrorKind, ReadNorFlash};
#[cfg(not(target_abi = "eabihf"))]
use fixed::types::I8F24;

/// The number type: I8F24 on a core without FPU (Cortex-M0+), f32 on one
/// with a single-precision FPU (Cortex-M4F, the same image built for
/// `thumbv7em-none-eabihf`).
#[cfg(not(target_abi = "eabihf"))]
type Num = I8F24;
#[cfg(target_abi = "eabihf")]
type Num = f32;

/// The raw bits the host's readings are kept as.
fn bits(x: Num) -> i32 {
    #[cfg(not(target_abi = "eabihf"))]
    return x.to_bits();
    #[cfg(target_abi = "eabihf")]
    return x.to_bits() as i32;
}

/// `x` as an integer count of `1/per` (for the log: no float formatting on
/// the device; `i32::MIN` stays as it is).
fn scaled_num(x: Num, per: i64) -> i32 {
    #[cfg(not(target_abi = "eabihf"))]
    return scaled(x.to_bits(), per);
    #[cfg(target_abi = "eabihf")]
    return libm_free_round(x * per as f32);
}

#[cfg(target_abi = "eabihf")]
fn libm_free_round(x: f32) -> i32 {
    (if x < 0.0 { x - 0.5 } else { x + 0.5 }) as i32
}

#[allow(dead_code)] // the run's description is the build script's too
mod design;
use design::*;

/// A reading the host made, as raw I8F24 bits (`i32::MIN`: off the scale).
pub struct Expected {
    pub nd20: i32,
    pub brix: i32,
    pub u_nd20: i32,
    pub u_brix: i32,
    pub settled: bool,
}

// The design's data (made by build.rs from the crate's exact models) and
// the test frames with the host's readings.
include!(concat!(env!("OUT_DIR"), "/design.rs"));

/// The meter's design: data prepared at build time, the OIV compensation grid
/// the crate ships.
static METER: MeterDesign<'static> = MeterDesign {
    boundary: BOUNDARY,
    map: DESIGN_MAP,
    water: DESIGN_WATER,
    thermistor: DESIGN_THERMISTOR,
    dispersion_ratio_q30: DESIGN_DISPERSION_RATIO_Q30,
    compensation: OIV_GRID,
    led_wavelength_pm: 590_000,
    frames_log2: FRAMES_LOG2,
    temperature_uncertainty_mc: 100,
    calibration_uncertainty_e8: 2000,
    settle_readings: 3,
    settle_band_e8: 2000,
    settle_band_mc: 100,
};

/// The part's flash controller for the two store pages (nRF51 NVMC, as
/// QEMU `microbit` emulates it: 1 KiB hardware pages, word writes).
struct StorePages;

const STORE_BASE: u32 = 32 * 1024 - 4 * 1024;
#[cfg(not(target_abi = "eabihf"))]
const NVMC: usize = 0x4001_E000;
#[cfg(not(target_abi = "eabihf"))]
const NVMC_READY: usize = NVMC + 0x400;
#[cfg(not(target_abi = "eabihf"))]
const NVMC_CONFIG: usize = NVMC + 0x504;
#[cfg(not(target_abi = "eabihf"))]
const NVMC_ERASEPAGE: usize = NVMC + 0x508;

#[cfg(not(target_abi = "eabihf"))]
fn nvmc_write(reg: usize, value: u32) {
    // SAFETY: a register of the flash controller, written as its manual says.
    unsafe { core::ptr::write_volatile(reg as *mut u32, value) }
    // SAFETY: the controller's READY register, read-only.
    while unsafe { core::ptr::read_volatile(NVMC_READY as *const u32) } & 1 == 0 {}
}

impl ErrorType for StorePages {
    type Error = NorFlashErrorKind;
}

impl ReadNorFlash for StorePages {
    const READ_SIZE: usize = 1;
    fn read(&mut self, offset: u32, bytes: &mut [u8]) -> Result<(), Self::Error> {
        if offset as usize + bytes.len() > self.capacity() {
            return Err(NorFlashErrorKind::OutOfBounds);
        }
        for (k, b) in bytes.iter_mut().enumerate() {
            let at = (STORE_BASE + offset) as usize + k;
            // SAFETY: inside the store's flash pages (checked above).
            *b = unsafe { core::ptr::read_volatile(at as *const u8) };
        }
        Ok(())
    }
    fn capacity(&self) -> usize {
        4096
    }
}

impl NorFlash for StorePages {
    const WRITE_SIZE: usize = 4;
    const ERASE_SIZE: usize = 2048;
    fn erase(&mut self, from: u32, to: u32) -> Result<(), Self::Error> {
        if from % 2048 != 0 || to % 2048 != 0 || to > 4096 || from > to {
            return Err(NorFlashErrorKind::NotAligned);
        }
        #[cfg(not(target_abi = "eabihf"))]
        {
            nvmc_write(NVMC_CONFIG, 2);
            for page in (from..to).step_by(1024) {
                nvmc_write(NVMC_ERASEPAGE, STORE_BASE + page);
            }
            nvmc_write(NVMC_CONFIG, 0);
        }
        // QEMU's mps2 boards have no flash controller: the pages are memory.
        #[cfg(target_abi = "eabihf")]
        for at in (from..to).step_by(4) {
            // SAFETY: a word of the store's pages (checked above).
            unsafe { core::ptr::write_volatile((STORE_BASE + at) as usize as *mut u32, u32::MAX) };
        }
        Ok(())
    }
    fn write(&mut self, offset: u32, bytes: &[u8]) -> Result<(), Self::Error> {
        if offset % 4 != 0 || bytes.len() % 4 != 0 || offset as usize + bytes.len() > 4096 {
            return Err(NorFlashErrorKind::NotAligned);
        }
        #[cfg(not(target_abi = "eabihf"))]
        nvmc_write(NVMC_CONFIG, 1);
        for (k, w) in bytes.chunks_exact(4).enumerate() {
            let word = u32::from_le_bytes([w[0], w[1], w[2], w[3]]);
            let at = (STORE_BASE + offset) as usize + 4 * k;
            // SAFETY: a word of the store's pages, with writes enabled.
            unsafe { core::ptr::write_volatile(at as *mut u32, word) };
            // SAFETY: the controller's READY register, read-only.
            #[cfg(not(target_abi = "eabihf"))]
            while unsafe { core::ptr::read_volatile(NVMC_READY as *const u32) } & 1 == 0 {}
        }
        #[cfg(not(target_abi = "eabihf"))]
        nvmc_write(NVMC_CONFIG, 0);
        Ok(())
    }
}

/// The span standard's %Brix in the number type (no float conversion on a
/// core without FPU).
fn span_brix() -> Num {
    #[cfg(not(target_abi = "eabihf"))]
    return I8F24::from_bits((SPAN_BRIX as i32) << 24);
    #[cfg(target_abi = "eabihf")]
    return SPAN_BRIX as f32;
}

/// The mean of the next reading's frames from stored frame `k`.
fn mean_of(
    meter: &mut BrixMeter<'static, Num>,
    k: usize,
    frame: &mut [u16; PIXELS],
) -> Option<embedded_optics::refractometer::reading::meter::Mean<Num>> {
    let (knots, code) = FRAMES.get(k)?;
    unpack(knots, frame);
    meter.feed(&frame[..], *code).ok().flatten()
}

/// I8F24 bits as an integer count of `1/per` (for the log: no float
/// formatting on the device; `i32::MIN` stays as it is).
#[cfg(not(target_abi = "eabihf"))]
fn scaled(bits: i32, per: i64) -> i32 {
    if bits == i32::MIN {
        return bits;
    }
    ((i64::from(bits) * per + (1 << 23)) >> 24) as i32
}

fn finish(ok: bool) -> ! {
    debug::exit(if ok {
        debug::EXIT_SUCCESS
    } else {
        debug::EXIT_FAILURE
    });
    loop {
        cortex_m::asm::wfi();
    }
}

/// Fill pattern of the stack painter (the whole image's stack high-water mark
/// is logged at the end: RAM is 8 KiB).
const PAINT: u32 = 0xC0FF_EE55;

unsafe extern "C" {
    /// First free RAM word after .data/.bss (cortex-m-rt): the stack's floor.
    static __sheap: u32;
    /// Top of the stack (cortex-m-rt).
    static _stack_start: u32;
}

/// Paints the free stack below this frame.
#[inline(never)]
fn paint() {
    let top = cortex_m::register::msp::read() as usize - 16;
    let mut a = core::ptr::addr_of!(__sheap) as usize;
    while a < top {
        // SAFETY: [floor, sp - 16) is unused stack, word aligned, in RAM.
        unsafe { core::ptr::write_volatile(a as *mut u32, PAINT) };
        a += 4;
    }
}

/// Stack bytes the image has used since [`paint`]: from the top of RAM to
/// the lowest word written.
fn stack_used() -> usize {
    let mut a = core::ptr::addr_of!(__sheap) as usize;
    // SAFETY: reads of the painted region; stops at the first touched word.
    while unsafe { core::ptr::read_volatile(a as *const u32) } == PAINT {
        a += 4;
    }
    (core::ptr::addr_of!(_stack_start) as usize).saturating_sub(a)
}

#[entry]
fn main() -> ! {
    paint();
    let Ok(mut store) = CalibrationStore::on_nor_flash(StorePages, 0) else {
        defmt::error!("calibration store: the pages do not fit the flash");
        finish(false)
    };
    let Ok(mut meter) = BrixMeter::<Num>::new(&METER) else {
        finish(false)
    };
    let mut frame = [0u16; PIXELS];
    match store.current() {
        None => {
            defmt::info!(
                "no calibration record: zero on water, span on {=f32} %Brix",
                SPAN_BRIX as f32
            );
            let zeroed = mean_of(&mut meter, 0, &mut frame).map(|m| meter.zero_with_water(&m));
            let spanned = mean_of(&mut meter, 1, &mut frame).map(|m| meter.span(&m, span_brix()));
            if !matches!((zeroed, spanned), (Some(Ok(())), Some(Ok(())))) {
                defmt::error!("calibration failed");
                finish(false)
            }
            let committed = meter
                .calibration_record(&store.choice())
                .and_then(|r| store.commit(r));
            match committed {
                Ok((_, r)) => defmt::info!("record {=u32} committed; restarting", r.sequence),
                Err(e) => {
                    defmt::error!("commit failed: {}", e);
                    finish(false)
                }
            }
            cortex_m::peripheral::SCB::sys_reset()
        }
        Some((_, record)) => {
            if meter.restore(&record).is_err() {
                defmt::error!("record {=u32} refused", record.sequence);
                finish(false)
            }
            defmt::info!("record {=u32} restored", record.sequence);
        }
    }
    // SysTick counts core cycles; under QEMU `-icount` it counts executed
    // instructions (the bench's method): each reading's cost, for the
    // worst-to-typical ratio over the run's temperatures.
    let mut syst = cortex_m::Peripherals::take().map(|p| p.SYST);
    if let Some(st) = syst.as_mut() {
        st.set_clock_source(cortex_m::peripheral::syst::SystClkSource::Core);
        st.set_reload(0x00FF_FFFF);
        st.clear_current();
        st.enable_counter();
    }
    let (mut fewest, mut most) = (u32::MAX, 0u32);
    let mut ok = true;
    for (k, want) in EXPECTED.iter().enumerate() {
        let reading = mean_of(&mut meter, k + 2, &mut frame).map(|m| {
            let start = cortex_m::peripheral::SYST::get_current();
            let r = meter.read(core::hint::black_box(&m));
            let ticks = start.wrapping_sub(cortex_m::peripheral::SYST::get_current()) & 0x00FF_FFFF;
            (fewest, most) = (fewest.min(ticks), most.max(ticks));
            r
        });
        let Some(Ok(r)) = reading else {
            defmt::error!("sample {=usize}: no reading", k);
            finish(false)
        };
        let brix = r.brix.map(bits).unwrap_or(i32::MIN);
        defmt::info!(
            "sample {=usize}: nD20 {=i32}e-6 ± {=i32}e-6, {=i32}e-3 %Brix ± {=i32}e-3 (k=1), {=i32}e-3 °C, settled {=bool}, calibration {=u32}",
            k,
            scaled_num(r.nd20, 1_000_000),
            scaled_num(r.u_nd20, 1_000_000),
            r.brix.map(|b| scaled_num(b, 1000)).unwrap_or(i32::MIN),
            scaled_num(r.u_brix, 1000),
            scaled_num(r.temperature_c, 1000),
            r.settled,
            r.calibration
        );
        let same = bits(r.nd20) == want.nd20
            && brix == want.brix
            && bits(r.u_nd20) == want.u_nd20
            && bits(r.u_brix) == want.u_brix
            && r.settled == want.settled;
        if !same {
            defmt::error!("sample {=usize} differs from the host", k);
            ok = false;
        }
    }
    if ok {
        defmt::info!("{=usize} readings bit-exact with the host", EXPECTED.len());
    }
    defmt::info!(
        "conversion per reading (BrixMeter::read), SysTick ticks: fewest {=u32}, most {=u32}",
        fewest,
        most
    );
    defmt::info!(
        "RAM: meter object {=usize} B, stack high-water {=usize} B (whole run, frame buffer included)",
        core::mem::size_of::<BrixMeter<'static, Num>>(),
        stack_used()
    );
    finish(ok)
}

// The defmt global logger: frames go to the host through semihosting, where
// `defmt-print` decodes them. This image has no interrupts.
#[defmt::global_logger]
struct SemihostingLogger;

struct Owned<T>(UnsafeCell<T>);
// SAFETY: only touched inside the logger's critical section.
unsafe impl<T> Sync for Owned<T> {}

static ENCODER: Owned<defmt::Encoder> = Owned(UnsafeCell::new(defmt::Encoder::new()));
static RESTORE: Owned<RestoreState> = Owned(UnsafeCell::new(RestoreState::invalid()));

fn to_host(bytes: &[u8]) {
    if let Ok(mut out) = hio::hstdout() {
        let _ = out.write_all(bytes);
    }
}

// SAFETY: acquire/release are paired by defmt and bracket every write.
unsafe impl defmt::Logger for SemihostingLogger {
    fn acquire() {
        // SAFETY: released in `release`.
        let restore = unsafe { critical_section::acquire() };
        // SAFETY: inside the critical section, nobody else holds these.
        unsafe {
            *RESTORE.0.get() = restore;
            (*ENCODER.0.get()).start_frame(to_host);
        }
    }
    unsafe fn flush() {}
    unsafe fn release() {
        // SAFETY: still inside the critical section opened by `acquire`.
        unsafe {
            (*ENCODER.0.get()).end_frame(to_host);
            critical_section::release(*RESTORE.0.get());
        }
    }
    unsafe fn write(bytes: &[u8]) {
        // SAFETY: between acquire and release.
        unsafe { (*ENCODER.0.get()).write(bytes, to_host) }
    }
}

/// Links only if no panic path survives optimisation: the handler calls a
/// function that exists nowhere.
#[panic_handler]
fn no_panic(_: &core::panic::PanicInfo) -> ! {
    unsafe extern "C" {
        fn reachable_panic_in_board_image() -> !;
    }
    // SAFETY: never runs: the symbol is undefined.
    unsafe { reachable_panic_in_board_image() }
}
