//! The ICUMSA sucrose table's cubic, cell by cell, with its inverse, worked
//! out at compile time: what a reading needs from the %Brix scale without
//! reading the table's entries, dividing or searching at run time.
//!
//! [`SucroseBrix`](crate::refractometer::scales::SucroseBrix) reads the table by four-point
//! interpolation; in each 5 %Brix cell that is one cubic. Here each cell's
//! cubic is expanded from the cell's lower entry, `n = y_k + s·(q1 + s·(q2 +
//! s·q3))` with `s` the place in the cell (0..1), and its inverse is a cubic
//! in `v = (n − y_k)/(y_{k+1} − y_k)`, `s ≈ v·(e1 + v·(e2 + v·e3))`,
//! interpolated through four points of the cell (within 2.3e-6 %Brix of the
//! exact inverse), then one chord step of Newton's method (within 4e-8).
//! `tests/sucrose_rows.rs` checks both against the table's own reading.

use crate::scalar::{Format, Scalar, literal_bits, split_floor};

/// The ICUMSA sucrose table, nD(20 °C, 589.3 nm, air) × 10⁵ at 0, 5, …, 85
/// %Brix: the data both sides read (sources in
/// [`SucroseBrix`](crate::refractometer::scales::SucroseBrix)'s table docs).
pub(crate) const ICUMSA_SUCROSE_ND: [i32; 18] = [
    133299, 134026, 134782, 135568, 136384, 137233, 138115, 139032, 139986, 140978, 142009, 143080,
    144193, 145348, 146546, 147787, 149071, 150398,
];
/// Denominator of [`ICUMSA_SUCROSE_ND`].
pub(crate) const ICUMSA_SUCROSE_DEN: i32 = 100_000;

/// Entries of the table.
const ENTRIES: usize = ICUMSA_SUCROSE_ND.len();
/// Cells (5 %Brix each).
pub(crate) const CELLS: usize = ENTRIES - 1;

/// One cell: `[y_k, q1, q2, q3, e1, e2, e3, 0.01/(y_{k+1} − y_k)]` (the
/// last scaled by 1/100 so that it fits I8F24; differences in nD are scaled
/// by 100 before they meet it).
type Cell = [f64; 8];

/// The cells in `f64`, from the table's integer entries by the same stencil
/// as the table's reading (the cubic through four entries, shifted to the
/// cell's lower entry).
const fn cells() -> [Cell; CELLS] {
    let ys = ICUMSA_SUCROSE_ND;
    let den = ICUMSA_SUCROSE_DEN as f64;
    let mut out = [[0.0; 8]; CELLS];
    let mut k = 0;
    while k < CELLS {
        // The table's stencil: entries k0..k0+4 with k0 = clamp(k − 1).
        let k0 = if k == 0 {
            0
        } else if k - 1 > ENTRIES - 4 {
            ENTRIES - 4
        } else {
            k - 1
        };
        let (y0, y1) = (ys[k0] as f64 / den, ys[k0 + 1] as f64 / den);
        let (y2, y3) = (ys[k0 + 2] as f64 / den, ys[k0 + 3] as f64 / den);
        // Newton form p(t) = y0 + t·a1 + t(t−1)·a2 + t(t−1)(t−2)·a3.
        let a1 = y1 - y0;
        let a2 = (y2 - 2.0 * y1 + y0) / 2.0;
        let a3 = (y3 - 3.0 * y2 + 3.0 * y1 - y0) / 6.0;
        // Monomial in t, then shifted to s = t − m.
        let (p1, p2, p3) = (a1 - a2 + 2.0 * a3, a2 - 3.0 * a3, a3);
        let m = (k - k0) as f64;
        let q3 = p3;
        let q2 = p2 + 3.0 * m * p3;
        let q1 = p1 + 2.0 * m * p2 + 3.0 * m * m * p3;
        let yk = ys[k] as f64 / den;
        let rise = (ys[k + 1] - ys[k]) as f64 / den;
        // The inverse through s = 0, 1/3, 2/3, 1 (Newton divided differences
        // on v, expanded; v0 = 0 and s0 = 0).
        let (s1, s2, s3) = (1.0 / 3.0, 2.0 / 3.0, 1.0);
        let v1 = s1 * (q1 + s1 * (q2 + s1 * q3)) / rise;
        let v2 = s2 * (q1 + s2 * (q2 + s2 * q3)) / rise;
        let v3 = s3 * (q1 + s3 * (q2 + s3 * q3)) / rise;
        let f01 = s1 / v1;
        let f12 = (s2 - s1) / (v2 - v1);
        let f23 = (s3 - s2) / (v3 - v2);
        let f012 = (f12 - f01) / v2;
        let f123 = (f23 - f12) / (v3 - v1);
        let f0123 = (f123 - f012) / v3;
        let e1 = f01 - f012 * v1 + f0123 * v1 * v2;
        let e2 = f012 - f0123 * (v1 + v2);
        let e3 = f0123;
        out[k] = [yk, q1, q2, q3, e1, e2, e3, 0.01 / rise];
        k += 1;
    }
    out
}

