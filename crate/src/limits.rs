//! Resource caps: every limit on what arrives from outside (files, links,
//! documents, computations they ask for), written down once. Each is checked
//! before the work it bounds, so that a hostile input is refused with a
//! message instead of exhausting memory or time (tests/limits.rs checks each).

/// Largest document text accepted (bytes): room for measured data sets (a
/// 100,000-point set is about 2 MB), far below what would hurt a browser tab.
pub const MAX_DOCUMENT_BYTES: usize = 16 * 1024 * 1024;
/// Most measured data sets a document may hold.
pub const MAX_DATA_SETS: usize = 50;
/// Most lamp-line readings a document may hold.
pub const MAX_READINGS: usize = 200;
/// Most bands a document may hold.
pub const MAX_BANDS: usize = 500;
/// Largest evaluation grid: enough for any spectrum, small enough for a tab.
pub const MAX_GRID_POINTS: usize = 200_000;
/// Largest file the importers read (bytes): 64 MiB is a few million points,
/// far beyond any spectrum, and refused before it is read into memory.
pub const MAX_IMPORT_BYTES: u64 = 64 * 1024 * 1024;
/// Most points one imported data set may hold (also the cap on a JCAMP-DX
/// DUP count or claimed NPOINTS, before anything is allocated).
pub const MAX_POINTS: usize = 1_000_000;
/// Longest link text accepted (whole URL included): a 500-band model fits.
pub const MAX_LINK_CHARS: usize = 100_000;
/// Largest inflated link payload: 2 MiB, below the document size limit (a
/// document file may carry large data sets; a link is for what a link can
/// hold, and a decompression bomb must stop early).
pub const MAX_INFLATED_BYTES: usize = 2 * 1024 * 1024;
/// Most transitions a computed-states file may hold (far beyond any computation).
pub const MAX_TRANSITIONS: usize = 100_000;
/// Most fit starts and iterations a document may ask for.
pub const MAX_STARTS: u32 = 256;
pub const MAX_ITERATIONS: u32 = 100_000;
/// Largest figure drawn, in pixels per side.
pub const MAX_FIGURE_PIXELS: u32 = 20_000;
