//! Optics math for instrument firmware: refractometers and camera autofocus.
//!
//! `embedded-optics` gives firmware for handheld digital refractometers and
//! autofocus controllers the physics they rest on and the measurement chains
//! built on it, in `no_std` Rust with no heap and no panics:
//!
//! The crate reads top-down, each layer importing only from the layers below it:
//!
//! | layer | modules |
//! |---|---|
//! | instruments (peers, never importing each other) | [`refractometer`] (sensor frame → boundary → nD at 20 °C → %Brix and other scales, calibration record and its flash store, thermistor, forward model); [`autofocus`] (focus geometry, actuator calibration and driver, focus metrics, search, camera-module simulation) |
//! | physics | [`optics`] (refraction, Fresnel, dispersion, lenses, chromatic effects, prisms); [`media`] (water, seawater, air, glass, and the [`Medium`](media::Medium) seam) |
//! | shared helpers | [`rng`] (the seeded generator of both simulations) |
//! | numeric core | [`scalar`] (the [`Scalar`] trait, `lit!`, integer rounding), [`error`] |
//!
//! Every routine is written once, generic over [`Scalar`], and runs in `f32`, `f64` or fixed
//! point ([`I32F32`](fixed::types::I32F32), [`I8F24`](fixed::types::I8F24)) with
//! the same algorithm, so a Cortex-M0 without FPU and a PC simulation agree.
//!
//! Every public function is total: NaN, infinities, zero, negative and
//! out-of-range inputs give a typed [`Error`]; fixed-point overflow is an error.
//!
//! The accuracy of every routine in every number type, measured against `f64`, is
//! in [`accuracy`].
//!
//! ```
//! use embedded_optics::optics::refraction::{critical_sine, sample_index_from_critical_sine};
//! use fixed::types::I8F24;
//! // A sugar solution (nD 1.3811) on a prism of index 1.72.
//! let n_prism = I8F24::from_num(1.72);
//! let s = critical_sine(n_prism, I8F24::from_num(1.3811)).unwrap();
//! let n = sample_index_from_critical_sine(n_prism, s).unwrap();
//! assert!((n.to_num::<f64>() - 1.3811).abs() < 1e-6);
//! ```
#![no_std]
#![forbid(unsafe_code)]
#![deny(missing_docs)]

pub mod autofocus;
pub mod error;
pub mod media;
pub mod optics;
pub mod refractometer;
pub mod rng;
pub mod scalar;

pub use error::{Error, Quantity};
pub use scalar::Scalar;

/// Accuracy of every routine in every number type against an `f64` reference.
#[doc = include_str!("../docs/accuracy.md")]
pub mod accuracy {}