/// The cells as bits of a number format (for [`Scalar::from_literal_bits`]).
const fn cell_bits(format: Format) -> [[i64; 8]; CELLS] {
    let c = cells();
    let mut out = [[0; 8]; CELLS];
    let mut k = 0;
    while k < CELLS {
        let mut j = 0;
        while j < 8 {
            out[k][j] = match literal_bits(c[k][j], format) {
                Some(b) => b,
                None => panic!("a sucrose cell constant does not fit the number format"),
            };
            j += 1;
        }
        k += 1;
    }
    out
}

/// The cells as 32-bit patterns for a 32-bit format (half the flash of
/// [`cell_bits`]); zeros for any other format, which reads [`cell_bits`].
const fn cell_bits32(format: Format) -> [[i32; 8]; CELLS] {
    let mut out = [[0; 8]; CELLS];
    let wide = match format {
        Format::Float32 | Format::Fixed { total_bits: 32, .. } => cell_bits(format),
        _ => return out,
    };
    let mut k = 0;
    while k < CELLS {
        let mut j = 0;
        while j < 8 {
            // Float32 patterns are zero-extended, 32-bit fixed point
            // sign-extended: the low 32 bits carry either.
            out[k][j] = wide[k][j] as i32;
            j += 1;
        }
        k += 1;
    }
    out
}

/// Constant `j` of cell `k` in `S`.
fn constant<S: Scalar>(k: usize, j: usize) -> Option<S> {
    match S::FORMAT {
        Format::Float32 => {
            let bits = const { &cell_bits32(S::FORMAT) };
            let b = *bits.get(k)?.get(j)?;
            Some(S::from_literal_bits(i64::from(b as u32)))
        }
        Format::Fixed { total_bits: 32, .. } => {
            let bits = const { &cell_bits32(S::FORMAT) };
            Some(S::from_literal_bits(i64::from(*bits.get(k)?.get(j)?)))
        }
        _ => {
            let bits = const { &cell_bits(S::FORMAT) };
            Some(S::from_literal_bits(*bits.get(k)?.get(j)?))
        }
    }
}

/// Cell `k` in `S`.
fn cell<S: Scalar>(k: usize) -> Option<[S; 8]> {
    let mut out = [S::ZERO; 8];
    for (j, slot) in out.iter_mut().enumerate() {
        *slot = constant(k, j)?;
    }
    Some(out)
}

/// nD at 20 °C of `brix` %Brix, 0–85, and dnD/d%Brix there (the cubic's
/// tangent). `None` outside 0–85 or where an operation fails: the caller
/// reads the table itself.
pub fn nd_of_brix<S: Scalar>(brix: S) -> Option<(S, S)> {
    if !(brix >= S::ZERO && brix <= crate::lit!(S, 85.0)) {
        return None;
    }
    // u in 0..17: the cell and the place in it.
    let u = brix.mul(crate::lit!(S, 0.2)).ok()?;
    let (k, s) = split_floor(u).ok()?;
    let (k, s) = match usize::try_from(k).ok()? {
        k if k >= CELLS => (CELLS - 1, S::ONE),
        k => (k, s),
    };
    let [yk, q1, q2, q3, ..] = cell::<S>(k)?;
    // Ranges (unchecked arithmetic): s in 0..1, q1 under 0.014, q2 under
    // 2.2e-4, |q3| under 1e-5: every term is under 1.6 in magnitude.
    let sq3 = s.mul_proved(q3);
    let inner = q2.add_proved(sq3);
    let n = yk.add_proved(s.mul_proved(q1.add_proved(s.mul_proved(inner))));
    // dn/ds = q1 + s·(2·q2 + 3·s·q3), per %Brix: / 5.
    let bend = q2
        .add_proved(q2)
        .add_proved(sq3.add_proved(sq3).add_proved(sq3));
    let ds = q1.add_proved(s.mul_proved(bend));
    Some((n, ds.mul_proved(crate::lit!(S, 0.2))))
}

/// %Brix of `nd` on the 20 °C scale inside the table (nD from its first to
/// its last entry); `None` outside or where an operation fails.
pub fn brix_of_nd<S: Scalar>(nd: S) -> Option<S> {
    inverse::<S, true>(nd).map(|(b, _)| b)
}

