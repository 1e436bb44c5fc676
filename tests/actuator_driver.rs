//! The I²C focus-actuator driver, checked transaction by transaction against
//! `embedded-hal-mock`.

use embedded_hal::i2c::ErrorKind;
use embedded_hal_mock::eh1::delay::{CheckedDelay, Transaction as Delay};
use embedded_hal_mock::eh1::i2c::{Mock as I2cMock, Transaction as I2c};
use embedded_optics::Error;
use embedded_optics::autofocus::actuator::Approach;
use embedded_optics::autofocus::driver::{
    BusLayout, DriverError, FocusActuatorDriver, MotionProfile,
};

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
    let bad_layouts = [
        BusLayout {
            address: 0x80,
            ..TEN_BIT
        },
        BusLayout {
            code_bits: 7,
            ..TEN_BIT
        },
        BusLayout {
            code_bits: 13,
            ..TEN_BIT
        },
        BusLayout {
            shift: 7,
            ..TEN_BIT
        }, // 10 + 7 > 16 bits
        BusLayout {
            fixed_bits: 0x0010,
            ..TEN_BIT
        }, // overlaps the code
        BusLayout {
            data_bytes: 3,
            ..TEN_BIT
        },
        BusLayout {
            code_bits: 10,
            data_bytes: 1,
            ..EIGHT_BIT
        }, // 10 bits in one byte
        BusLayout {
            fixed_bits: 0x0100,
            ..EIGHT_BIT
        }, // beyond one byte
    ];
    for layout in bad_layouts {
        let i2c = I2cMock::new(&[]);
        let delay = CheckedDelay::new(&[]);
        assert!(
            FocusActuatorDriver::new(i2c.clone(), delay.clone(), layout, MOTION).is_err(),
            "{layout:?}"
        );
        let (mut i2c, mut delay) = (i2c, delay);
        i2c.done();
        delay.done();
    }
    for motion in [
        MotionProfile {
            max_step_codes: 0,
            ..MOTION
        },
        MotionProfile {
            resonance_hz: 5,
            ..MOTION
        },
        MotionProfile {
            settle_periods: 0,
            ..MOTION
        },
    ] {
        let mut i2c = I2cMock::new(&[]);
        let mut delay = CheckedDelay::new(&[]);
        assert!(FocusActuatorDriver::new(i2c.clone(), delay.clone(), TEN_BIT, motion).is_err());
        i2c.done();
        delay.done();
    }
}
