//! Running the `halfrail` binary on a document written to a temporary file.

use std::process::{Command, Output};

use serde_json::Value;

pub fn halfrail(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_halfrail")).args(args).output().expect("the binary runs")
}

/// `doc` written to a file named after `name` and this process; its path.
pub fn written(name: &str, doc: &Value) -> String {
    let path = std::env::temp_dir().join(format!("halfrail-{name}-{}.json", std::process::id()));
    std::fs::write(&path, doc.to_string()).unwrap();
    path.display().to_string()
}

/// `halfrail crystal` with `flags` on `doc` refuses it: exit 2, one line on stderr,
/// which contains `needle`.
pub fn crystal_refuses(name: &str, doc: &Value, flags: &[&str], needle: &str) {
    let path = written(name, doc);
    let out = halfrail(&[&["crystal", path.as_str()][..], flags].concat());
    let err = String::from_utf8_lossy(&out.stderr).to_string();
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert_eq!(err.trim_end().lines().count(), 1, "{err}");
    assert!(err.contains(needle), "{err:?} lacks {needle:?}");
    let _ = std::fs::remove_file(path);
}
