// One row of inputs and the table of outputs checked on the boards. Shared by
// build.rs (host, expected values) and the images (target) with `#[path]`, so the
// host and the firmware run literally the same code.

use embedded_optics::optics::refraction::{
    critical_angle, critical_sine, sample_index_from_critical_angle,
    sample_index_from_critical_sine,
};
use embedded_optics::{Error, Scalar, optics::fresnel};

/// Outputs per row: see [`outputs`].
pub const OUTPUTS: usize = 10;

/// Names of the outputs, in the order of [`outputs`] (for failure messages).
pub const OUTPUT_NAMES: [&str; OUTPUTS] = [
    "critical_sine",
    "critical_angle",
    "sample_index_from_critical_sine",
    "sample_index_from_critical_angle",
    "reflectance_from_cosine.s",
    "reflectance_from_cosine.p",
    "reflectance_from_cosine.unpolarised",
    "reflectance.s",
    "reflectance.p",
    "reflectance.unpolarised",
];

/// Inputs of one row, in the scalar type under test.
#[derive(Clone, Copy)]
pub struct Row<S> {
    /// Prism index.
    pub n_prism: S,
    /// Sample index.
    pub n_sample: S,
    /// Measured sine of the critical angle.
    pub sine: S,
    /// Measured critical angle, rad.
    pub angle: S,
    /// Angle of incidence for Fresnel, rad.
    pub incidence: S,
    /// Cosine of the angle of incidence for Fresnel.
    pub cosine: S,
}

/// Every routine of the crate on one row.
pub fn outputs<S: Scalar>(r: &Row<S>) -> [Result<S, Error>; OUTPUTS] {
    let rc = fresnel::reflectance_from_cosine(r.n_prism, r.n_sample, r.cosine);
    let ra = fresnel::reflectance(r.n_prism, r.n_sample, r.incidence);
    [
        critical_sine(r.n_prism, r.n_sample),
        critical_angle(r.n_prism, r.n_sample),
        sample_index_from_critical_sine(r.n_prism, r.sine),
        sample_index_from_critical_angle(r.n_prism, r.angle),
        rc.map(|x| x.s),
        rc.map(|x| x.p),
        rc.map(|x| x.unpolarised),
        ra.map(|x| x.s),
        ra.map(|x| x.p),
        ra.map(|x| x.unpolarised),
    ]
}
