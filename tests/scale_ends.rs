//! Every trade scale at the ends of the published table (or relation) it is
//! built on, and on distilled water: each end is accepted both ways in every
//! number type and reads the published value; a scale whose range starts at
//! water reads water (nD 1.33299, and the IAPWS figure 1.332986) at its zero;
//! a scale whose published table does not reach water refuses it.

use embedded_optics::refractometer::TradeScale;
use embedded_optics::refractometer::brewing::{Plato, SpecificGravity};
use embedded_optics::refractometer::freezing::{Alcohol, ScreenWashFreezingPoint, ScreenWashMass};
use embedded_optics::refractometer::glycerol::GlycerolMass;
use embedded_optics::refractometer::scales::{
    BatteryAcidDensity, EthyleneGlycolFreezingPoint, EthyleneGlycolMass, HoneyWater, IndexScale,
    MustPotentialAlcohol, Salinity, SaltBrine, SucroseBrix,
};
use embedded_optics::refractometer::syrup::GlucoseSyrupDryMatter;
use embedded_optics::refractometer::urea::UreaMass;
use embedded_optics::refractometer::wine::{MustDensity, Oechsle};
use embedded_optics::{Error, Quantity, Scalar};
use fixed::types::{I8F24, I32F32};

#[allow(dead_code)]
#[path = "published/crc_aqueous.rs"]
mod crc_aqueous;
#[allow(dead_code)]
#[path = "published/crc_trade_solutes.rs"]
mod crc_solutes;
#[allow(dead_code)]
#[path = "published/glycerol_water_nd20.rs"]
mod glycerol;
#[path = "published/honey_moisture.rs"]
mod honey;
#[allow(dead_code)]
#[path = "published/iso1743_glucose_syrup.rs"]
mod iso1743;
#[path = "published/must_table_ii.rs"]
mod must;
#[path = "published/quan_fry_1995.rs"]
mod quan_fry;

/// Water at 20 °C, 589.3 nm, relative to air: 1.33299, the water row of the
/// trade tables (ISO 1743's 0 % row, `iso1743::ROWS[0]`), and 1.33298602367,
/// IAPWS R9-97 at IAPWS-95 density over the Ciddor air index (the value
/// `tests/world_dispersion.rs` computes with the iapws and mpmath libraries).
const WATER: [f64; 2] = [1.33299, 1.332_986_023_67];

/// One end of a scale: nD at 20 °C, the published value there, how far the
/// scale may read from it (an nD tolerance, carried through the scale's local
/// slope, plus one in the scale's unit), and where it is printed.
struct End {
    nd: f64,
    value: f64,
    nd_tolerance: f64,
    tolerance: f64,
    source: &'static str,
}

/// What a scale does with distilled water.
enum Water {
    /// Reads this value (its zero) within the tolerance (which takes in the
    /// 4e-6 nD between the two water figures through the scale's slope).
    Reads(f64, f64),
    /// Is refused: the published table starts above water.
    Outside,
}

/// nD resolution of each type near nD 1.5: f32's unit in the last place,
/// the fixed types' step.
const RESOLUTION: [(&str, f64); 4] = [
    ("f64", 0.0),
    ("f32", 1.2e-7),
    ("I32F32", 2.4e-10),
    ("I8F24", 6.0e-8),
];

fn read<S: Scalar, T: TradeScale<S>>(scale: &T, nd: f64) -> Result<f64, Error> {
    scale.value_at(S::from_f64(nd)?).map(Scalar::to_f64)
}

fn back<S: Scalar, T: TradeScale<S>>(scale: &T, value: f64) -> Result<f64, Error> {
    scale.nd20_at(S::from_f64(value)?).map(Scalar::to_f64)
}