/// [`brix_of_nd`] with d%Brix/dnD per 0.01 nD (the inverse cubic's
/// derivative: about 7, where the slope per unit nD, about 700, is beyond
/// I8F24; for an uncertainty, within 1e-3 of the exact tangent's inverse).
/// Without [`brix_of_nd`]'s chord step: the inverse cubic alone is within
/// 2.3e-6 %Brix of the exact inverse, and a reading saves its five
/// multiplications.
pub fn brix_of_nd_with_slope<S: Scalar>(nd: S) -> Option<(S, S)> {
    inverse::<S, false>(nd)
}

/// The inverse cubic of the cell `nd` lies in, with its slope, and with one
/// chord step of Newton's method when `CHORD`.
fn inverse<S: Scalar, const CHORD: bool>(nd: S) -> Option<(S, S)> {
    let first = crate::lit!(S, ICUMSA_SUCROSE_ND[0] as f64 / ICUMSA_SUCROSE_DEN as f64);
    let top = crate::lit!(
        S,
        ICUMSA_SUCROSE_ND[ENTRIES - 1] as f64 / ICUMSA_SUCROSE_DEN as f64
    );
    if !(nd >= first && nd <= top) {
        return None;
    }
    // The last cell whose lower entry is at or below nd (rising entries),
    // by halving.
    let (mut k, mut above) = (0, CELLS);
    while above - k > 1 {
        let mid = (k + above) / 2;
        if constant::<S>(mid, 0)? <= nd {
            k = mid;
        } else {
            above = mid;
        }
    }
    let [yk, q1, q2, q3, e1, e2, e3, per_rise] = cell::<S>(k)?;
    // Ranges (unchecked arithmetic): 0 ≤ du ≤ the cell's rise (under
    // 0.014), ×100 under 1.4, v in 0..1, |e2|, |e3| under 0.03, s under 1.1,
    // the cell's cubic at s under 0.02: every term is under 2 in magnitude.
    let hundred = crate::lit!(S, 100.0);
    let du = nd.sub_proved(yk);
    let v = du.mul_proved(hundred).mul_proved(per_rise);
    let ve3 = v.mul_proved(e3);
    let s = v.mul_proved(e1.add_proved(v.mul_proved(e2.add_proved(ve3))));
    // ds/dv = e1 + v·(2·e2 + 3·v·e3); d%Brix per 0.01 nD = 5·ds/dv·per_rise.
    let bend = e2
        .add_proved(e2)
        .add_proved(ve3.add_proved(ve3).add_proved(ve3));
    let x = e1.add_proved(v.mul_proved(bend)).mul_proved(per_rise);
    let per_centi = x.add_proved(x).add_proved(x.add_proved(x)).add_proved(x);
    // One chord step: s − (n(s) − nd)/(y_{k+1} − y_k).
    let s = if CHORD {
        let cubic = q1.add_proved(s.mul_proved(q2.add_proved(s.mul_proved(q3))));
        let miss = s.mul_proved(cubic).sub_proved(du);
        s.sub_proved(miss.mul_proved(hundred).mul_proved(per_rise))
    } else {
        s
    };
    let s = s.max(S::ZERO).min(S::ONE);
    // Under 90.
    let b = S::from_i32(5 * k as i32)
        .ok()?
        .add_proved(s.mul_proved(crate::lit!(S, 5.0)));
    Some((b, per_centi))
}

/// Slope dnD/d%Brix and curvature d²nD/d%Brix² of the table's end cubics
/// (four-point Lagrange derivatives), at 0 and at 85 %Brix: the parabolas a
/// reading continues along beyond the table's ends (water read warm, a dense
/// syrup read cold). Returns (nD at the end, slope, curvature); the scale's
/// band below water and its reading beyond the ends take the same.
pub(crate) const fn end_parabola(top: bool) -> (f64, f64, f64) {
    let y = ICUMSA_SUCROSE_ND;
    let d = ICUMSA_SUCROSE_DEN as f64;
    let n = ENTRIES;
    let (y0, y1, y2, y3, sign) = if top {
        (y[n - 1], y[n - 2], y[n - 3], y[n - 4], -1.0)
    } else {
        (y[0], y[1], y[2], y[3], 1.0)
    };
    let (y0, y1, y2, y3) = (y0 as f64 / d, y1 as f64 / d, y2 as f64 / d, y3 as f64 / d);
    let slope = sign * (-11.0 * y0 + 18.0 * y1 - 9.0 * y2 + 2.0 * y3) / 30.0;
    let curvature = (2.0 * y0 - 5.0 * y1 + 4.0 * y2 - y3) / 25.0;
    (y0, slope, curvature)
}

