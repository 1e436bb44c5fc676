//! A handheld %Brix refractometer on an RP2040 (Cortex-M0+, no FPU) with
//! embassy-rp, in I32F32 fixed point. Our fictional juice plant's hand unit:
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
//! LED) are the board images' invented design; put your own in `DESCRIPTION`.
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
use embedded_optics::media::IndexReference;
use embedded_optics::media::glass::Glass;
use embedded_optics::media::water::Water;
use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
use embedded_optics::refractometer::compensation::SucroseCompensation;
use embedded_optics::refractometer::geometry::GeometryDescription;
use embedded_optics::refractometer::instrument::{Instrument, InstrumentDescription};
use embedded_optics::refractometer::record;
use embedded_optics::refractometer::scales::SucroseBrix;
use embedded_optics::refractometer::store::{CalibrationStore, NorFlashSlots};
use embedded_optics::refractometer::thermistor::{Beta, Divider, Placement};
use embedded_optics::refractometer::wavelength::{WaterLikeAtLed, WaterLikeDispersion};
use embedded_optics::{Error, lit};
use fixed::types::I32F32;
use {defmt_rtt as _, panic_probe as _};

/// The number type of the whole chain: no FPU, so fixed point.
type S = I32F32;

/// Pixels of the line sensor.
const PIXELS: usize = 1024;

/// The instrument's optics and read-out (see the module docs).
const DESCRIPTION: InstrumentDescription = InstrumentDescription {
    geometry: GeometryDescription {
        pixel_pitch_um: 14.0,
        focal_length_mm: 30.0,
        axis_offset_px: 511.5,
        apex_angle_deg: 56.25,
        reversed: false,
    },
    boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
    led_wavelength_nm: 590.0,
    frames_per_reading: 4,
    temperature_uncertainty_c: 0.2,
    calibration_uncertainty: 1.0e-5,
    settle_readings: 3,
    settle_band_nd: 3.0e-5,
    settle_band_c: 0.1,
};

/// The thermistor divider on ADC0 (12-bit codes).
const DIVIDER: Divider = Divider {
    placement: Placement::ThermistorLowSide,
    reference_ohms: 10_000,
    adc_bits: 12,
    rail_margin_codes: 8,
};

/// Flash size of the board (a Raspberry Pi Pico: 2 MiB).
const FLASH_SIZE: usize = 2 * 1024 * 1024;
/// The two calibration sectors, kept out of the program by `memory.x`.
const CALIBRATION_OFFSET: u32 = (FLASH_SIZE - 2 * flash::ERASE_SIZE) as u32;

bind_interrupts!(struct Irqs {
    DMA_IRQ_0 => dma::InterruptHandler<DMA_CH0>, dma::InterruptHandler<DMA_CH1>;
});

type Refractometer = Instrument<S, Glass<S>, WaterLikeAtLed<S>, SucroseCompensation, SucroseBrix>;

fn refractometer() -> Result<Refractometer, Error> {
    Instrument::new(
        &DESCRIPTION,
        Glass::from_nd_vd(lit!(S, 1.7174), lit!(S, 29.5), lit!(S, 4.0))?,
        WaterLikeDispersion::at_led(lit!(S, 0.590))?,
        SucroseCompensation::oiv(),
        SucroseBrix,
    )
}

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
    let beta = Beta {
        beta_k: 3950,
        r0_ohms: 10_000,
        t0_c: lit!(S, 25.0),
    };

    let mut config = spi::Config::default();
    config.frequency = 8_000_000;
    let mut sensor = Spi::new_rxonly(
        p.SPI0, p.PIN_18, p.PIN_16, p.DMA_CH0, p.DMA_CH1, Irqs, config,
    );
    let mut select = Output::new(p.PIN_17, Level::High);
    let zero_button = Input::new(p.PIN_15, Pull::Up);

    let Ok(mut meter) = refractometer() else {
        defmt::error!("instrument description refused");
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
        let temperature = adc
            .blocking_read(&mut thermistor)
            .map_err(|_| Error::SensorOpen)
            .and_then(|code| DIVIDER.temperature_c(&beta, u32::from(code)));
        let temperature = match temperature {
            Ok(t) => t,
            Err(e) => {
                warn!("thermistor: {}", e);
                continue;
            }
        };

        if zeroing {
            // Average the configured frames, then zero against water at the LED.
            match meter.feed(&frame, temperature) {
                Ok(None) => {}
                Ok(Some(avg)) => {
                    zeroing = false;
                    let choice = store
                        .as_ref()
                        .map_or(record::choose_slots(&[], &[]), |s| s.choice());
                    let stored = meter
                        .zero_with_water(&avg, &Water::new(IndexReference::Air))
                        .and_then(|_| meter.calibration_record(&choice));
                    match (stored, store.as_mut()) {
                        (Ok(rec), Some(store)) => match store.commit(rec) {
                            Ok((slot, rec)) => {
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

        match meter.measure(&frame, temperature) {
            Ok(None) => {}
            Ok(Some(r)) => match r.scale_value {
                Ok(brix) => info!(
                    "{} %Brix  nD20 {} ± {}  {} °C{}",
                    brix,
                    r.nd20,
                    r.uncertainty,
                    r.temperature_c,
                    if r.stable { "" } else { "  (settling)" }
                ),
                Err(e) => info!("nD20 {} (off the %Brix scale: {})", r.nd20, e),
            },
            Err(e) => warn!("reading: {}", e),
        }
    }
}
