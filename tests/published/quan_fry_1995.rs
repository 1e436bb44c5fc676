//! The index of refraction of seawater: X. Quan and E. S. Fry, "Empirical
//! equation for the index of refraction of seawater", Appl. Opt. 34(18),
//! 3477–3480 (1995), a fit to the Austin & Halikas (1976) data, relative to
//! air. Salinity S in ‰ as the paper gives it, T in °C, λ in nm. The ten
//! coefficients are recalled (`// from memory`); at 20 °C and 589.3 nm they
//! give 1.3330044 at S = 0, 1.4e-5 above water's 1.33299.

/// n(S, T, λ) of the relation.
pub fn nd(s: f64, t: f64, l: f64) -> f64 {
    1.31405 + (1.779e-4 - 1.05e-6 * t + 1.6e-8 * t * t) * s - 2.02e-6 * t * t
        + (15.868 + 0.01155 * s - 0.00423 * t) / l
        - 4382.0 / (l * l)
        + 1.1455e6 / (l * l * l)
}
