//! The calibration store against a flash model that enforces the
//! `embedded-storage` rules (as its documentation states them: `NorFlash`
//! writes aligned to WRITE_SIZE, in bounds, each word once after an erase;
//! erases of whole ERASE_SIZE sectors; reads aligned to READ_SIZE) and cuts
//! power after any write word and at any point of any erase. After every cut
//! the next start must find exactly the old or exactly the new calibration and
//! name its slot, and the next commit must work.

use embedded_optics::Error;
use embedded_optics::error::StorageFault;
use embedded_optics::refractometer::record::{CalibrationRecord, RECORD_LEN, Slot, choose_slots};
use embedded_optics::refractometer::store::{CalibrationStore, EepromSlots, NorFlashSlots};
use embedded_optics::rng::Rng;
use embedded_storage::nor_flash::{
    ErrorType, NorFlash, NorFlashError, NorFlashErrorKind, ReadNorFlash,
};
use embedded_storage::{ReadStorage, Storage};
use fixed::types::I32F32;

// ------------------------------------------------------------ the model ----

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum ModelError {
    /// The caller broke one of the trait's rules.
    Rule(NorFlashErrorKind),
    /// Power went during this operation; the device is dead until reboot.
    PowerLost,
}

impl NorFlashError for ModelError {
    fn kind(&self) -> NorFlashErrorKind {
        match self {
            ModelError::Rule(k) => *k,
            ModelError::PowerLost => NorFlashErrorKind::Other,
        }
    }
}

/// What the "undefined" contents of an interrupted operation are.
#[derive(Clone, Copy, Debug)]
enum Tear {
    /// Word: nothing programmed yet.
    Unwritten,
    /// Word: fully programmed, but power went before the call returned.
    Complete,
    /// Word: some of the bits to clear still set (programming clears bits).
    HalfProgrammed,
    /// Word: the words after it in the same call programmed first, this one
    /// half (the trait leaves the order undefined).
    LaterWordsFirst,
    /// Erase: the first `k` bytes of the sector erased, the rest as before.
    ErasedPrefix(usize),
    /// Erase: random bits of the sector set (erasing sets bits).
    BitsSet(u64),
    /// Erase: the sector holds noise.
    Noise(u64),
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Event {
    Word,
    Erase,
    Byte,
}

/// A NOR flash of `len` bytes with `W`-byte words and `E`-byte sectors (reads
/// aligned to `W` too); also a byte-writable `Storage` (an EEPROM) when used
/// through that trait.
#[derive(Clone, Debug)]
struct Model<const W: usize, const E: usize> {
    mem: Vec<u8>,
    /// Per word: programmed (or undefined) since its sector's last erase.
    used: Vec<bool>,
    events: Vec<Event>,
    cut: Option<(usize, Tear)>,
    dead: bool,
    violations: Vec<String>,
}

impl<const W: usize, const E: usize> Model<W, E> {
    fn erased(len: usize) -> Self {
        Self {
            mem: vec![0xFF; len],
            used: vec![false; len / W],
            events: Vec::new(),
            cut: None,
            dead: false,
            violations: Vec::new(),
        }
    }

    /// The same cells after a power cycle: no cut armed, event log cleared.
    fn rebooted(&self) -> Self {
        Self {
            events: Vec::new(),
            cut: None,
            dead: false,
            ..self.clone()
        }
    }

    fn armed(&self, at_event: usize, tear: Tear) -> Self {
        Self {
            cut: Some((at_event, tear)),
            ..self.rebooted()
        }
    }

    fn rule(&mut self, kind: NorFlashErrorKind, what: String) -> Result<(), ModelError> {
        self.violations.push(what);
        Err(ModelError::Rule(kind))
    }

    fn check(&mut self, op: &str, at: u32, len: usize, align: usize) -> Result<(), ModelError> {
        let at = at as usize;
        if at + len > self.mem.len() {
            return self.rule(
                NorFlashErrorKind::OutOfBounds,
                format!("{op} {at}+{len} out of bounds"),
            );
        }
        if !at.is_multiple_of(align) || !len.is_multiple_of(align) {
            return self.rule(
                NorFlashErrorKind::NotAligned,
                format!("{op} {at}+{len} not aligned to {align}"),
            );
        }
        Ok(())
    }