/// Lowest %Brix read at temperature (water read at 40 °C is about −1.7).
pub const APPARENT_MIN: f64 = -2.5;
/// Highest %Brix read at temperature (85 %Brix read at 5 °C is about 85.9).
pub const APPARENT_MAX: f64 = 87.0;

/// nD at 20 °C for `brix` from [`APPARENT_MIN`] to [`APPARENT_MAX`]: the
/// table's cubic inside 0–85, its end parabolas beyond; with the slope.
pub fn nd_of_apparent<S: Scalar>(brix: S) -> Option<(S, S)> {
    if brix >= S::ZERO && brix <= crate::lit!(S, 85.0) {
        return nd_of_brix(brix);
    }
    if !(brix >= crate::lit!(S, APPARENT_MIN) && brix <= crate::lit!(S, APPARENT_MAX)) {
        return None;
    }
    let top = brix > S::ZERO;
    let (n0, slope, curvature) = if top {
        const E: (f64, f64, f64) = end_parabola(true);
        (
            crate::lit!(S, E.0),
            crate::lit!(S, E.1),
            crate::lit!(S, E.2),
        )
    } else {
        const E: (f64, f64, f64) = end_parabola(false);
        (
            crate::lit!(S, E.0),
            crate::lit!(S, E.1),
            crate::lit!(S, E.2),
        )
    };
    let b = if top {
        brix.sub_proved(crate::lit!(S, 85.0))
    } else {
        brix
    };
    // Ranges: |b| ≤ 2.5, slope under 3e-3, curvature under 1e-4.
    let half_bend = curvature.mul_proved(S::HALF).mul_proved(b);
    let n = n0.add_proved(b.mul_proved(slope.add_proved(half_bend)));
    Some((n, slope.add_proved(curvature.mul_proved(b))))
}

/// %Brix of `nd` read at temperature, on the 20 °C scale, from
/// [`APPARENT_MIN`] to [`APPARENT_MAX`]: [`brix_of_nd`] inside the table, the
/// end parabolas' root beyond (`b = u − k·u²/2 + k²·u³/2 − 5k³·u⁴/8`, `u =
/// (n − n_end)/slope`, `k = curvature/slope`: under 1e-5 %Brix from the
/// exact root over 2.5 %Brix).
pub fn apparent_of_nd<S: Scalar>(nd: S) -> Option<S> {
    apparent_of_nd_with_slope(nd).map(|(b, _)| b)
}

/// [`apparent_of_nd`] with d%Brix/dnD per 0.01 nD (beyond the table's
/// ends: the end parabola's, at its end).
pub fn apparent_of_nd_with_slope<S: Scalar>(nd: S) -> Option<(S, S)> {
    if let Some(b) = brix_of_nd_with_slope(nd) {
        return Some(b);
    }
    const LOW: (f64, f64, f64) = end_parabola(false);
    const HIGH: (f64, f64, f64) = end_parabola(true);
    // The end parabola's own reach: 2.5 %Brix beyond 0 and 2 beyond 85.
    let (n0, per_slope, k, base, lo, hi) = if nd < crate::lit!(S, LOW.0) {
        (
            crate::lit!(S, LOW.0),
            crate::lit!(S, 0.01 / LOW.1),
            crate::lit!(S, LOW.2 / LOW.1),
            S::ZERO,
            crate::lit!(S, APPARENT_MIN),
            S::ZERO,
        )
    } else {
        (
            crate::lit!(S, HIGH.0),
            crate::lit!(S, 0.01 / HIGH.1),
            crate::lit!(S, HIGH.2 / HIGH.1),
            crate::lit!(S, 85.0),
            S::ZERO,
            crate::lit!(S, APPARENT_MAX - 85.0),
        )
    };
    // u = (n − n_end)/slope, checked to ±3 %Brix before the series (the
    // difference is under 0.01 nD: nd was checked finite and near the
    // table by the caller's range, and 1/slope is under 800).
    let dn = nd.sub(n0).ok()?;
    if dn.abs().ok()? > crate::lit!(S, 0.01) {
        return None;
    }
    // u = (100·dn)·(0.01/slope): 1/slope (about 700) is beyond I8F24.
    let u = dn.mul_proved(crate::lit!(S, 100.0)).mul_proved(per_slope);
    let ku = k.mul_proved(u);
    // Ranges: |u| under 8, |k·u| under 0.2.
    let five_eighths = crate::lit!(S, 0.625);
    let series = S::ONE.sub_proved(ku.mul_proved(
        S::HALF.sub_proved(ku.mul_proved(S::HALF.sub_proved(five_eighths.mul_proved(ku)))),
    ));
    let b = u.mul_proved(series);
    if b < lo || b > hi {
        return None;
    }
    Some((base.add_proved(b), per_slope))
}
