//! Factory calibration by least squares: a polynomial of degree 1 to 3 through
//! up to [`MAX_STANDARDS`] standards, with its uncertainty and a pass/fail per
//! standard.
//!
//! Each standard pairs a reading (the boundary position, or any abscissa) with
//! the standard's certified value (nD, or any ordinate). The fit works on the
//! abscissa centred and scaled onto [−1, 1], `u = (x − centre) / half_span`,
//! so that the design matrix's columns 1, u, u², u³ stay within ±1 (fixed
//! point holds them) and its condition is that of a polynomial on [−1, 1]
//! whatever the abscissa's unit and offset. It solves by modified
//! Gram–Schmidt QR of that matrix, not by the normal equations, which square
//! the condition and so lose twice the digits.
//!
//! The report gives the coefficients in the scaled basis (and in the raw basis,
//! in `f64`, for checks), the residual of every standard, the residual
//! standard deviation `s = ‖r‖ / √(N − p)` (`p` coefficients), the
//! coefficients' covariance `s²(RᵀR)⁻¹`, the fit's standard uncertainty at
//! any abscissa `√(gᵀCg)` with `g = (1, u, u², u³)`, and whether each
//! residual is within the caller's maximum permissible error (MPE).
//!
//! With exactly `N = p` standards the curve passes through every one of them:
//! the residuals are zero and say nothing of the standards' scatter, so the
//! residual standard deviation, the covariance and the uncertainties are
//! `None`.
//!
//! The fit's uncertainty is that of the curve through these standards, from
//! their scatter alone: the standards' own certified uncertainty adds to it.
//! Readings outside the standards' span are extrapolations, and a curve of
//! higher degree than the standards support bends there; a calibration whose
//! standards fail their MPE is not one to ship.
//!
//! Largest error against an `f64` reference solved independently (normal
//! equations in the scaled basis), over 4 to 8 standards on positions
//! 0–1023 px, nD 1.33–1.50 read with up to 3e-5 of scatter, degrees 1 to 3
//! (2160 points; `tests/accuracy/fit.rs`, in `docs/accuracy.md`):
//!
//! | type | value at a position, nD | its standard uncertainty, nD |
//! |---|---:|---:|
//! | `f64` | 2.0e-15 | 5.1e-16 |
//! | `f32` | 4.2e-7 | 2.0e-7 |
//! | `I32F32` | 8.1e-9 | 2.2e-9 |
//! | `I8F24` | 1.6e-6 | 6.0e-7 |
//!
//! On NIST's StRD Norris (linear) and Pontius (quadratic, x to 3e6) data,
//! `f64` gives the certified estimates within 4.3e-13 relative, their
//! standard deviations and the residual standard deviation within 7.0e-14
//! (`tests/world_factory_fit.rs`).
//!
//! I8F24 holds ±128: give it positions in units of 64 pixels (a 4096-pixel
//! array fits), which changes nothing in the fit but the unit of the abscissa.
//!
//! ```
//! use embedded_optics::refractometer::factory_fit::{fit, FitPoint, FitReport};
//! // An invented juice plant's calibration line: water and four sucrose
//! // standards (nD 20 °C, ICUMSA) read at five boundary positions, in pixels.
//! let standards = [
//!     FitPoint { position: 112.6, value: 1.33299 },
//!     FitPoint { position: 304.1, value: 1.34782 },
//!     FitPoint { position: 508.9, value: 1.36384 },
//!     FitPoint { position: 726.2, value: 1.38115 },
//!     FitPoint { position: 956.3, value: 1.39986 },
//! ];
//! // A quadratic, each standard within 5e-5 nD (about 0.03 %Brix).
//! let report: FitReport<f64> = fit(&standards, 2, 5e-5).unwrap();
//! assert!(report.all_within_mpe());
//! let nd = report.value_at(600.0).unwrap();
//! let u = report.uncertainty_at(600.0).unwrap().unwrap();
//! assert!(nd > 1.36384 && nd < 1.38115 && u < 5e-5);
//! ```

use crate::error::{Error, Quantity};
use crate::scalar::Scalar;

/// Most standards a firmware fit takes: the capacity of [`FitReport`]'s
/// default. A host check passes a larger capacity to [`fit`].
pub const MAX_STANDARDS: usize = 8;

/// Highest polynomial degree.
pub const MAX_DEGREE: usize = 3;

/// Coefficients of a cubic: the length of the coefficient arrays.
pub const MAX_TERMS: usize = MAX_DEGREE + 1;

