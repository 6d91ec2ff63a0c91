//! The render, link and open verbs through the real binary: exit codes, one
//! line messages for bad input, and link -> open giving the file back.

use chiroptic::Document;
use std::io::Write;
use std::process::{Command, Output, Stdio};

const BIN: &str = env!("CARGO_BIN_EXE_chiroptic");
const DEMO: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/../fixtures/demo/demo.json");

fn run(args: &[&str]) -> Output {
    Command::new(BIN).args(args).output().expect("the binary runs")
}

fn stdout(o: &Output) -> String {
    String::from_utf8_lossy(&o.stdout).into_owned()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

fn assert_bad_input(o: &Output, mentions: &str) {
    assert_eq!(o.status.code(), Some(2), "stderr: {}", stderr(o));
    let err = stderr(o);
    assert_eq!(err.trim_end().lines().count(), 1, "one line expected: {err}");
    assert!(err.contains(mentions), "{err:?} should mention {mentions:?}");
}

#[test]
fn link_then_open_gives_the_document_back() {
    let link = run(&["link", DEMO, "--base", "https://example.invalid/page/"]);
    assert!(link.status.success(), "{}", stderr(&link));
    let url = stdout(&link).trim().to_string();
    assert!(url.starts_with("https://example.invalid/page/#c1."), "{url}");
    let opened = run(&["open", &url]);
    assert!(opened.status.success(), "{}", stderr(&opened));
    let back = Document::from_json(&stdout(&opened)).expect("open prints a document");
    let original = Document::from_json(&std::fs::read_to_string(DEMO).expect("demo")).expect("demo parses");
    assert_eq!(back, original);

    // The same through standard input.
    let mut child = Command::new(BIN).args(["open", "-"]).stdin(Stdio::piped()).stdout(Stdio::piped()).spawn().expect("spawns");
    child.stdin.take().expect("stdin").write_all(url.as_bytes()).expect("writes");
    let piped = child.wait_with_output().expect("finishes");
    assert!(piped.status.success());
    assert_eq!(Document::from_json(&stdout(&piped)).expect("document"), original);
}

#[test]
fn default_link_is_relative_to_the_page() {
    let link = run(&["link", DEMO]);
    assert!(stdout(&link).starts_with("index.html#c1."), "{}", stdout(&link));
}

#[test]
fn bad_links_exit_2_with_one_line() {
    assert_bad_input(&run(&["open", "index.html#c9.AAAA"]), "version 9");
    assert_bad_input(&run(&["open", "#c1.@@@"]), "damaged");
    assert_bad_input(&run(&["open", "hello"]), "not a chiroptic link");
}

#[test]
fn render_writes_an_svg_file() {
    let dir = std::env::temp_dir().join(format!("chiroptic-render-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let out = dir.join("cd.svg");
    let o = run(&[
        "render",
        DEMO,
        "--plot",
        "cd",
        "--unit",
        "mdeg",
        "--width",
        "640",
        "--height",
        "400",
        "-o",
        out.to_str().unwrap_or_default(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let svg = std::fs::read_to_string(&out).expect("written");
    assert!(svg.starts_with("<svg width=\"640\" height=\"400\""));
    assert!(svg.contains("θ / mdeg"), "label missing");
    let _ = std::fs::remove_dir_all(&dir);

    let o = run(&["render", DEMO, "--plot", "index", "-o", "-"]);
    assert!(o.status.success());
    assert!(stdout(&o).contains("Δn"));
}

#[test]
fn render_refuses_bad_options() {
    assert_bad_input(&run(&["render", DEMO, "--plot", "pie", "-o", "-"]), "--plot");
    assert_bad_input(&run(&["render", DEMO, "--plot", "cd", "--unit", "furlong", "-o", "-"]), "furlong");
    assert_bad_input(&run(&["render", DEMO, "--plot", "abs", "--unit", "mdeg", "-o", "-"]), "--unit");
    assert_bad_input(&run(&["render", DEMO, "--plot", "cd", "--axis", "parsec", "-o", "-"]), "parsec");
    assert_bad_input(&run(&["render", DEMO, "--plot", "cd", "--from", "300", "-o", "-"]), "--to");
    assert_bad_input(&run(&["render", DEMO, "--plot", "cd", "--width", "5", "-o", "-"]), "--width");
    assert_bad_input(&run(&["render", DEMO, "--plot", "cd", "--unit", "mean_residue_ellipticity", "-o", "-"]), "mean_residue_weight");
    assert_bad_input(&run(&["render", "/nonexistent.json", "--plot", "cd", "-o", "-"]), "nonexistent");
}

#[test]
fn render_refuses_a_bad_view_as_link_does() {
    // The same document through both verbs: one view check (view::check).
    let dir = std::env::temp_dir().join(format!("chiroptic-badview-{}", std::process::id()));
    std::fs::create_dir_all(&dir).expect("temp dir");
    let path = dir.join("bad-view.json");
    let mut doc: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(DEMO).expect("demo")).expect("demo parses");
    doc["view"] = serde_json::json!({ "cd_unit": "xyz" });
    std::fs::write(&path, doc.to_string()).expect("written");
    let file = path.to_str().unwrap_or_default();
    assert_bad_input(&run(&["render", file, "--plot", "cd", "-o", "-"]), "view.cd_unit");
    assert_bad_input(&run(&["link", file]), "view.cd_unit");
    let _ = std::fs::remove_dir_all(&dir);
}
