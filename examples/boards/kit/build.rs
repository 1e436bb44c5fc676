//! Host half of the board checks: makes the input rows, runs the crate's routines
//! on them on the PC, and writes `$OUT_DIR/table.rs` with the inputs (as raw bits
//! of each number type) and the expected outputs:
//! - fixed point: the same fixed type on the host, so the board must be bit-exact;
//! - f32: `f64` on the host from the same (f32-rounded) inputs, budget 2e-6.
use embedded_optics::{Error, Scalar};
use fixed::types::{I8F24, I32F32};
use std::fmt::Write as _;

#[path = "src/rows.rs"]
#[allow(dead_code)]
mod rows;
use rows::{Row, outputs};

#[path = "src/chains.rs"]
#[allow(dead_code)]
mod chains;
use chains::{FOCUS_FRAMES_MAX, FRAMES, PIXELS, SUBJECTS};

/// Host figures as build warnings, with `BOARD_VERBOSE=1`.
macro_rules! note {
    ($($a:tt)*) => {
        if std::env::var_os("BOARD_VERBOSE").is_some() {
            println!("cargo:warning={}", format!($($a)*));
        }
    };
}

/// The rows, in f64: a refractometer's working range on three prism glasses,
/// incidences away from the critical angle (where reflectance has a vertical
/// tangent), then rows every routine must refuse.
fn rows_f64() -> Vec<[f64; 6]> {
    let mut v = Vec::new();
    let fractions = [0.0, 0.3, 0.6, 0.85, 1.15];
    let mut k = 0;
    for n_prism in [1.52, 1.72, 1.75] {
        for n_sample in [1.3000, 1.3330, 1.3811, 1.4200, 1.4900] {
            let sine: f64 = n_sample / n_prism;
            let theta = sine.asin();
            let incidence = (fractions[k % fractions.len()] * theta).min(1.5);
            k += 1;
            v.push([n_prism, n_sample, sine, theta, incidence, incidence.cos()]);
        }
    }
    // Sample as dense as the prism, sine 1: no critical angle.
    v.push([1.52, 1.52, 1.0, 1.5, 1.0, 0.0]);
    // Sample above the prism; sine giving nD < 1; angle and cosine out of range.
    v.push([1.72, 1.9, 0.5, 1.7, 1.7, 1.25]);
    v
}

fn to_row<S: Scalar>(r: &[f64; 6]) -> Row<S> {
    let s = |x: f64| S::from_f64(x).expect("input fits");
    Row {
        n_prism: s(r[0]),
        n_sample: s(r[1]),
        sine: s(r[2]),
        angle: s(r[3]),
        incidence: s(r[4]),
        cosine: s(r[5]),
    }
}

fn fields<S: Scalar>(r: &Row<S>) -> [S; 6] {
    [
        r.n_prism,
        r.n_sample,
        r.sine,
        r.angle,
        r.incidence,
        r.cosine,
    ]
}

fn result<S: Scalar>(x: &Result<S, Error>, bits: impl Fn(S) -> String) -> String {
    match x {
        Ok(v) => format!("Ok({})", bits(*v)),
        Err(e) => format!("Err({e:?})"),
    }
}

/// Writes `IN_<name>` and `OUT_<name>` for one number type.
fn emit<S: Scalar>(out: &mut String, name: &str, ty: &str, bits: impl Fn(S) -> String + Copy) {
    let rows: Vec<Row<S>> = rows_f64().iter().map(to_row::<S>).collect();
    writeln!(out, "pub static IN_{name}: [[{ty}; 6]; ROWS] = [").unwrap();
    for r in &rows {
        let f: Vec<String> = fields(r).iter().map(|x| bits(*x)).collect();
        writeln!(out, "    [{}],", f.join(", ")).unwrap();
    }
    writeln!(out, "];").unwrap();
    expect(out, name, ty, &rows, bits);
}

fn expect<S: Scalar>(
    out: &mut String,
    name: &str,
    ty: &str,
    rows: &[Row<S>],
    bits: impl Fn(S) -> String + Copy,
) {
    writeln!(
        out,
        "pub static OUT_{name}: [[Result<{ty}, Error>; OUTPUTS]; ROWS] = ["
    )
    .unwrap();
    for r in rows {
        let o: Vec<String> = outputs(r).iter().map(|x| result(x, bits)).collect();
        writeln!(out, "    [{}],", o.join(", ")).unwrap();
    }
    writeln!(out, "];").unwrap();
}