    /// Logs an event; `Some(tear)` if power goes during it.
    fn event(&mut self, e: Event) -> Option<Tear> {
        let n = self.events.len();
        self.events.push(e);
        match self.cut {
            Some((at, tear)) if at == n => {
                self.dead = true;
                Some(tear)
            }
            _ => None,
        }
    }

    fn alive(&self) -> Result<(), ModelError> {
        if self.dead {
            Err(ModelError::PowerLost)
        } else {
            Ok(())
        }
    }
}

fn noise(seed: u64, len: usize) -> Vec<u8> {
    let mut r = Rng::new(seed);
    (0..len).map(|_| r.below(256) as u8).collect()
}

impl<const W: usize, const E: usize> ErrorType for Model<W, E> {
    type Error = ModelError;
}

impl<const W: usize, const E: usize> ReadNorFlash for Model<W, E> {
    const READ_SIZE: usize = W;
    fn read(&mut self, at: u32, out: &mut [u8]) -> Result<(), ModelError> {
        self.alive()?;
        self.check("read", at, out.len(), W)?;
        out.copy_from_slice(&self.mem[at as usize..at as usize + out.len()]);
        Ok(())
    }
    fn capacity(&self) -> usize {
        self.mem.len()
    }
}

impl<const W: usize, const E: usize> NorFlash for Model<W, E> {
    const WRITE_SIZE: usize = W;
    const ERASE_SIZE: usize = E;

    fn erase(&mut self, from: u32, to: u32) -> Result<(), ModelError> {
        self.alive()?;
        if from > to {
            return self.rule(
                NorFlashErrorKind::OutOfBounds,
                format!("erase {from}..{to}"),
            );
        }
        self.check("erase", from, (to - from) as usize, E)?;
        for s in (from as usize..to as usize).step_by(E) {
            let tear = self.event(Event::Erase);
            let sector = &mut self.mem[s..s + E];
            match tear {
                None => sector.fill(0xFF),
                Some(Tear::ErasedPrefix(k)) => sector[..k].fill(0xFF),
                Some(Tear::BitsSet(seed)) => {
                    for (b, m) in sector.iter_mut().zip(noise(seed, E)) {
                        *b |= m;
                    }
                }
                Some(Tear::Noise(seed)) => sector.copy_from_slice(&noise(seed, E)),
                Some(t) => panic!("word tear {t:?} armed on an erase"),
            }
            // A torn sector's words are undefined: they need an erase first.
            self.used[s / W..(s + E) / W].fill(tear.is_some());
            if tear.is_some() {
                return Err(ModelError::PowerLost);
            }
        }
        Ok(())
    }

