//! The reading side: what a refractometer's firmware links.
//!
//! The crate has two sides with a line between them:
//!
//! - **the reading side** (this folder): the boundary finder, evaluators of
//!   data prepared at build time ([`prepared`]: the position map, the
//!   thermistor's code table, water's index for the zero, the sucrose
//!   correction grid), the ICUMSA %Brix cells ([`brix_cells`], worked out at
//!   compile time), the %Brix meter ([`meter`]), the calibration record and
//!   its flash store. It checks inputs once where they enter and computes
//!   inside with range-proved arithmetic; it imports nothing but the numeric
//!   core and this folder.
//! - **the model side** (the rest of [`refractometer`](super) with
//!   [`optics`](crate::optics) and [`media`](crate::media)): the exact models
//!   (published tables, the sucrose temperature model, IAPWS water, the
//!   prism's geometry and dispersion), checked on every operation. It runs
//!   on the host, at build time ([`prepare`](super::prepare) turns it into
//!   the data above) and in the tests, and it is the reference the reading
//!   side is measured against.
//!
//! `tests/layout.rs` enforces the line: no file here imports the model side.
//!
//! A firmware builds its design's data in its `build.rs` with
//! [`prepare`](super::prepare) (the crate as a build dependency), includes
//! it as `const`s and runs a [`BrixMeter`](meter::BrixMeter) on it:
//!
//! ```
//! use embedded_optics::media::glass::Glass;
//! use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
//! use embedded_optics::refractometer::geometry::GeometryDescription;
//! use embedded_optics::refractometer::prepare::{self, Prepared};
//! use embedded_optics::refractometer::reading::meter::{BrixMeter, MeterDesign};
//! use embedded_optics::refractometer::reading::tables::OIV_GRID;
//! use embedded_optics::refractometer::thermistor::{Beta, Divider, Placement};
//! # fn main() -> Result<(), embedded_optics::Error> {
//! // On the host (a build script): our invented handheld's optics, prism,
//! // LED and thermistor, turned into data.
//! let geometry = GeometryDescription {
//!     pixel_pitch_um: 14.0, focal_length_mm: 30.0, axis_offset_px: 256.0,
//!     apex_angle_deg: 53.5, reversed: false,
//! };
//! let prism = Glass::from_nd_vd(1.7174, 29.5, 4.0)?;
//! let divider = Divider {
//!     placement: Placement::ThermistorLowSide, reference_ohms: 10_000, adc_bits: 12,
//!     rail_margin_codes: 4,
//! };
//! let ntc = Beta { beta_k: 3950, r0_ohms: 10_000, t0_c: 25.0 };
//! let data: Prepared = prepare::prepare(&geometry, &prism, 590.0, 512, &divider, &ntc)?;
//! // `data.to_rust("DESIGN")` is what the build script writes; here the
//! // same data is used directly.
//! let design = MeterDesign {
//!     boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
//!     map: data.map(), water: data.water(), thermistor: data.thermistor(),
//!     dispersion_ratio_q30: data.dispersion_ratio_q30, compensation: OIV_GRID,
//!     led_wavelength_pm: 590_000, frames_log2: 0, temperature_uncertainty_mc: 100,
//!     calibration_uncertainty_e8: 2000, settle_readings: 3, settle_band_e8: 2000,
//!     settle_band_mc: 100,
//! };
//! let meter = BrixMeter::<f32>::new(&design)?;
//! # let _ = meter;
//! # Ok(())
//! # }
//! ```

pub mod boundary;
pub mod brix_cells;
pub mod meter;
pub mod prepared;
pub mod record;
pub mod store;
#[rustfmt::skip]
pub mod tables;
