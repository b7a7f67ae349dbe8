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