    fn write(&mut self, at: u32, bytes: &[u8]) -> Result<(), ModelError> {
        self.alive()?;
        self.check("write", at, bytes.len(), W)?;
        let at = at as usize;
        for i in (0..bytes.len()).step_by(W) {
            let word = (at + i) / W;
            if self.used[word] {
                return self.rule(
                    NorFlashErrorKind::Other,
                    format!("word at {} written twice without an erase", at + i),
                );
            }
            let tear = self.event(Event::Word);
            let new = &bytes[i..i + W];
            let half: Vec<u8> = new.iter().map(|b| b | 0x5A).collect();
            let cell = at + i;
            match tear {
                None | Some(Tear::Complete) => self.mem[cell..cell + W].copy_from_slice(new),
                Some(Tear::Unwritten) => {}
                Some(Tear::HalfProgrammed) => self.mem[cell..cell + W].copy_from_slice(&half),
                Some(Tear::LaterWordsFirst) => {
                    let rest = &bytes[i + W..];
                    self.mem[cell + W..cell + W + rest.len()].copy_from_slice(rest);
                    self.used[word + 1..word + 1 + rest.len() / W].fill(true);
                    self.mem[cell..cell + W].copy_from_slice(&half);
                }
                Some(t) => panic!("erase tear {t:?} armed on a write"),
            }
            self.used[word] = true;
            if tear.is_some() {
                return Err(ModelError::PowerLost);
            }
        }
        Ok(())
    }
}

/// The EEPROM face: byte writes in place, no erase; a cut after any byte.
impl<const W: usize, const E: usize> ReadStorage for Model<W, E> {
    type Error = ModelError;
    fn read(&mut self, at: u32, out: &mut [u8]) -> Result<(), ModelError> {
        self.alive()?;
        self.check("read", at, out.len(), 1)?;
        out.copy_from_slice(&self.mem[at as usize..at as usize + out.len()]);
        Ok(())
    }
    fn capacity(&self) -> usize {
        self.mem.len()
    }
}

impl<const W: usize, const E: usize> Storage for Model<W, E> {
    fn write(&mut self, at: u32, bytes: &[u8]) -> Result<(), ModelError> {
        self.alive()?;
        self.check("write", at, bytes.len(), 1)?;
        for (i, &b) in bytes.iter().enumerate() {
            let cell = at as usize + i;
            match self.event(Event::Byte) {
                None | Some(Tear::Complete) => self.mem[cell] = b,
                Some(Tear::Unwritten) => {}
                Some(Tear::HalfProgrammed) => self.mem[cell] = (self.mem[cell] & 0xF0) | (b & 0x0F),
                Some(Tear::Noise(seed)) => self.mem[cell] = noise(seed, 1)[0],
                Some(t) => panic!("tear {t:?} armed on an EEPROM byte"),
            }
            if self.dead {
                return Err(ModelError::PowerLost);
            }
        }
        Ok(())
    }
}

/// `Storage` has no `&mut T` impl upstream: a borrowed EEPROM for the store.
struct Borrowed<'a, const W: usize, const E: usize>(&'a mut Model<W, E>);

impl<const W: usize, const E: usize> ReadStorage for Borrowed<'_, W, E> {
    type Error = ModelError;
    fn read(&mut self, at: u32, out: &mut [u8]) -> Result<(), ModelError> {
        ReadStorage::read(self.0, at, out)
    }
    fn capacity(&self) -> usize {
        ReadStorage::capacity(self.0)
    }
}

impl<const W: usize, const E: usize> Storage for Borrowed<'_, W, E> {
    fn write(&mut self, at: u32, bytes: &[u8]) -> Result<(), ModelError> {
        Storage::write(self.0, at, bytes)
    }
}

// ------------------------------------------------------------ scenarios ----

type Current = Option<(Slot, CalibrationRecord)>;

/// The store on a model through one of its two faces.
#[derive(Clone, Copy, Debug)]
enum Face {
    Nor,
    Eeprom,
}

fn open_current<const W: usize, const E: usize>(
    face: Face,
    m: &mut Model<W, E>,
    base: u32,
) -> Result<Current, Error> {
    Ok(match face {
        Face::Nor => CalibrationStore::on_nor_flash(m, base)?.current(),
        Face::Eeprom => CalibrationStore::on_eeprom(Borrowed(m), base)?.current(),
    })
}

fn open_commit<const W: usize, const E: usize>(
    face: Face,
    m: &mut Model<W, E>,
    base: u32,
    record: CalibrationRecord,
) -> Result<(Slot, CalibrationRecord), Error> {
    match face {
        Face::Nor => CalibrationStore::on_nor_flash(m, base)?.commit(record),
        Face::Eeprom => CalibrationStore::on_eeprom(Borrowed(m), base)?.commit(record),
    }
}

/// Invented calibrations of our fictional juice plant's bench unit, one per
/// recalibration, all different.
fn calibration(k: u32) -> CalibrationRecord {
    CalibrationRecord {
        c0: I32F32::from_num(-0.0001 * f64::from(k)),
        c1: I32F32::from_num(1.0 + 0.0007 * f64::from(k)),
        c2: I32F32::from_num(0.00002 * f64::from(k)),
        zero_temperature_mc: 19_500 + 100 * k as i32,
        ..CalibrationRecord::factory(590_000)
    }
}

