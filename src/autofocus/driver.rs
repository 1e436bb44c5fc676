//! An `embedded-hal` 1.0 driver for an I²C focus actuator (VCM driver or stepper
//! controller), modelled on no particular part: the bus address, the code width (8
//! to 12 bits) and where the code sits in the written bytes are all configuration.
//!
//! A voice-coil lens is a mass on a spring: a large jump in drive current makes it
//! ring at its resonance frequency. The driver therefore splits a move into steps
//! of at most [`MotionProfile::max_step_codes`] and waits a settle time derived
//! from the resonance frequency after each one ([`move_to`](FocusActuatorDriver::move_to)).
//! Two more ways to move:
//!
//! - [`move_shaped`](FocusActuatorDriver::move_shaped): the move split by an
//!   input shaper ([`MoveSchedule`], from [`dynamics::Shaper`](crate::autofocus::dynamics::Shaper))
//!   into two or three timed commands whose ringing cancels: the lens is at
//!   rest at the target half a damped period (ZV) after the move starts, instead
//!   of several periods of settling;
//! - [`land`](FocusActuatorDriver::land): a slow ramp at a given rate, for the
//!   first move after power-up (the lens rests at a parked code: released at
//!   full speed it would strike the end stop or the target hard) or whenever a
//!   gentle move is wanted.
//!
//! ```
//! use embedded_hal_mock::eh1::delay::{CheckedDelay, Transaction as Wait};
//! use embedded_hal_mock::eh1::i2c::{Mock, Transaction as Write};
//! use embedded_optics::autofocus::driver::{BusLayout, FocusActuatorDriver, MotionProfile};
//! // Our camera rig's actuator at 0x0C: a 10-bit code in bits 13..4 of a
//! // 16-bit big-endian word (code << 4), a layout common among 10-bit VCM drivers.
//! let layout = BusLayout {
//!     address: 0x0C, code_bits: 10, register: None, shift: 4, fixed_bits: 0, data_bytes: 2,
//! };
//! // 125 Hz resonance, wait one period (8 ms) after each step of at most 64 codes.
//! let motion = MotionProfile { max_step_codes: 64, resonance_hz: 125, settle_periods: 1 };
//! let bus = Mock::new(&[
//!     Write::write(0x0C, vec![0x1F, 0x40]), // 500 << 4
//!     Write::write(0x0C, vec![0x23, 0x40]), // 564 << 4
//!     Write::write(0x0C, vec![0x25, 0x80]), // 600 << 4
//! ]);
//! let delay = CheckedDelay::new(&[Wait::delay_us(8000), Wait::delay_us(8000), Wait::delay_us(8000)]);
//! let mut actuator = FocusActuatorDriver::new(bus, delay, layout, motion).unwrap();
//! actuator.move_to(500).unwrap(); // unknown position: straight there
//! actuator.move_to(600).unwrap(); // 564, then 600
//! let (mut bus, mut delay) = actuator.release();
//! bus.done();
//! delay.done();
//! ```

use crate::autofocus::actuator::Approach;
use crate::autofocus::dynamics::{Command, MAX_IMPULSES, MoveSchedule};
use crate::error::{Error, Quantity};
use embedded_hal::delay::DelayNs;
use embedded_hal::i2c::I2c;

/// How the actuator expects a code on the bus.
///
/// The code is shifted left by `shift`, OR-ed with `fixed_bits` (mode or enable
/// bits the part wants in every write), and sent most significant byte first in
/// `data_bytes` bytes, after the `register` byte if there is one.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct BusLayout {
    /// 7-bit I²C address.
    pub address: u8,
    /// Code width, 8 to 12 bits.
    pub code_bits: u8,
    /// Register address written before the data, if the part has one.
    pub register: Option<u8>,
    /// Left shift of the code inside the data word.
    pub shift: u8,
    /// Bits set in every data word; must not overlap the code.
    pub fixed_bits: u16,
    /// Data bytes per write, 1 or 2.
    pub data_bytes: u8,
}

