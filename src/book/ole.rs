//! The compound-file (OLE) container of an xls workbook: the bytes of its
//! workbook stream, found the way the workbook library finds them, with
//! every sector chain checked to stay inside the file and never to loop.
//!
//! This module only reads a file already in memory: it never allocates
//! more than the file's own size for a chain, and never reads a record of
//! the stream it returns.

/// The first bytes of a compound file.
const SIGNATURE: [u8; 8] = [0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1];
/// Ends a sector chain.
const END_OF_CHAIN: u32 = 0xFFFF_FFFE;
/// Sector ids from here up are markers, not sectors.
const RESERVED: u32 = 0xFFFF_FFFA;
/// Marks a sector of the DIFAT itself.
const DIFAT_SECTOR: u32 = 0xFFFF_FFFC;
/// Streams shorter than this live in the mini stream.
const MINI_CUTOFF: usize = 4096;
/// The size of a mini sector.
const MINI_SECTOR: usize = 64;

/// The little-endian u16 at `at`, or 0 past the end.
pub(super) fn u16_at(b: &[u8], at: usize) -> u16 {
    match b.get(at..at + 2) {
        Some(&[x, y]) => u16::from_le_bytes([x, y]),
        _ => 0,
    }
}

/// The little-endian u32 at `at`, or 0 past the end.
pub(super) fn u32_at(b: &[u8], at: usize) -> u32 {
    match b.get(at..at + 4) {
        Some(&[a, b1, c, d]) => u32::from_le_bytes([a, b1, c, d]),
        _ => 0,
    }
}

fn u64_at(b: &[u8], at: usize) -> u64 {
    u64::from(u32_at(b, at)) | (u64::from(u32_at(b, at + 4)) << 32)
}

fn u32s(b: &[u8]) -> impl Iterator<Item = u32> + '_ {
    b.chunks_exact(4).map(|c| u32_at(c, 0))
}

/// Sectors of one size over some bytes, and the table that chains them.
struct Sectors<'a> {
    bytes: &'a [u8],
    size: usize,
}

impl<'a> Sectors<'a> {
    /// Sector `id`: whole, or cut short at the end of the bytes.
    fn get(&self, id: u32) -> Result<&'a [u8], String> {
        let start = usize::try_from(id)
            .ok()
            .and_then(|i| i.checked_mul(self.size))
            .filter(|&s| s < self.bytes.len())
            .ok_or_else(|| format!("sector {id} lies past the end of the file"))?;
        let end = start.saturating_add(self.size).min(self.bytes.len());
        self.bytes
            .get(start..end)
            .ok_or_else(|| format!("sector {id} lies past the end of the file"))
    }

    /// The bytes of the chain from `start`, at most `len` of them, through
    /// `table`; a chain longer than there are sectors loops.
    fn chain(&self, start: u32, table: &[u32], len: usize) -> Result<Vec<u8>, String> {
        let most = self.bytes.len() / self.size + 1;
        let mut out = Vec::new();
        let mut id = start;
        let mut steps = 0usize;
        while id != END_OF_CHAIN {
            steps += 1;
            if steps > most {
                return Err("a sector chain that loops".to_string());
            }
            let sector = self.get(id)?;
            let take = sector.len().min(len.saturating_sub(out.len()));
            out.extend_from_slice(sector.get(..take).unwrap_or_default());
            if out.len() >= len {
                break;
            }
            id = usize::try_from(id)
                .ok()
                .and_then(|i| table.get(i))
                .copied()
                .ok_or_else(|| format!("sector {id} missing from the allocation table"))?;
        }
        Ok(out)
    }
}

/// A directory entry: name, first sector, length.
struct Entry {
    name: String,
    start: u32,
    len: usize,
}

/// The workbook stream of a compound file ("Workbook", else "Book"), or
/// `None` when the file has neither (the library then says so). The `Err`
/// says what is damaged.
pub(crate) fn workbook_stream(file: &[u8]) -> Result<Option<Vec<u8>>, String> {
    let header = file
        .get(..512)
        .filter(|h| h.starts_with(&SIGNATURE))
        .ok_or("a compound file without its header")?;
    let size: usize = match u16_at(header, 30) {
        9 => 512,
        12 => 4096,
        _ => return Ok(None),
    };
    let sectors = Sectors {
        bytes: file.get(size..).unwrap_or_default(),
        size,
    };
    // The DIFAT: 109 ids in the header, then a chain of DIFAT sectors each
    // ending in the id of the next.
    let mut difat: Vec<u32> = u32s(header.get(76..512).unwrap_or_default()).collect();
    let mut id = u32_at(header, 68);
    let mut steps = 0usize;
    while id < RESERVED {
        steps += 1;
        if steps > file.len() / size + 1 {
            return Err("a DIFAT chain that loops".to_string());
        }
        difat.extend(u32s(sectors.get(id)?));
        id = difat.pop().unwrap_or(END_OF_CHAIN);
    }
    let mut fat: Vec<u32> = Vec::new();
    for id in difat.into_iter().filter(|id| *id < DIFAT_SECTOR) {
        fat.extend(u32s(sectors.get(id)?));
    }
    let dirs = sectors.chain(u32_at(header, 48), &fat, usize::MAX)?;
    let entries: Vec<Entry> = dirs
        .chunks_exact(128)
        .map(|d| {
            let units: Vec<u16> = d
                .get(..64)
                .unwrap_or_default()
                .chunks_exact(2)
                .map(|c| u16_at(c, 0))
                .take_while(|&u| u != 0)
                .collect();
            let len = if size == 512 {
                u64::from(u32_at(d, 120))
            } else {
                u64_at(d, 120)
            };
            Entry {
                name: String::from_utf16_lossy(&units),
                start: u32_at(d, 116),
                len: usize::try_from(len).unwrap_or(usize::MAX),
            }
        })
        .collect();
    let Some(root) = entries.first() else {
        return Err("a compound file without a root directory".to_string());
    };
    let named = |n: &str| entries.iter().find(|e| e.name.eq_ignore_ascii_case(n));
    let Some(stream) = named("Workbook").or_else(|| named("Book")) else {
        return Ok(None);
    };
    if stream.len >= MINI_CUTOFF {
        return sectors.chain(stream.start, &fat, stream.len).map(Some);
    }
    let mini_fat_len = usize::try_from(u32_at(header, 64)).unwrap_or(usize::MAX);
    if mini_fat_len == 0 {
        return Err("a short workbook stream without a mini-sector table".to_string());
    }
    let mini_stream = sectors.chain(root.start, &fat, root.len)?;
    let mini_fat: Vec<u32> =
        u32s(&sectors.chain(u32_at(header, 60), &fat, mini_fat_len.saturating_mul(size))?)
            .collect();
    let minis = Sectors {
        bytes: &mini_stream,
        size: MINI_SECTOR,
    };
    minis.chain(stream.start, &mini_fat, stream.len).map(Some)
}