#[derive(Default, Debug)]
struct Outcomes {
    cuts: usize,
    old: usize,
    new: usize,
    erase_cuts: usize,
    word_cuts: usize,
    /// (commit, event, tear) of every cut that gave the new record.
    new_at: Vec<(u32, usize, String)>,
}

const COMMITS: u32 = 5;
const SENTINEL: u8 = 0xA5;

/// Commits `COMMITS` calibrations in turn and, for each, cuts power at every
/// event of the commit with every tear that event can have; after each cut:
/// reboot, the store must hold exactly the old or the new calibration in the
/// slot it names, the slot in use and the bytes outside the store's region
/// untouched, no rule broken; then a retried commit must land.
fn power_cut_everywhere<const W: usize, const E: usize>(
    face: Face,
    len: usize,
    base: u32,
) -> Outcomes {
    let mut device = Model::<W, E>::erased(len);
    // Other data around the store (firmware, logs) that it must never touch.
    let (start, end) = match face {
        Face::Nor => CalibrationStore::on_nor_flash(&mut device, base)
            .unwrap()
            .region(),
        Face::Eeprom => CalibrationStore::on_eeprom(Borrowed(&mut device), base)
            .unwrap()
            .region(),
    };
    for (i, b) in device.mem.iter_mut().enumerate() {
        if !(start as usize..end as usize).contains(&i) {
            *b = SENTINEL;
        }
    }
    let outside = |m: &Model<W, E>| {
        m.mem
            .iter()
            .enumerate()
            .filter(|(i, _)| !(start as usize..end as usize).contains(i))
            .all(|(_, &b)| b == SENTINEL)
    };
    let mut out = Outcomes::default();
    let mut old: Current = None;
    for k in 1..=COMMITS {
        let record = calibration(k);
        // A clean run: how many events the commit has, and what it writes.
        let mut dry = device.rebooted();
        let (slot, written) = open_commit(face, &mut dry, base, record).unwrap();
        assert_eq!(written.sequence, k);
        assert_eq!(
            written,
            CalibrationRecord {
                sequence: k,
                ..record
            }
        );
        let new = Some((slot, written));
        assert_ne!(
            old.map(|(s, _)| s),
            Some(slot),
            "commit {k} wrote over the slot in use"
        );
        let in_use = old.map(|(s, _)| {
            let at = match (s, face) {
                (Slot::A, _) => start as usize,
                (Slot::B, _) => (start as usize + end as usize) / 2,
            };
            device.mem[at..at + RECORD_LEN].to_vec()
        });
        for (n, &event) in dry.events.iter().enumerate() {
            let tears: Vec<Tear> = match event {
                Event::Word => vec![
                    Tear::Unwritten,
                    Tear::Complete,
                    Tear::HalfProgrammed,
                    Tear::LaterWordsFirst,
                ],
                Event::Erase => (0..=E)
                    .step_by(W)
                    .map(Tear::ErasedPrefix)
                    .chain([Tear::BitsSet(n as u64), Tear::Noise(n as u64 + 1000)])
                    .collect(),
                Event::Byte => vec![
                    Tear::Unwritten,
                    Tear::Complete,
                    Tear::HalfProgrammed,
                    Tear::Noise(n as u64),
                ],
            };
            for tear in tears {
                let mut cut = device.armed(n, tear);
                let got = open_commit(face, &mut cut, base, record);
                assert_eq!(
                    got,
                    Err(Error::Storage(StorageFault::Device)),
                    "commit {k}, event {n}, {tear:?}: power loss must fail the commit"
                );
                let mut boot = cut.rebooted();
                let now = open_current(face, &mut boot, base).unwrap();
                out.cuts += 1;
                if event == Event::Erase {
                    out.erase_cuts += 1;
                } else {
                    out.word_cuts += 1;
                }
                if now == old {
                    out.old += 1;
                } else if now == new {
                    out.new += 1;
                    out.new_at.push((k, n, format!("{tear:?}")));
                } else {
                    panic!(
                        "commit {k}, event {n}, {tear:?}: found {now:?}, neither {old:?} nor {new:?}"
                    );
                }
                assert!(
                    outside(&boot),
                    "commit {k}, event {n}, {tear:?}: bytes outside the store changed"
                );
                if let (Some((s, _)), Some(bytes)) = (old, &in_use) {
                    let at = if s == Slot::A {
                        start as usize
                    } else {
                        (start as usize + end as usize) / 2
                    };
                    assert_eq!(
                        &boot.mem[at..at + RECORD_LEN],
                        &bytes[..],
                        "slot in use touched"
                    );
                }
                // The unit goes on: the retried commit lands and is found.
                let (_, again) = open_commit(face, &mut boot, base, record).unwrap();
                assert_eq!(
                    CalibrationRecord {
                        sequence: 0,
                        ..again
                    },
                    CalibrationRecord {
                        sequence: 0,
                        ..record
                    }
                );
                let after = open_current(face, &mut boot, base).unwrap();
                assert_eq!(after.map(|(_, r)| r), Some(again));
                assert!(
                    cut.violations.is_empty() && boot.violations.is_empty(),
                    "commit {k}, event {n}, {tear:?}: {:?} {:?}",
                    cut.violations,
                    boot.violations
                );
            }
        }
        // Move on with the clean run's device.
        device = dry.rebooted();
        assert!(device.violations.is_empty(), "{:?}", device.violations);
        old = new;
    }
    println!("{face:?} {W}-byte words, {E}-byte sectors: {out:?}");
    // Both outcomes occur: cuts before the last word keep the old record, a
    // cut after a complete last word gives the new one.
    assert!(out.old > 0 && out.new > 0, "{out:?}");
    out
}

