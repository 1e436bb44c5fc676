//! The calibration store: the two-slot record of [`record`](super::record) kept
//! in a device's NOR flash or EEPROM through the `embedded-storage` traits, so
//! that a power cut at any moment of a recalibration leaves the unit with either
//! its old or its new calibration, and it says which.
//!
//! # How it writes
//!
//! Two slots, A and B, side by side from `base`; on NOR flash each slot is a
//! whole number of erase sectors (one 2 KiB sector on most Cortex-M0+ parts),
//! on EEPROM 64 bytes. A commit goes to the slot *not* in use:
//!
//! 1. erase that slot (NOR flash only; an EEPROM overwrites in place),
//! 2. write the 64-byte record at its start in one `write` (every byte of a
//!    write word written once after the erase, as `NorFlash` requires),
//! 3. read it back and compare; only then does the store switch to it.
//!
//! The slot in use is never erased or written, so a cut during steps 1–3 leaves
//! it intact; the torn slot fails its CRC at the next start, and
//! [`CalibrationStore::open`] picks the newest valid slot (serial-number order of
//! the sequence, as [`choose_slots`] does). The tests cut power after every
//! write word and at every point of every erase, on three flash geometries and
//! an EEPROM, with the device's "undefined" contents modelled as unwritten,
//! fully written, half-programmed and out-of-order words.
//!
//! # Why not `sequential-storage`
//!
//! That crate's map keeps many items with wear levelling in a ring of pages. For
//! one 64-byte record rewritten a few times in a unit's life (each
//! recalibration) a two-slot scheme needs two sectors, no cache and no async
//! executor (its API is `async`-only, over `embedded-storage-async`), keeps the
//! documented 64-byte layout readable by a service tool, and its in-flash format
//! is ours to keep stable (that crate's is not yet declared stable).
//!
//! # Errors
//!
//! Every failure is [`Error::Storage`] with a [`StorageFault`]; a driver's error
//! is reduced to its `NorFlashErrorKind` (an EEPROM driver's to
//! [`StorageFault::Device`]). Pass a NOR flash driver by `&mut` (`NorFlash` is
//! implemented for `&mut T`) to keep it for other uses and for its own error
//! detail; [`CalibrationStore::into_memory`] gives an owned driver back.
//!
//! ```
//! use embedded_optics::refractometer::record::{CalibrationRecord, Slot};
//! use embedded_optics::refractometer::store::CalibrationStore;
//! use embedded_storage::nor_flash::{ErrorType, NorFlash, NorFlashErrorKind, ReadNorFlash};
//!
//! /// A RAM stand-in for the part's flash: 4 sectors of 2 KiB, 8-byte words.
//! struct Flash([u8; 8192]);
//! impl ErrorType for Flash {
//!     type Error = NorFlashErrorKind;
//! }
//! impl ReadNorFlash for Flash {
//!     const READ_SIZE: usize = 1;
//!     fn read(&mut self, at: u32, out: &mut [u8]) -> Result<(), Self::Error> {
//!         let at = at as usize;
//!         let src = self.0.get(at..at + out.len()).ok_or(NorFlashErrorKind::OutOfBounds)?;
//!         out.copy_from_slice(src);
//!         Ok(())
//!     }
//!     fn capacity(&self) -> usize {
//!         self.0.len()
//!     }
//! }
//! impl NorFlash for Flash {
//!     const WRITE_SIZE: usize = 8;
//!     const ERASE_SIZE: usize = 2048;
//!     fn erase(&mut self, from: u32, to: u32) -> Result<(), Self::Error> {
//!         let cells = self.0.get_mut(from as usize..to as usize);
//!         cells.ok_or(NorFlashErrorKind::OutOfBounds)?.fill(0xFF);
//!         Ok(())
//!     }
//!     fn write(&mut self, at: u32, bytes: &[u8]) -> Result<(), Self::Error> {
//!         let at = at as usize;
//!         let cells = self.0.get_mut(at..at + bytes.len());
//!         cells.ok_or(NorFlashErrorKind::OutOfBounds)?.copy_from_slice(bytes);
//!         Ok(())
//!     }
//! }
//!
//! # fn main() -> Result<(), embedded_optics::Error> {
//! let mut flash = Flash([0xFF; 8192]);
//! // The last two sectors hold the calibration.
//! let mut store = CalibrationStore::on_nor_flash(&mut flash, 4096)?;
//! assert_eq!(store.current(), None); // a new unit: use the factory record
//!
//! // After a calibration (`Instrument::calibration_record(&store.choice())`):
//! let record = CalibrationRecord::factory(590_000);
//! let (slot, written) = store.commit(record)?;
//! assert_eq!((slot, written.sequence), (Slot::A, 1));
//! let (slot, _) = store.commit(record)?;
//! assert_eq!(slot, Slot::B);
//!
//! // Next boot: the newest valid slot, and which one it is.
//! let store = CalibrationStore::on_nor_flash(&mut flash, 4096)?;
//! assert_eq!(store.current().map(|(s, r)| (s, r.sequence)), Some((Slot::B, 2)));
//! # Ok(())
//! # }
//! ```

