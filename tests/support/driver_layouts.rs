//! Bus layouts and a motion profile shared by the blocking and the async driver
//! tests: parts modelled on no particular device.
#![allow(dead_code)]

use embedded_optics::autofocus::driver::{BusLayout, MotionProfile};

/// A 10-bit part with no register byte: code in bits 13..4 of a 16-bit word,
/// nothing else set: a layout common among 10-bit VCM drivers.
pub const TEN_BIT: BusLayout = BusLayout::ten_bit_word(0x0C);

/// 8-bit part behind a register byte, one data byte.
pub const EIGHT_BIT: BusLayout = BusLayout {
    address: 0x18,
    code_bits: 8,
    register: Some(0x03),
    shift: 0,
    fixed_bits: 0,
    data_bytes: 1,
};

/// 12-bit part with a register byte and a mode bit (bit 15) in every write.
pub const TWELVE_BIT: BusLayout = BusLayout {
    address: 0x72,
    code_bits: 12,
    register: Some(0x10),
    shift: 0,
    fixed_bits: 0x8000,
    data_bytes: 2,
};

/// 100 Hz resonance, one period per step: 10 000 µs.
pub const MOTION: MotionProfile = MotionProfile {
    max_step_codes: 100,
    resonance_hz: 100,
    settle_periods: 1,
};
