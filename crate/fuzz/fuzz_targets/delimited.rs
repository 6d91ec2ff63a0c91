//! Any text as a delimited table: a table (then recognised) or a message.
#![no_main]
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = String::from_utf8_lossy(data);
    if let Ok(table) = chiroptic::import::delimited::parse(&text) {
        let _ = table.recognise(&chiroptic::import::ColumnChoice::default());
    }
});
