//! The I²C focus-actuator driver, checked transaction by transaction against
//! `embedded-hal-mock`.

use embedded_hal::i2c::ErrorKind;
use embedded_hal_mock::eh1::delay::{CheckedDelay, Transaction as Delay};
use embedded_hal_mock::eh1::i2c::{Mock as I2cMock, Transaction as I2c};
use embedded_optics::Error;
use embedded_optics::autofocus::actuator::Approach;
use embedded_optics::autofocus::driver::{
    BusLayout, DriverError, FocusActuatorDriver, Landing, MotionProfile,
};
use embedded_optics::autofocus::dynamics::{SecondOrder, Shaper};

#[path = "support/driver_layouts.rs"]
mod driver_layouts;
use driver_layouts::{EIGHT_BIT, MOTION, TEN_BIT, TWELVE_BIT};

/// Checks that every expected transaction and delay happened.
fn finish(drv: FocusActuatorDriver<I2cMock, CheckedDelay>) {
    let (mut i2c, mut delay) = drv.release();
    i2c.done();
    delay.done();
}

#[test]
fn settle_time_from_resonance() {
    assert_eq!(MOTION.settle_us(), 10_000);
    let m = MotionProfile {
        max_step_codes: 1,
        resonance_hz: 120,
        settle_periods: 2,
    };
    assert_eq!(m.settle_us(), 16_667); // 2/120 s rounded up
}

#[test]
fn first_move_goes_straight_then_steps() {
    // 300 = 0x12C; << 4 = 0x12C0. Then 300 → 520 in steps of 100: 400, 500, 520.
    let i2c = I2cMock::new(&[
        I2c::write(0x0C, vec![0x12, 0xC0]),
        I2c::write(0x0C, vec![0x19, 0x00]),
        I2c::write(0x0C, vec![0x1F, 0x40]),
        I2c::write(0x0C, vec![0x20, 0x80]),
    ]);
    let delay = CheckedDelay::new(&[
        Delay::delay_us(10_000),
        Delay::delay_us(10_000),
        Delay::delay_us(10_000),
        Delay::delay_us(10_000),
    ]);
    let mut drv = FocusActuatorDriver::new(i2c, delay, TEN_BIT, MOTION).unwrap();
    assert_eq!(drv.position(), None);
    drv.move_to(300).unwrap();
    assert_eq!(drv.last_approach(), None);
    drv.move_to(520).unwrap();
    assert_eq!(drv.position(), Some(520));
    assert_eq!(drv.last_approach(), Some(Approach::FromInfinity));
    finish(drv);
}

#[test]
fn downward_move_and_register_byte() {
    // 8-bit part at 200, down to 5 in steps of 100: 100, 5.
    let i2c = I2cMock::new(&[
        I2c::write(0x18, vec![0x03, 100]),
        I2c::write(0x18, vec![0x03, 5]),
    ]);
    let delay = CheckedDelay::new(&[Delay::delay_us(10_000), Delay::delay_us(10_000)]);
    let mut drv = FocusActuatorDriver::new(i2c, delay, EIGHT_BIT, MOTION).unwrap();
    drv.assume_position(200).unwrap();
    drv.move_to(5).unwrap();
    assert_eq!(drv.last_approach(), Some(Approach::FromMacro));
    // Same code again: no bus traffic.
    drv.move_to(5).unwrap();
    // 8-bit part refuses 256 before touching the bus.
    assert_eq!(
        drv.move_to(256),
        Err(DriverError::Rejected(Error::OutOfRange(
            embedded_optics::Quantity::ActuatorCode
        )))
    );
    finish(drv);
}

#[test]
fn twelve_bit_with_mode_bit() {
    // 4095 = 0x0FFF | 0x8000 = 0x8FFF.
    let i2c = I2cMock::new(&[I2c::write(0x72, vec![0x10, 0x8F, 0xFF])]);
    let delay = CheckedDelay::new(&[Delay::delay_us(10_000)]);
    let mut drv = FocusActuatorDriver::new(i2c, delay, TWELVE_BIT, MOTION).unwrap();
    drv.move_to(4095).unwrap();
    finish(drv);
}

#[test]
fn bus_error_is_reported_and_position_kept() {
    let i2c = I2cMock::new(&[
        I2c::write(0x0C, vec![0x12, 0xC0]),
        I2c::write(0x0C, vec![0x19, 0x00]).with_error(ErrorKind::Other),
    ]);
    let delay = CheckedDelay::new(&[Delay::delay_us(10_000)]);
    let mut drv = FocusActuatorDriver::new(i2c, delay, TEN_BIT, MOTION).unwrap();
    drv.move_to(300).unwrap();
    assert_eq!(drv.move_to(520), Err(DriverError::Bus(ErrorKind::Other)));
    assert_eq!(drv.position(), Some(300));
    finish(drv);
}

