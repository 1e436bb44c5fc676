//! OIV-MA-AS2-02 Table I, every published cell read: rows 5–17 °C, columns
//! 10, 15, ..., 75 % by mass, in 0.01 % (minus: subtract from the reading).
//!
//! Source: OIV Compendium of international methods of wine and must analysis,
//! "Evaluation of sugar by refractometry", Table I (yumpu copy of the
//! Compendium, page 49). The 5–9 °C rows stop at 30 %; the 17 °C row's 75 %
//! cell was not legible in that copy. Shared by the test crates that check the
//! library's copy of the table.

/// Row temperatures, °C.
pub const ROWS_C: [f64; 13] = [5., 6., 7., 8., 9., 10., 11., 12., 13., 14., 15., 16., 17.];

/// One row per temperature, one entry per column from 10 %.
pub const CELLS: [&[i32]; 13] = [
    &[-82, -87, -92, -95, -99],
    &[-80, -82, -87, -90, -94],
    &[-74, -78, -82, -84, -88],
    &[-69, -73, -76, -79, -82],
    &[-64, -67, -71, -73, -75],
    &[
        -59, -62, -65, -67, -69, -71, -72, -73, -74, -75, -75, -75, -75, -75,
    ],
    &[
        -54, -57, -59, -61, -63, -64, -65, -66, -67, -68, -68, -68, -68, -67,
    ],
    &[
        -49, -51, -53, -55, -56, -57, -58, -59, -60, -60, -61, -61, -60, -60,
    ],
    &[
        -43, -45, -47, -48, -50, -51, -52, -52, -53, -53, -53, -53, -53, -53,
    ],
    &[
        -38, -39, -40, -42, -43, -44, -44, -45, -45, -46, -46, -46, -46, -45,
    ],
    &[
        -32, -33, -34, -35, -36, -37, -37, -38, -38, -38, -38, -38, -38, -38,
    ],
    &[
        -26, -27, -28, -28, -29, -30, -30, -30, -31, -31, -31, -31, -31, -30,
    ],
    &[
        -20, -20, -21, -21, -22, -22, -23, -23, -23, -23, -23, -23, -23,
    ],
];
