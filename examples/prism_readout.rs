//! A first taste of the refractometer relation, in three number types.
//!
//! Our fictional juice plant's bench refractometer has a dense-flint prism
//! (nD 1.7200, assumed) and reports the critical angle it found for three samples.
//! The example turns each angle into the sample's refractive index with the same
//! generic routine in f64, f32 and 32-bit fixed point, and shows the agreement.
//!
//! Run: `cargo run --example prism_readout`

use embedded_optics::optics::refraction::{critical_angle, sample_index_from_critical_angle};
use embedded_optics::{Error, Scalar};
use fixed::types::I8F24;

fn index_from_angle<S: Scalar>(n_prism: f64, critical_deg: f64) -> Result<f64, Error> {
    let n = sample_index_from_critical_angle(
        S::from_f64(n_prism)?,
        S::from_f64(critical_deg.to_radians())?,
    )?;
    Ok(n.to_f64())
}

fn main() -> Result<(), Error> {
    let n_prism = 1.72;
    // Demo samples: rinse water, apple juice, a syrup concentrate (invented).
    let samples = [
        ("rinse water", 1.3330),
        ("apple juice", 1.3530),
        ("syrup concentrate", 1.4400),
    ];
    println!("prism nD {n_prism:.4}");
    println!(
        "{:<18} {:>10} {:>11} {:>11} {:>11}",
        "sample", "θc (deg)", "n f64", "n f32", "n I8F24"
    );
    for (name, n_true) in samples {
        let theta: f64 = critical_angle(n_prism, n_true)?;
        let deg = theta.to_degrees();
        println!(
            "{name:<18} {deg:>10.4} {:>11.6} {:>11.6} {:>11.6}",
            index_from_angle::<f64>(n_prism, deg)?,
            index_from_angle::<f32>(n_prism, deg)?,
            index_from_angle::<I8F24>(n_prism, deg)?,
        );
    }
    // A gemstone on the prism has no critical angle: the instrument must say so.
    match critical_angle(n_prism, 2.15) {
        Err(e) => println!("cubic zirconia (n 2.15): {e}"),
        Ok(t) => println!("unexpected angle {t}"),
    }
    Ok(())
}
