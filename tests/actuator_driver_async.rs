//! The async focus-actuator driver (feature `async`): checked transaction by
//! transaction against `embedded-hal-mock`'s async I²C and delay, and against
//! the blocking driver on the same moves (both front ends share one planner).
#![cfg(feature = "async")]

use core::future::Future;
use core::pin::pin;
use core::task::{Context, Poll, Waker};
use embedded_hal::i2c::ErrorKind;
use embedded_hal_mock::eh1::delay::{CheckedDelay, Transaction as Delay};
use embedded_hal_mock::eh1::i2c::{Mock as I2cMock, Transaction as I2c};
use embedded_optics::autofocus::actuator::Approach;
use embedded_optics::autofocus::async_driver::AsyncFocusActuatorDriver;
use embedded_optics::autofocus::driver::{
    BusLayout, DriverError, FocusActuatorDriver, Landing, MotionProfile,
};
use embedded_optics::autofocus::dynamics::{SecondOrder, Shaper};
use embedded_optics::{Error, Quantity};

/// Runs a future to completion by polling (the mocks never return Pending;
/// a real executor such as embassy's waits on the waker instead).
fn block_on<F: Future>(f: F) -> F::Output {
    let mut f = pin!(f);
    let mut cx = Context::from_waker(Waker::noop());
    loop {
        if let Poll::Ready(v) = f.as_mut().poll(&mut cx) {
            return v;
        }
    }
}

#[path = "support/driver_layouts.rs"]
mod driver_layouts;
use driver_layouts::{MOTION, TEN_BIT, TWELVE_BIT};

fn finish(drv: AsyncFocusActuatorDriver<I2cMock, CheckedDelay>) {
    let (mut i2c, mut delay) = drv.release();
    i2c.done();
    delay.done();
}

#[test]
fn first_move_goes_straight_then_steps() {
    // 300 << 4 = 0x12C0, then 400, 500, 520 (steps of at most 100).
    let i2c = I2cMock::new(&[
        I2c::write(0x0C, vec![0x12, 0xC0]),
        I2c::write(0x0C, vec![0x19, 0x00]),
        I2c::write(0x0C, vec![0x1F, 0x40]),
        I2c::write(0x0C, vec![0x20, 0x80]),
    ]);
    let delay = CheckedDelay::new(&vec![Delay::delay_us(10_000); 4]);
    let mut drv = AsyncFocusActuatorDriver::new(i2c, delay, TEN_BIT, MOTION).unwrap();
    assert_eq!(drv.position(), None);
    block_on(drv.move_to(300)).unwrap();
    assert_eq!(drv.last_approach(), None);
    block_on(drv.move_to(520)).unwrap();
    assert_eq!(drv.position(), Some(520));
    assert_eq!(drv.last_approach(), Some(Approach::FromInfinity));
    finish(drv);
}

#[test]
fn register_byte_mode_bit_and_refusals() {
    // Known at 4000, down to 3850: 3900, 3850 (| 0x8000, after register 0x10).
    let i2c = I2cMock::new(&[
        I2c::write(0x72, vec![0x10, 0x8F, 0x3C]),
        I2c::write(0x72, vec![0x10, 0x8F, 0x0A]),
    ]);
    let delay = CheckedDelay::new(&vec![Delay::delay_us(10_000); 2]);
    let mut drv = AsyncFocusActuatorDriver::new(i2c, delay, TWELVE_BIT, MOTION).unwrap();
    drv.assume_position(4000).unwrap();
    block_on(drv.move_to(3850)).unwrap();
    assert_eq!(drv.last_approach(), Some(Approach::FromMacro));
    block_on(drv.move_to(3850)).unwrap(); // already there: no traffic
    let refused = Err(DriverError::Rejected(Error::OutOfRange(
        Quantity::ActuatorCode,
    )));
    assert_eq!(block_on(drv.move_to(4096)), refused);
    assert_eq!(
        drv.assume_position(4096),
        Err(Error::OutOfRange(Quantity::ActuatorCode))
    );
    assert_eq!(drv.position(), Some(3850));
    finish(drv);
}

#[test]
fn bus_error_is_reported_and_position_kept() {
    let i2c = I2cMock::new(&[
        I2c::write(0x0C, vec![0x12, 0xC0]),
        I2c::write(0x0C, vec![0x19, 0x00]).with_error(ErrorKind::Other),
    ]);
    let delay = CheckedDelay::new(&[Delay::delay_us(10_000)]);
    let mut drv = AsyncFocusActuatorDriver::new(i2c, delay, TEN_BIT, MOTION).unwrap();
    block_on(drv.move_to(300)).unwrap();
    assert_eq!(
        block_on(drv.move_to(520)),
        Err(DriverError::Bus(ErrorKind::Other))
    );
    assert_eq!(drv.position(), Some(300));
    finish(drv);
}