#[test]
fn nor_4_byte_words_2_kib_sectors() {
    // A Cortex-M0+ part with 2 KiB pages programmed by 32-bit word. Store in
    // sectors 2 and 3 of 6.
    let o = power_cut_everywhere::<4, 2048>(Face::Nor, 6 * 2048, 2 * 2048);
    // Per commit: one sector erase (513 prefixes + 2), 16 words × 4 tears.
    assert_eq!(o.erase_cuts, COMMITS as usize * 515);
    assert_eq!(o.word_cuts, COMMITS as usize * 16 * 4);
    // A complete last word gives the new record; so does the out-of-order
    // tear at word 4 (later words programmed first, word 4 half): that word
    // is c0's high half, 0xFFFFFFFF for a negative c0, which a half-programmed
    // word already holds, so the cells hold the whole new record.
    assert_complete_last_word_is_new(&o, 16);
    assert_eq!(o.new, 2 * COMMITS as usize, "{:?}", o.new_at);
}

/// Every commit's cut after its last word, fully programmed, boots the new
/// record (the commit failed only because power went before it returned).
fn assert_complete_last_word_is_new(o: &Outcomes, last_event: usize) {
    for k in 1..=COMMITS {
        assert!(
            o.new_at.contains(&(k, last_event, "Complete".into())),
            "commit {k}: {:?}",
            o.new_at
        );
    }
}

#[test]
fn nor_8_byte_words_4_kib_sectors() {
    // Double-word (64-bit) programming and 4 KiB sectors. Store at sector 1 of 4.
    let o = power_cut_everywhere::<8, 4096>(Face::Nor, 4 * 4096, 4096);
    assert_eq!(o.erase_cuts, COMMITS as usize * 515);
    assert_eq!(o.word_cuts, COMMITS as usize * 8 * 4);
    assert_complete_last_word_is_new(&o, 8);
    assert_eq!(o.new, COMMITS as usize, "{:?}", o.new_at);
}

#[test]
fn nor_sectors_smaller_than_a_record() {
    // 32-byte sectors: a slot is two sectors, a commit two erases.
    let o = power_cut_everywhere::<4, 32>(Face::Nor, 8 * 32, 2 * 32);
    assert_eq!(o.erase_cuts, COMMITS as usize * 2 * (9 + 2));
    assert_eq!(o.word_cuts, COMMITS as usize * 16 * 4);
    assert_complete_last_word_is_new(&o, 17);
}

