//! Any text as a share link: a document or a typed error, never a panic.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        if let Ok(doc) = chiroptic::link::decode(text) {
            let _ = chiroptic::link::validate(&doc);
        }
    }
});