#[test]
fn bad_configuration_is_refused_as_by_the_blocking_driver() {
    let layouts = [
        TEN_BIT,
        BusLayout {
            fixed_bits: 0x0010, // overlaps the code
            ..TEN_BIT
        },
        BusLayout {
            code_bits: 13,
            ..TWELVE_BIT
        },
    ];
    let motions = [
        MOTION,
        MotionProfile {
            max_step_codes: 0,
            ..MOTION
        },
        MotionProfile {
            resonance_hz: 5001,
            ..MOTION
        },
    ];
    for layout in layouts {
        for motion in motions {
            let (i2c, delay) = (I2cMock::new(&[]), CheckedDelay::new(&[]));
            let a = AsyncFocusActuatorDriver::new(i2c.clone(), delay.clone(), layout, motion);
            let b = FocusActuatorDriver::new(i2c.clone(), delay.clone(), layout, motion);
            assert_eq!(a.is_ok(), b.is_ok(), "{layout:?} {motion:?}");
            assert_eq!(a.err(), b.err());
            let (mut i2c, mut delay) = (i2c, delay);
            i2c.done();
            delay.done();
        }
    }
}

/// Bus and delay doubles that record what they saw, for both front ends.
#[derive(Default)]
struct Log {
    writes: Vec<(u8, Vec<u8>)>,
    waits_us: Vec<u32>,
}

struct Recorder<'a>(&'a std::cell::RefCell<Log>);

impl embedded_hal::i2c::ErrorType for Recorder<'_> {
    type Error = core::convert::Infallible;
}
impl embedded_hal::i2c::I2c for Recorder<'_> {
    fn transaction(
        &mut self,
        address: u8,
        ops: &mut [embedded_hal::i2c::Operation<'_>],
    ) -> Result<(), Self::Error> {
        for op in ops {
            if let embedded_hal::i2c::Operation::Write(b) = op {
                self.0.borrow_mut().writes.push((address, b.to_vec()));
            }
        }
        Ok(())
    }
}
impl embedded_hal_async::i2c::I2c for Recorder<'_> {
    async fn transaction(
        &mut self,
        address: u8,
        ops: &mut [embedded_hal::i2c::Operation<'_>],
    ) -> Result<(), Self::Error> {
        embedded_hal::i2c::I2c::transaction(self, address, ops)
    }
}
impl embedded_hal::delay::DelayNs for Recorder<'_> {
    fn delay_ns(&mut self, ns: u32) {
        self.0.borrow_mut().waits_us.push(ns / 1000);
    }
    fn delay_us(&mut self, us: u32) {
        self.0.borrow_mut().waits_us.push(us);
    }
}
impl embedded_hal_async::delay::DelayNs for Recorder<'_> {
    async fn delay_ns(&mut self, ns: u32) {
        embedded_hal::delay::DelayNs::delay_ns(self, ns)
    }
    async fn delay_us(&mut self, us: u32) {
        embedded_hal::delay::DelayNs::delay_us(self, us)
    }
}

#[test]
fn same_writes_and_waits_as_the_blocking_driver() {
    // A sweep as a contrast search makes it: out, back, small steps, the ends.
    let targets = [700u16, 0, 1023, 512, 513, 511, 511, 900, 37, 1023];
    for layout in [TEN_BIT, TWELVE_BIT] {
        for max_step_codes in [1, 7, 100, 4095] {
            let motion = MotionProfile {
                max_step_codes,
                resonance_hz: 333,
                settle_periods: 2,
            };
            let (blocking, asynchronous) = (Default::default(), Default::default());
            let mut b =
                FocusActuatorDriver::new(Recorder(&blocking), Recorder(&blocking), layout, motion)
                    .unwrap();
            let mut a = AsyncFocusActuatorDriver::new(
                Recorder(&asynchronous),
                Recorder(&asynchronous),
                layout,
                motion,
            )
            .unwrap();
            for t in targets {
                assert_eq!(b.move_to(t).is_ok(), block_on(a.move_to(t)).is_ok());
                assert_eq!(
                    (b.position(), b.last_approach()),
                    (a.position(), a.last_approach())
                );
            }
            let (b, a): (Log, Log) = (blocking.into_inner(), asynchronous.into_inner());
            assert!(!b.writes.is_empty());
            assert_eq!(b.writes, a.writes, "{layout:?} {motion:?}");
            assert_eq!(b.waits_us, a.waits_us);
            // 2 periods of 333 Hz, rounded up: 6007 µs after every write.
            assert!(a.waits_us.iter().all(|&w| w == 6007));
            assert_eq!(a.waits_us.len(), a.writes.len());
        }
    }
}

