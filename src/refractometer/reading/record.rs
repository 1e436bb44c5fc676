//! The instrument's calibration record: a fixed-size, versioned byte layout with
//! a CRC, and the two-slot rule that keeps the last good calibration through a
//! power cut in the middle of a write.
//!
//! This module encodes, decodes and chooses slots;
//! [`store`](super::store) keeps them on a `NorFlash` or EEPROM device. By hand:
//! write a new record to [`SlotChoice::write_to`] (the older or invalid slot),
//! never over the record in use: a write torn at any byte leaves the other slot
//! intact, and the next boot still finds it.
//!
//! # Layout, format version 1 (64 bytes, little-endian)
//!
//! | offset | size | field |
//! |---:|---:|---|
//! | 0 | 4 | magic `b"EOcR"` |
//! | 4 | 2 | format version (`1`) |
//! | 6 | 2 | record length in bytes (`64`) |
//! | 8 | 4 | sequence number, `u32`, newer is larger (serial-number arithmetic, so it may wrap) |
//! | 12 | 8 | c0, I32F32 raw bits, `i64` |
//! | 20 | 8 | c1, I32F32 raw bits, `i64` |
//! | 28 | 8 | c2, I32F32 raw bits, `i64` |
//! | 36 | 4 | temperature at which zero was taken, m°C, `i32` |
//! | 40 | 4 | LED wavelength, pm, `u32` |
//! | 44 | 16 | reserved, written as zero, covered by the CRC |
//! | 60 | 4 | CRC-32/ISO-HDLC of bytes 0..60, `u32` |
//!
//! The empirical correction is `n' = c0 + c1·n + c2·n²`.
//!
//! ```
//! use embedded_optics::refractometer::record::{choose_slots, CalibrationRecord, Slot};
//! let slot_a = CalibrationRecord::factory(589_300).encode();
//! let slot_b = [0xFF; 64]; // erased flash
//! let choice = choose_slots(&slot_a, &slot_b);
//! assert_eq!(choice.current.map(|(s, _)| s), Some(Slot::A));
//! assert_eq!(choice.write_to, Slot::B);
//! ```

use crate::error::{Error, Quantity};
use crate::scalar::Scalar;
use crate::scalar::split_floor;
use fixed::types::I32F32;

/// Bytes in an encoded record.
pub const RECORD_LEN: usize = 64;
/// Format version written by [`CalibrationRecord::encode`].
pub const FORMAT_VERSION: u16 = 1;
/// Marks a record as ours (`"EOcR"`: embedded-optics calibration record).
pub const MAGIC: [u8; 4] = *b"EOcR";

const CRC_AT: usize = RECORD_LEN - 4;

/// CRC-32/ISO-HDLC from the `crc` crate, bit by bit (`NoTable`): no table in
/// flash. A record is 60 bytes, checked at start-up and after a write, so the
/// 8 steps per byte cost nothing that matters; on the Cortex-M0 (RP2040 image)
/// this is 996 bytes of flash less than the crate's 1 KiB byte-wise table, and
/// 40 bytes less than a 16-entry (4-bit) table with its loop.
const CRC32: crc::Crc<u32, crc::NoTable> =
    crc::Crc::<u32, crc::NoTable>::new(&crc::CRC_32_ISO_HDLC);

/// CRC-32/ISO-HDLC (the CRC of zlib, PNG and Ethernet): init and final XOR
/// 0xFFFFFFFF, reflected. Check value for `b"123456789"` is `0xCBF43926`.
///
/// ```
/// use embedded_optics::refractometer::record::crc32;
/// assert_eq!(crc32(b"123456789"), 0xCBF4_3926);
/// ```
pub fn crc32(bytes: &[u8]) -> u32 {
    CRC32.checksum(bytes)
}

/// One calibration: the empirical index correction and the conditions it was
/// taken under.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CalibrationRecord {
    /// Write counter; the valid record with the newer sequence wins.
    pub sequence: u32,
    /// Constant term of `n' = c0 + c1·n + c2·n²`.
    pub c0: I32F32,
    /// Linear term.
    pub c1: I32F32,
    /// Quadratic term.
    pub c2: I32F32,
    /// Temperature at which the zero (water or air) was taken, in m°C.
    pub zero_temperature_mc: i32,
    /// LED wavelength the calibration belongs to, in pm.
    pub led_wavelength_pm: u32,
}

