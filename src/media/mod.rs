//! Optical media with their published index models: water, seawater, air, glass.
//!
//! Each model enforces its validity range (outside it: [`Error::OutOfRange`](crate::Error::OutOfRange),
//! never an extrapolation) and says whether its index is relative to vacuum or to
//! air. Each implements [`Medium`](crate::medium::Medium) so instrument code can
//! ask for `n(λ, T)` without knowing which formula answers.
//!
//! Wavelengths are in micrometres throughout (the `Medium` trait's unit too), so
//! every model runs in every number type, I8F24 (range ±128) included.
//!
//! | model | source | reference | validity |
//! |---|---|---|---|
//! | [`water`] | IAPWS R9-97 with Kell (1975) density at 101.325 kPa | vacuum (or air, converted) | 0–100 °C, 0.2–1.1 µm |
//! | [`seawater`] | Quan & Fry (1995) | air | 0–30 °C, 0–35 ‰, 0.4–0.7 µm |
//! | [`air`] | Ciddor (1996) standard air, Edlén-type density scaling | vacuum | −20–50 °C, 50–120 kPa, 0.3–1.69 µm |
//! | [`glass`] | Malitson (1965) fused silica; any Sellmeier or (nd, Vd) glass, linear dn/dT | air | the law's range, −20–80 °C |

pub mod air;
pub mod glass;
pub mod seawater;
pub mod water;
