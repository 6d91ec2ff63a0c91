//! Any text as a transition list: conformers (then broadened) or a message.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    if let Ok(conformers) = chiroptic::states::table::parse(&text) {
        let _ = chiroptic::states::bands(&conformers, &chiroptic::states::Broadening::default());
    }
});
