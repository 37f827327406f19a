//! `docs/reliability.md` names, for every promise, the tests that check it:
//! each promise must name at least one test file, and every test it names
//! must exist, so the document cannot drift from the tests.

use std::path::Path;

fn test_sources() -> Vec<(String, String)> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests");
    let mut files: Vec<(String, String)> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "rs"))
        .map(|p| (format!("tests/{}", p.file_name().unwrap().to_string_lossy()), std::fs::read_to_string(&p).unwrap()))
        .collect();
    files.sort();
    files
}

#[test]
fn every_promise_names_tests_that_exist() {
    let doc = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/reliability.md")).unwrap();
    let sources = test_sources();
    let promises: Vec<&str> =
        doc.split("\n## ").skip(1).filter(|s| s.starts_with(|c: char| c.is_ascii_digit())).collect();
    assert!(promises.len() >= 8, "the promises are numbered sections");
    for promise in promises {
        let title = promise.lines().next().unwrap();
        // Backticked words: file names and test names.
        let quoted: Vec<&str> = promise.split('`').skip(1).step_by(2).collect();
        let files: Vec<&str> =
            quoted.iter().copied().filter(|q| q.starts_with("tests/") && q.ends_with(".rs")).collect();
        assert!(!files.is_empty(), "promise '{title}' names no test file");
        for file in &files {
            assert!(sources.iter().any(|(name, _)| name == file), "promise '{title}': {file} does not exist");
        }
        let tests = quoted.iter().filter(|q| {
            q.split('_').count() >= 4 && q.chars().all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_')
        });
        for test in tests {
            let defined = sources.iter().any(|(_, text)| text.contains(&format!("fn {test}(")));
            assert!(defined, "promise '{title}': no test named {test}");
        }
    }
}