impl BusLayout {
    /// A layout common among 10-bit VCM drivers: no register byte, the code in
    /// bits 13..4 of one 16-bit big-endian word (code << 4), no other bits set.
    ///
    /// ```
    /// use embedded_optics::autofocus::driver::BusLayout;
    /// let layout = BusLayout::ten_bit_word(0x0C);
    /// assert_eq!((layout.shift, layout.data_bytes, layout.max_code()), (4, 2, 1023));
    /// ```
    pub const fn ten_bit_word(address: u8) -> Self {
        BusLayout {
            address,
            code_bits: 10,
            register: None,
            shift: 4,
            fixed_bits: 0,
            data_bytes: 2,
        }
    }

    /// Largest code the layout can carry.
    pub fn max_code(&self) -> u16 {
        ((1u32 << u32::from(self.code_bits.min(12))) - 1) as u16
    }

    /// Checks the layout: address, width, that code and fixed bits fit the data
    /// bytes and do not overlap.
    fn check(&self) -> Result<Self, Error> {
        if self.address > 0x7F {
            return Err(Error::InvalidField("address"));
        }
        if !(8..=12).contains(&self.code_bits) {
            return Err(Error::InvalidField("code_bits"));
        }
        if !(1..=2).contains(&self.data_bytes) {
            return Err(Error::InvalidField("data_bytes"));
        }
        let word_bits = 8 * u32::from(self.data_bytes);
        let code_mask = u32::from(self.max_code()) << u32::from(self.shift.min(16));
        if u32::from(self.shift) + u32::from(self.code_bits) > word_bits {
            return Err(Error::InvalidField("shift"));
        }
        if u32::from(self.fixed_bits) >> word_bits != 0
            || code_mask & u32::from(self.fixed_bits) != 0
        {
            return Err(Error::InvalidField("fixed_bits"));
        }
        Ok(*self)
    }

    /// The bytes of one write for `code` (register byte first if any) and how
    /// many of the three are used.
    fn frame(&self, code: u16) -> ([u8; 3], usize) {
        let word = (u32::from(code) << self.shift) | u32::from(self.fixed_bits);
        let [_, _, hi, lo] = word.to_be_bytes();
        let data: &[u8] = if self.data_bytes == 2 {
            &[hi, lo]
        } else {
            &[lo]
        };
        let mut buf = [0u8; 3];
        let mut n = 0;
        for b in self.register.iter().chain(data.iter()) {
            if let Some(slot) = buf.get_mut(n) {
                *slot = *b;
                n += 1;
            }
        }
        (buf, n)
    }
}

/// How moves are paced.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct MotionProfile {
    /// Largest code change in one step (1 or more).
    pub max_step_codes: u16,
    /// Mechanical resonance of the lens on its spring, Hz (10 to 5000).
    pub resonance_hz: u16,
    /// Resonance periods to wait after each step (1 to 10; one or two damp a
    /// typical VCM, common practice).
    pub settle_periods: u8,
}

impl MotionProfile {
    /// Wait after each step, microseconds: `settle_periods / resonance_hz`,
    /// rounded up.
    pub fn settle_us(&self) -> u32 {
        let hz = u32::from(self.resonance_hz.max(1));
        (u32::from(self.settle_periods) * 1_000_000).div_ceil(hz)
    }

    fn check(&self) -> Result<Self, Error> {
        if self.max_step_codes == 0 {
            Err(Error::InvalidField("max_step_codes"))
        } else if !(10..=5000).contains(&self.resonance_hz) {
            Err(Error::InvalidField("resonance_hz"))
        } else if !(1..=10).contains(&self.settle_periods) {
            Err(Error::InvalidField("settle_periods"))
        } else {
            Ok(*self)
        }
    }
}

/// A slow ramp for a gentle landing: the first move from an unknown position,
/// or any move that must not jolt the lens.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Landing {
    /// Code the lens is taken to rest at when its position is unknown: for a
    /// voice-coil actuator the unpowered rest on its end stop, code 0 or the
    /// start code of the travel (common practice).
    pub park_code: u16,
    /// Codes per ramp step (1 or more).
    pub codes_per_step: u16,
    /// Wait after each ramp step, µs (1 to 1 000 000). The ramp rate is
    /// `codes_per_step / step_us`.
    pub step_us: u32,
}

impl Landing {
    fn check(&self) -> Result<Self, Error> {
        if self.codes_per_step == 0 || !(1..=1_000_000).contains(&self.step_us) {
            return Err(Error::OutOfRange(Quantity::Value));
        }
        Ok(*self)
    }
}

