//! Accuracy of every routine in every number type, against an independent `f64`
//! reference. Asserts each routine's budget and keeps `docs/accuracy.md` in step.
//!
//! Regenerate the published table with
//! `UPDATE_ACCURACY=1 cargo test --test accuracy`.

#[macro_use]
mod harness;
mod afint;
mod cal;
mod chain;
mod dispersion;
mod dynamics;
mod fit;
mod lens;
mod reading;
mod refraction;
mod scalar;
mod search;
mod trade;

use harness::{Row, row};

fn all_rows() -> Vec<Row> {
    vec![
        row::<scalar::Sqrt>(),
        row::<scalar::SinCos>(),
        row::<scalar::Asin>(),
        row::<scalar::Atan2>(),
        row::<scalar::Ln>(),
        row::<scalar::Exp>(),
        row::<refraction::CriticalSine>(),
        row::<refraction::CriticalAngle>(),
        row::<refraction::IndexFromCriticalAngle>(),
        row::<refraction::RefractionAngle>(),
        row::<refraction::FresnelUnpolarised>(),
        row::<cal::BrixFromNd>(),
        row::<cal::NdFromBrix>(),
        row::<cal::HoneyWaterFromNd>(),
        row::<cal::SalinityFromNd>(),
        row::<cal::MustAlcoholFromNd>(),
        row::<cal::BrineFromNd>(),
        row::<cal::GlycolMassFromNd>(),
        row::<cal::GlycolFreezingFromNd>(),
        row::<cal::BatteryAcidFromNd>(),
        row::<trade::UreaFromNd>(),
        row::<trade::GlycerolFromNd>(),
        row::<trade::GravityFromNd>(),
        row::<trade::MethanolFreezing>(),
        row::<trade::MustDensityFromNd>(),
        row::<trade::SyrupDryMatterFromNd>(),
        row::<cal::SucroseCorrection>(),
        row::<cal::SucroseRowsCorrection>(),
        row::<reading::MapIndex>(),
        row::<reading::WaterLine>(),
        row::<reading::ThermistorTable>(),
        row::<reading::CellsApparentBrix>(),
        row::<reading::CellsNdOfBrix>(),
        row::<reading::GridCorrectionOiv>(),
        row::<reading::GridCorrectionJuice>(),
        row::<trade::SucroseTemperatureModel>(),
        row::<cal::LinearSampleCompensation>(),
        row::<cal::PrismIndex>(),
        row::<cal::ThermistorSteinhartHart>(),
        row::<cal::ThermistorBeta>(),
        row::<cal::FieldRezero>(),
        row::<cal::RecordCorrection>(),
        row::<cal::RecordCoefficient>(),
        row::<fit::FitValue>(),
        row::<fit::FitUncertainty>(),
        row::<fit::FitSlope>(),
        row::<fit::FactoryCurve>(),
        row::<search::PeakParabolic>(),
        row::<search::PeakGaussian>(),
        row::<search::SimBlur>(),
        row::<search::SimMetric>(),
        row::<lens::ImageDistance>(),
        row::<lens::LensExtension>(),
        row::<lens::SubjectFromExtension>(),
        row::<lens::Hyperfocal>(),
        row::<lens::DofNear>(),
        row::<lens::DofFar>(),
        row::<lens::DepthOfFocus>(),
        row::<lens::Lensmaker>(),
        row::<lens::TwoLensEfl>(),
        row::<lens::LiquidLensFocal>(),
        row::<lens::VertexPower>(),
        row::<lens::FarPoint>(),
        row::<lens::RatioForCode>(),
        row::<lens::RangeParallax>(),
        row::<dispersion::SellmeierSilica>(),
        row::<dispersion::CauchyNdVd>(),
        row::<dispersion::AbbeVd>(),
        row::<dispersion::PartialDispersion>(),
        row::<dispersion::WaterIapws>(),
        row::<dispersion::WaterDensity>(),
        row::<dispersion::WaterAir>(),
        row::<dispersion::WaterTableAir>(),
        row::<dispersion::WaterPrecomputedAir>(),
        row::<dispersion::SeawaterQuanFry>(),
        row::<dispersion::AirRefractivity>(),
        row::<dispersion::GlassSilica>(),
        row::<dispersion::NdWaterLike>(),
        row::<dispersion::NdAbbe>(),
        row::<dispersion::PrismDeviation>(),
        row::<dispersion::PrismMinDeviation>(),
        row::<dispersion::PrismIndex>(),
        row::<dispersion::AngularDispersionSilica>(),
        row::<dispersion::SingletFocalLength>(),
        row::<dispersion::AchromatSecondary>(),
        row::<chain::PixelToIndex>(),
        row::<chain::PixelSlope>(),
        row::<chain::CorrectionApply>(),
        row::<afint::ExtensionForVergence>(),
        row::<afint::BlurCircle>(),
        row::<afint::DepthOfFocusAtMagnification>(),
        row::<afint::HyperfocalExtension>(),
        row::<dynamics::StepResponse>(),
        row::<dynamics::PeakOvershoot>(),
        row::<dynamics::SettleTime>(),
        row::<dynamics::EnvelopeSettleTime>(),
        row::<dynamics::ZvSensitivity>(),
        row::<dynamics::ZvdSensitivity>(),
        row::<dynamics::IdentifyFrequency>(),
        row::<dynamics::IdentifyDamping>(),
    ]
}

const HEADER: &str = "\
Maximum absolute error of each routine over its working domain, per number type,
against an independent `f64` reference computed with plain `libm` calls from the
closed-form relation (the f64 column therefore shows the routine's own rounding in
`f64`). Each input is first rounded to the type under test and the reference is
taken at that rounded input, so the figures are the routine's error, not the
quantisation of its inputs (I8F24 resolves 6.0e-8, I32F32 2.3e-10).

Produced by `tests/accuracy/main.rs`; regenerate with
`UPDATE_ACCURACY=1 cargo test --test accuracy`. The same test asserts a budget for
every cell (see the `BUDGET` beside each sweep) and fails if this table is stale.

";

#[test]
fn accuracy_within_budget_and_table_current() {
    let rows = all_rows();
    let violations: Vec<String> = rows.iter().flat_map(|r| r.violations()).collect();
    let doc = format!(
        "# Accuracy against f64\n\n{HEADER}{}",
        harness::table(&rows)
    );
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/docs/accuracy.md");
    if std::env::var_os("UPDATE_ACCURACY").is_some() {
        std::fs::write(path, &doc).unwrap();
    } else {
        let committed = std::fs::read_to_string(path).unwrap_or_default();
        assert!(
            committed == doc,
            "docs/accuracy.md is stale; regenerate with UPDATE_ACCURACY=1 cargo test --test accuracy\n{doc}"
        );
    }
    assert!(
        violations.is_empty(),
        "budget violations:\n{}",
        violations.join("\n")
    );
}
