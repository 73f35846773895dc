//! Shared pieces of the on-target programs: semihosting exit with a status
//! code and a panic handler that reports and exits.
#![no_std]

use cortex_m_semihosting::hprintln;

/// Ends the QEMU run with `code` as the process exit status
/// (semihosting SYS_EXIT_EXTENDED, ADP_Stopped_ApplicationExit).
pub fn exit(code: u32) -> ! {
    let block: [u32; 2] = [0x20026, code];
    // SAFETY: semihosting call 0x20 (SYS_EXIT_EXTENDED) reads the two words of
    // `block`, which lives on the stack for the duration of the call.
    unsafe {
        cortex_m_semihosting::syscall(0x20, &block);
    }
    loop {
        cortex_m::asm::nop();
    }
}

/// Prints a line through semihosting.
pub fn say(args: core::fmt::Arguments<'_>) {
    hprintln!("{}", args);
}

pub mod checks;
pub mod vectors;