/// Empirical correction fitted to standards: `n' = c0 + c1·n + c2·n²`, applied
/// to the geometry's index. Three coefficients in fixed memory (the calibration
/// record stores exactly these).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Correction<S> {
    /// Constant term.
    pub c0: S,
    /// Linear term (1 for an offset-only correction).
    pub c1: S,
    /// Quadratic term (0 unless three standards were used).
    pub c2: S,
}

impl<S: Scalar> Correction<S> {
    /// No correction.
    pub fn identity() -> Self {
        Correction {
            c0: S::ZERO,
            c1: S::ONE,
            c2: S::ZERO,
        }
    }

    /// The corrected index, `c0 + n·(c1 + c2·n)`.
    pub fn apply(&self, n: S) -> Result<S, Error> {
        let n = check_index(n)?;
        let out = self.c2.mul_add(n, self.c1)?.mul_add(n, self.c0)?;
        check_index(out)
    }

    /// Derivative `c1 + 2·c2·n`, for uncertainty propagation.
    pub fn slope(&self, n: S) -> Result<S, Error> {
        self.c2.mul(n)?.mul(S::TWO)?.add(self.c1)
    }
}

/// A refractive index checked as the optics checks one: finite, 1 to 4.5.
fn check_index<S: Scalar>(n: S) -> Result<S, Error> {
    n.check_range(
        Quantity::RefractiveIndex,
        crate::lit!(S, 1.0),
        crate::lit!(S, 4.5),
    )
}

fn field<const N: usize>(bytes: &[u8], at: usize) -> Result<[u8; N], Error> {
    bytes
        .get(at..at + N)
        .and_then(|s| s.try_into().ok())
        .ok_or(Error::RecordTruncated)
}

fn put(out: &mut [u8; RECORD_LEN], at: usize, bytes: &[u8]) {
    if let Some(dst) = out.get_mut(at..at + bytes.len()) {
        dst.copy_from_slice(bytes);
    }
}

/// An I32F32 coefficient as `S`, with integer arithmetic only for fixed-point `S`.
fn coefficient<S: Scalar>(c: I32F32) -> Result<S, Error> {
    let bits = c.to_bits();
    let int = S::from_i32((bits >> 32) as i32)?;
    let frac = (bits & 0xFFFF_FFFF) as u32;
    let hi = S::from_ratio((frac >> 16) as i32, 1 << 16)?;
    let lo = S::from_ratio((frac & 0xFFFF) as i32, 1 << 16)?.mul(S::from_ratio(1, 1 << 16)?)?;
    int.add(hi)?.add(lo)
}

/// A coefficient in `S` as I32F32, with integer arithmetic only for
/// fixed-point `S`: the integer part, then the fraction four bits at a time (no
/// intermediate above 16, so I8F24 runs it), rounded at 2⁻³². Exact for
/// I8F24, I32F32 and f32 coefficients within I32F32's range; f64 rounds to
/// 2.3e-10.
fn to_coefficient<S: Scalar>(x: S) -> Result<I32F32, Error> {
    if !x.is_finite() {
        return Err(Error::NotFinite(Quantity::Value));
    }
    let (mut int, mut frac) = split_floor(x)?;
    // A float a hair below an integer leaves a fraction that rounds to 1.
    if frac >= S::ONE {
        int = int.checked_add(1).ok_or(Error::Overflow)?;
        frac = S::ZERO;
    }
    let mut bits: i64 = 0;
    for _ in 0..8 {
        let (digit, rest) = split_floor(frac.mul(crate::lit!(S, 16.0))?)?;
        bits = (bits << 4) + i64::from(digit.clamp(0, 15));
        frac = rest;
    }
    if frac >= S::HALF {
        bits += 1;
    }
    (i64::from(int) << 32)
        .checked_add(bits)
        .map(I32F32::from_bits)
        .ok_or(Error::Overflow)
}

impl CalibrationRecord {
    /// The same record holding `correction` (the instrument's, see
    /// [`Instrument::calibration_record`](crate::refractometer::instrument::Instrument::calibration_record)).
    /// A coefficient beyond I32F32's range is [`Error::Overflow`].
    pub fn with_correction<S: Scalar>(self, correction: &Correction<S>) -> Result<Self, Error> {
        Ok(Self {
            c0: to_coefficient(correction.c0)?,
            c1: to_coefficient(correction.c1)?,
            c2: to_coefficient(correction.c2)?,
            ..self
        })
    }

