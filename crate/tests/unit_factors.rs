//! Unit factors and constants live in one place, `crate/src/units.rs`
//! (DEVELOPERS.md, "Invariants"). This test reads every other Rust source of
//! the crate and every page module and fails when one writes such a number as
//! code: a factor written twice can drift apart silently.

use std::path::{Path, PathBuf};

/// The numbers that are unit factors or physical constants of this project
/// (32.98 and 3298.2 are the ellipticity factors, 1e-40 and 1e-18 the esu
/// scales of R and D, 1e7 nm per cm⁻¹, 1239.84 eV nm, ...). Written as the
/// literals one would type for them.
const FACTORS: [&str; 16] = [
    "32.98",
    "32.982",
    "3298",
    "3298.2",
    "1e-40",
    "1e40",
    "1e-36",
    "1e-18",
    "1e7",
    "1.0e7",
    "1e+7",
    "10_000_000.0",
    "1239.84",
    "1239.8",
    "8065.5",
    "2.302585",
];

fn sources(dir: &Path, ext: &str, out: &mut Vec<PathBuf>) {
    let Ok(entries) = std::fs::read_dir(dir) else { return };
    for entry in entries.flatten() {
        let path = entry.path();
        if path.is_dir() {
            sources(&path, ext, out);
        } else if path.extension().is_some_and(|e| e == ext) {
            out.push(path);
        }
    }
}

/// The line without its `//` comment (a `//` inside a string cuts a little
/// more than needed, which only means less is checked there).
fn code_of(line: &str) -> &str {
    line.split("//").next().unwrap_or("")
}

/// Whether `token` stands alone in `code` as a number (not inside a name
/// such as `rotatory_strength_1e40_cgs` or a longer number).
fn has_number(code: &str, token: &str) -> bool {
    let bytes = code.as_bytes();
    let part_of_word = |b: u8| b.is_ascii_alphanumeric() || b == b'_' || b == b'.';
    code.match_indices(token).any(|(i, _)| {
        let before = i.checked_sub(1).map(|j| bytes[j]);
        let after = bytes.get(i + token.len()).copied();
        !before.is_some_and(part_of_word) && !after.is_some_and(|b| b.is_ascii_alphanumeric() || b == b'_' || b == b'.')
    })
}

#[test]
fn no_unit_factor_is_written_outside_units_rs() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut files = Vec::new();
    sources(&root.join("src"), "rs", &mut files);
    sources(&root.join("../www/js"), "js", &mut files);
    assert!(files.len() > 20, "the sources were found ({} files)", files.len());
    let mut found = Vec::new();
    for path in files.iter().filter(|p| !p.ends_with("units.rs")) {
        let text = std::fs::read_to_string(path).unwrap_or_default();
        for (n, line) in text.lines().enumerate() {
            let code = code_of(line);
            for token in FACTORS.iter().filter(|t| has_number(code, t)) {
                found.push(format!("{}:{}: {token}", path.display(), n + 1));
            }
        }
    }
    assert!(found.is_empty(), "unit factors outside units.rs:\n{}", found.join("\n"));
}

#[test]
fn the_scan_sees_a_factor_and_skips_names_and_comments() {
    assert!(has_number("let k = 32.98 * da;", "32.98"));
    assert!(has_number("x / 1e7", "1e7"));
    assert!(!has_number("b.rotatory_strength_1e40_cgs", "1e40"));
    assert!(!has_number("let y = 132.985;", "32.98"));
    assert!(!has_number(code_of("let a = 1; // 32.98 x"), "32.98"));
}