/// A synthetic 12-bit line-sensor frame for per-pixel items (boundary finder,
/// focus metric): invented scenario, a juice sample (nD 1.3811) on a 1.72 prism,
/// the pixels spanning incidences critical angle ± 3°, intensity ∝ unpolarised
/// Fresnel reflectance (bright beyond the critical angle), plus a little
/// deterministic noise. The critical angle falls on pixel 512.
fn frame(out: &mut String) {
    let (n_prism, n_sample) = (1.72f64, 1.3811f64);
    let critical = (n_sample / n_prism).asin();
    let span = 6f64.to_radians();
    let mut noise: u32 = 0x2545_F491;
    writeln!(out, "pub static FRAME: [u16; {PIXELS}] = [").unwrap();
    for p in 0..PIXELS {
        let incidence = critical + span * (p as f64 / PIXELS as f64 - 0.5);
        let r = embedded_optics::optics::fresnel::reflectance(n_prism, n_sample, incidence)
            .expect("valid incidence")
            .unpolarised;
        noise ^= noise << 13;
        noise ^= noise >> 17;
        noise ^= noise << 5;
        let counts = 3600.0 * r + 200.0 + f64::from(noise % 17) - 8.0;
        writeln!(out, "    {},", counts.round() as u16).unwrap();
    }
    writeln!(out, "];").unwrap();
}

fn main() {
    println!("cargo:rerun-if-changed=build.rs");
    println!("cargo:rerun-if-changed=src/rows.rs");
    println!("cargo:rerun-if-changed=src/chains.rs");
    println!("cargo:rerun-if-env-changed=BOARD_VERBOSE");
    println!("cargo:rerun-if-changed=../../../src");
    let mut out = String::new();
    writeln!(out, "// @generated by build.rs on the host.").unwrap();
    writeln!(out, "pub const ROWS: usize = {};", rows_f64().len()).unwrap();
    emit::<I8F24>(&mut out, "I8F24", "i32", |x| format!("{}", x.to_bits()));
    emit::<I32F32>(&mut out, "I32F32", "i64", |x| format!("{}", x.to_bits()));
    emit::<f32>(&mut out, "F32", "u32", |x| format!("{:#010x}", x.to_bits()));
    // f64 reference from the f32-rounded inputs: only the arithmetic is compared.
    let wide: Vec<Row<f64>> = rows_f64()
        .iter()
        .map(|r| {
            let f = fields(&to_row::<f32>(r)).map(f64::from);
            Row {
                n_prism: f[0],
                n_sample: f[1],
                sine: f[2],
                angle: f[3],
                incidence: f[4],
                cosine: f[5],
            }
        })
        .collect();
    expect(&mut out, "F64", "f64", &wide, |x| format!("{x:?}"));
    frame(&mut out);
    chain_tables(&mut out);
    lean_design(&mut out);
    let path = std::path::Path::new(&std::env::var("OUT_DIR").unwrap()).join("table.rs");
    std::fs::write(path, out).unwrap();
}

/// The reading side's data for the chain's design (prepared from the exact
/// models, as a firmware's build script does): `LEAN_MAP`, `LEAN_WATER`,
/// `LEAN_THERMISTOR` (10 kΩ NTC, β 3950 K, under 10 kΩ, 12-bit ADC) and
/// `LEAN_DISPERSION_RATIO_Q30`.
fn lean_design(out: &mut String) {
    use embedded_optics::refractometer::prepare;
    use embedded_optics::refractometer::thermistor::{Beta, Divider, Placement};
    let divider = Divider {
        placement: Placement::ThermistorLowSide,
        reference_ohms: 10_000,
        adc_bits: 12,
        rail_margin_codes: 4,
    };
    let ntc = Beta {
        beta_k: 3950,
        r0_ohms: 10_000,
        t0_c: 25.0,
    };
    let prism = chains::prism::<f64>().unwrap();
    let data = prepare::prepare(
        &chains::GEOMETRY,
        &prism,
        chains::LED_NM,
        PIXELS as u16,
        &divider,
        &ntc,
    )
    .unwrap();
    data.to_rust("LEAN", out).unwrap();
}

/// Samples of the refractometer run: (%Brix at 20 °C, sample temperature °C);
/// the first is distilled water (the zero). Inside OIV Table I (5–20 °C,
/// 10–75 %Brix) with room for the ±0.5 K of the uncertainty's differences.
const SAMPLES: [(f64, f64); FRAMES] = [
    (0.0, 18.0),
    (25.0, 17.3),
    (20.0, 12.6),
    (35.0, 16.2),
    (50.0, 19.45),
];

