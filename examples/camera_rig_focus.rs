//! From a range reading to a lens move, in I8F24 fixed point.
//!
//! Our fictional camera rig has a 4 mm f/2 phone-size module (invented
//! calibration: infinity at code 300, 10 cm at code 700, 10-bit VCM at I²C 0x0C behind register 0x03)
//! and a time-of-flight sensor 12 mm beside the lens. The example plans a full
//! contrast sweep and the contrast search's settings from it, turns three range
//! readings into actuator codes (with the module facing up at 40 °C), and drives
//! a printing stand-in for the I²C bus.
//!
//! Run: `cargo run --example camera_rig_focus`

use embedded_hal::delay::DelayNs;
use embedded_hal::i2c::{ErrorType, I2c, Operation};
use embedded_optics::autofocus::actuator::{
    ActuatorModel, Approach, CalibrationPoint, OperatingConditions, Posture,
};
use embedded_optics::autofocus::assist::{RangeSensorMount, range_sensor_target};
use embedded_optics::autofocus::driver::{BusLayout, FocusActuatorDriver, MotionProfile};
use embedded_optics::autofocus::focus::{
    SubjectDistance, circle_of_confusion_from_pitch, hyperfocal_distance, hyperfocal_extension,
    plan_focus_sweep,
};
use embedded_optics::autofocus::search::SearchConfig;
use embedded_optics::{Error, Scalar};
use fixed::types::I8F24;

/// Prints every write instead of sending it.
struct PrintingBus;
impl ErrorType for PrintingBus {
    type Error = core::convert::Infallible;
}
impl I2c for PrintingBus {
    fn transaction(&mut self, addr: u8, ops: &mut [Operation<'_>]) -> Result<(), Self::Error> {
        for op in ops {
            if let Operation::Write(bytes) = op {
                println!("    i2c 0x{addr:02X} <- {bytes:02X?}");
            }
        }
        Ok(())
    }
}

/// Prints the settle waits.
struct PrintingDelay;
impl DelayNs for PrintingDelay {
    fn delay_ns(&mut self, ns: u32) {
        println!("    wait {} us", ns / 1000);
    }
    fn delay_us(&mut self, us: u32) {
        println!("    wait {us} us");
    }
}

fn main() -> Result<(), Error> {
    let m = |x: f64| I8F24::from_f64(x);
    let f = m(0.004)?;
    let n = m(2.0)?;
    // Two 1.12 µm pixels (I8F24 holds the pitch to 60 nm, so 1.13 µm).
    let c = circle_of_confusion_from_pitch(m(1.12e-6)?, m(2.0)?)?;
    let h = hyperfocal_distance(f, n, c)?;
    println!(
        "circle of confusion {:.2} um, hyperfocal {:.2} m",
        c.to_f64() * 1e6,
        h.to_f64()
    );
    let plan = plan_focus_sweep(f, n, c, m(0.1)?, SubjectDistance::Infinity, m(0.25)?)?;
    println!(
        "full sweep 10 cm to infinity: {} positions, {:.2} um apart",
        plan.steps,
        plan.spacing.to_f64() * 1e6
    );

    let model = ActuatorModel::from_table(
        f,
        &[
            CalibrationPoint {
                code: 300,
                subject: SubjectDistance::Infinity,
            },
            CalibrationPoint {
                code: 700,
                subject: SubjectDistance::Finite(m(0.1)?),
            },
        ],
    )?
    .with_travel(250, 1023)?
    .with_hysteresis(6)?
    .with_temperature_drift(m(25.0)?, m(-0.4)?)?
    .with_posture_offsets(m(7.0)?, m(-5.0)?)?;
    // The contrast search steps one planned position at a time over the same
    // range (its near end lands at code 697, not 700: in I8F24 metres the
    // spacing is held to 60 nm, and 25 spacings add up to a few codes).
    let park = hyperfocal_extension(n, c)?;
    let search = SearchConfig::from_sweep_plan(&plan, &model, park)?;
    println!(
        "contrast search: codes {}..{}, coarse step {}, fine step {}, budget {} frames",
        search.code_min, search.code_max, search.coarse_step, search.fine_step, search.frame_budget
    );
    let mount = RangeSensorMount {
        baseline: m(0.012)?,
        axial_offset: m(0.0)?,
    };

    // Our rig's driver takes the code right-aligned after register byte 0x03.
    let layout = BusLayout {
        address: 0x0C,
        register: Some(0x03),
        code_bits: 10,
        data_bytes: 2,
        shift: 0,
        fixed_bits: 0,
    };
    let motion = MotionProfile {
        max_step_codes: 80,
        resonance_hz: 110,
        settle_periods: 1,
    };
    let mut vcm = FocusActuatorDriver::new(PrintingBus, PrintingDelay, layout, motion)?;

    for range in [1.5, 0.25, 0.07] {
        let mut field = OperatingConditions {
            temperature: Some(m(40.0)?),
            posture: Posture::FacingUp,
            approach: None,
        };
        print!("range {range:.2} m: ");
        let target = |field: &OperatingConditions<I8F24>| {
            range_sensor_target(&model, &mount, m(range)?, m(0.9)?, m(0.5)?, field)
        };
        // The hysteresis correction depends on the direction of the move, which
        // depends on the target: aim without it, then with the direction found.
        let aimed = target(&field).and_then(|first| {
            field.approach = match vcm.position() {
                Some(at) if first.code < at => Some(Approach::FromMacro),
                _ => Some(Approach::FromInfinity),
            };
            target(&field)
        });
        match aimed {
            Ok(target) => {
                println!("code {} ({:?})", target.code, field.approach);
                if vcm.move_to(target.code).is_err() {
                    println!("    bus write failed");
                }
            }
            Err(e) => println!("no move ({e}); fall back to a contrast search"),
        }
    }
    Ok(())
}
