//! Standard output for commands: each command prints its text once, after its files are
//! written, so a failed run prints no half report.

use std::io::Write;

/// Writes `text` to standard output; a closed pipe (`axicore … | head`) ends the program
/// quietly instead of panicking, as the reader wants no more.
pub fn emit(text: &str) {
    let mut out = std::io::stdout().lock();
    if let Err(e) = out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
        if e.kind() == std::io::ErrorKind::BrokenPipe {
            std::process::exit(0);
        }
        eprintln!("axicore: error: cannot write the output: {e}");
        std::process::exit(1);
    }
}