/// A driver failure: the bus, or a request the configuration rules out.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum DriverError<E> {
    /// The I²C transfer failed.
    Bus(E),
    /// The request was refused before touching the bus.
    Rejected(Error),
}

impl<E: core::fmt::Debug> core::fmt::Display for DriverError<E> {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        match self {
            DriverError::Bus(e) => {
                write!(
                    f,
                    "I2C transfer failed ({e:?}): check the wiring and the address"
                )
            }
            DriverError::Rejected(e) => write!(f, "move refused: {e}"),
        }
    }
}

impl<E: core::fmt::Debug> core::error::Error for DriverError<E> {}

impl<E> From<Error> for DriverError<E> {
    fn from(e: Error) -> Self {
        DriverError::Rejected(e)
    }
}

/// What the blocking and the async drivers share: the checked configuration,
/// where the lens is, and the planning of a move into steps. The front ends only
/// write the bytes and wait.
#[derive(Clone, Copy, Debug)]
pub(crate) struct MoveState {
    layout: BusLayout,
    motion: MotionProfile,
    position: Option<u16>,
    last_approach: Option<Approach>,
}

/// The bytes of one bus write (register byte first, if any).
pub(crate) struct BusWrite {
    buf: [u8; 3],
    len: usize,
}

impl BusWrite {
    pub(crate) fn bytes(&self) -> &[u8] {
        self.buf.get(..self.len).unwrap_or(&self.buf)
    }
}

impl MoveState {
    /// Checks the layout and the motion profile; position unknown.
    pub(crate) fn new(layout: BusLayout, motion: MotionProfile) -> Result<Self, Error> {
        Ok(MoveState {
            layout: layout.check()?,
            motion: motion.check()?,
            position: None,
            last_approach: None,
        })
    }

    pub(crate) fn position(&self) -> Option<u16> {
        self.position
    }

    pub(crate) fn last_approach(&self) -> Option<Approach> {
        self.last_approach
    }

    pub(crate) fn address(&self) -> u8 {
        self.layout.address
    }

    pub(crate) fn assume_position(&mut self, code: u16) -> Result<(), Error> {
        self.position = Some(self.check_code(code)?);
        Ok(())
    }

    fn check_code(&self, code: u16) -> Result<u16, Error> {
        if code > self.layout.max_code() {
            Err(Error::OutOfRange(Quantity::ActuatorCode))
        } else {
            Ok(code)
        }
    }

    /// Starts a move: checks `target` (nothing is written for a code beyond the
    /// layout's width) and records the direction when the position is known.
    pub(crate) fn begin(&mut self, target: u16) -> Result<u16, Error> {
        let target = self.check_code(target)?;
        if let Some(at) = self.position
            && target != at
        {
            self.last_approach = Some(if target > at {
                Approach::FromInfinity
            } else {
                Approach::FromMacro
            });
        }
        Ok(target)
    }

    /// The bytes that write `code`.
    fn write_of(&self, code: u16) -> BusWrite {
        let (buf, len) = self.layout.frame(code);
        BusWrite { buf, len }
    }

    /// At most `max_step` codes from `at` toward `target`.
    fn step_toward(at: u16, target: u16, max_step: u16) -> u16 {
        if target > at {
            at.saturating_add(max_step).min(target)
        } else {
            at.saturating_sub(max_step).max(target)
        }
    }

    /// The next code to write on the way to `target` and its bytes, `None` once
    /// there: from an unknown position straight to the target, otherwise at most
    /// `max_step_codes` closer.
    pub(crate) fn next_step(&self, target: u16) -> Option<(u16, BusWrite)> {
        let code = match self.position {
            None => target,
            Some(at) if at == target => return None,
            Some(at) => Self::step_toward(at, target, self.motion.max_step_codes),
        };
        Some((code, self.write_of(code)))
    }

    /// Records a write that went through; returns the settle wait, µs.
    pub(crate) fn written(&mut self, code: u16) -> u32 {
        self.position = Some(code);
        self.motion.settle_us()
    }

