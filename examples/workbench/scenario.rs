//! Scenario files: what instrument to simulate, which samples, which study.
//!
//! TOML with keys of the workbench's own naming. Unknown keys are refused (a
//! typo must not silently fall back to a default); a malformed file gives the
//! parser's message, which names the line, the column and the field.

use serde::Deserialize;

/// A whole scenario file.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Scenario {
    /// `"refractometer"` (the default when absent).
    #[serde(default)]
    pub instrument: Option<String>,
    /// One line saying what is simulated (printed at the top of the report).
    pub title: String,
    /// The measuring prism.
    pub prism: Prism,
    /// The line sensor and its frames.
    pub sensor: Sensor,
    /// Imaging optics between the prism face and the sensor.
    pub optics: Optics,
    /// The light source.
    pub led: Led,
    /// The temperature sensor.
    pub thermistor: Thermistor,
    /// How the firmware turns index into nD at 20 °C and a scale.
    pub sample_model: SampleModelSpec,
    /// Factory calibration: water zero and one span standard.
    pub calibration: CalibrationSpec,
    /// Samples to read.
    pub samples: Vec<SampleSpec>,
    /// What to run.
    pub study: Study,
    /// End-of-line verification of simulated units (optional).
    #[serde(default)]
    pub end_of_line: Option<EndOfLine>,
}

/// End-of-line verification: every simulated unit, built and calibrated with
/// the study's tolerances, reads these check standards at the calibration
/// temperature; a unit ships when each is within its MPE.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct EndOfLine {
    /// Units simulated.
    pub units: usize,
    /// The check standards.
    pub checks: Vec<CheckSpec>,
}

/// One check standard: nominal nD at 20 °C or scale value, and its MPE in
/// the same unit.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CheckSpec {
    /// Name for the table.
    pub name: String,
    /// Nominal nD at 20 °C (MPE in nD).
    #[serde(default)]
    pub nd20: Option<f64>,
    /// Nominal scale value (MPE in the scale's unit), instead of `nd20`.
    #[serde(default)]
    pub scale_value: Option<f64>,
    /// Maximum permissible error.
    pub mpe: f64,
    /// Distilled water (rendered from the water model, not the sample model).
    #[serde(default)]
    pub water: bool,
}

/// Prism glass and apex angle.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Prism {
    /// Glass nd at 20 °C (datasheet).
    pub glass_nd: f64,
    /// Glass Abbe number Vd.
    pub glass_vd: f64,
    /// Glass dn/dT, 1e-6 per K.
    pub dn_dt_ppm: f64,
    /// Apex angle, degrees.
    pub apex_deg: f64,
}

/// Line sensor, readout and frame averaging.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Sensor {
    /// Number of pixels (64 to 4096).
    pub pixels: usize,
    /// Pixel pitch, µm.
    pub pitch_um: f64,
    /// Pixel on the optical axis.
    pub axis_px: f64,
    /// Counts above dark for total reflection on the axis.
    pub full_scale: f64,
    /// Dark level, counts.
    pub dark_level: f64,
    /// Read noise, counts (standard deviation).
    pub read_noise: f64,
    /// Pixel response non-uniformity, relative standard deviation.
    #[serde(default)]
    pub response_spread: f64,
    /// Blur half-width, pixels.
    pub blur_px: f64,
    /// Frames averaged into one reading.
    pub frames_per_reading: u8,
}

/// Imaging optics.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Optics {
    /// Focal length, mm.
    pub focal_length_mm: f64,
}

/// Light source.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Led {
    /// Centre wavelength, nm (what the firmware assumes).
    pub centre_nm: f64,
    /// Full width at half maximum, nm.
    pub fwhm_nm: f64,
}

/// Temperature sensor.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Thermistor {
    /// Standard uncertainty of the sample temperature reading, °C (what the
    /// firmware is told, and what the budget draws offsets from).
    pub tolerance_c: f64,
}

/// The firmware's sample models and trade scale.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SampleModelSpec {
    /// `"water-like"` or `"abbe"` (with `abbe_number`).
    pub dispersion: String,
    /// Sample Abbe number, for `dispersion = "abbe"`.
    #[serde(default)]
    pub abbe_number: Option<f64>,
    /// `"water"` (water's own dn/dT), `"linear"` (with `dn_dt_per_k`) or
    /// `"sucrose"` (sucrose and juices over 5–40 °C: the juice-products
    /// correction table where it has cells, the sucrose temperature model
    /// elsewhere).
    pub compensation: String,
    /// Sample dn/dT per K, for `compensation = "linear"`.
    #[serde(default)]
    pub dn_dt_per_k: Option<f64>,
    /// Temperatures the compensation holds for, °C: `[low, high]`.
    pub compensation_range_c: [f64; 2],
    /// `"brix"`, `"salinity"`, `"brine"`, `"honey"`, `"glycol-freezing-point"`,
    /// `"battery-acid"`, `"urea"` (AUS 32), `"methanol-freezing-point"`
    /// (screen wash) or `"nd"`.
    pub scale: String,
}