/// One standard: where the instrument read it, and what it is.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FitPoint<S> {
    /// The abscissa: the boundary position read on the standard (any unit).
    pub position: S,
    /// The ordinate: the standard's certified value (nD, or any value).
    pub value: S,
}

/// A fitted calibration curve and how well it fits its standards.
///
/// `N` is the capacity in standards; firmware keeps the default
/// [`MAX_STANDARDS`].
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FitReport<S, const N: usize = MAX_STANDARDS> {
    degree: usize,
    count: usize,
    centre: S,
    half_span: S,
    coefficients: [S; MAX_TERMS],
    /// R⁻¹, upper triangular: the covariance is `s²·R⁻¹R⁻ᵀ`.
    r_inverse: [[S; MAX_TERMS]; MAX_TERMS],
    residuals: [S; N],
    within_mpe: [bool; N],
    residual_sd: Option<S>,
}

/// Fits a polynomial of `degree` (1 to 3) in the position to `standards`, and
/// checks every residual against `mpe` (`|value − curve| ≤ mpe`).
///
/// Errors: `degree` outside 1..=3 (`OutOfRange(PolynomialDegree)`); fewer
/// standards than `degree + 1` or more than `N` (`OutOfRange(StandardCount)`);
/// a NaN or infinite position or value (`NotFinite(CalibrationStandard)`);
/// `mpe` not finite or not positive (`PermissibleError`); fewer distinct
/// positions than coefficients ([`Error::RankDeficient`]); an intermediate
/// that leaves the number type (`Overflow`).
pub fn fit<S: Scalar, const N: usize>(
    standards: &[FitPoint<S>],
    degree: usize,
    mpe: S,
) -> Result<FitReport<S, N>, Error> {
    if !(1..=MAX_DEGREE).contains(&degree) {
        return Err(Error::OutOfRange(Quantity::PolynomialDegree));
    }
    let terms = degree + 1;
    let count = standards.len();
    if count < terms || count > N {
        return Err(Error::OutOfRange(Quantity::StandardCount));
    }
    if !mpe.is_finite() {
        return Err(Error::NotFinite(Quantity::PermissibleError));
    }
    if mpe <= S::ZERO {
        return Err(Error::OutOfRange(Quantity::PermissibleError));
    }
    if standards
        .iter()
        .any(|s| !s.position.is_finite() || !s.value.is_finite())
    {
        return Err(Error::NotFinite(Quantity::CalibrationStandard));
    }
    let (centre, half_span) = span_of(standards)?;

    // Columns of the design matrix in the scaled basis, and the ordinates.
    let mut columns = [[S::ZERO; N]; MAX_TERMS];
    let mut values = [S::ZERO; N];
    for (i, s) in standards.iter().enumerate() {
        let g = basis(s.position, centre, half_span, degree)?;
        for (column, power) in columns.iter_mut().zip(g) {
            column[i] = power;
        }
        values[i] = s.value;
    }
    let (r, qty) = factor(&mut columns, &mut values, count, terms)?;
    let r_inverse = invert_upper(&r, terms)?;
    let mut coefficients = [S::ZERO; MAX_TERMS];
    for (i, c) in coefficients.iter_mut().enumerate().take(terms) {
        *c = dot(&r_inverse[i][i..terms], &qty[i..terms])?;
    }

    let mut report = FitReport {
        degree,
        count,
        centre,
        half_span,
        coefficients,
        r_inverse,
        residuals: [S::ZERO; N],
        within_mpe: [false; N],
        residual_sd: None,
    };
    for (i, s) in standards.iter().enumerate() {
        let residual = s.value.sub(report.value_at(s.position)?)?;
        report.residuals[i] = residual;
        report.within_mpe[i] = residual.abs().is_ok_and(|a| a <= mpe);
    }
    if count > terms {
        let dof = i32::try_from(count - terms).map_err(|_| Error::Overflow)?;
        let sd = norm(&report.residuals[..count])?.div(S::from_i32(dof)?.sqrt()?)?;
        report.residual_sd = Some(sd);
    }
    Ok(report)
}

impl<S: Scalar, const N: usize> FitReport<S, N> {
    /// The polynomial's degree.
    pub fn degree(&self) -> usize {
        self.degree
    }

    /// The abscissa mapped to `u = 0`: the middle of the standards' span.
    pub fn centre(&self) -> S {
        self.centre
    }

    /// Half the standards' span: the abscissa step mapped to a unit of `u`.
    pub fn half_span(&self) -> S {
        self.half_span
    }

