//! A second published sucrose temperature-correction table, for laboratory
//! refractometers read in %Brix: "Table A.1 — temperature corrections to
//! laboratory refractometer readings when the temperature differs from 20 °C",
//! an annex of a Russian interstate standard for juice products, as published
//! at docs.cntd.ru (document 1200157922, annex A). Columns 0, 5, ..., 70 % of
//! the reading ("70 and more"); rows 10–19 °C are subtracted from the reading,
//! 21 °C and above added. The copy read shows the rows 10–21 °C in full and
//! only the first six cells of the 22 °C row; the rows up to 30 °C that such
//! tables carry were not legible. Signs here: what to add, in 0.01 %.

/// Row temperatures, °C (20 °C omitted: zero by definition).
pub const ROWS_C: [f64; 12] = [10., 11., 12., 13., 14., 15., 16., 17., 18., 19., 21., 22.];

/// Column readings, %: 0, 5, ..., 70.
pub fn column(j: usize) -> f64 {
    5.0 * j as f64
}

/// One row per temperature, one entry per column from 0 %.
pub const CELLS: [&[i32]; 12] = [
    &[
        -50, -54, -58, -61, -64, -66, -68, -70, -72, -73, -74, -75, -76, -78, -79,
    ],
    &[
        -46, -49, -53, -55, -58, -60, -62, -64, -65, -66, -67, -68, -69, -70, -71,
    ],
    &[
        -42, -45, -48, -50, -52, -54, -56, -57, -57, -59, -60, -61, -61, -63, -63,
    ],
    &[
        -37, -40, -42, -44, -46, -48, -49, -50, -51, -52, -53, -54, -54, -55, -55,
    ],
    &[
        -33, -35, -37, -39, -40, -41, -42, -43, -44, -45, -45, -46, -46, -47, -47,
    ],
    &[
        -27, -29, -31, -33, -34, -34, -35, -36, -37, -37, -38, -39, -39, -40, -40,
    ],
    &[
        -22, -24, -25, -26, -27, -28, -28, -29, -30, -30, -30, -31, -31, -32, -32,
    ],
    &[
        -17, -18, -19, -20, -21, -21, -21, -22, -22, -23, -23, -23, -23, -24, -24,
    ],
    &[
        -12, -13, -13, -14, -14, -14, -14, -15, -15, -15, -15, -16, -16, -16, -16,
    ],
    &[-6, -6, -6, -7, -7, -7, -7, -8, -8, -8, -8, -8, -8, -8, -8],
    &[6, 7, 7, 7, 7, 8, 8, 8, 8, 8, 8, 8, 8, 8, 8],
    &[13, 13, 14, 14, 15, 15],
];
