//! The focus-actuator driver of [`driver`](super::driver) for async firmware
//! (`embedded-hal-async` 1.0, executors such as embassy): the same bus layouts,
//! the same move planning and settle times, awaiting the bus and the delay
//! instead of blocking on them. Feature `async`.
//!
//! ```
//! # fn block_on<F: core::future::Future>(f: F) -> F::Output {
//! #     let mut f = core::pin::pin!(f);
//! #     let mut cx = core::task::Context::from_waker(core::task::Waker::noop());
//! #     loop {
//! #         if let core::task::Poll::Ready(v) = f.as_mut().poll(&mut cx) { return v; }
//! #     }
//! # }
//! use embedded_hal_mock::eh1::delay::{CheckedDelay, Transaction as Wait};
//! use embedded_hal_mock::eh1::i2c::{Mock, Transaction as Write};
//! use embedded_optics::autofocus::async_driver::AsyncFocusActuatorDriver;
//! use embedded_optics::autofocus::driver::{BusLayout, MotionProfile};
//! // Our camera rig's 10-bit actuator at 0x0C, steps of at most 64 codes, 8 ms settle.
//! let motion = MotionProfile { max_step_codes: 64, resonance_hz: 125, settle_periods: 1 };
//! let bus = Mock::new(&[
//!     Write::write(0x0C, vec![0x1F, 0x40]), // 500 << 4
//!     Write::write(0x0C, vec![0x23, 0x40]), // 564 << 4
//!     Write::write(0x0C, vec![0x25, 0x80]), // 600 << 4
//! ]);
//! let delay = CheckedDelay::new(&[Wait::delay_us(8000), Wait::delay_us(8000), Wait::delay_us(8000)]);
//! let mut actuator =
//!     AsyncFocusActuatorDriver::new(bus, delay, BusLayout::ten_bit_word(0x0C), motion).unwrap();
//! block_on(async {
//!     actuator.move_to(500).await.unwrap(); // unknown position: straight there
//!     actuator.move_to(600).await.unwrap(); // 564, then 600
//! });
//! let (mut bus, mut delay) = actuator.release();
//! bus.done();
//! delay.done();
//! ```

use crate::autofocus::actuator::Approach;
use crate::autofocus::driver::{
    BusLayout, DriverError, Landing, MotionProfile, MoveState, front_end_common,
};
use crate::autofocus::dynamics::MoveSchedule;
use crate::error::Error;
use embedded_hal_async::delay::DelayNs;
use embedded_hal_async::i2c::I2c;

/// Focus actuator on an async I²C bus.
pub struct AsyncFocusActuatorDriver<I2C, D> {
    i2c: I2C,
    delay: D,
    state: MoveState,
}

impl<I2C: I2c, D: DelayNs> AsyncFocusActuatorDriver<I2C, D> {
    front_end_common!();

    /// Moves to `target` in steps of at most `max_step_codes`, awaiting the
    /// settle time after each; from an unknown position straight to the target.
    /// A code beyond the layout's width is refused without a bus write. If the
    /// future is dropped between steps, the position is the last code written.
    pub async fn move_to(&mut self, target: u16) -> Result<(), DriverError<I2C::Error>> {
        let target = self.state.begin(target)?;
        while let Some((code, write)) = self.state.next_step(target) {
            self.i2c
                .write(self.state.address(), write.bytes())
                .await
                .map_err(DriverError::Bus)?;
            let settle_us = self.state.written(code);
            self.delay.delay_us(settle_us).await;
        }
        Ok(())
    }

    /// Moves to `target` along an input shaper's `schedule`, awaiting the time
    /// between commands; returns right after the last (see
    /// [`FocusActuatorDriver::move_shaped`](super::driver::FocusActuatorDriver::move_shaped)).
    /// The position must be known. If the future is dropped between commands,
    /// the position is the last code written and the lens rings.
    pub async fn move_shaped(
        &mut self,
        target: u16,
        schedule: &MoveSchedule,
    ) -> Result<(), DriverError<I2C::Error>> {
        let commands = self.state.begin_shaped(target, schedule)?;
        let mut previous_us = 0;
        for command in &commands {
            let (wait_us, write) = self.state.shaped_write(command, previous_us);
            if wait_us > 0 {
                self.delay.delay_us(wait_us).await;
            }
            self.i2c
                .write(self.state.address(), write.bytes())
                .await
                .map_err(DriverError::Bus)?;
            self.state.record(command.code);
            previous_us = command.at_us;
        }
        Ok(())
    }

    /// Ramps gently to `target`, awaiting each ramp step and the final settle
    /// time (see [`FocusActuatorDriver::land`](super::driver::FocusActuatorDriver::land));
    /// from an unknown position the park code first.
    pub async fn land(
        &mut self,
        target: u16,
        landing: &Landing,
    ) -> Result<(), DriverError<I2C::Error>> {
        let target = self.state.begin_landing(target, landing)?;
        while let Some((code, write, wait_us)) = self.state.next_landing_step(target, landing) {
            self.i2c
                .write(self.state.address(), write.bytes())
                .await
                .map_err(DriverError::Bus)?;
            self.state.record(code);
            self.delay.delay_us(wait_us).await;
        }
        Ok(())
    }
}
