//! Which module may know which (DEVELOPERS.md, "Modules"): share links and
//! views know nothing of drawing, so a link can be checked and opened where
//! no figure is ever drawn. Read from the sources' `use` lines.

use std::path::Path;

fn uses(file: &str) -> Vec<String> {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("src").join(file);
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    text.lines().map(str::trim).filter(|l| l.starts_with("use ") || l.starts_with("pub use ")).map(String::from).collect()
}

#[test]
fn link_and_view_know_nothing_of_figures() {
    for file in ["link.rs", "view.rs"] {
        let found = uses(file);
        assert!(!found.is_empty(), "{file} has use lines");
        let drawing: Vec<_> = found.iter().filter(|l| l.contains("figures") || l.contains("plotters")).collect();
        assert!(drawing.is_empty(), "{file} uses drawing code: {drawing:?}");
    }
}
