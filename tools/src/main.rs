//! `axicore`: rod-core coil cases to dipole moment, fields and VTK maps. The command line
//! lives in the library (`axicore::commands`), one file per subcommand.

fn main() -> std::process::ExitCode {
    axicore::commands::main()
}
