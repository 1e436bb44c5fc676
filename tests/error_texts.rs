//! What the errors say: every variant's `Display` names what happened and,
//! after a colon, what to do; every error type is a `core::error::Error`; and
//! the sequencing and mismatch variants come from the sites that raise them.

use embedded_hal::i2c::ErrorKind;
use embedded_optics::autofocus::driver::DriverError;
use embedded_optics::error::{BoundaryFault, StorageFault};
use embedded_optics::refractometer::record::CalibrationRecord;
use embedded_optics::refractometer::table::{LinearTable, UniformCubicTable};
use embedded_optics::refractometer::thermistor::{Beta, ThermistorModel};
use embedded_optics::{Error, Quantity};

/// Every variant of the three error enums (by hand: a new variant must be
/// added here to be checked).
fn every_error() -> Vec<Error> {
    let mut all = vec![
        Error::NotFinite(Quantity::Wavelength),
        Error::OutOfRange(Quantity::Temperature),
        Error::Overflow,
        Error::DivisionByZero,
        Error::MathDomain,
        Error::TotalInternalReflection,
        Error::IndexAtOrAbovePrism,
        Error::SensorOpen,
        Error::SensorShorted,
        Error::RecordTruncated,
        Error::RecordForeign,
        Error::RecordCorrupt,
        Error::RecordVersionUnsupported,
        Error::CloserThanMacro,
        Error::LowConfidence,
        Error::RankDeficient,
        Error::NotZeroed,
        Error::RecordMismatch("led_wavelength_pm"),
        Error::InvalidField("beta_k"),
    ];
    all.extend(every_boundary_fault().into_iter().map(Error::Boundary));
    all.extend(every_storage_fault().into_iter().map(Error::Storage));
    all
}

fn every_boundary_fault() -> [BoundaryFault; 6] {
    [
        BoundaryFault::NoLight,
        BoundaryFault::NoBoundary,
        BoundaryFault::LowContrast,
        BoundaryFault::Saturated,
        BoundaryFault::AtArrayEnd,
        BoundaryFault::MultipleBoundaries,
    ]
}

fn every_storage_fault() -> [StorageFault; 5] {
    [
        StorageFault::Geometry,
        StorageFault::NotAligned,
        StorageFault::OutOfBounds,
        StorageFault::Device,
        StorageFault::Verify,
    ]
}

/// "what happened: what to do", each part present, the whole short enough
/// for a two-line display or a log line.
fn says_what_to_do(text: &str) {
    let (what, remedy) = text
        .rsplit_once(": ")
        .unwrap_or_else(|| panic!("no remedy: {text}"));
    assert!(what.len() >= 8 && remedy.len() >= 8, "{text}");
    assert!(text.chars().count() <= 110, "too long: {text}");
}

#[test]
fn every_error_says_what_happened_and_what_to_do() {
    let texts: Vec<String> = every_error().iter().map(ToString::to_string).collect();
    for t in &texts {
        says_what_to_do(t);
    }
    for f in every_boundary_fault() {
        says_what_to_do(&f.to_string());
    }
    for f in every_storage_fault() {
        says_what_to_do(&f.to_string());
    }
    // No two variants say the same thing.
    let mut sorted = texts.clone();
    sorted.sort();
    sorted.dedup();
    assert_eq!(sorted.len(), texts.len());
}

#[test]
fn the_new_variants_word_for_word() {
    assert_eq!(
        Error::NotZeroed.to_string(),
        "no zero yet: zero on distilled water first"
    );
    assert_eq!(
        Error::RecordMismatch("led_wavelength_pm").to_string(),
        "calibration record made for another unit (led_wavelength_pm differs): calibrate this unit"
    );
    assert_eq!(
        Error::InvalidField("frames_per_reading").to_string(),
        "frames_per_reading outside its allowed values: correct the description"
    );
    assert_eq!(
        Error::OutOfRange(Quantity::RefractiveIndex).to_string(),
        "refractive index is out of range: see the routine's stated range"
    );
    assert_eq!(
        Error::Boundary(BoundaryFault::Saturated).to_string(),
        "boundary not measured: sensor saturated near the boundary: lower the LED current or exposure"
    );
    assert_eq!(
        DriverError::<ErrorKind>::Bus(ErrorKind::Other).to_string(),
        "I2C transfer failed (Other): check the wiring and the address"
    );
    assert_eq!(
        DriverError::<ErrorKind>::Rejected(Error::NotZeroed).to_string(),
        "move refused: no zero yet: zero on distilled water first"
    );
}

fn is_error<E: core::error::Error>(_: &E) {}

#[test]
fn every_error_type_is_a_core_error() {
    is_error(&Error::Overflow);
    is_error(&BoundaryFault::NoLight);
    is_error(&StorageFault::Device);
    is_error(&DriverError::<ErrorKind>::Bus(ErrorKind::Other));
    let boxed: Box<dyn core::error::Error> = Box::new(Error::NotZeroed);
    assert_eq!(boxed.to_string(), Error::NotZeroed.to_string());
}

#[test]
fn a_record_for_another_led_is_a_mismatch() {
    let record = CalibrationRecord::factory(589_300);
    assert_eq!(record.check_made_for(589_300), Ok(()));
    assert_eq!(
        record.check_made_for(590_000),
        Err(Error::RecordMismatch("led_wavelength_pm"))
    );
}

#[test]
fn bad_descriptions_name_their_field() {
    // Tables.
    assert_eq!(
        LinearTable::new(&[(1, 1)], 1, 1),
        Err(Error::InvalidField("points"))
    );
    assert_eq!(
        LinearTable::new(&[(2, 1), (1, 2)], 1, 1),
        Err(Error::InvalidField("points"))
    );
    assert_eq!(
        LinearTable::new(&[(1, 1), (2, 2)], 0, 1),
        Err(Error::InvalidField("x_den"))
    );
    assert_eq!(
        LinearTable::new(&[(1, 1), (2, 2)], 1, -1),
        Err(Error::InvalidField("y_den"))
    );
    let cubic = |ys: &'static [i32], step: i32| UniformCubicTable {
        x0: 0,
        step,
        x_den: 1,
        ys,
        y_den: 1,
    };
    assert_eq!(
        cubic(&[0, 1, 2], 1).y_at(0.5f64, Quantity::Value),
        Err(Error::InvalidField("ys"))
    );
    assert_eq!(
        cubic(&[0, 2, 1, 3], 1).x_at(0.5f64, Quantity::Value),
        Err(Error::InvalidField("ys"))
    );
    assert_eq!(
        cubic(&[0, 1, 2, 3], 0).y_at(0.5f64, Quantity::Value),
        Err(Error::InvalidField("step"))
    );
    // A thermistor model: β outside 100–12 700 K.
    let model = Beta {
        beta_k: 50,
        r0_ohms: 10_000,
        t0_c: 25.0f64,
    };
    assert_eq!(
        model.temperature_c(9.2f64),
        Err(Error::InvalidField("beta_k"))
    );
}