#[test]
fn bad_layouts_and_profiles_are_refused() {
    // Each refusal names the field of the description that is wrong.
    let bad_layouts = [
        (
            BusLayout {
                address: 0x80,
                ..TEN_BIT
            },
            "address",
        ),
        (
            BusLayout {
                code_bits: 7,
                ..TEN_BIT
            },
            "code_bits",
        ),
        (
            BusLayout {
                code_bits: 13,
                ..TEN_BIT
            },
            "code_bits",
        ),
        (
            BusLayout {
                shift: 7,
                ..TEN_BIT
            },
            "shift",
        ), // 10 + 7 > 16 bits
        (
            BusLayout {
                fixed_bits: 0x0010,
                ..TEN_BIT
            },
            "fixed_bits",
        ), // overlaps the code
        (
            BusLayout {
                data_bytes: 3,
                ..TEN_BIT
            },
            "data_bytes",
        ),
        (
            BusLayout {
                code_bits: 10,
                data_bytes: 1,
                ..EIGHT_BIT
            },
            "shift",
        ), // 10 bits in one byte
        (
            BusLayout {
                fixed_bits: 0x0100,
                ..EIGHT_BIT
            },
            "fixed_bits",
        ), // beyond one byte
    ];
    for (layout, field) in bad_layouts {
        let i2c = I2cMock::new(&[]);
        let delay = CheckedDelay::new(&[]);
        assert_eq!(
            FocusActuatorDriver::new(i2c.clone(), delay.clone(), layout, MOTION).err(),
            Some(Error::InvalidField(field)),
            "{layout:?}"
        );
        let (mut i2c, mut delay) = (i2c, delay);
        i2c.done();
        delay.done();
    }
    for (motion, field) in [
        (
            MotionProfile {
                max_step_codes: 0,
                ..MOTION
            },
            "max_step_codes",
        ),
        (
            MotionProfile {
                resonance_hz: 5,
                ..MOTION
            },
            "resonance_hz",
        ),
        (
            MotionProfile {
                settle_periods: 0,
                ..MOTION
            },
            "settle_periods",
        ),
    ] {
        let mut i2c = I2cMock::new(&[]);
        let mut delay = CheckedDelay::new(&[]);
        assert_eq!(
            FocusActuatorDriver::new(i2c.clone(), delay.clone(), TEN_BIT, motion).err(),
            Some(Error::InvalidField(field))
        );
        i2c.done();
        delay.done();
    }
}

/// ZV and ZVD schedules for a 100 Hz (0.628 rad/ms), ζ = 0.05 carrier.
/// Overshoot K = exp(−0.05π/√(1 − 0.05²)) = 0.85447; half a damped period
/// π/(0.628·√(1 − 0.05²)) = 5.0089 ms.
fn schedules() -> (
    embedded_optics::autofocus::dynamics::MoveSchedule,
    embedded_optics::autofocus::dynamics::MoveSchedule,
) {
    let carrier = SecondOrder::new(0.628f64, 0.05).unwrap();
    (
        Shaper::zero_vibration(&carrier)
            .unwrap()
            .schedule()
            .unwrap(),
        Shaper::zero_vibration_derivative(&carrier)
            .unwrap()
            .schedule()
            .unwrap(),
    )
}

#[test]
fn shaped_move_writes_the_schedule() {
    let (zv, zvd) = schedules();
    // ZV, 300 → 364 (Singer & Seering 1990): 64/(1 + K) = 34.51 → 335 at 0,
    // 364 at 5009 µs. ZVD, 364 → 300: 64/(1+K)² = 18.61 down → 345 at 0;
    // 64·(1 + 2K)/(1+K)² = 50.41 down → 314 at 5009 µs; 300 at 10 018 µs.
    let i2c = I2cMock::new(&[
        I2c::write(0x0C, vec![0x14, 0xF0]), // 335 << 4
        I2c::write(0x0C, vec![0x16, 0xC0]), // 364 << 4
        I2c::write(0x0C, vec![0x15, 0x90]), // 345 << 4
        I2c::write(0x0C, vec![0x13, 0xA0]), // 314 << 4
        I2c::write(0x0C, vec![0x12, 0xC0]), // 300 << 4
    ]);
    let delay = CheckedDelay::new(&[
        Delay::delay_us(5009),
        Delay::delay_us(5009),
        Delay::delay_us(5009),
    ]);
    let mut drv = FocusActuatorDriver::new(i2c, delay, TEN_BIT, MOTION).unwrap();
    drv.assume_position(300).unwrap();
    drv.move_shaped(364, &zv).unwrap();
    assert_eq!(drv.position(), Some(364));
    assert_eq!(drv.last_approach(), Some(Approach::FromInfinity));
    drv.move_shaped(300, &zvd).unwrap();
    assert_eq!(drv.position(), Some(300));
    assert_eq!(drv.last_approach(), Some(Approach::FromMacro));
    // Already there: no traffic.
    drv.move_shaped(300, &zv).unwrap();
    finish(drv);
}