/// Smallest x in [lo, hi] with f(x) ≥ y, f rising (bisection, 60 halvings).
fn solve(f: impl Fn(f64) -> f64, y: f64, mut lo: f64, mut hi: f64) -> f64 {
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if f(mid) < y { lo = mid } else { hi = mid }
    }
    0.5 * (lo + hi)
}

/// The stored frames, rendered by the crate's forward model (f64): what the
/// sensor would see for each sample (index at the LED and temperature found by
/// inverting the chain's own models), read noise 10 counts, seeded.
fn chain_frames() -> Vec<Vec<u16>> {
    use embedded_optics::media::water::Water;
    use embedded_optics::media::{IndexReference, Medium};
    use embedded_optics::refractometer::compensation::SucroseCompensation;
    use embedded_optics::refractometer::forward::{SampleState, SensorScene, render};
    use embedded_optics::refractometer::scales::SucroseBrix;
    use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
    use embedded_optics::refractometer::{TradeScale, WavelengthCorrection};
    use embedded_optics::rng::Rng;
    let led = chains::LED_NM / 1000.0;
    let scene = SensorScene {
        geometry: chains::GEOMETRY,
        led_centre_nm: chains::LED_NM,
        led_fwhm_nm: 15.0,
        blur_px: 1.5,
        full_scale: 3000.0,
        dark_level: 100.0,
        read_noise: 10.0,
        shot_noise_per_count: 0.0,
        response_spread: 0.0,
        adc_max: 4095,
    };
    let prism = chains::prism::<f64>().unwrap();
    SAMPLES
        .iter()
        .enumerate()
        .map(|(k, &(brix, t))| {
            let n_led = if brix == 0.0 {
                Water::new(IndexReference::Air).index(led, t).unwrap()
            } else {
                let comp = SucroseCompensation::oiv();
                let read = solve(
                    |b| comp.brix_at_reference(b, t).unwrap_or(f64::NAN),
                    brix,
                    5.0,
                    80.0,
                );
                let nd_t = SucroseBrix.nd20_at(read).unwrap();
                solve(
                    |n| WaterLikeDispersion.to_nd(n, led).unwrap(),
                    nd_t,
                    1.3,
                    1.6,
                )
            };
            let sample = SampleState {
                index: n_led,
                dispersion_per_nm: -3.0e-5,
                temperature_c: t,
            };
            let mut f = vec![0u16; PIXELS];
            render(
                &scene,
                &prism,
                &sample,
                &mut Rng::new(2026 + k as u64),
                &mut f,
            )
            .unwrap();
            f
        })
        .collect()
}

fn reading<S: Scalar>(r: &chains::ReadingOut<S>, bits: impl Fn(S) -> String) -> String {
    match r {
        Ok((p, n, Ok(b))) => format!("Ok(({p}, {}, Ok({})))", bits(*n), bits(*b)),
        Ok((p, n, Err(e))) => format!("Ok(({p}, {}, Err({e:?})))", bits(*n)),
        Err(e) => format!("Err({e:?})"),
    }
}

/// Chain inputs and expected outputs for type `S` (temperatures from `temps`).
fn emit_chain<S: Scalar>(
    out: &mut String,
    name: &str,
    ty: &str,
    frames: &[Vec<u16>],
    temps: [S; FRAMES],
    bits: impl Fn(S) -> String + Copy,
) {
    let f: [&[u16]; FRAMES] = core::array::from_fn(|k| frames[k].as_slice());
    let r = chains::refractometer_run::<S, u16>(&f, &temps);
    let o: Vec<String> = r.iter().map(|x| reading(x, bits)).collect();
    writeln!(
        out,
        "pub static CHAIN_OUT_{name}: [Result<(i32, {ty}, Result<{ty}, Error>), Error>; {FRAMES}] = [{}];",
        o.join(", ")
    )
    .unwrap();
    for (x, (brix, t)) in r.iter().zip(SAMPLES) {
        if let Ok((p, n, b)) = x {
            let b = b.map_or_else(|e| format!("{e:?}"), |b| format!("{:.3} %Brix", b.to_f64()));
            note!(
                "{name}: {brix} %Brix at {t} °C: position {p}, nD20 {:.6}, {b}",
                n.to_f64()
            );
        } else {
            note!("{name}: {brix} %Brix at {t} °C: {x:?}");
        }
    }
}