    /// Starts a shaped move: the commands from the known position to `target`
    /// (none if already there). From an unknown position the move is refused
    /// ([`Error::OutOfRange`] of [`Quantity::ActuatorCode`]): the shaper cancels
    /// the ringing of a move of known size only; land first.
    pub(crate) fn begin_shaped(
        &mut self,
        target: u16,
        schedule: &MoveSchedule,
    ) -> Result<heapless::Vec<Command, MAX_IMPULSES>, Error> {
        let from = self
            .position
            .ok_or(Error::OutOfRange(Quantity::ActuatorCode))?;
        let target = self.begin(target)?;
        if target == from {
            return Ok(heapless::Vec::new());
        }
        schedule.commands(from, target)
    }

    /// One command of a shaped move: the wait before it (µs since the command
    /// at `previous_us`) and its bytes.
    pub(crate) fn shaped_write(&self, command: &Command, previous_us: u32) -> (u32, BusWrite) {
        (
            command.at_us.saturating_sub(previous_us),
            self.write_of(command.code),
        )
    }

    /// Starts a landing: checks the ramp and `target`, and records the direction
    /// from the known position, or from the park code when unknown.
    pub(crate) fn begin_landing(&mut self, target: u16, landing: &Landing) -> Result<u16, Error> {
        let landing = landing.check()?;
        let park = self.check_code(landing.park_code)?;
        if self.position.is_none() {
            let target = self.check_code(target)?;
            if target != park {
                self.last_approach = Some(if target > park {
                    Approach::FromInfinity
                } else {
                    Approach::FromMacro
                });
            }
            return Ok(target);
        }
        self.begin(target)
    }

    /// The next code of a landing, its bytes and the wait after it (`None`
    /// once there): from an unknown position the park code first, then
    /// `codes_per_step` at a time, `step_us` after each step and the settle
    /// time after the last.
    pub(crate) fn next_landing_step(
        &self,
        target: u16,
        landing: &Landing,
    ) -> Option<(u16, BusWrite, u32)> {
        let code = match self.position {
            None => landing.park_code,
            Some(at) if at == target => return None,
            Some(at) => Self::step_toward(at, target, landing.codes_per_step),
        };
        let wait = if code == target {
            self.motion.settle_us()
        } else {
            landing.step_us
        };
        Some((code, self.write_of(code), wait))
    }

    /// Records a write that went through.
    pub(crate) fn record(&mut self, code: u16) {
        self.position = Some(code);
    }
}

/// Focus actuator on an I²C bus.
pub struct FocusActuatorDriver<I2C, D> {
    i2c: I2C,
    delay: D,
    state: MoveState,
}

/// The methods the blocking and the async front ends have alike: they only
/// build, read or set the shared [`MoveState`]. Used inside each front end's
/// `impl` block (fields `i2c`, `delay`, `state`).
macro_rules! front_end_common {
    () => {
        /// Takes the bus and a delay; checks the layout and motion profile.
        /// Nothing is written until the first move. The lens position is unknown
        /// until then.
        pub fn new(
            i2c: I2C,
            delay: D,
            layout: BusLayout,
            motion: MotionProfile,
        ) -> Result<Self, Error> {
            Ok(Self {
                i2c,
                delay,
                state: MoveState::new(layout, motion)?,
            })
        }

        /// Code last written, if any.
        pub fn position(&self) -> Option<u16> {
            self.state.position()
        }

        /// Direction of the last move, for the actuator model's hysteresis
        /// correction.
        pub fn last_approach(&self) -> Option<Approach> {
            self.state.last_approach()
        }

        /// Declares where the lens is without writing (for example after a reset
        /// that parks it at a known code), so the next move is stepped from there.
        pub fn assume_position(&mut self, code: u16) -> Result<(), Error> {
            self.state.assume_position(code)
        }

        /// Gives back the bus and the delay.
        pub fn release(self) -> (I2C, D) {
            (self.i2c, self.delay)
        }
    };
}
#[cfg(feature = "async")]
pub(crate) use front_end_common;

impl<I2C: I2c, D: DelayNs> FocusActuatorDriver<I2C, D> {
    front_end_common!();

    /// Moves to `target` in steps of at most `max_step_codes`, settling after
    /// each. From an unknown position the first write goes straight to the target.
    /// A code beyond the layout's width is refused without a bus write.
    pub fn move_to(&mut self, target: u16) -> Result<(), DriverError<I2C::Error>> {
        let target = self.state.begin(target)?;
        while let Some((code, write)) = self.state.next_step(target) {
            self.i2c
                .write(self.state.address(), write.bytes())
                .map_err(DriverError::Bus)?;
            let settle_us = self.state.written(code);
            self.delay.delay_us(settle_us);
        }
        Ok(())
    }

