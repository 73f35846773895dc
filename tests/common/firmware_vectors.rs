//! Keeps a generated firmware vector file equal to what the host generates
//! (shared by the tests/target_*vectors.rs generators).

use std::path::Path;

/// Compares `fresh` with the committed `firmware/src/<file>`; with
/// `UPDATE_TARGET_VECTORS` set, writes it first. `test` names the test target
/// to rerun in the message.
pub fn keep_current(file: &str, test: &str, fresh: &str) {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("firmware/src")
        .join(file);
    if std::env::var_os("UPDATE_TARGET_VECTORS").is_some() {
        std::fs::write(&path, fresh).unwrap();
    }
    let committed = std::fs::read_to_string(&path).unwrap_or_default();
    assert!(
        committed == fresh,
        "firmware/src/{file} is out of date: run UPDATE_TARGET_VECTORS=1 cargo test --features std --test {test}"
    );
}
