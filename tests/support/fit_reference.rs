//! An independent `f64` least-squares polynomial fit for checking
//! `refractometer::factory_fit`, and the calibration-like problems it is
//! checked on.
//!
//! The reference forms the normal equations on the abscissa centred and
//! scaled onto [−1, 1] (a cubic's design there has a condition of tens, so
//! their squared condition costs `f64` about three digits) and solves them by
//! Gauss–Jordan elimination with partial pivoting: a different method from
//! the library's QR, sharing no code with it. The curve and its uncertainty
//! do not depend on the basis, so they compare directly.
#![allow(dead_code)]

/// A fitted polynomial: what the checks compare.
pub struct Reference {
    pub centre: f64,
    pub half_span: f64,
    /// Coefficients of 1, u, u², … with u = (x − centre) / half_span.
    pub coefficients: Vec<f64>,
    /// (AᵀA)⁻¹ in the same basis.
    pub normal_inverse: Vec<Vec<f64>>,
    /// Residual standard deviation; `None` with no degree of freedom.
    pub residual_sd: Option<f64>,
    pub residuals: Vec<f64>,
}

/// Solves `m·x = rhs` by Gauss–Jordan with partial pivoting, returning `x`
/// and `m⁻¹`; `None` for a singular `m`.
pub fn solve(m: &[Vec<f64>], rhs: &[f64]) -> Option<(Vec<f64>, Vec<Vec<f64>>)> {
    let n = m.len();
    // Augmented [m | rhs | I].
    let mut a: Vec<Vec<f64>> = (0..n)
        .map(|i| {
            let mut row = m[i].clone();
            row.push(rhs[i]);
            row.extend((0..n).map(|j| if i == j { 1.0 } else { 0.0 }));
            row
        })
        .collect();
    for col in 0..n {
        let pivot = (col..n).max_by(|&i, &j| a[i][col].abs().total_cmp(&a[j][col].abs()))?;
        if a[pivot][col] == 0.0 {
            return None;
        }
        a.swap(col, pivot);
        let p = a[col][col];
        a[col].iter_mut().for_each(|v| *v /= p);
        for i in 0..n {
            if i != col {
                let f = a[i][col];
                let pivot_row = a[col].clone();
                a[i].iter_mut()
                    .zip(&pivot_row)
                    .for_each(|(v, pv)| *v -= f * pv);
            }
        }
    }
    let x = a.iter().map(|row| row[n]).collect();
    let inv = a.iter().map(|row| row[n + 1..].to_vec()).collect();
    Some((x, inv))
}

/// The normal equations `AᵀA·c = Aᵀy` for the powers of `t(x)`.
pub fn normal_equations(
    points: &[(f64, f64)],
    degree: usize,
    t: impl Fn(f64) -> f64,
) -> (Vec<Vec<f64>>, Vec<f64>) {
    let p = degree + 1;
    let mut ata = vec![vec![0.0; p]; p];
    let mut aty = vec![0.0; p];
    for &(x, y) in points {
        let g: Vec<f64> = (0..p).map(|k| t(x).powi(k as i32)).collect();
        for i in 0..p {
            aty[i] += g[i] * y;
            for j in 0..p {
                ata[i][j] += g[i] * g[j];
            }
        }
    }
    (ata, aty)
}

/// Least-squares polynomial of `degree` through `points` (x, y).
pub fn fit(points: &[(f64, f64)], degree: usize) -> Option<Reference> {
    let lo = points.iter().map(|p| p.0).fold(f64::INFINITY, f64::min);
    let hi = points.iter().map(|p| p.0).fold(f64::NEG_INFINITY, f64::max);
    let (centre, half_span) = (0.5 * (lo + hi), 0.5 * (hi - lo));
    let (ata, aty) = normal_equations(points, degree, |x| (x - centre) / half_span);
    let (coefficients, normal_inverse) = solve(&ata, &aty)?;
    let mut r = Reference {
        centre,
        half_span,
        coefficients,
        normal_inverse,
        residual_sd: None,
        residuals: vec![],
    };
    r.residuals = points.iter().map(|&(x, y)| y - r.value_at(x)).collect();
    let dof = points.len() - (degree + 1);
    if dof > 0 {
        let ss: f64 = r.residuals.iter().map(|e| e * e).sum();
        r.residual_sd = Some((ss / dof as f64).sqrt());
    }
    Some(r)
}

impl Reference {
    fn basis(&self, x: f64) -> Vec<f64> {
        let u = (x - self.centre) / self.half_span;
        (0..self.coefficients.len())
            .map(|k| u.powi(k as i32))
            .collect()
    }

    pub fn value_at(&self, x: f64) -> f64 {
        let g = self.basis(x);
        g.iter().zip(&self.coefficients).map(|(a, b)| a * b).sum()
    }

    /// s·√(gᵀ(AᵀA)⁻¹g).
    pub fn uncertainty_at(&self, x: f64) -> Option<f64> {
        let g = self.basis(x);
        let mut q = 0.0;
        for (i, gi) in g.iter().enumerate() {
            for (j, gj) in g.iter().enumerate() {
                q += gi * self.normal_inverse[i][j] * gj;
            }
        }
        Some(self.residual_sd? * q.sqrt())
    }
}

/// A deterministic pseudo-random sequence in [−1, 1) (SplitMix64), for the
/// standards' reading scatter.
pub struct Scatter(u64);

impl Scatter {
    pub fn new(seed: u64) -> Self {
        Scatter(seed)
    }

    pub fn next(&mut self) -> f64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^= z >> 31;
        (z >> 11) as f64 / (1u64 << 52) as f64 - 1.0
    }
}

/// An invented calibration problem: `count` standards (position in pixels
/// 0–1023, nD 1.33–1.50) on a smooth curve drawn from `seed`, each
/// read with up to `scatter` nD of error.
pub fn calibration_standards(seed: u64, count: usize, scatter: f64) -> Vec<(f64, f64)> {
    let mut rng = Scatter::new(seed);
    // Positions spread over most of the array, each moved by up to 20 px.
    let first = 40.0 + 40.0 * rng.next();
    let last = 980.0 + 40.0 * rng.next().min(0.99);
    let bow = 0.02 * rng.next();
    let twist = 0.01 * rng.next();
    (0..count)
        .map(|i| {
            let even = first + (last - first) * i as f64 / (count - 1) as f64;
            let px = (even + 20.0 * rng.next()).clamp(0.0, 1023.0);
            let t = px / 1023.0;
            let nd = 1.335 + 0.16 * t + bow * t * (1.0 - t) + twist * t * (1.0 - t) * (t - 0.5);
            (px, nd + scatter * rng.next())
        })
        .collect()
}