/// Autofocus runs in type `S`: subject vergences (inputs), outcomes, and the
/// metrics the first run fed to the search (for the per-step cost item).
fn emit_focus<S: Scalar>(out: &mut String, name: &str, ty: &str, bits: impl Fn(S) -> String) {
    let v: Vec<S> = SUBJECTS.iter().map(|&x| S::from_f64(x).unwrap()).collect();
    let vb: Vec<String> = v.iter().map(|x| bits(*x)).collect();
    writeln!(
        out,
        "pub static FOCUS_V_{name}: [{ty}; {}] = [{}];",
        SUBJECTS.len(),
        vb.join(", ")
    )
    .unwrap();
    let mut first = None;
    let mut rs = Vec::new();
    for (k, x) in v.iter().enumerate() {
        let mut m = [0u64; FOCUS_FRAMES_MAX];
        let r = chains::focus_run(*x, 11 + k as u64, &mut m);
        note!("{name}: focus on {} dpt: {r:?}", SUBJECTS[k]);
        if first.is_none() {
            let n = r.map(|o| o[2] as usize).unwrap_or(0);
            first = Some(m[..n].to_vec());
        }
        rs.push(match r {
            Ok(o) => format!("Ok({o:?})"),
            Err(e) => format!("Err({e:?})"),
        });
    }
    writeln!(
        out,
        "pub static FOCUS_OUT_{name}: [Result<[i32; 5], Error>; {}] = [{}];",
        SUBJECTS.len(),
        rs.join(", ")
    )
    .unwrap();
    let m = first.unwrap_or_default();
    writeln!(
        out,
        "pub static FOCUS_METRICS_{name}: [u64; {}] = {m:?};",
        m.len()
    )
    .unwrap();
    writeln!(out, "pub const FOCUS_STEPS_{name}: usize = {};", m.len()).unwrap();
    let lens = embedded_optics::autofocus::sim::LensModel::<S>::phone_module();
    let park = chains::focus_config(&lens).unwrap().hyperfocal_code;
    writeln!(out, "pub const FOCUS_PARK_{name}: i32 = {park};").unwrap();
}

fn chain_tables(out: &mut String) {
    let frames = chain_frames();
    writeln!(
        out,
        "pub static CHAIN_FRAMES: [[u16; {PIXELS}]; {FRAMES}] = {frames:?};"
    )
    .unwrap();
    let temps = |f: fn(f64) -> String| {
        SAMPLES
            .iter()
            .map(|s| f(s.1))
            .collect::<Vec<_>>()
            .join(", ")
    };
    writeln!(
        out,
        "pub static CHAIN_T_I8F24: [i32; {FRAMES}] = [{}];",
        temps(|t| I8F24::from_num(t).to_bits().to_string())
    )
    .unwrap();
    writeln!(
        out,
        "pub static CHAIN_T_I32F32: [i64; {FRAMES}] = [{}];",
        temps(|t| I32F32::from_num(t).to_bits().to_string())
    )
    .unwrap();
    writeln!(
        out,
        "pub static CHAIN_T_F32: [u32; {FRAMES}] = [{}];",
        temps(|t| format!("{:#010x}", (t as f32).to_bits()))
    )
    .unwrap();
    let t = |k: usize| SAMPLES[k].1;
    emit_chain::<I8F24>(
        out,
        "I8F24",
        "i32",
        &frames,
        core::array::from_fn(|k| I8F24::from_num(t(k))),
        |x| x.to_bits().to_string(),
    );
    emit_chain::<I32F32>(
        out,
        "I32F32",
        "i64",
        &frames,
        core::array::from_fn(|k| I32F32::from_num(t(k))),
        |x| x.to_bits().to_string(),
    );
    // f32 on the board against f64 on the host, from the same (f32) temperatures.
    emit_chain::<f64>(
        out,
        "F64",
        "f64",
        &frames,
        core::array::from_fn(|k| f64::from(t(k) as f32)),
        |x| format!("{x:?}"),
    );
    emit_focus::<I8F24>(out, "I8F24", "i32", |x| x.to_bits().to_string());
    emit_focus::<I32F32>(out, "I32F32", "i64", |x| x.to_bits().to_string());
    emit_focus::<f32>(out, "F32", "u32", |x| format!("{:#010x}", x.to_bits()));
    emit_focus::<f64>(out, "F64", "u64", |x| format!("{:#018x}", x.to_bits()));
}
