//! The invented handheld of this image, shared by the firmware and its build
//! script: optics, thermistor, the meter's settings, the samples of the run,
//! and how the stored test frames are unpacked.

use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};

/// 512 pixels of 14 µm behind 30 mm optics; prism apex 53.5°; 590 nm LED.
pub const PIXELS: usize = 512;
/// LED centre wavelength, nm.
pub const LED_NM: f64 = 590.0;
/// How the boundary is found: 12-bit sensor, dark below the critical angle.
pub const BOUNDARY: BoundaryConfig = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
/// Frames per reading, as a power of two.
pub const FRAMES_LOG2: u8 = 0;

/// The span standard, %Brix at 20 °C.
pub const SPAN_BRIX: f64 = 40.0;
/// Zero (water) and span temperatures, °C.
pub const ZERO_C: f64 = 18.0;
/// See [`ZERO_C`].
pub const SPAN_C: f64 = 22.0;
/// The samples read after the restart: (%Brix at 20 °C, °C).
pub const SAMPLES: [(f64, f64); 5] = [
    (0.0, 20.0),
    (12.0, 15.3),
    (20.0, 25.8),
    (33.3, 10.4),
    (45.0, 31.2),
];

/// A frame stored as knots `(pixel, counts)`, rebuilt by straight lines
/// between them (integer arithmetic: the firmware and the host rebuild the
/// same frame).
pub fn unpack(knots: &[(u16, u16)], frame: &mut [u16]) {
    for pair in knots.windows(2) {
        let ((x0, v0), (x1, v1)) = (pair[0], pair[1]);
        let (x0, x1) = (i32::from(x0), i32::from(x1));
        let (v0, v1) = (i32::from(v0), i32::from(v1));
        let span = (x1 - x0).max(1);
        for x in x0..=x1 {
            if let Some(p) = frame.get_mut(x as usize) {
                let v = v0 + (v1 - v0) * (x - x0) / span;
                *p = v.clamp(0, 4095) as u16;
            }
        }
    }
}