use super::record::{CalibrationRecord, RECORD_LEN, Slot, SlotChoice, choose_slots};
use crate::error::{Error, StorageFault};
use embedded_storage::Storage;
use embedded_storage::nor_flash::{NorFlash, NorFlashError, NorFlashErrorKind};

/// `RECORD_LEN` as the devices' offset type.
const RECORD_SPAN: u32 = RECORD_LEN as u32;

mod sealed {
    use crate::error::Error;
    use crate::refractometer::reading::record::RECORD_LEN;

    /// What the store does with a memory; implemented by the two adapters only.
    pub trait Memory {
        /// Bytes from one slot's start to the next's, and the alignment of a
        /// slot's start; `Geometry` if the device cannot hold a record slot.
        fn slot_layout(&self) -> Result<(u32, u32), Error>;
        /// The device's size in bytes.
        fn capacity(&self) -> usize;
        /// Reads a record's bytes at `at`.
        fn read_record(&mut self, at: u32, out: &mut [u8; RECORD_LEN]) -> Result<(), Error>;
        /// Makes `from..to` writable (erases it on NOR flash).
        fn clear(&mut self, from: u32, to: u32) -> Result<(), Error>;
        /// Writes a record's bytes at `at`.
        fn program(&mut self, at: u32, bytes: &[u8; RECORD_LEN]) -> Result<(), Error>;
    }
}

/// A memory the store can keep its two slots in: [`NorFlashSlots`] or
/// [`EepromSlots`].
pub trait SlotMemory: sealed::Memory {}

/// A `NorFlash` device (erase to 0xFF in sectors, write each word once) as the
/// store's memory. Its write and read sizes must be powers of two of at most 64
/// bytes, its erase size a multiple of both.
#[derive(Debug)]
pub struct NorFlashSlots<F>(pub F);

/// A byte-writable `Storage` device (EEPROM, FRAM) as the store's memory: slots
/// of 64 bytes, overwritten in place with no erase. Not for a flash behind a
/// read-modify-write `Storage` adapter: both slots may share one of its pages,
/// and a cut while it erases that page loses both; use [`NorFlashSlots`] there.
#[derive(Debug)]
pub struct EepromSlots<S>(pub S);

fn nor_fault<E: NorFlashError>(e: E) -> Error {
    Error::Storage(match e.kind() {
        NorFlashErrorKind::NotAligned => StorageFault::NotAligned,
        NorFlashErrorKind::OutOfBounds => StorageFault::OutOfBounds,
        _ => StorageFault::Device,
    })
}

fn is_unit(size: usize) -> bool {
    size.is_power_of_two() && size <= RECORD_LEN
}

impl<F: NorFlash> sealed::Memory for NorFlashSlots<F> {
    fn slot_layout(&self) -> Result<(u32, u32), Error> {
        let erase = F::ERASE_SIZE;
        if !is_unit(F::WRITE_SIZE)
            || !is_unit(F::READ_SIZE)
            || erase == 0
            || !erase.is_multiple_of(F::WRITE_SIZE)
            || !erase.is_multiple_of(F::READ_SIZE)
        {
            return Err(StorageFault::Geometry.into());
        }
        // Whole sectors, at least one record long.
        let span = RECORD_LEN
            .div_ceil(erase)
            .checked_mul(erase)
            .and_then(|s| u32::try_from(s).ok())
            .ok_or(StorageFault::Geometry)?;
        let align = u32::try_from(erase).map_err(|_| StorageFault::Geometry)?;
        Ok((span, align))
    }
    fn capacity(&self) -> usize {
        self.0.capacity()
    }
    fn read_record(&mut self, at: u32, out: &mut [u8; RECORD_LEN]) -> Result<(), Error> {
        self.0.read(at, out).map_err(nor_fault)
    }
    fn clear(&mut self, from: u32, to: u32) -> Result<(), Error> {
        self.0.erase(from, to).map_err(nor_fault)
    }
    fn program(&mut self, at: u32, bytes: &[u8; RECORD_LEN]) -> Result<(), Error> {
        self.0.write(at, bytes).map_err(nor_fault)
    }
}

impl<F: NorFlash> SlotMemory for NorFlashSlots<F> {}

impl<S: Storage> sealed::Memory for EepromSlots<S> {
    fn slot_layout(&self) -> Result<(u32, u32), Error> {
        Ok((RECORD_SPAN, 1))
    }
    fn capacity(&self) -> usize {
        self.0.capacity()
    }
    fn read_record(&mut self, at: u32, out: &mut [u8; RECORD_LEN]) -> Result<(), Error> {
        self.0
            .read(at, out)
            .map_err(|_| StorageFault::Device.into())
    }
    fn clear(&mut self, _from: u32, _to: u32) -> Result<(), Error> {
        Ok(())
    }
    fn program(&mut self, at: u32, bytes: &[u8; RECORD_LEN]) -> Result<(), Error> {
        self.0
            .write(at, bytes)
            .map_err(|_| StorageFault::Device.into())
    }
}

