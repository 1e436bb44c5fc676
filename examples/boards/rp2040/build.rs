//! The design's data for the reading side, from the crate's exact models on
//! the host: the sensor's position map through the optics and the prism, water's
//! index at the LED (the zero), the thermistor's code table, the dispersion
//! ratio at the LED. Written to `$OUT_DIR/design.rs`, included by main.rs.
use embedded_optics::media::glass::Glass;
use embedded_optics::refractometer::geometry::GeometryDescription;
use embedded_optics::refractometer::prepare;
use embedded_optics::refractometer::thermistor::{Beta, Divider, Placement};

/// 1024 pixels of 14 µm behind 30 mm optics, prism apex 56.25°.
const GEOMETRY: GeometryDescription = GeometryDescription {
    pixel_pitch_um: 14.0,
    focal_length_mm: 30.0,
    axis_offset_px: 511.5,
    apex_angle_deg: 56.25,
    reversed: false,
};

/// The thermistor divider on ADC0: 10 kΩ NTC (β 3950 K) to ground under
/// 10 kΩ, 12-bit codes.
const DIVIDER: Divider = Divider {
    placement: Placement::ThermistorLowSide,
    reference_ohms: 10_000,
    adc_bits: 12,
    rail_margin_codes: 8,
};

fn main() {
    println!("cargo:rerun-if-changed=build.rs");
    let prism = Glass::from_nd_vd(1.7174, 29.5, 4.0).expect("prism");
    let ntc = Beta {
        beta_k: 3950,
        r0_ohms: 10_000,
        t0_c: 25.0,
    };
    let data = prepare::prepare(&GEOMETRY, &prism, 590.0, 1024, &DIVIDER, &ntc).expect("prepare");
    let mut src = String::new();
    data.to_rust("DESIGN", &mut src).expect("write");
    let out =
        std::path::PathBuf::from(std::env::var("OUT_DIR").expect("OUT_DIR")).join("design.rs");
    std::fs::write(out, src).expect("write design.rs");
}