/// Both ends in every type, and water. `skip_i8f24_top`: I8F24 cannot hold
/// the top value (the scale documents [`Error::Overflow`] there).
fn check<T>(name: &str, scale: T, ends: [End; 2], water: Water, skip_i8f24_top: bool)
where
    T: TradeScale<f64> + TradeScale<f32> + TradeScale<I32F32> + TradeScale<I8F24>,
{
    for (i, end) in ends.iter().enumerate() {
        let f64_reading = read::<f64, T>(&scale, end.nd)
            .unwrap_or_else(|e| panic!("{name}: {} nD {}: {e}", end.source, end.nd));
        // |d value / d nD| from the end 2e-5 nD inward.
        let h = 2e-5_f64.copysign(ends[1 - i].nd - end.nd);
        let inward = read::<f64, T>(&scale, end.nd + h).unwrap();
        let slope = ((inward - f64_reading) / h).abs();
        let tolerance = slope * end.nd_tolerance + end.tolerance;
        let d = (f64_reading - end.value).abs();
        assert!(
            d <= tolerance,
            "{name}: {} nD {} reads {f64_reading}, published {}",
            end.source,
            end.nd,
            end.value
        );
        let nd_back = back::<f64, T>(&scale, end.value)
            .unwrap_or_else(|e| panic!("{name}: {} value {}: {e}", end.source, end.value));
        assert!(
            (nd_back - end.nd).abs() <= end.nd_tolerance + end.tolerance / slope + 1e-9,
            "{name}: value {} gives nD {nd_back}, published {}",
            end.value,
            end.nd
        );
        println!(
            "{name}: {} nD {} -> {f64_reading:.5} (published {}, |Δ| {d:.1e})",
            end.source, end.nd, end.value
        );
        for (type_name, res) in RESOLUTION.iter().skip(1) {
            if skip_i8f24_top && i == 1 && *type_name == "I8F24" {
                assert_eq!(read::<I8F24, T>(&scale, end.nd), Err(Error::Overflow));
                continue;
            }
            // Within the type's nD resolution, carried through the slope,
            // of f64 (and 2e-5 of the value for the rounding of the steps).
            let tol = 4.0 * res * slope + 2e-5 * end.value.abs().max(1.0);
            let got = match *type_name {
                "f32" => read::<f32, T>(&scale, end.nd),
                "I32F32" => read::<I32F32, T>(&scale, end.nd),
                _ => read::<I8F24, T>(&scale, end.nd),
            }
            .unwrap_or_else(|e| panic!("{name} in {type_name}: nD {}: {e}", end.nd));
            assert!(
                (got - f64_reading).abs() <= tol,
                "{name} in {type_name}: nD {} reads {got}, f64 {f64_reading}",
                end.nd
            );
            let back_ok = match *type_name {
                "f32" => back::<f32, T>(&scale, end.value),
                "I32F32" => back::<I32F32, T>(&scale, end.value),
                _ => back::<I8F24, T>(&scale, end.value),
            };
            assert!(
                back_ok.is_ok(),
                "{name} in {type_name}: value {} refused: {back_ok:?}",
                end.value
            );
        }
    }
    for nd in WATER {
        match water {
            Water::Reads(zero, tol) => {
                for reading in [
                    read::<f64, T>(&scale, nd),
                    read::<f32, T>(&scale, nd),
                    read::<I32F32, T>(&scale, nd),
                    read::<I8F24, T>(&scale, nd),
                ] {
                    let v = reading.unwrap_or_else(|e| panic!("{name}: water {nd}: {e}"));
                    assert!(
                        (v - zero).abs() <= tol,
                        "{name}: water {nd} reads {v}, zero {zero}"
                    );
                }
            }
            Water::Outside => assert_eq!(
                read::<f64, T>(&scale, nd),
                Err(Error::OutOfRange(Quantity::RefractiveIndex)),
                "{name}: water"
            ),
        }
    }
}

/// An end the scale stores (or computes) exactly: read back to f64's
/// rounding, `tolerance` in the scale's unit.
fn end(nd: f64, value: f64, tolerance: f64, source: &'static str) -> End {
    End {
        nd,
        value,
        nd_tolerance: 0.0,
        tolerance,
        source,
    }
}

/// A handbook row between water and the scale's first stored row: nD
/// printed to four decimals, so within two roundings (1e-4 nD, as
/// `tests/world_cal.rs` states) through the local slope, plus half the
/// value's last printed digit.
fn between(nd: f64, value: f64, last_digit: f64, source: &'static str) -> End {
    End {
        nd,
        value,
        nd_tolerance: 1e-4,
        tolerance: last_digit / 2.0,
        source,
    }
}

/// A stored row: the scale's own node, read back to f64's rounding.
const ON_NODE: f64 = 1e-9;

#[test]
fn sucrose_brix_ends() {
    // 0 %Brix: water, the ISO 1743 0 % row; 85 %Brix: the ICUMSA table's
    // last entry, 1.50398 (from memory, as the scale's table documents).
    let water = iso1743::ROWS[0].1[0];
    check(
        "%Brix",
        SucroseBrix,
        [
            end(water, 0.0, ON_NODE, "ISO 1743 0 % row"),
            end(1.50398, 85.0, ON_NODE, "ICUMSA 85 % entry (from memory)"),
        ],
        // 4e-6 nD below water is −0.003 %Brix on the band below water.
        Water::Reads(0.0, 0.004),
        false,
    );
}