    /// Coefficients of `1, u, u², …` up to the degree, `u = (x − centre) / half_span`.
    pub fn coefficients(&self) -> &[S] {
        // `get`: no panic path for a firmware's no-panic link (the degree is
        // 1 to 3 by construction).
        self.coefficients
            .get(..=self.degree)
            .unwrap_or(&self.coefficients)
    }

    /// `value − curve(position)` of each standard, in the order given.
    pub fn residuals(&self) -> &[S] {
        &self.residuals[..self.count]
    }

    /// Whether each standard's residual is within the MPE, in the order given.
    pub fn within_mpe(&self) -> &[bool] {
        &self.within_mpe[..self.count]
    }

    /// `true` when every standard is within the MPE.
    pub fn all_within_mpe(&self) -> bool {
        self.within_mpe().iter().all(|&ok| ok)
    }

    /// Residual standard deviation `‖r‖ / √(N − p)`; `None` when `N = p`
    /// (the curve interpolates the standards: no degree of freedom is left).
    pub fn residual_sd(&self) -> Option<S> {
        self.residual_sd
    }

    /// The fitted curve at `position`.
    pub fn value_at(&self, position: S) -> Result<S, Error> {
        let g = self.basis_at(position)?;
        // `dot` stops at the shorter: the coefficients up to the degree.
        dot(self.coefficients(), &g)
    }

    /// The fitted curve's slope at `position`, per unit of the abscissa:
    /// `(c₁ + 2c₂u + 3c₃u²) / half_span`. An instrument propagates the
    /// position's (or the raw index's) uncertainty through it.
    pub fn slope_at(&self, position: S) -> Result<S, Error> {
        let g = self.basis_at(position)?;
        // Σ k·c_k·u^(k−1): coefficient k beside power k − 1.
        let (mut per_u, mut k) = (S::ZERO, S::ZERO);
        for (c, power) in self.coefficients().iter().skip(1).zip(g) {
            k = k.add(S::ONE)?;
            per_u = per_u.add(c.mul(power)?.mul(k)?)?;
        }
        per_u.div(self.half_span)
    }

    /// Standard uncertainty of the fitted curve at `position`, `√(gᵀCg)`
    /// (`None` when `N = p`): the spread of the curve from the standards'
    /// scatter, growing away from the standards' centre.
    pub fn uncertainty_at(&self, position: S) -> Result<Option<S>, Error> {
        let Some(rows) = self.scaled_r_inverse()? else {
            return Ok(None);
        };
        let g = self.basis_at(position)?;
        // w_j = Σ_i (s·R⁻¹)_ij·g_i, row by row: R⁻¹ is upper triangular and
        // zero above the degree, as g is, so the zeros add nothing (and the
        // loop has no index a firmware's no-panic link must prove).
        let mut w = [S::ZERO; MAX_TERMS];
        for (row, gi) in rows.iter().zip(g) {
            for (wj, rij) in w.iter_mut().zip(row) {
                *wj = wj.add(rij.mul(gi)?)?;
            }
        }
        norm(&w).map(Some)
    }

    /// Standard deviation of coefficient `k` of the scaled basis (`None` when
    /// `N = p`, or `k` above the degree).
    pub fn coefficient_sd(&self, k: usize) -> Result<Option<S>, Error> {
        if k > self.degree {
            return Ok(None);
        }
        let Some(rows) = self.scaled_r_inverse()? else {
            return Ok(None);
        };
        norm(&rows[k][..=self.degree]).map(Some)
    }

    /// Covariance of the scaled-basis coefficients, `s²(RᵀR)⁻¹` (entries
    /// above the degree are zero; `None` when `N = p`). An nD fit's
    /// variances are near 1e-10: I32F32 resolves 2.3e-10 and I8F24 6.0e-8,
    /// so fixed-point firmware reads [`coefficient_sd`](Self::coefficient_sd)
    /// and [`uncertainty_at`](Self::uncertainty_at) instead, which never
    /// square `s`.
    pub fn covariance(&self) -> Result<Option<[[S; MAX_TERMS]; MAX_TERMS]>, Error> {
        let Some(rows) = self.scaled_r_inverse()? else {
            return Ok(None);
        };
        let mut c = [[S::ZERO; MAX_TERMS]; MAX_TERMS];
        for i in 0..=self.degree {
            for j in 0..=self.degree {
                c[i][j] = dot(&rows[i][..=self.degree], &rows[j][..=self.degree])?;
            }
        }
        Ok(Some(c))
    }

