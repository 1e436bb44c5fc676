//! Our fictional juice plant's bench refractometer uses a 590 nm LED and a
//! dense-flint prism. This host example follows one reading through the optics
//! of the dispersion step: the prism's index at the LED and the instrument's
//! temperature, water's index for the zero check, and the sample's nD.
//!
//! Run with `cargo run --example led_to_nd`.

use embedded_optics::media::glass::Glass;
use embedded_optics::media::water::WaterTable;
use embedded_optics::media::{IndexReference, Medium};
use embedded_optics::optics::refraction::sample_index_from_critical_sine;
use embedded_optics::refractometer::WavelengthCorrection;
use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
use fixed::types::I32F32;

fn main() -> Result<(), embedded_optics::Error> {
    let led_um = I32F32::from_num(0.590);
    let temperature = I32F32::from_num(26.5);
    // Prism of glass code 717295 (a dense flint: nd 1.7174, Vd 29.5, from memory),
    // dn/dT +4.0e-6/K (the order of dense flints, from memory).
    let prism = Glass::from_nd_vd(
        I32F32::from_num(1.7174),
        I32F32::from_num(29.5),
        I32F32::from_num(4.0),
    )?;
    let n_prism = prism.index(led_um, temperature)?;
    println!("prism index at 590 nm, 26.5 °C: {n_prism:.6}");

    // Zero check with distilled water: the table is built once at start-up.
    let water = WaterTable::new(led_um, IndexReference::Air)?;
    let n_water = water.index(temperature)?;
    println!("water at 590 nm, 26.5 °C (air-relative): {n_water:.6}");

    // A sample reading: sine of the measured critical angle (invented).
    let sin_c = I32F32::from_num(0.80925);
    let n_led = sample_index_from_critical_sine(n_prism, sin_c)?;
    let nd = WaterLikeDispersion.to_nd(n_led, led_um)?;
    println!("sample: n(590 nm) = {n_led:.6}, nD = {nd:.6} (at 26.5 °C, before ATC)");
    Ok(())
}