#[test]
fn salinity_ends() {
    // Quan & Fry 1995 at 20 °C, 589.3 nm: salinity 0 and 43 (the top of the
    // data behind the relation, as the scale documents).
    check(
        "salinity",
        Salinity,
        [
            // The test's relation and the scale's rounded coefficients: 1e-5 ‰.
            end(
                quan_fry::nd(0.0, 20.0, 589.3),
                0.0,
                1e-5,
                "Quan & Fry S = 0",
            ),
            end(
                quan_fry::nd(43.0, 20.0, 589.3),
                43.0,
                1e-5,
                "Quan & Fry S = 43",
            ),
        ],
        // The relation's own S = 0 lies 1.4e-5 nD above water's 1.33299 and
        // 1.8e-5 above 1.332986: water reads −0.08 and −0.10 ‰.
        Water::Reads(0.0, 0.11),
        false,
    );
}

#[test]
fn honey_water_ends() {
    // IHC Harmonised Methods moisture table, the first and last rows read
    // (four decimals: ±5e-5 nD is ±0.022 % water).
    let (first, last) = (honey::ROWS[0], honey::ROWS[honey::ROWS.len() - 1]);
    check(
        "honey",
        HoneyWater,
        [
            // Four decimals: ±5e-5 nD, the IHC table's rounding.
            End {
                nd_tolerance: 5e-5,
                ..end(first.1, first.0, 1e-9, "IHC 13.0 % row")
            },
            End {
                nd_tolerance: 5e-5,
                ..end(last.1, last.0, 1e-9, "IHC 22.4 % row")
            },
        ],
        Water::Outside,
        false,
    );
}

/// OIV-MA-AS2-02 Table II (French arrêté of 14 September 2011, annex IV):
/// the potential alcohol, % vol, of its first (10.0 %) and last (30.0 %) rows.
const OIV_ALCOHOL_ENDS: [f64; 2] = [4.88, 18.35];

#[test]
fn must_scales_ends() {
    let (first, last) = (must::ROWS[0], must::ROWS[must::ROWS.len() - 1]);
    check(
        "must potential alcohol",
        MustPotentialAlcohol,
        [
            end(first.1, OIV_ALCOHOL_ENDS[0], ON_NODE, "OIV Table II 10.0 %"),
            end(last.1, OIV_ALCOHOL_ENDS[1], ON_NODE, "OIV Table II 30.0 %"),
        ],
        Water::Outside,
        false,
    );
    check(
        "must density",
        MustDensity,
        [
            end(first.1, first.2, 1e-9, "OIV Table II 10.0 %"),
            end(last.1, last.2, 1e-9, "OIV Table II 30.0 %"),
        ],
        Water::Outside,
        false,
    );
    // °Oe = (ρ − 1)·1000 (common practice); 128.7 does not fit I8F24.
    check(
        "Oechsle",
        Oechsle,
        [
            end(
                first.1,
                (first.2 - 1.0) * 1000.0,
                1e-9,
                "OIV Table II 10.0 %",
            ),
            end(last.1, (last.2 - 1.0) * 1000.0, 1e-9, "OIV Table II 30.0 %"),
        ],
        Water::Outside,
        true,
    );
}

#[test]
fn handbook_scales_ends() {
    // CRC Handbook, concentrative properties of aqueous solutions (nD to
    // four decimals, the rest to their printed digits).
    let eg = crc_aqueous::ETHYLENE_GLYCOL;
    let (first, last) = (eg[0], eg[eg.len() - 1]);
    check(
        "ethylene glycol",
        EthyleneGlycolMass,
        [
            between(first.1, first.0, 0.1, "CRC 0.5 % row"),
            end(last.1, last.0, ON_NODE, "CRC 60 % row"),
        ],
        Water::Reads(0.0, 0.005),
        false,
    );
    check(
        "ethylene glycol freezing point",
        EthyleneGlycolFreezingPoint,
        [
            between(first.1, -first.2, 0.01, "CRC 0.5 % row"),
            end(last.1, -last.2, ON_NODE, "CRC 60 % row"),
        ],
        Water::Reads(0.0, 0.001),
        false,
    );
    let nacl = crc_aqueous::SODIUM_CHLORIDE;
    let (first, last) = (nacl[0], nacl[nacl.len() - 1]);
    check(
        "salt brine",
        SaltBrine,
        [
            between(first.1, first.0, 0.1, "CRC 0.1 % row"),
            end(last.1, last.0, ON_NODE, "CRC 26 % row"),
        ],
        Water::Reads(0.0, 0.003),
        false,
    );
    let acid = crc_aqueous::SULFURIC_ACID;
    let (first, last) = (acid[0], acid[acid.len() - 1]);
    check(
        "battery acid density",
        BatteryAcidDensity,
        [
            between(first.1, first.2, 1e-4, "CRC 0.5 % row"),
            end(last.1, last.2, ON_NODE, "CRC 60 % row"),
        ],
        // Water's density at 20 °C, 0.99820 g/cm³ (CRC Handbook, from memory).
        Water::Reads(0.9982, 1e-5),
        false,
    );
    let urea = crc_solutes::UREA;
    let (first, last) = (urea[0], urea[urea.len() - 1]);
    check(
        "urea",
        UreaMass,
        [
            between(first.1, first.0, 0.1, "CRC 0.5 % row"),
            end(last.1, last.0, ON_NODE, "CRC 44 % row"),
        ],
        Water::Reads(0.0, 0.003),
        false,
    );
    // Screen wash: the scales stop where the index stops rising clearly
    // (40, 40 and 20 % by mass, as the module documents).
    for (alcohol, rows, top) in [
        (Alcohol::Methanol, &crc_solutes::METHANOL[..], 40.0),
        (Alcohol::Ethanol, &crc_solutes::ETHANOL[..], 40.0),
        (Alcohol::Propan2ol, &crc_solutes::PROPAN2OL[..], 20.0),
    ] {
        let first = rows[0];
        let last = *rows.iter().find(|r| r.0 == top).unwrap();
        check(
            "screen wash",
            ScreenWashMass(alcohol),
            [
                between(first.1, first.0, 0.1, "CRC first row"),
                end(last.1, last.0, ON_NODE, "CRC top row"),
            ],
            Water::Reads(0.0, 0.02),
            false,
        );
        check(
            "screen wash freezing point",
            ScreenWashFreezingPoint(alcohol),
            [
                between(first.1, -first.2, 0.01, "CRC first row"),
                end(last.1, -last.2, ON_NODE, "CRC top row"),
            ],
            Water::Reads(0.0, 0.02),
            false,
        );
    }
}