    /// The stored correction in `S` (integer arithmetic for fixed-point `S`;
    /// a coefficient beyond `S`'s range is [`Error::Overflow`]).
    ///
    /// ```
    /// use embedded_optics::refractometer::geometry::Correction;
    /// use embedded_optics::refractometer::record::CalibrationRecord;
    /// use fixed::types::I8F24;
    /// let c = Correction { c0: I8F24::from_num(-0.0123), c1: I8F24::from_num(1.0071), c2: I8F24::ZERO };
    /// let bytes = CalibrationRecord::factory(590_000).with_correction(&c).unwrap().encode();
    /// let back = CalibrationRecord::decode(&bytes).unwrap().correction::<I8F24>().unwrap();
    /// assert_eq!(back, c);
    /// ```
    pub fn correction<S: Scalar>(&self) -> Result<Correction<S>, Error> {
        Ok(Correction {
            c0: coefficient(self.c0)?,
            c1: coefficient(self.c1)?,
            c2: coefficient(self.c2)?,
        })
    }

    /// The identity correction (`c0 = 0, c1 = 1, c2 = 0`), sequence 0, zero at
    /// 20 °C: what a unit leaves the line with before its first calibration.
    pub const fn factory(led_wavelength_pm: u32) -> Self {
        Self {
            sequence: 0,
            c0: I32F32::ZERO,
            c1: I32F32::ONE,
            c2: I32F32::ZERO,
            zero_temperature_mc: 20_000,
            led_wavelength_pm,
        }
    }

    /// Whether this record belongs to a unit whose LED emits at
    /// `led_wavelength_pm` (pm): a record made for another LED is
    /// [`Error::RecordMismatch`] naming `led_wavelength_pm`, for a restore to
    /// refuse before it touches the unit's calibration.
    ///
    /// ```
    /// use embedded_optics::Error;
    /// use embedded_optics::refractometer::record::CalibrationRecord;
    /// let rec = CalibrationRecord::factory(589_300);
    /// assert_eq!(rec.check_made_for(589_300), Ok(()));
    /// assert_eq!(
    ///     rec.check_made_for(656_300),
    ///     Err(Error::RecordMismatch("led_wavelength_pm"))
    /// );
    /// ```
    pub const fn check_made_for(&self, led_wavelength_pm: u32) -> Result<(), Error> {
        if self.led_wavelength_pm == led_wavelength_pm {
            Ok(())
        } else {
            Err(Error::RecordMismatch("led_wavelength_pm"))
        }
    }

    /// The record to write next: same contents with `sequence + 1` (wrapping).
    pub const fn successor(self) -> Self {
        Self {
            sequence: self.sequence.wrapping_add(1),
            ..self
        }
    }

    /// `true` if `self` was written after `other` (serial-number arithmetic on
    /// the sequence, so a wrapped counter still orders correctly).
    pub const fn is_newer_than(&self, other: &Self) -> bool {
        (self.sequence.wrapping_sub(other.sequence) as i32) > 0
    }

    /// Encodes to the version-1 layout (see the module docs).
    pub fn encode(&self) -> [u8; RECORD_LEN] {
        let mut out = [0u8; RECORD_LEN];
        put(&mut out, 0, &MAGIC);
        put(&mut out, 4, &FORMAT_VERSION.to_le_bytes());
        put(&mut out, 6, &(RECORD_LEN as u16).to_le_bytes());
        put(&mut out, 8, &self.sequence.to_le_bytes());
        put(&mut out, 12, &self.c0.to_bits().to_le_bytes());
        put(&mut out, 20, &self.c1.to_bits().to_le_bytes());
        put(&mut out, 28, &self.c2.to_bits().to_le_bytes());
        put(&mut out, 36, &self.zero_temperature_mc.to_le_bytes());
        put(&mut out, 40, &self.led_wavelength_pm.to_le_bytes());
        let crc = crc32(out.get(..CRC_AT).unwrap_or(&[]));
        put(&mut out, CRC_AT, &crc.to_le_bytes());
        out
    }