#[test]
fn eeprom_byte_writes() {
    // Byte-writable, overwritten in place: a cut after any of the 64 bytes.
    let o = power_cut_everywhere::<1, 1>(Face::Eeprom, 512, 100);
    assert_eq!(o.word_cuts, COMMITS as usize * 64 * 4);
    assert_eq!(o.erase_cuts, 0);
    assert_complete_last_word_is_new(&o, 63);
}

// ---------------------------------------------------- the model is strict ----

#[test]
fn the_model_refuses_what_the_traits_forbid() {
    let mut m = Model::<4, 2048>::erased(4096);
    assert!(NorFlash::write(&mut m, 0, &[0; 4]).is_ok());
    // Same word twice without an erase.
    assert!(NorFlash::write(&mut m, 0, &[0; 4]).is_err());
    // Misaligned offset and length, out of bounds.
    assert!(NorFlash::write(&mut m, 2, &[0; 4]).is_err());
    assert!(NorFlash::write(&mut m, 8, &[0; 3]).is_err());
    assert!(NorFlash::write(&mut m, 4096, &[0; 4]).is_err());
    // Part of a sector, past the end.
    assert!(m.erase(0, 1024).is_err());
    assert!(m.erase(0, 6144).is_err());
    assert!(ReadNorFlash::read(&mut m, 1, &mut [0; 4]).is_err());
    assert_eq!(m.violations.len(), 7, "{:?}", m.violations);
    // After an erase the word may be written again.
    assert!(m.erase(0, 2048).is_ok());
    assert!(NorFlash::write(&mut m, 0, &[0; 4]).is_ok());
    // A torn erase leaves the sector unwritable until erased again.
    let mut t = m.armed(0, Tear::ErasedPrefix(1024));
    assert_eq!(t.erase(0, 2048), Err(ModelError::PowerLost));
    let mut t = t.rebooted();
    assert!(NorFlash::write(&mut t, 1024, &[0; 4]).is_err());
}

#[test]
fn a_store_that_wrote_twice_would_be_caught() {
    // The store erases before each commit; writing the record again over the
    // same slot without one is what the model must catch.
    let mut m = Model::<8, 4096>::erased(8192);
    let bytes = calibration(1).encode();
    assert!(NorFlash::write(&mut m, 0, &bytes).is_ok());
    assert!(NorFlash::write(&mut m, 0, &bytes).is_err());
    assert_eq!(m.violations.len(), 1);
}

// ------------------------------------------------------- other failures ----

#[test]
fn geometry_is_checked_before_any_access() {
    let mut m = Model::<4, 2048>::erased(4 * 2048);
    let geometry = Err(Error::Storage(StorageFault::Geometry));
    // Base not on a sector boundary, region past the end, offset overflow.
    assert_eq!(
        CalibrationStore::on_nor_flash(&mut m, 100).map(|s| s.current()),
        geometry
    );
    assert_eq!(
        CalibrationStore::on_nor_flash(&mut m, 3 * 2048).map(|s| s.current()),
        geometry
    );
    assert_eq!(
        CalibrationStore::on_nor_flash(&mut m, u32::MAX - 2047).map(|s| s.current()),
        geometry
    );
    assert_eq!(
        CalibrationStore::on_eeprom(Borrowed(&mut m), 8 * 1024 - 100).map(|s| s.current()),
        geometry
    );
    assert!(m.events.is_empty() && m.violations.is_empty());
    // Write size above 64 bytes, or not a power of two.
    let mut big = Model::<128, 4096>::erased(4 * 4096);
    assert_eq!(
        CalibrationStore::on_nor_flash(&mut big, 0).map(|s| s.current()),
        geometry
    );
    let mut odd = Model::<12, 2400>::erased(4 * 2400);
    assert_eq!(
        CalibrationStore::on_nor_flash(&mut odd, 0).map(|s| s.current()),
        geometry
    );
    // The last two sectors fit exactly.
    let s = CalibrationStore::on_nor_flash(&mut m, 2 * 2048).unwrap();
    assert_eq!(s.region(), (4096, 8192));
    assert_eq!(
        (s.slot_offset(Slot::A), s.slot_offset(Slot::B)),
        (4096, 6144)
    );
}