/// ZV for a 100 Hz (0.628 rad/ms), ζ = 0.05 carrier: 1/(1 + K) of the move at
/// 0, the rest half a damped period (5009 µs) later, K = 0.85447
/// (Singer & Seering 1990).
fn zv() -> embedded_optics::autofocus::dynamics::MoveSchedule {
    let carrier = SecondOrder::new(0.628f64, 0.05).unwrap();
    Shaper::zero_vibration(&carrier)
        .unwrap()
        .schedule()
        .unwrap()
}

#[test]
fn lands_then_moves_shaped() {
    // Land from the park code 0 at 200 codes per 1.5 ms: 0, 200, 300 (+ settle);
    // then ZV 300 → 364: 64/(1 + K) = 34.51 → 335 at 0, 364 at 5009 µs.
    let landing = Landing {
        park_code: 0,
        codes_per_step: 200,
        step_us: 1500,
    };
    let i2c = I2cMock::new(&[
        I2c::write(0x0C, vec![0x00, 0x00]),
        I2c::write(0x0C, vec![0x0C, 0x80]), // 200 << 4
        I2c::write(0x0C, vec![0x12, 0xC0]), // 300 << 4
        I2c::write(0x0C, vec![0x14, 0xF0]), // 335 << 4
        I2c::write(0x0C, vec![0x16, 0xC0]), // 364 << 4
    ]);
    let delay = CheckedDelay::new(&[
        Delay::delay_us(1500),
        Delay::delay_us(1500),
        Delay::delay_us(10_000),
        Delay::delay_us(5009),
    ]);
    let mut drv = AsyncFocusActuatorDriver::new(i2c, delay, TEN_BIT, MOTION).unwrap();
    let schedule = zv();
    // Unknown position: a shaped move is refused without traffic.
    assert_eq!(
        block_on(drv.move_shaped(364, &schedule)),
        Err(DriverError::Rejected(Error::OutOfRange(
            Quantity::ActuatorCode
        )))
    );
    block_on(drv.land(300, &landing)).unwrap();
    assert_eq!(drv.last_approach(), Some(Approach::FromInfinity));
    block_on(drv.move_shaped(364, &schedule)).unwrap();
    assert_eq!(drv.position(), Some(364));
    finish(drv);
}

#[test]
fn shaped_moves_and_landings_as_the_blocking_driver() {
    let schedule = zv();
    let landing = Landing {
        park_code: 20,
        codes_per_step: 9,
        step_us: 700,
    };
    let targets = [700u16, 0, 1023, 512, 513, 511, 511, 900, 37, 1023];
    for layout in [TEN_BIT, TWELVE_BIT] {
        let (blocking, asynchronous) = (Default::default(), Default::default());
        let mut b =
            FocusActuatorDriver::new(Recorder(&blocking), Recorder(&blocking), layout, MOTION)
                .unwrap();
        let mut a = AsyncFocusActuatorDriver::new(
            Recorder(&asynchronous),
            Recorder(&asynchronous),
            layout,
            MOTION,
        )
        .unwrap();
        b.land(600, &landing).unwrap();
        block_on(a.land(600, &landing)).unwrap();
        for (i, t) in targets.into_iter().enumerate() {
            if i % 3 == 2 {
                assert_eq!(
                    b.land(t, &landing).is_ok(),
                    block_on(a.land(t, &landing)).is_ok()
                );
            } else {
                assert_eq!(
                    b.move_shaped(t, &schedule).is_ok(),
                    block_on(a.move_shaped(t, &schedule)).is_ok()
                );
            }
            assert_eq!(
                (b.position(), b.last_approach()),
                (a.position(), a.last_approach())
            );
            assert_eq!(a.position(), Some(t));
        }
        let (b, a): (Log, Log) = (blocking.into_inner(), asynchronous.into_inner());
        // The landing from 20 to 600 alone is 66 writes (20, 29, …, 596, 600).
        assert!(b.writes.len() > 66);
        assert_eq!(b.writes, a.writes, "{layout:?}");
        assert_eq!(b.waits_us, a.waits_us);
        assert!(a.waits_us.contains(&5009) && a.waits_us.contains(&700));
    }
}
