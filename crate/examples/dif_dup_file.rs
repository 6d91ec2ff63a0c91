//! Writes the 20,000-point DIF/DUP JCAMP-DX file of `benches/import.rs` to
//! standard output, for the page's timing script (tests/bench/data.mjs).
//! Run: `cargo run -q -p chiroptic --example dif_dup_file > file.jdx`.

#[path = "../benches/support/dif_dup.rs"]
mod dif_dup;

fn main() {
    print!("{}", dif_dup::file(&dif_dup::ordinates()));
}