/// A flash whose cell at one offset is stuck at 0 (a worn bit).
struct Stuck(Model<4, 2048>, usize);
impl ErrorType for Stuck {
    type Error = ModelError;
}
impl ReadNorFlash for Stuck {
    const READ_SIZE: usize = 4;
    fn read(&mut self, at: u32, out: &mut [u8]) -> Result<(), ModelError> {
        ReadNorFlash::read(&mut self.0, at, out)
    }
    fn capacity(&self) -> usize {
        ReadNorFlash::capacity(&self.0)
    }
}
impl NorFlash for Stuck {
    const WRITE_SIZE: usize = 4;
    const ERASE_SIZE: usize = 2048;
    fn erase(&mut self, from: u32, to: u32) -> Result<(), ModelError> {
        self.0.erase(from, to)
    }
    fn write(&mut self, at: u32, bytes: &[u8]) -> Result<(), ModelError> {
        NorFlash::write(&mut self.0, at, bytes)?;
        self.0.mem[self.1] = 0;
        Ok(())
    }
}

#[test]
fn a_failed_verify_keeps_the_old_calibration() {
    // The stuck cell is first outside the store (sector 0), then in slot B.
    let mut flash = Stuck(Model::erased(4 * 2048), 0);
    let mut store = CalibrationStore::on_nor_flash(&mut flash, 2048).unwrap();
    let (slot, first) = store.commit(calibration(1)).unwrap();
    assert_eq!(slot, Slot::A);
    flash.1 = 2 * 2048 + 17; // a byte inside slot B's record
    let mut store = CalibrationStore::on_nor_flash(&mut flash, 2048).unwrap();
    assert_eq!(
        store.commit(calibration(2)),
        Err(Error::Storage(StorageFault::Verify))
    );
    assert_eq!(store.current(), Some((Slot::A, first)));
    assert_eq!(store.choice().write_to, Slot::B);
    let store = CalibrationStore::on_nor_flash(&mut flash, 2048).unwrap();
    assert_eq!(store.current(), Some((Slot::A, first)));
}

#[test]
fn a_region_that_starts_as_noise_is_empty_and_then_works() {
    let mut m = Model::<8, 4096>::erased(3 * 4096);
    m.mem = noise(77, 3 * 4096);
    m.used.fill(true);
    assert_eq!(open_current(Face::Nor, &mut m, 4096), Ok(None));
    let (slot, rec) = open_commit(Face::Nor, &mut m, 4096, calibration(3)).unwrap();
    assert_eq!((slot, rec.sequence), (Slot::A, 1));
    assert_eq!(
        open_current(Face::Nor, &mut m, 4096),
        Ok(Some((Slot::A, rec)))
    );
    assert!(m.violations.is_empty(), "{:?}", m.violations);
}

#[test]
fn the_store_reads_what_choose_slots_reads() {
    // Slots written by hand with the record layout, as a service tool or an
    // earlier firmware did: the store agrees with `choose_slots`.
    let mut m = Model::<4, 2048>::erased(2 * 2048);
    let a = CalibrationRecord {
        sequence: 41,
        ..calibration(1)
    }
    .encode();
    let b = CalibrationRecord {
        sequence: 40,
        ..calibration(2)
    }
    .encode();
    NorFlash::write(&mut m, 0, &a).unwrap();
    NorFlash::write(&mut m, 2048, &b).unwrap();
    let store = CalibrationStore::open(NorFlashSlots(&mut m), 0).unwrap();
    assert_eq!(store.choice(), choose_slots(&a, &b));
    assert_eq!(store.choice().write_to, Slot::B);
    let mut e = Model::<1, 1>::erased(256);
    Storage::write(&mut e, 64, &a).unwrap();
    let store = CalibrationStore::open(EepromSlots(Borrowed(&mut e)), 0).unwrap();
    assert_eq!(
        store.current().map(|(s, r)| (s, r.sequence)),
        Some((Slot::B, 41))
    );
    assert_eq!(store.into_memory().0.0.mem[64..128], a);
}
