//! A handheld %Brix refractometer on an RP2040 (Cortex-M0+, no FPU) with
//! embassy-rp, on the crate's reading side (`BrixMeter`) in I8F24 fixed
//! point, its design's data prepared at build time (`build.rs`). Our
//! fictional juice plant's hand unit:
//!
//! - thermistor: 10 kΩ NTC (β 3950) to ground under a 10 kΩ resistor from the
//!   ADC's reference, on GPIO26 (ADC0), read by the blocking ADC;
//! - line sensor: 1024 pixels of 12 bits behind an SPI read-out (two bytes per
//!   pixel, most significant first) on SPI0, clock GPIO18, data GPIO16, chip
//!   select GPIO17, read into the frame buffer by DMA;
//! - calibration: the crate's 64-byte record in the last two 4 KiB sectors of
//!   the 2 MiB flash, through the crate's two-slot `CalibrationStore` on the
//!   HAL's `NorFlash` (one record per sector, the newest valid one wins);
//! - a button on GPIO15 to ground: held at power-up with distilled water on the
//!   prism, it zeroes the instrument and stores the zero;
//! - readings: logged with defmt (RTT), nD at 20 °C and %Brix.
//!
//! The optics (14 µm pixels, 30 mm lens, prism of nd 1.7174 / Vd 29.5, 590 nm
//! LED) and the thermistor are the board images' invented design; put your
//! own in `build.rs`.
#![no_std]
#![no_main]

use defmt::{info, warn};
use embassy_executor::Spawner;
use embassy_rp::adc::{self, Adc, Channel};
use embassy_rp::flash::{self, Blocking, Flash};
use embassy_rp::gpio::{Input, Level, Output, Pull};
use embassy_rp::peripherals::{DMA_CH0, DMA_CH1, FLASH};
use embassy_rp::spi::{self, Spi};
use embassy_rp::{bind_interrupts, dma};
use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
use embedded_optics::refractometer::reading::meter::{BrixMeter, MeterDesign};
use embedded_optics::refractometer::reading::prepared::{CodeTable, PositionMap, TemperatureLine};
use embedded_optics::refractometer::reading::tables::OIV_GRID;
use embedded_optics::refractometer::record;
use embedded_optics::refractometer::store::{CalibrationStore, NorFlashSlots};
use fixed::types::I8F24;
use {defmt_rtt as _, panic_probe as _};

/// The number type of the reading side: no FPU, so 32-bit fixed point.
type S = I8F24;

/// Pixels of the line sensor.
const PIXELS: usize = 1024;

// The design's data: `DESIGN_MAP`, `DESIGN_WATER`, `DESIGN_THERMISTOR`,
// `DESIGN_DISPERSION_RATIO_Q30`, made by build.rs from the exact models.
include!(concat!(env!("OUT_DIR"), "/design.rs"));

/// The meter: the prepared data, the OIV compensation grid, four frames a
/// reading, the thermistor's 0.2 °C and the calibration's 1e-5.
static METER: MeterDesign<'static> = MeterDesign {
    boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
    map: DESIGN_MAP,
    water: DESIGN_WATER,
    thermistor: DESIGN_THERMISTOR,
    dispersion_ratio_q30: DESIGN_DISPERSION_RATIO_Q30,
    compensation: OIV_GRID,
    led_wavelength_pm: 590_000,
    frames_log2: 2,
    temperature_uncertainty_mc: 200,
    calibration_uncertainty_e8: 1000,
    settle_readings: 3,
    settle_band_e8: 3000,
    settle_band_mc: 100,
};

/// Flash size of the board (a Raspberry Pi Pico: 2 MiB).
const FLASH_SIZE: usize = 2 * 1024 * 1024;
/// The two calibration sectors, kept out of the program by `memory.x`.
const CALIBRATION_OFFSET: u32 = (FLASH_SIZE - 2 * flash::ERASE_SIZE) as u32;

bind_interrupts!(struct Irqs {
    DMA_IRQ_0 => dma::InterruptHandler<DMA_CH0>, dma::InterruptHandler<DMA_CH1>;
});

type BoardFlash<'d> = Flash<'d, FLASH, Blocking, FLASH_SIZE>;

/// The calibration record in the two sectors at `CALIBRATION_OFFSET`: the
/// crate's two-slot store on the HAL's `NorFlash` (a commit erases and writes
/// the slot not in use and reads it back; a power cut keeps the old record).
type Store<'d> = CalibrationStore<NorFlashSlots<BoardFlash<'d>>>;

