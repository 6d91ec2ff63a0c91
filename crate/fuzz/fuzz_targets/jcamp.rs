//! Any text as JCAMP-DX: blocks or a message naming the line.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    let _ = chiroptic::import::jcamp::parse(&text);
});