/// The trade scales a scenario can pick, as `sample_model.scale` spells them.
pub const SCALE_NAMES: [&str; 9] = [
    "brix",
    "salinity",
    "brine",
    "honey",
    "glycol-freezing-point",
    "battery-acid",
    "urea",
    "methanol-freezing-point",
    "nd",
];

/// Factory calibration.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CalibrationSpec {
    /// Temperature of the calibration, °C.
    pub temperature_c: f64,
    /// Certified nD at 20 °C of the span standard.
    pub span_nd20: f64,
    /// Standard uncertainty of that certificate, nD.
    pub standard_uncertainty: f64,
}

/// One sample, given by its nD at 20 °C or by its scale value.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SampleSpec {
    /// Name for the table.
    pub name: String,
    /// True nD at 20 °C.
    #[serde(default)]
    pub nd20: Option<f64>,
    /// True value in the scale's unit (instead of `nd20`).
    #[serde(default)]
    pub scale_value: Option<f64>,
}

/// The study: readings, Monte Carlo budget and sweeps.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Study {
    /// Sample temperatures of the readings, °C.
    pub temperatures_c: Vec<f64>,
    /// Seed of every random draw.
    pub seed: u64,
    /// Monte Carlo trials (simulated units) per budget run.
    pub trials: usize,
    /// Tolerances (standard deviations) the budget draws from.
    pub tolerances: Tolerances,
    /// nD20 range of the error-against-index plot: `[low, high]`.
    pub sweep_nd20: [f64; 2],
}

/// Standard deviations of the factors in the budget. Zero leaves a factor out.
#[derive(Debug, Clone, Copy, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Tolerances {
    /// Pixel noise on (uses the sensor's read noise) or off.
    pub pixel_noise: bool,
    /// LED centre wavelength drift after calibration, nm.
    pub led_drift_nm: f64,
    /// Prism apex angle, degrees.
    pub prism_angle_deg: f64,
    /// Focal length, mm.
    pub focal_length_mm: f64,
}

/// A scenario that does not parse or does not make sense.
#[derive(Debug)]
pub struct ScenarioError(pub String);

impl std::fmt::Display for ScenarioError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

impl std::error::Error for ScenarioError {}

fn bad(field: &str, why: &str) -> ScenarioError {
    ScenarioError(format!("scenario field `{field}`: {why}"))
}

fn within(field: &str, x: f64, lo: f64, hi: f64) -> Result<(), ScenarioError> {
    if x.is_finite() && (lo..=hi).contains(&x) {
        Ok(())
    } else {
        Err(bad(field, &format!("{x} is outside {lo} to {hi}")))
    }
}

/// Parses and checks a scenario. `origin` names the file in messages.
pub fn parse(text: &str, origin: &str) -> Result<Scenario, ScenarioError> {
    let s: Scenario = toml::from_str(text).map_err(|e| ScenarioError(format!("{origin}: {e}")))?;
    s.check()
        .map_err(|e| ScenarioError(format!("{origin}: {e}")))?;
    Ok(s)
}

