//! NIST Statistical Reference Datasets (StRD), Linear Least Squares
//! Regression: the datasets "Norris" (a calibration of ozone monitors, J.
//! Norris, NIST) and "Pontius" (a load-cell calibration, P. Pontius, NIST),
//! with the certified values NIST publishes for them (15 significant digits;
//! public domain).

/// Norris: (y, x), 36 observations; model y = B0 + B1·x (difficulty: lower).
pub const NORRIS: [(f64, f64); 36] = [
    (0.1, 0.2),
    (338.8, 337.4),
    (118.1, 118.2),
    (888.0, 884.6),
    (9.2, 10.1),
    (228.1, 226.5),
    (668.5, 666.3),
    (998.5, 996.3),
    (449.1, 448.6),
    (778.9, 777.0),
    (559.2, 558.2),
    (0.3, 0.4),
    (0.1, 0.6),
    (778.1, 775.5),
    (668.8, 666.9),
    (339.3, 338.0),
    (448.9, 447.5),
    (10.8, 11.6),
    (557.7, 556.0),
    (228.3, 228.1),
    (998.0, 995.8),
    (888.8, 887.6),
    (119.6, 120.2),
    (0.3, 0.3),
    (0.6, 0.3),
    (557.6, 556.8),
    (339.3, 339.1),
    (888.0, 887.2),
    (998.5, 999.0),
    (778.9, 779.0),
    (10.2, 11.1),
    (117.6, 118.3),
    (228.9, 229.2),
    (668.4, 669.1),
    (449.2, 448.9),
    (0.2, 0.5),
];

/// Norris certified estimates B0, B1.
pub const NORRIS_B: [f64; 2] = [-0.262323073774029, 1.00211681802045];
/// Norris certified standard deviations of B0, B1.
pub const NORRIS_B_SD: [f64; 2] = [0.232818234301152, 0.429796848199937e-03];
/// Norris certified residual standard deviation (34 degrees of freedom).
pub const NORRIS_RESIDUAL_SD: f64 = 0.884796396144373;

/// Pontius: (deflection y, load x), 40 observations; model
/// y = B0 + B1·x + B2·x² (difficulty: lower; x reaches 3e6).
pub const PONTIUS: [(f64, f64); 40] = [
    (0.11019, 150000.0),
    (0.21956, 300000.0),
    (0.32949, 450000.0),
    (0.43899, 600000.0),
    (0.54803, 750000.0),
    (0.65694, 900000.0),
    (0.76562, 1050000.0),
    (0.87487, 1200000.0),
    (0.98292, 1350000.0),
    (1.09146, 1500000.0),
    (1.20001, 1650000.0),
    (1.30822, 1800000.0),
    (1.41599, 1950000.0),
    (1.52399, 2100000.0),
    (1.63194, 2250000.0),
    (1.73947, 2400000.0),
    (1.84646, 2550000.0),
    (1.95392, 2700000.0),
    (2.06128, 2850000.0),
    (2.16844, 3000000.0),
    (0.11052, 150000.0),
    (0.22018, 300000.0),
    (0.32939, 450000.0),
    (0.43886, 600000.0),
    (0.54798, 750000.0),
    (0.65739, 900000.0),
    (0.76596, 1050000.0),
    (0.87474, 1200000.0),
    (0.98300, 1350000.0),
    (1.09150, 1500000.0),
    (1.20004, 1650000.0),
    (1.30818, 1800000.0),
    (1.41613, 1950000.0),
    (1.52408, 2100000.0),
    (1.63159, 2250000.0),
    (1.73965, 2400000.0),
    (1.84696, 2550000.0),
    (1.95445, 2700000.0),
    (2.06177, 2850000.0),
    (2.16829, 3000000.0),
];

/// Pontius certified estimates B0, B1, B2.
pub const PONTIUS_B: [f64; 3] = [
    0.673565789473684e-03,
    0.732059160401003e-06,
    -0.316081871345029e-14,
];
/// Pontius certified standard deviations of B0, B1, B2.
pub const PONTIUS_B_SD: [f64; 3] = [
    0.107938612033077e-03,
    0.157817399981659e-09,
    0.486652849992036e-16,
];
/// Pontius certified residual standard deviation (37 degrees of freedom).
pub const PONTIUS_RESIDUAL_SD: f64 = 0.205177424076185e-03;
