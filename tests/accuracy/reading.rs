//! The reading side's compiled forms against the exact models they are
//! prepared from, in f64 (the model side is itself checked against the
//! published tables in `tests/world_*.rs`): the budget of a compiled form is
//! 2e-6 nD or 0.002 %Brix (`tests/reading_side.rs` scans them densely).
//!
//! The design is the crate's invented handheld (512 pixels of 14 µm, 30 mm
//! optics, apex 53.5°, dense flint prism, 590 nm LED, 10 kΩ NTC β 3950 K under
//! 10 kΩ on a 12-bit ADC).

use crate::harness::{Budget, span};
use embedded_optics::media::water::Water;
use embedded_optics::media::{IndexReference, Medium};
use embedded_optics::refractometer::TradeScale;
use embedded_optics::refractometer::calibration::water_reference;
use embedded_optics::refractometer::compensation::SucroseCompensation;
use embedded_optics::refractometer::geometry::Geometry;
use embedded_optics::refractometer::reading::brix_cells::{apparent_of_nd, nd_of_apparent};
use embedded_optics::refractometer::reading::tables::{JUICE_LAB_GRID, OIV_GRID};
use embedded_optics::refractometer::scales::{SucroseBrix, apparent_brix};
use embedded_optics::{Error, Quantity};

#[path = "../support/handheld.rs"]
mod handheld;
use handheld::{DIVIDER, GEOMETRY, data, ntc, prism};

case! {
    pub struct MapIndex;
    name: "refractometer::reading::prepared::PositionMap::index_at",
    unit: "1 (index)",
    domain: "every 1/4 pixel of 512, prism at 4.5–40.5 °C; against the exact geometry",
    budget: Budget { f64: 1.0e-7, f32: 5.0e-7, i32f32: 1.0e-7, i8f24: 6.0e-7 },
    inputs: {
    let mut v = Vec::new();
    // Pixels travel as pixel/8 so that I8F24 holds them.
    for p in span(0.0, 511.75 / 8.0, 2048) {
        for t in span(4.5, 40.5, 7) {
            v.push(vec![p, t]);
        }
    }
    v
    },
    reference(x): {
    let g = Geometry::<f64>::new(&GEOMETRY).ok()?;
    let n_p = prism().index(0.590, x[1]).ok()?;
    g.index_at((x[0] * 8.0 * 65536.0).round() as i32, n_p).ok().map(|i| i.index)
    },
    eval(x): {
    let pos = (x[0].to_f64() * 8.0 * 65536.0).round() as i32;
    data().map().index_at(pos, x[1]).map(|m| m.index)
    }
}

case! {
    pub struct WaterLine;
    name: "refractometer::reading::prepared::TemperatureLine::at (water at the LED)",
    unit: "1 (index)",
    domain: "4–41 °C, 590 nm; against IAPWS R9-97 through media::water",
    budget: Budget { f64: 5.0e-8, f32: 2.0e-7, i32f32: 5.0e-8, i8f24: 2.0e-7 },
    inputs: { span(4.0, 41.0, 371).map(|t| vec![t]).collect() },
    reference(x): {
    water_reference(&Water::new(IndexReference::Air), 0.590, x[0]).ok()
    },
    eval(x): { data().water().at(x[0]) }
}

case! {
    pub struct ThermistorTable;
    name: "refractometer::reading::prepared::CodeTable::temperature_c",
    unit: "°C",
    domain: "every ADC code at 0–45 °C; against the β model through thermistor::Divider",
    budget: Budget { f64: 1.0e-3, f32: 1.0e-3, i32f32: 1.0e-3, i8f24: 1.0e-3 },
    inputs: { (0..4096).map(|c| vec![f64::from(c) / 64.0]).collect() },
    reference(x): {
    let code = (x[0] * 64.0).round() as u32;
    let t: f64 = DIVIDER.temperature_c(&ntc(), code).ok()?;
    let table = data().thermistor();
    // The table's own reach: inside it, the model's temperature.
    table.temperature_c::<f64>(code as u16).ok().map(|_| t)
    },
    eval(x): {
    // The code travels as code/64 so that I8F24 holds it.
    let code = (x[0].to_f64() * 64.0).round() as u16;
    data().thermistor().temperature_c(code)
    }
}

case! {
    pub struct CellsApparentBrix;
    name: "refractometer::reading::brix_cells::apparent_of_nd",
    unit: "%Brix",
    domain: "nD 1.3296–1.5067 (−2.4 to 86.9 %Brix read at temperature); against scales::apparent_brix",
    budget: Budget { f64: 1.0e-5, f32: 2.0e-4, i32f32: 1.0e-5, i8f24: 2.0e-4 },
    inputs: { span(1.3296, 1.5067, 1771).map(|n| vec![n]).collect() },
    reference(x): { apparent_brix(x[0]).ok() },
    eval(x): { apparent_of_nd(x[0]).ok_or(Error::OutOfRange(Quantity::RefractiveIndex)) }
}

case! {
    pub struct CellsNdOfBrix;
    name: "refractometer::reading::brix_cells::nd_of_apparent",
    unit: "1 (index)",
    domain: "0–85 %Brix; against scales::SucroseBrix::nd20_at",
    budget: Budget { f64: 1.0e-9, f32: 2.0e-7, i32f32: 1.0e-9, i8f24: 3.0e-7 },
    inputs: { span(0.0, 85.0, 851).map(|b| vec![b]).collect() },
    reference(x): { SucroseBrix.nd20_at(x[0]).ok() },
    eval(x): { nd_of_apparent(x[0]).map(|(n, _)| n).ok_or(Error::OutOfRange(Quantity::ScaleValue)) }
}

case! {
    pub struct GridCorrectionOiv;
    name: "refractometer::reading::prepared::CorrectionGrid::correction (OIV_GRID)",
    unit: "%Brix",
    domain: "4.5–40.5 °C × −2.5–87 %Brix read, every 0.25 K × 0.25 %Brix; against compensation::SucroseCompensation::oiv",
    budget: Budget { f64: 2.0e-3, f32: 2.0e-3, i32f32: 2.0e-3, i8f24: 2.0e-3 },
    inputs: {
    let mut v = Vec::new();
    for t in span(4.5, 40.5, 145) {
        for b in span(-2.5, 87.0, 359) {
            v.push(vec![t, b]);
        }
    }
    v
    },
    reference(x): {
    SucroseCompensation::oiv().correction(x[0], x[1]).ok().map(|c| c.correction)
    },
    eval(x): { OIV_GRID.correction(x[0], x[1]).map(|c| c.correction) }
}

case! {
    pub struct GridCorrectionJuice;
    name: "refractometer::reading::prepared::CorrectionGrid::correction (JUICE_LAB_GRID)",
    unit: "%Brix",
    domain: "4.5–40.5 °C × −2.5–87 %Brix read, every 0.25 K × 0.25 %Brix; against compensation::SucroseCompensation::juice_lab",
    budget: Budget { f64: 2.0e-3, f32: 2.0e-3, i32f32: 2.0e-3, i8f24: 2.0e-3 },
    inputs: {
    let mut v = Vec::new();
    for t in span(4.5, 40.5, 145) {
        for b in span(-2.5, 87.0, 359) {
            v.push(vec![t, b]);
        }
    }
    v
    },
    reference(x): {
    SucroseCompensation::juice_lab().correction(x[0], x[1]).ok().map(|c| c.correction)
    },
    eval(x): { JUICE_LAB_GRID.correction(x[0], x[1]).map(|c| c.correction) }
}