#[test]
fn glycerol_ends() {
    // Glycerine Producers' Association (1963): 0 % and 100 % rows. Its 0 %
    // row, water as measured there, is 4e-5 nD above the water zero.
    let gpa = glycerol::GPA_1963;
    let (first, last) = (gpa[0], gpa[gpa.len() - 1]);
    check(
        "glycerol",
        GlycerolMass,
        [
            end(first.1, first.0, ON_NODE, "GPA 0 % row"),
            end(last.1, last.0, ON_NODE, "GPA 100 % row"),
        ],
        // 4e-5 and 4.4e-5 nD below the 0 % row: −0.035 and −0.039 %.
        Water::Reads(0.0, 0.045),
        false,
    );
}

#[test]
fn glucose_syrup_ends() {
    // ISO 1743, 20 °C column: 0 % and 64 % rows (the scale's grid; the 66 %
    // row is off its 4 % grid and the 45 °C cell of that row a misprint).
    let rows = iso1743::ROWS;
    let last = *rows.iter().find(|r| r.0 == 64.0).unwrap();
    check(
        "glucose syrup",
        GlucoseSyrupDryMatter,
        [
            end(rows[0].1[0], 0.0, ON_NODE, "ISO 1743 0 % row"),
            end(last.1[0], 64.0, ON_NODE, "ISO 1743 64 % row"),
        ],
        Water::Reads(0.0, 0.003),
        false,
    );
}

/// The NBS-table fit of %Brix to specific gravity and the ASBC °Plato
/// polynomial, as printed in the encyclopedia article "Brix" ("Tables").
fn nbs_brix(s: f64) -> f64 {
    ((182.4601 * s - 775.6821) * s + 1262.7794) * s - 669.5622
}
fn asbc_plato(s: f64) -> f64 {
    ((135.997 * s - 630.272) * s + 1111.14) * s - 616.868
}

#[test]
fn brewing_ends() {
    // The fits are stated for S up to 1.17874 (40 °Bx). Their low end is
    // water: S = 1 reads nbs_brix(1) = −0.005 °Bx, so the scales' zero is the
    // S where the fit gives 0 °Bx (1.0000185) and the Plato there.
    let top = 1.17874;
    let top_nd: f64 = SucroseBrix.nd20_at(nbs_brix(top)).unwrap();
    let water_nd = WATER[0];
    check(
        "specific gravity",
        SpecificGravity,
        [
            end(water_nd, 1.0, 1e-4, "water, S = 1"),
            end(top_nd, top, 1e-5, "fit's stated top, S = 1.17874"),
        ],
        Water::Reads(1.0, 1e-4),
        false,
    );
    check(
        "Plato",
        Plato,
        [
            end(water_nd, 0.0, 0.01, "water"),
            end(top_nd, asbc_plato(top), 1e-3, "ASBC at S = 1.17874"),
        ],
        Water::Reads(0.0, 0.01),
        false,
    );
}

#[test]
fn index_scale_reads_water_as_itself() {
    for nd in WATER {
        let v: f64 = IndexScale.value_at(nd).unwrap();
        assert_eq!(v, nd);
    }
}

#[test]
fn salinity_is_named_as_its_source_names_it() {
    // Quan & Fry 1995 give salinity in ‰ (parts per thousand).
    assert_eq!(TradeScale::<f64>::unit(&Salinity), "‰");
}