#[test]
fn shaped_move_needs_a_known_position_and_a_code_in_range() {
    let (zv, _) = schedules();
    let refused = Err(DriverError::Rejected(Error::OutOfRange(
        embedded_optics::Quantity::ActuatorCode,
    )));
    let mut drv =
        FocusActuatorDriver::new(I2cMock::new(&[]), CheckedDelay::new(&[]), EIGHT_BIT, MOTION)
            .unwrap();
    assert_eq!(drv.move_shaped(100, &zv), refused);
    drv.assume_position(10).unwrap();
    assert_eq!(drv.move_shaped(256, &zv), refused);
    assert_eq!(drv.position(), Some(10));
    finish(drv);
}

#[test]
fn shaped_move_bus_error_keeps_the_last_code_written() {
    let (zv, _) = schedules();
    let i2c = I2cMock::new(&[
        I2c::write(0x0C, vec![0x14, 0xF0]),
        I2c::write(0x0C, vec![0x16, 0xC0]).with_error(ErrorKind::Other),
    ]);
    let delay = CheckedDelay::new(&[Delay::delay_us(5009)]);
    let mut drv = FocusActuatorDriver::new(i2c, delay, TEN_BIT, MOTION).unwrap();
    drv.assume_position(300).unwrap();
    assert_eq!(
        drv.move_shaped(364, &zv),
        Err(DriverError::Bus(ErrorKind::Other))
    );
    assert_eq!(drv.position(), Some(335));
    finish(drv);
}

/// Park at 0, 100 codes every 2 ms (50 codes/ms).
const LANDING: Landing = Landing {
    park_code: 0,
    codes_per_step: 100,
    step_us: 2000,
};

#[test]
fn first_move_lands_gently_from_the_park_code() {
    // Unknown position: 0 (parked), 100, 200 every 2 ms, then 250 and the
    // 10 ms settle time; later landings ramp from where the lens is.
    let i2c = I2cMock::new(&[
        I2c::write(0x0C, vec![0x00, 0x00]),
        I2c::write(0x0C, vec![0x06, 0x40]), // 100 << 4
        I2c::write(0x0C, vec![0x0C, 0x80]), // 200 << 4
        I2c::write(0x0C, vec![0x0F, 0xA0]), // 250 << 4
        I2c::write(0x0C, vec![0x09, 0x60]), // 150 << 4
        I2c::write(0x0C, vec![0x08, 0x20]), // 130 << 4
    ]);
    let delay = CheckedDelay::new(&[
        Delay::delay_us(2000),
        Delay::delay_us(2000),
        Delay::delay_us(2000),
        Delay::delay_us(10_000),
        Delay::delay_us(2000),
        Delay::delay_us(10_000),
    ]);
    let mut drv = FocusActuatorDriver::new(i2c, delay, TEN_BIT, MOTION).unwrap();
    drv.land(250, &LANDING).unwrap();
    assert_eq!(drv.position(), Some(250));
    assert_eq!(drv.last_approach(), Some(Approach::FromInfinity));
    drv.land(250, &LANDING).unwrap(); // already there: no traffic
    drv.land(130, &LANDING).unwrap();
    assert_eq!(drv.last_approach(), Some(Approach::FromMacro));
    finish(drv);
}

#[test]
fn bad_landings_are_refused_without_traffic() {
    let refused = |e| Err(DriverError::Rejected(Error::OutOfRange(e)));
    let mut drv =
        FocusActuatorDriver::new(I2cMock::new(&[]), CheckedDelay::new(&[]), EIGHT_BIT, MOTION)
            .unwrap();
    for bad in [
        Landing {
            codes_per_step: 0,
            ..LANDING
        },
        Landing {
            step_us: 0,
            ..LANDING
        },
        Landing {
            step_us: 1_000_001,
            ..LANDING
        },
    ] {
        assert_eq!(
            drv.land(100, &bad),
            refused(embedded_optics::Quantity::Value)
        );
    }
    let beyond = Landing {
        park_code: 256,
        ..LANDING
    };
    assert_eq!(
        drv.land(100, &beyond),
        refused(embedded_optics::Quantity::ActuatorCode)
    );
    assert_eq!(
        drv.land(256, &LANDING),
        refused(embedded_optics::Quantity::ActuatorCode)
    );
    assert_eq!(drv.position(), None);
    finish(drv);
}