impl Scenario {
    /// Range checks the parser cannot do; each names its field.
    fn check(&self) -> Result<(), ScenarioError> {
        if let Some(kind) = self.instrument.as_deref().filter(|k| *k != "refractometer") {
            return Err(bad(
                "instrument",
                &format!("\"{kind}\" is not one of \"refractometer\", \"autofocus\""),
            ));
        }
        if let Some(e) = &self.end_of_line {
            within("end_of_line.units", e.units as f64, 1.0, 10_000.0)?;
            within("end_of_line.checks", e.checks.len() as f64, 1.0, 8.0)?;
            for c in &e.checks {
                within("end_of_line.checks.mpe", c.mpe, 1e-7, 100.0)?;
                if c.nd20.is_some() == c.scale_value.is_some() {
                    return Err(bad(
                        "end_of_line.checks",
                        &format!("`{}` needs exactly one of nd20, scale_value", c.name),
                    ));
                }
            }
        }
        within("prism.glass_nd", self.prism.glass_nd, 1.4, 2.2)?;
        within("prism.glass_vd", self.prism.glass_vd, 15.0, 100.0)?;
        within("prism.dn_dt_ppm", self.prism.dn_dt_ppm, -50.0, 50.0)?;
        within("prism.apex_deg", self.prism.apex_deg, 20.0, 80.0)?;
        within("sensor.pixels", self.sensor.pixels as f64, 64.0, 4096.0)?;
        within("sensor.pitch_um", self.sensor.pitch_um, 1.0, 100.0)?;
        within(
            "sensor.axis_px",
            self.sensor.axis_px,
            0.0,
            self.sensor.pixels as f64,
        )?;
        within("sensor.full_scale", self.sensor.full_scale, 100.0, 65535.0)?;
        within("sensor.dark_level", self.sensor.dark_level, 0.0, 4000.0)?;
        within("sensor.read_noise", self.sensor.read_noise, 0.0, 1000.0)?;
        within(
            "sensor.response_spread",
            self.sensor.response_spread,
            0.0,
            0.2,
        )?;
        within("sensor.blur_px", self.sensor.blur_px, 0.5, 8.0)?;
        within(
            "sensor.frames_per_reading",
            f64::from(self.sensor.frames_per_reading),
            1.0,
            64.0,
        )?;
        within(
            "optics.focal_length_mm",
            self.optics.focal_length_mm,
            1.0,
            500.0,
        )?;
        within("led.centre_nm", self.led.centre_nm, 400.0, 800.0)?;
        within("led.fwhm_nm", self.led.fwhm_nm, 0.0, 60.0)?;
        within(
            "thermistor.tolerance_c",
            self.thermistor.tolerance_c,
            0.0,
            10.0,
        )?;
        match self.sample_model.dispersion.as_str() {
            "water-like" => {}
            "abbe" => within(
                "sample_model.abbe_number",
                self.sample_model.abbe_number.unwrap_or(f64::NAN),
                10.0,
                100.0,
            )?,
            other => {
                return Err(bad(
                    "sample_model.dispersion",
                    &format!("\"{other}\" is not one of \"water-like\", \"abbe\""),
                ));
            }
        }
        match self.sample_model.compensation.as_str() {
            "water" | "sucrose" => {}
            "linear" => within(
                "sample_model.dn_dt_per_k",
                self.sample_model.dn_dt_per_k.unwrap_or(f64::NAN),
                -5.0e-3,
                5.0e-3,
            )?,
            other => {
                return Err(bad(
                    "sample_model.compensation",
                    &format!("\"{other}\" is not one of \"water\", \"linear\", \"sucrose\""),
                ));
            }
        }
        let [lo, hi] = self.sample_model.compensation_range_c;
        within("sample_model.compensation_range_c", lo, -20.0, hi)?;
        within("sample_model.compensation_range_c", hi, lo, 100.0)?;
        if !SCALE_NAMES.contains(&self.sample_model.scale.as_str()) {
            return Err(bad(
                "sample_model.scale",
                &format!(
                    "\"{}\" is not one of {}",
                    self.sample_model.scale,
                    SCALE_NAMES
                        .iter()
                        .map(|n| format!("\"{n}\""))
                        .collect::<Vec<_>>()
                        .join(", ")
                ),
            ));
        }
        within(
            "calibration.temperature_c",
            self.calibration.temperature_c,
            lo,
            hi,
        )?;
        within(
            "calibration.span_nd20",
            self.calibration.span_nd20,
            1.30,
            1.70,
        )?;
        if (self.calibration.span_nd20 - 1.333).abs() < 0.02 {
            return Err(bad(
                "calibration.span_nd20",
                "the span standard must be at least 0.02 from water (nD 1.333)",
            ));
        }
        within(
            "calibration.standard_uncertainty",
            self.calibration.standard_uncertainty,
            0.0,
            0.01,
        )?;
        if self.samples.is_empty() {
            return Err(bad("samples", "at least one [[samples]] entry is needed"));
        }
        for (i, s) in self.samples.iter().enumerate() {
            match (s.nd20, s.scale_value) {
                (Some(n), None) => within(&format!("samples[{i}].nd20"), n, 1.30, 1.70)?,
                (None, Some(v)) => within(&format!("samples[{i}].scale_value"), v, -1e3, 1e3)?,
                _ => {
                    return Err(bad(
                        &format!("samples[{i}]"),
                        "give exactly one of `nd20` and `scale_value`",
                    ));
                }
            }
        }
        if self.study.temperatures_c.is_empty() {
            return Err(bad("study.temperatures_c", "at least one temperature"));
        }
        for t in &self.study.temperatures_c {
            within("study.temperatures_c", *t, lo, hi)?;
        }
        within("study.trials", self.study.trials as f64, 10.0, 100_000.0)?;
        let [a, b] = self.study.sweep_nd20;
        within("study.sweep_nd20", a, 1.30, b)?;
        within("study.sweep_nd20", b, a, 1.70)?;
        let tol = &self.study.tolerances;
        within("study.tolerances.led_drift_nm", tol.led_drift_nm, 0.0, 20.0)?;
        within(
            "study.tolerances.prism_angle_deg",
            tol.prism_angle_deg,
            0.0,
            1.0,
        )?;
        within(
            "study.tolerances.focal_length_mm",
            tol.focal_length_mm,
            0.0,
            5.0,
        )?;
        Ok(())
    }
}
