//! The reading's geometry through the stretch of the array it falls in (a
//! cubic in the position per 32 pixels and per whole degree of prism
//! temperature) against the geometry itself (`Geometry::index_at`, the
//! closed-form critical-angle relation checked in `tests/world_refraction.rs`),
//! at the prism index of the reading's own temperature.

use embedded_optics::Scalar;
use embedded_optics::media::Medium;
use embedded_optics::refractometer::boundary::Boundary;
use embedded_optics::refractometer::geometry::Geometry;
use embedded_optics::refractometer::instrument::Averaged;
use fixed::types::{I8F24, I32F32};

mod support;
use support::{GEOMETRY, LED_NM, LinearGlass, PIXELS};

fn averaged<S: Scalar>(position: i32, t: f64) -> Averaged<S> {
    Averaged {
        position,
        position_uncertainty: 1 << 12,
        temperature_c: S::from_f64(t).unwrap(),
        boundary: Boundary {
            position,
            dark_level: 100,
            bright_level: 3000,
            noise_q8: 2560,
            edge_width_q8: 400,
            uncertainty: 1 << 12,
        },
        frames: 1,
    }
}

/// Worst |raw index − geometry| over the array and 5–40 °C, in `S`, against
/// the f64 geometry, and the readings compared.
fn worst<S: Scalar>() -> (f64, usize) {
    let geometry = Geometry::<f64>::new(&GEOMETRY).unwrap();
    let mut inst = support::instrument::<S>();
    let (mut index, mut n) = (0f64, 0);
    let mut x = 0x2545_F491_4F6C_DD1Du64;
    for k in 0..4000 {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        // Temperatures off whole degrees and whole ones; positions anywhere
        // on the array, in sub-pixel steps.
        let t = 5.0 + 35.0 * (k as f64 / 4000.0) + if k % 5 == 0 { 0.0 } else { 0.37 };
        let t = t.round_to_hundredths();
        let position = ((x >> 11) % ((PIXELS as u64) << 16)) as i32;
        let avg = averaged::<S>(position, t);
        let Ok(r) = inst.read(&avg) else { continue };
        let n_p = LinearGlass
            .index(LED_NM / 1000.0, avg.temperature_c.to_f64())
            .unwrap();
        let Ok(want) = geometry.index_at(position, n_p) else {
            panic!("the instrument read where the geometry refuses: {position} {t}");
        };
        index = index.max((r.raw_index.to_f64() - want.index).abs());
        n += 1;
    }
    (index, n)
}

trait Hundredths {
    fn round_to_hundredths(self) -> f64;
}
impl Hundredths for f64 {
    fn round_to_hundredths(self) -> f64 {
        (self * 100.0).round() / 100.0
    }
}

#[test]
fn the_stretch_follows_the_geometry_in_every_number_type() {
    let (f, _) = worst::<f64>();
    let (g, _) = worst::<f32>();
    let (h, _) = worst::<I32F32>();
    let (i, n) = worst::<I8F24>();
    println!(
        "raw index vs geometry (f64): f64 {f:.1e}, f32 {g:.1e}, I32F32 {h:.1e}, I8F24 {i:.1e} over {n} readings"
    );
    assert!(n > 3000);
    // f64: the cubic's own error over 32 pixels (h^4 n''''/384, under 1e-10)
    // and the prism's straight line within a degree; the others: the
    // geometry's own budgets in docs/accuracy.md (5e-7, 5e-9, 6e-7).
    assert!(f < 1e-9, "{f}");
    assert!(g < 5e-7 && h < 5e-9 && i < 6e-7, "{g} {h} {i}");
}