    /// Coefficients of `1, x, x², x³` in the raw abscissa, worked out in
    /// `f64` from the scaled ones: for host checks and reports (a firmware
    /// without FPU pays soft-float calls here). `Overflow` if one leaves
    /// `f64` (a centre far from zero against a narrow span).
    pub fn raw_coefficients_f64(&self) -> Result<[f64; MAX_TERMS], Error> {
        let t = self.raw_transform_f64();
        let mut b = [0.0; MAX_TERMS];
        for (bj, row) in b.iter_mut().zip(&t) {
            for (tk, c) in row.iter().zip(&self.coefficients) {
                *bj += tk * c.to_f64();
            }
        }
        all_finite(b)
    }

    /// Covariance of [`raw_coefficients_f64`](Self::raw_coefficients_f64)
    /// (`None` when `N = p`), `T·C·Tᵀ` in `f64` with `T` the change of basis.
    pub fn raw_covariance_f64(&self) -> Result<Option<[[f64; MAX_TERMS]; MAX_TERMS]>, Error> {
        let Some(sd) = self.residual_sd else {
            return Ok(None);
        };
        let t = self.raw_transform_f64();
        // M = T·(s·R⁻¹); the covariance is M·Mᵀ.
        let mut m = [[0.0; MAX_TERMS]; MAX_TERMS];
        for (mrow, trow) in m.iter_mut().zip(&t) {
            for (col, mv) in mrow.iter_mut().enumerate() {
                for (tk, rrow) in trow.iter().zip(&self.r_inverse) {
                    *mv += tk * sd.to_f64() * rrow[col].to_f64();
                }
            }
        }
        let mut c = [[0.0; MAX_TERMS]; MAX_TERMS];
        for (crow, mi) in c.iter_mut().zip(&m) {
            for (cv, mj) in crow.iter_mut().zip(&m) {
                *cv = mi.iter().zip(mj).map(|(a, b)| a * b).sum();
            }
            all_finite(*crow)?;
        }
        Ok(Some(c))
    }

    /// `T[j][k]`: the weight of scaled coefficient `k` in raw coefficient `j`,
    /// from `((x − c)/h)^k = h^−k · Σ_j C(k, j) x^j (−c)^(k−j)`.
    fn raw_transform_f64(&self) -> [[f64; MAX_TERMS]; MAX_TERMS] {
        const BINOMIAL: [[f64; MAX_TERMS]; MAX_TERMS] = [
            [1.0, 0.0, 0.0, 0.0],
            [1.0, 1.0, 0.0, 0.0],
            [1.0, 2.0, 1.0, 0.0],
            [1.0, 3.0, 3.0, 1.0],
        ];
        let (c, h) = (self.centre.to_f64(), self.half_span.to_f64());
        let power = |base: f64, e: usize| (0..e).fold(1.0, |p, _| p * base);
        let mut t = [[0.0; MAX_TERMS]; MAX_TERMS];
        for (j, row) in t.iter_mut().enumerate() {
            for (k, tk) in row.iter_mut().enumerate().take(self.degree + 1).skip(j) {
                *tk = BINOMIAL[k][j] * power(-c, k - j) / power(h, k);
            }
        }
        t
    }

    /// `s·R⁻¹`, whose rows' inner products are the covariance.
    fn scaled_r_inverse(&self) -> Result<Option<[[S; MAX_TERMS]; MAX_TERMS]>, Error> {
        let Some(sd) = self.residual_sd else {
            return Ok(None);
        };
        let mut rows = self.r_inverse;
        for v in rows.iter_mut().flatten() {
            *v = v.mul(sd)?;
        }
        Ok(Some(rows))
    }

    fn basis_at(&self, position: S) -> Result<[S; MAX_TERMS], Error> {
        if !position.is_finite() {
            return Err(Error::NotFinite(Quantity::Value));
        }
        basis(position, self.centre, self.half_span, self.degree)
    }
}

/// Centre and half-width of the positions' span; a zero span cannot fit a
/// slope.
fn span_of<S: Scalar>(standards: &[FitPoint<S>]) -> Result<(S, S), Error> {
    let mut lo = standards.first().map_or(S::ZERO, |s| s.position);
    let mut hi = lo;
    for s in standards {
        lo = lo.min(s.position);
        hi = hi.max(s.position);
    }
    let half_span = hi.sub(lo)?.mul(S::HALF)?;
    if half_span <= S::ZERO {
        return Err(Error::RankDeficient);
    }
    Ok((lo.add(half_span)?, half_span))
}