    /// Moves to `target` along `schedule` (from [`Shaper::schedule`](crate::autofocus::dynamics::Shaper::schedule)):
    /// writes each command at its time, waiting in between, and returns right
    /// after the last one; on the carrier the shaper was designed for the lens
    /// is then at rest at the target, no settle wait needed. The position must
    /// be known (after a [`move_to`](Self::move_to), a [`land`](Self::land) or
    /// [`assume_position`](Self::assume_position)); otherwise, and for a code
    /// beyond the layout's width, the move is refused without a bus write.
    ///
    /// ```
    /// use embedded_hal_mock::eh1::delay::{CheckedDelay, Transaction as Wait};
    /// use embedded_hal_mock::eh1::i2c::{Mock, Transaction as Write};
    /// use embedded_optics::autofocus::driver::{BusLayout, FocusActuatorDriver, Landing, MotionProfile};
    /// use embedded_optics::autofocus::dynamics::{SecondOrder, Shaper};
    /// // Our camera rig's carrier: 100 Hz (0.628 rad/ms), ζ = 0.05, shaped by ZV.
    /// let carrier = SecondOrder::new(0.628f32, 0.05).unwrap();
    /// let zv = Shaper::zero_vibration(&carrier).unwrap().schedule().unwrap();
    /// let motion = MotionProfile { max_step_codes: 64, resonance_hz: 100, settle_periods: 1 };
    /// // After power-up the lens rests at code 0: ramp 150 codes per 3 ms.
    /// let landing = Landing { park_code: 0, codes_per_step: 150, step_us: 3000 };
    /// let bus = Mock::new(&[
    ///     Write::write(0x0C, vec![0x00, 0x00]), // 0, the park code
    ///     Write::write(0x0C, vec![0x09, 0x60]), // 150
    ///     Write::write(0x0C, vec![0x12, 0xC0]), // 300, then the settle time
    ///     Write::write(0x0C, vec![0x14, 0xF0]), // 335 = 300 + 64/(1 + 0.854), rounded
    ///     Write::write(0x0C, vec![0x16, 0xC0]), // 364, half a damped period later
    /// ]);
    /// let delay = CheckedDelay::new(&[
    ///     Wait::delay_us(3000),
    ///     Wait::delay_us(3000),
    ///     Wait::delay_us(10_000),
    ///     Wait::delay_us(5009),
    /// ]);
    /// let mut actuator =
    ///     FocusActuatorDriver::new(bus, delay, BusLayout::ten_bit_word(0x0C), motion).unwrap();
    /// actuator.land(300, &landing).unwrap();
    /// actuator.move_shaped(364, &zv).unwrap();
    /// let (mut bus, mut delay) = actuator.release();
    /// bus.done();
    /// delay.done();
    /// ```
    pub fn move_shaped(
        &mut self,
        target: u16,
        schedule: &MoveSchedule,
    ) -> Result<(), DriverError<I2C::Error>> {
        let commands = self.state.begin_shaped(target, schedule)?;
        let mut previous_us = 0;
        for command in &commands {
            let (wait_us, write) = self.state.shaped_write(command, previous_us);
            if wait_us > 0 {
                self.delay.delay_us(wait_us);
            }
            self.i2c
                .write(self.state.address(), write.bytes())
                .map_err(DriverError::Bus)?;
            self.state.record(command.code);
            previous_us = command.at_us;
        }
        Ok(())
    }

    /// Ramps gently to `target`: `landing.codes_per_step` codes every
    /// `landing.step_us`, then the settle time. From an unknown position it
    /// first writes the park code, where the lens is taken to rest. A code
    /// beyond the layout's width, or a bad ramp, is refused without a bus write.
    pub fn land(&mut self, target: u16, landing: &Landing) -> Result<(), DriverError<I2C::Error>> {
        let target = self.state.begin_landing(target, landing)?;
        while let Some((code, write, wait_us)) = self.state.next_landing_step(target, landing) {
            self.i2c
                .write(self.state.address(), write.bytes())
                .map_err(DriverError::Bus)?;
            self.state.record(code);
            self.delay.delay_us(wait_us);
        }
        Ok(())
    }
}
