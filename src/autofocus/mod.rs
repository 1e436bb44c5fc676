//! The autofocus instrument: from a subject distance, a focus-metric curve or a
//! phase disparity to a lens-actuator code, and back to a subject distance.
//!
//! - [`focus`]: focus geometry (lens extension, depth of field, hyperfocal
//!   distance, circle of confusion, sweep planning);
//! - [`actuator`]: VCM or stepper code ↔ lens position ↔ subject distance, from
//!   factory points;
//! - [`dynamics`]: the lens carrier as a damped second-order system: step
//!   response, settle time, identification from a recorded step, input shapers;
//! - [`driver`]: the actuator's I²C driver on `embedded-hal` 1.0;
//! - `async_driver` (feature `async`): the same driver on `embedded-hal-async` 1.0;
//! - [`assist`]: focus targets from a phase-detect disparity or a range sensor;
//! - [`metric`]: focus metrics on a region of interest;
//! - [`search`]: contrast and hybrid search as a per-frame state machine;
//! - [`sim`]: a seeded camera-module simulation for trying the search on a PC.
//!
//! It rests on [`crate::optics`] and the numeric core; it imports nothing from
//! [`crate::refractometer`]. Measured closed-loop figures are in `docs/autofocus.md`.

pub mod actuator;
pub mod assist;
#[cfg(feature = "async")]
pub mod async_driver;
pub mod driver;
pub mod dynamics;
pub mod focus;
pub mod metric;
pub mod search;
pub mod sim;