/// `1, u, …, u^degree` (zero above) for `u = (x − centre) / half_span`.
fn basis<S: Scalar>(x: S, centre: S, half_span: S, degree: usize) -> Result<[S; MAX_TERMS], Error> {
    let u = x.sub(centre)?.div(half_span)?;
    let mut g = [S::ZERO; MAX_TERMS];
    let mut power = S::ONE;
    for (k, gk) in g.iter_mut().enumerate().take(degree.saturating_add(1)) {
        if k > 0 {
            power = power.mul(u)?;
        }
        *gk = power;
    }
    Ok(g)
}

/// Modified Gram–Schmidt on the first `count` rows and `terms` columns, the
/// ordinates carried as one more column: returns `R` and `Qᵀy`. A diagonal of
/// R below 64 units of the type's resolution, relative to its column's
/// norm, is a column the others already span: [`Error::RankDeficient`].
fn factor<S: Scalar, const N: usize>(
    columns: &mut [[S; N]; MAX_TERMS],
    values: &mut [S; N],
    count: usize,
    terms: usize,
) -> Result<([[S; MAX_TERMS]; MAX_TERMS], [S; MAX_TERMS]), Error> {
    let mut floors = [S::ZERO; MAX_TERMS];
    for (floor, column) in floors.iter_mut().zip(columns.iter()).take(terms) {
        *floor = norm(&column[..count])?.mul(S::RESOLUTION.mul(crate::lit!(S, 64.0))?)?;
    }
    let mut r = [[S::ZERO; MAX_TERMS]; MAX_TERMS];
    let mut qty = [S::ZERO; MAX_TERMS];
    for k in 0..terms {
        let (done, rest) = columns.split_at_mut(k + 1);
        let q = &mut done[k][..count];
        let diagonal = norm(q)?;
        if diagonal <= floors[k] {
            return Err(Error::RankDeficient);
        }
        for v in q.iter_mut() {
            *v = v.div(diagonal)?;
        }
        r[k][k] = diagonal;
        for (j, column) in rest.iter_mut().enumerate().take(terms - k - 1) {
            r[k][k + 1 + j] = project_out(q, &mut column[..count])?;
        }
        qty[k] = project_out(q, &mut values[..count])?;
    }
    Ok((r, qty))
}

/// Removes from `v` its component along the unit vector `q`; returns `q·v`.
fn project_out<S: Scalar>(q: &[S], v: &mut [S]) -> Result<S, Error> {
    let along = dot(q, v)?;
    for (vi, &qi) in v.iter_mut().zip(q) {
        *vi = vi.sub(along.mul(qi)?)?;
    }
    Ok(along)
}

/// Inverse of the upper-triangular `r` (first `terms` rows and columns), by
/// back substitution on each column of the identity.
fn invert_upper<S: Scalar>(
    r: &[[S; MAX_TERMS]; MAX_TERMS],
    terms: usize,
) -> Result<[[S; MAX_TERMS]; MAX_TERMS], Error> {
    let mut inv = [[S::ZERO; MAX_TERMS]; MAX_TERMS];
    for j in 0..terms {
        inv[j][j] = S::ONE.div(r[j][j])?;
        for i in (0..j).rev() {
            let mut sum = S::ZERO;
            for m in i + 1..=j {
                sum = sum.add(r[i][m].mul(inv[m][j])?)?;
            }
            inv[i][j] = sum.neg()?.div(r[i][i])?;
        }
    }
    Ok(inv)
}

fn all_finite<const K: usize>(v: [f64; K]) -> Result<[f64; K], Error> {
    if v.iter().all(|x| x.is_finite()) {
        Ok(v)
    } else {
        Err(Error::Overflow)
    }
}

fn dot<S: Scalar>(a: &[S], b: &[S]) -> Result<S, Error> {
    a.iter()
        .zip(b)
        .try_fold(S::ZERO, |sum, (&x, &y)| sum.add(x.mul(y)?))
}

/// Euclidean norm, each entry first divided by the largest magnitude so that
/// no square leaves a fixed-point range.
fn norm<S: Scalar>(v: &[S]) -> Result<S, Error> {
    let mut largest = S::ZERO;
    for &x in v {
        largest = largest.max(x.abs()?);
    }
    if largest <= S::ZERO {
        return Ok(S::ZERO);
    }
    let mut sum = S::ZERO;
    for &x in v {
        sum = sum.add(x.div(largest)?.square()?)?;
    }
    largest.mul(sum.sqrt()?)
}
