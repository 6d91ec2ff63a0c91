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
/// Most conformers and computed transitions a document's `states` may hold:
/// 5000 broaden onto a page's grid in a few tens of milliseconds.
pub const MAX_CONFORMERS: usize = 500;
pub const MAX_DOCUMENT_TRANSITIONS: usize = 5000;
/// Most fit starts and iterations a document may ask for.
pub const MAX_STARTS: u32 = 256;
pub const MAX_ITERATIONS: u32 = 100_000;
/// Largest figure drawn, in pixels per side.
pub const MAX_FIGURE_PIXELS: u32 = 20_000;

/// Largest sample concentration (mol/L): pure water is 55.5 mol/L, so no
/// solution comes near; it keeps every sample unit finite (common practice:
/// a bound, not a physical law).
pub const MAX_CONCENTRATION_MOL_PER_L: f64 = 100.0;
/// Longest path length (cm): 10 m, beyond any polarimeter tube or cell.
pub const MAX_PATH_LENGTH_CM: f64 = 1000.0;
/// Largest dipole strength of one band (debye²): the strongest single
/// electronic transitions are of order 10²; with R bounded by |g| ≤ 2 this
/// keeps ε, Δε and the indices finite for any band a document may hold.
pub const MAX_DIPOLE_STRENGTH_DEBYE2: f64 = 1.0e4;
/// Coupled systems (see `coupled`): most systems a document may hold, most
/// chromophores in one system, most transitions per chromophore and in one
/// system. The solve is a complex LU per grid point, O(N^3) in the system's
/// transitions: 64 on 2000 points is about a second, the most a page edit
/// should cost.
pub const MAX_SYSTEMS: usize = 8;
pub const MAX_CHROMOPHORES: usize = 32;
pub const MAX_TRANSITIONS_PER_CHROMOPHORE: usize = 4;
pub const MAX_SYSTEM_TRANSITIONS: usize = 64;