impl<S: Storage> SlotMemory for EepromSlots<S> {}

/// Two calibration slots on a device, and which one is in use.
#[derive(Debug)]
pub struct CalibrationStore<M> {
    memory: M,
    base: u32,
    span: u32,
    choice: SlotChoice,
}

impl<F: NorFlash> CalibrationStore<NorFlashSlots<F>> {
    /// [`open`](Self::open) on a `NorFlash` device: the slots are the
    /// `2 × ceil(64 / ERASE_SIZE)` sectors from `base`.
    pub fn on_nor_flash(flash: F, base: u32) -> Result<Self, Error> {
        Self::open(NorFlashSlots(flash), base)
    }
}

impl<S: Storage> CalibrationStore<EepromSlots<S>> {
    /// [`open`](Self::open) on a byte-writable device: the slots are the
    /// 128 bytes from `base`.
    pub fn on_eeprom(eeprom: S, base: u32) -> Result<Self, Error> {
        Self::open(EepromSlots(eeprom), base)
    }
}

impl<M: SlotMemory> CalibrationStore<M> {
    /// Start-up: checks that the two slots from `base` fit the device (`base`
    /// on a sector boundary, the region inside the device, else
    /// `Storage(Geometry)`), reads both and picks the newest valid record.
    /// Erased or torn slots are not errors: they are simply not valid.
    pub fn open(memory: M, base: u32) -> Result<Self, Error> {
        let (span, align) = memory.slot_layout()?;
        let end = span
            .checked_mul(2)
            .and_then(|both| base.checked_add(both))
            .ok_or(StorageFault::Geometry)?;
        let fits = usize::try_from(end).is_ok_and(|end| end <= memory.capacity());
        if !base.is_multiple_of(align) || !fits {
            return Err(StorageFault::Geometry.into());
        }
        let mut store = Self {
            memory,
            base,
            span,
            choice: choose_slots(&[], &[]),
        };
        store.reload()?;
        Ok(store)
    }

    /// Reads both slots again and picks the newest valid record (what
    /// [`open`](Self::open) does after its checks).
    pub fn reload(&mut self) -> Result<SlotChoice, Error> {
        let mut a = [0u8; RECORD_LEN];
        let mut b = [0u8; RECORD_LEN];
        let (at_a, at_b) = (self.slot_offset(Slot::A), self.slot_offset(Slot::B));
        self.memory.read_record(at_a, &mut a)?;
        self.memory.read_record(at_b, &mut b)?;
        self.choice = choose_slots(&a, &b);
        Ok(self.choice)
    }

    /// The record in use and its slot; `None` on a unit never calibrated (or
    /// whose slots are both unreadable): use [`CalibrationRecord::factory`].
    pub fn current(&self) -> Option<(Slot, CalibrationRecord)> {
        self.choice.current
    }

    /// The slot in use and where the next commit goes, as
    /// [`Instrument::calibration_record`](crate::refractometer::instrument::Instrument::calibration_record)
    /// takes it.
    pub fn choice(&self) -> SlotChoice {
        self.choice
    }

    /// Byte offset of a slot's start on the device.
    pub fn slot_offset(&self, slot: Slot) -> u32 {
        match slot {
            Slot::A => self.base,
            // `open` checked that base + 2·span fits in a u32.
            Slot::B => self.base.saturating_add(self.span),
        }
    }

    /// The bytes the store owns on the device: `(start, end)`, end exclusive.
    pub fn region(&self) -> (u32, u32) {
        (
            self.base,
            self.base.saturating_add(self.span.saturating_mul(2)),
        )
    }

    /// Writes `record` to the slot not in use (erase, write, read back) and
    /// switches to it; returns the slot and the record as written. The sequence
    /// is the store's: one past the record in use (1 on a new unit), whatever
    /// `record` carries. On any error the record in use stays in use, on the
    /// device and in [`current`](Self::current), and the next commit retries the
    /// same slot.
    pub fn commit(
        &mut self,
        record: CalibrationRecord,
    ) -> Result<(Slot, CalibrationRecord), Error> {
        let target = self.choice.write_to;
        let written = CalibrationRecord {
            sequence: self.choice.next_record(record.led_wavelength_pm).sequence,
            ..record
        };
        let bytes = written.encode();
        let at = self.slot_offset(target);
        self.memory.clear(at, at.saturating_add(self.span))?;
        self.memory.program(at, &bytes)?;
        let mut back = [0u8; RECORD_LEN];
        self.memory.read_record(at, &mut back)?;
        if back != bytes {
            return Err(StorageFault::Verify.into());
        }
        self.choice = SlotChoice {
            current: Some((target, written)),
            write_to: match target {
                Slot::A => Slot::B,
                Slot::B => Slot::A,
            },
        };
        Ok((target, written))
    }

    /// Gives the memory back (the driver is its `.0`).
    pub fn into_memory(self) -> M {
        self.memory
    }
}
