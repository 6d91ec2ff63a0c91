//! The hostile-input corpus (fixtures/hostile, made by make_hostile.py, and
//! the bad links of fixtures/bad-links) run through the CLI: every refused
//! input exits with code 2 and one line naming what is wrong; every input
//! the corpus marks as readable exits 0 with finite output (issue 13). The
//! inputs too large for git are made here.

use serde_json::Value;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("..")
}

fn run(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_chiroptic")).args(args).output().expect("binary runs")
}

fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("chiroptic-hostile-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir.join(name)
}

/// Runs one verb on one file the way a user would.
fn run_verb(verb: &str, file: &Path) -> Output {
    let f = file.to_str().unwrap();
    let out = scratch(&format!("{}.out", file.file_name().unwrap().to_string_lossy()));
    let o = out.to_str().unwrap();
    match verb {
        "eval" | "import" => run(&[verb, f]),
        "render" => run(&["render", "--plot", "cd", "-o", o, f]),
        "states" => run(&["states", f, "-o", o]),
        other => panic!("manifest names an unknown verb {other}"),
    }
}

fn assert_refused(what: &str, o: &Output, expect: &str) {
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(2), "{what}: exit code; stderr: {err}");
    assert_eq!(err.lines().count(), 1, "{what}: one line, got: {err}");
    assert!(err.contains(expect), "{what}: message should name {expect:?}: {err}");
}

#[test]
fn every_corpus_file_gets_its_message_or_is_read_cleanly() {
    let manifest: Value = serde_json::from_str(&std::fs::read_to_string(root().join("fixtures/hostile/manifest.json")).unwrap()).unwrap();
    let entries = manifest["entries"].as_array().unwrap();
    assert!(entries.len() >= 60, "the corpus holds {} entries", entries.len());
    for e in entries {
        let file = root().join("fixtures/hostile/files").join(e["file"].as_str().unwrap());
        let (verb, expect) = (e["verb"].as_str().unwrap(), e["expect"].as_str().unwrap());
        let o = run_verb(verb, &file);
        let what = format!("{verb} {}", file.display());
        if expect.is_empty() {
            assert_eq!(o.status.code(), Some(0), "{what}: {}", String::from_utf8_lossy(&o.stderr));
            let text = String::from_utf8_lossy(&o.stdout).to_lowercase();
            assert!(!text.contains("nan") && !text.contains("inf"), "{what}: a non-finite value in the output");
        } else {
            assert_refused(&what, &o, expect);
        }
    }
}

#[test]
fn every_bad_link_is_refused_in_one_line() {
    let corpus: Value = serde_json::from_str(&std::fs::read_to_string(root().join("fixtures/bad-links/corpus.json")).unwrap()).unwrap();
    let bad = corpus["bad"].as_array().unwrap();
    assert!(bad.len() >= 40);
    for b in bad {
        let link = match (b["link"].as_str(), &b["generate"]) {
            (Some(l), _) => l.to_string(),
            (None, g) => {
                format!("{}{}", g["prefix"].as_str().unwrap(), g["repeat"].as_str().unwrap().repeat(g["count"].as_u64().unwrap() as usize))
            }
        };
        let path = scratch(&format!("{}.link", b["name"].as_str().unwrap()));
        std::fs::write(&path, link).unwrap();
        // Through standard input, as a pasted link arrives.
        let o =
            Command::new(env!("CARGO_BIN_EXE_chiroptic")).args(["open", "-"]).stdin(std::fs::File::open(&path).unwrap()).output().unwrap();
        assert_refused(&format!("link {}", b["name"]), &o, "");
    }
}

#[test]
fn huge_files_are_refused_by_their_size_before_they_are_read() {
    // A 100 MB single line (no line break at all).
    let line = scratch("one-line.csv");
    std::fs::write(&line, vec![b'1'; 100 * 1024 * 1024]).unwrap();
    assert_refused("100 MB line", &run(&["import", line.to_str().unwrap()]), "limit");
    std::fs::remove_file(&line).unwrap();
    // A file that claims 10 GB (sparse: no disk is used).
    let sparse = scratch("ten-gigabytes.jdx");
    std::fs::File::create(&sparse).unwrap().set_len(10 * 1024 * 1024 * 1024).unwrap();
    assert_refused("10 GB file", &run(&["import", sparse.to_str().unwrap()]), "limit");
    let doc = scratch("ten-gigabytes.json");
    std::fs::rename(&sparse, &doc).unwrap();
    assert_refused("10 GB document", &run(&["eval", doc.to_str().unwrap()]), "limit");
    std::fs::remove_file(&doc).unwrap();
}