    /// Decodes a record, checking in order: length ([`Error::RecordTruncated`]),
    /// magic ([`Error::RecordForeign`]), version
    /// ([`Error::RecordVersionUnsupported`]), declared length and CRC
    /// ([`Error::RecordCorrupt`]). Bytes past [`RECORD_LEN`] are ignored.
    pub fn decode(bytes: &[u8]) -> Result<Self, Error> {
        if bytes.len() < RECORD_LEN {
            return Err(Error::RecordTruncated);
        }
        if field::<4>(bytes, 0)? != MAGIC {
            return Err(Error::RecordForeign);
        }
        let version = u16::from_le_bytes(field(bytes, 4)?);
        if version != FORMAT_VERSION {
            return Err(Error::RecordVersionUnsupported);
        }
        let declared = u16::from_le_bytes(field(bytes, 6)?);
        let stored_crc = u32::from_le_bytes(field(bytes, CRC_AT)?);
        let body = bytes.get(..CRC_AT).ok_or(Error::RecordTruncated)?;
        if usize::from(declared) != RECORD_LEN || crc32(body) != stored_crc {
            return Err(Error::RecordCorrupt);
        }
        Ok(Self {
            sequence: u32::from_le_bytes(field(bytes, 8)?),
            c0: I32F32::from_bits(i64::from_le_bytes(field(bytes, 12)?)),
            c1: I32F32::from_bits(i64::from_le_bytes(field(bytes, 20)?)),
            c2: I32F32::from_bits(i64::from_le_bytes(field(bytes, 28)?)),
            zero_temperature_mc: i32::from_le_bytes(field(bytes, 36)?),
            led_wavelength_pm: u32::from_le_bytes(field(bytes, 40)?),
        })
    }

    /// Applies the empirical correction `n' = c0 + c1·n + c2·n²` to a measured
    /// index. The result must be a physical index (1.0–4.5), else
    /// [`Error::OutOfRange`].
    ///
    /// ```
    /// use embedded_optics::refractometer::record::CalibrationRecord;
    /// use fixed::types::{I8F24, I32F32};
    /// let mut rec = CalibrationRecord::factory(589_300);
    /// rec.c0 = I32F32::from_num(0.0002); // the zero read 0.0002 low
    /// let n = rec.correct(I8F24::from_num(1.3328)).unwrap();
    /// assert!((n.to_num::<f64>() - 1.3330).abs() < 1e-6);
    /// ```
    pub fn correct<S: Scalar>(&self, n: S) -> Result<S, Error> {
        let n = check_index(n)?;
        self.correction::<S>()?
            .apply(n)
            .map_err(|_| Error::OutOfRange(Quantity::RefractiveIndex))
    }
}

/// One of the two storage slots.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Slot {
    /// The first slot.
    A,
    /// The second slot.
    B,
}

/// What the two slots hold and where the next write goes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SlotChoice {
    /// The newest valid record and its slot; `None` if neither slot is valid
    /// (fall back to [`CalibrationRecord::factory`]).
    pub current: Option<(Slot, CalibrationRecord)>,
    /// Where to write the next record: the slot not holding `current`.
    pub write_to: Slot,
}

impl SlotChoice {
    /// The record to write next: the successor of the current one, or the
    /// factory record (sequence 1) if there is none. The caller changes the
    /// coefficients before encoding.
    pub fn next_record(&self, led_wavelength_pm: u32) -> CalibrationRecord {
        match self.current {
            Some((_, r)) => r.successor(),
            None => CalibrationRecord::factory(led_wavelength_pm).successor(),
        }
    }
}

/// Chooses between the two slots' contents: the valid record with the newer
/// sequence wins; the next write goes to the other slot. If neither is valid the
/// next write goes to slot A.
pub fn choose_slots(slot_a: &[u8], slot_b: &[u8]) -> SlotChoice {
    let a = CalibrationRecord::decode(slot_a).ok();
    let b = CalibrationRecord::decode(slot_b).ok();
    let current = match (a, b) {
        (Some(ra), Some(rb)) => {
            if rb.is_newer_than(&ra) {
                Some((Slot::B, rb))
            } else {
                Some((Slot::A, ra))
            }
        }
        (Some(ra), None) => Some((Slot::A, ra)),
        (None, Some(rb)) => Some((Slot::B, rb)),
        (None, None) => None,
    };
    let write_to = match current {
        Some((Slot::A, _)) => Slot::B,
        _ => Slot::A,
    };
    SlotChoice { current, write_to }
}