/// One frame from the line sensor: chip select low, 2048 bytes by DMA, chip
/// select high, then the big-endian pixel pairs into counts.
async fn read_frame(
    spi: &mut Spi<'_, embassy_rp::peripherals::SPI0, spi::Async>,
    select: &mut Output<'_>,
    raw: &mut [u8; 2 * PIXELS],
    frame: &mut [u16; PIXELS],
) -> Result<(), spi::Error> {
    select.set_low();
    let read = spi.read(raw).await;
    select.set_high();
    read?;
    for (px, pair) in frame.iter_mut().zip(raw.chunks_exact(2)) {
        *px = u16::from_be_bytes([pair[0], pair[1]]) & 0x0FFF;
    }
    Ok(())
}

#[embassy_executor::main]
async fn main(_spawner: Spawner) {
    let p = embassy_rp::init(Default::default());

    let mut adc = Adc::new_blocking(p.ADC, adc::Config::default());
    let mut thermistor = Channel::new_pin(p.PIN_26, Pull::None);

    let mut config = spi::Config::default();
    config.frequency = 8_000_000;
    let mut sensor = Spi::new_rxonly(
        p.SPI0, p.PIN_18, p.PIN_16, p.DMA_CH0, p.DMA_CH1, Irqs, config,
    );
    let mut select = Output::new(p.PIN_17, Level::High);
    let zero_button = Input::new(p.PIN_15, Pull::Up);

    let Ok(mut meter) = BrixMeter::<S>::new(&METER) else {
        defmt::error!("meter design refused");
        return;
    };
    let mut store: Option<Store<'_>> =
        match CalibrationStore::on_nor_flash(BoardFlash::new_blocking(p.FLASH), CALIBRATION_OFFSET)
        {
            Ok(s) => Some(s),
            Err(e) => {
                warn!("calibration flash unusable: {}", e);
                None
            }
        };
    match store.as_ref().and_then(|s| s.current()) {
        Some((slot, rec)) => match meter.restore(&rec) {
            Ok(_) => info!("calibration {} restored from slot {}", rec.sequence, slot),
            Err(e) => warn!("stored calibration refused ({}): uncalibrated", e),
        },
        None => warn!("no calibration stored: uncalibrated"),
    }

    let mut raw = [0u8; 2 * PIXELS];
    let mut frame = [0u16; PIXELS];
    let mut zeroing = zero_button.is_low();
    if zeroing {
        info!("zero: distilled water on the prism");
    }
    loop {
        if let Err(e) = read_frame(&mut sensor, &mut select, &mut raw, &mut frame).await {
            warn!("line sensor: {}", e);
            continue;
        }
        let Ok(code) = adc.blocking_read(&mut thermistor) else {
            warn!("thermistor: ADC read failed");
            continue;
        };

        if zeroing {
            // Average the configured frames, then zero against water at the LED.
            match meter.feed(&frame, code) {
                Ok(None) => {}
                Ok(Some(avg)) => {
                    zeroing = false;
                    let choice = store
                        .as_ref()
                        .map_or(record::choose_slots(&[], &[]), |s| s.choice());
                    let stored = meter
                        .zero_with_water(&avg)
                        .and_then(|_| meter.calibration_record(&choice));
                    match (stored, store.as_mut()) {
                        (Ok(rec), Some(store)) => match store.commit(rec) {
                            Ok((slot, rec)) => {
                                meter.set_record_sequence(rec.sequence);
                                info!(
                                    "zero stored as calibration {} in slot {}",
                                    rec.sequence, slot
                                )
                            }
                            Err(e) => warn!("calibration not stored: {}", e),
                        },
                        (Ok(_), None) => warn!("zero kept until power-off: no calibration flash"),
                        (Err(e), _) => warn!("zero refused: {}", e),
                    }
                }
                Err(e) => warn!("zero frame: {}", e),
            }
            continue;
        }

        let reading = match meter.feed(&frame, code) {
            Ok(Some(mean)) => meter.read(&mean).map(Some),
            Ok(None) => Ok(None),
            Err(e) => Err(e),
        };
        match reading {
            Ok(None) => {}
            Ok(Some(r)) => match r.brix {
                Ok(brix) => info!(
                    "{} ± {} %Brix  nD20 {} ± {}  {} °C{}",
                    brix,
                    r.u_brix,
                    r.nd20,
                    r.u_nd20,
                    r.temperature_c,
                    if r.settled { "" } else { "  (settling)" }
                ),
                Err(e) => info!("nD20 {} (off the %Brix scale: {})", r.nd20, e),
            },
            Err(e) => warn!("reading: {}", e),
        }
    }
}
