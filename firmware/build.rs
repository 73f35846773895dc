//! Puts the memory map of the QEMU machine for the target being built where
//! cortex-m-rt's link.x looks for `memory.x`.
use std::{env, fs, path::PathBuf};

fn main() {
    let target = env::var("TARGET").unwrap_or_default();
    let memory = if target.starts_with("thumbv6m") {
        // microbit (nRF51822): 256 KiB flash, 16 KiB RAM.
        "MEMORY\n{\n  FLASH : ORIGIN = 0x00000000, LENGTH = 256K\n  RAM : ORIGIN = 0x20000000, LENGTH = 16K\n}\n"
    } else {
        // mps2-an386 (Cortex-M4F): 4 MiB code memory, 4 MiB RAM.
        "MEMORY\n{\n  FLASH : ORIGIN = 0x00000000, LENGTH = 4M\n  RAM : ORIGIN = 0x20000000, LENGTH = 4M\n}\n"
    };
    let out = PathBuf::from(env::var_os("OUT_DIR").unwrap_or_default());
    if fs::write(out.join("memory.x"), memory).is_err() {
        println!("cargo:warning=could not write memory.x");
    }
    println!("cargo:rustc-link-search={}", out.display());
    println!("cargo:rerun-if-changed=build.rs");
}
