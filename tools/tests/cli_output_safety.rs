//! Output files that cannot hurt, through the real `axicore` binary: one test per fault found
//! by reviewing the program as an attacker and a careless user would use it (issue 11, item 8).
//! Run as root, `--vtk /dev/null` replaced the system's `/dev/null` with a regular file.

use std::fs;
use std::io::{BufRead, BufReader};
use std::os::unix::fs::{FileTypeExt, PermissionsExt};
use std::os::unix::process::{CommandExt, ExitStatusExt};
use std::path::PathBuf;
use std::process::{Command, Output, Stdio};

const CASE: &str = r#"
title = "Demo: output-safety rod"
[core]
shape = "rod"
length = "70 mm"
diameter = "8 mm"
material = "nickel-iron-80"
[[winding]]
turns = 100
current = "40 mA"
inner_radius = "4.2 mm"
outer_radius = "6 mm"
length = "60 mm"
"#;

/// A fresh directory holding `case.toml`, traversable by every user (for the test run as
/// another user), removed on drop.
struct Scratch(PathBuf);

impl Scratch {
    fn new(name: &str) -> Scratch {
        let dir = std::env::temp_dir().join(format!("axicore-out-{name}-{}", std::process::id()));
        let _ = fs::remove_dir_all(&dir);
        fs::create_dir_all(&dir).unwrap();
        fs::set_permissions(&dir, fs::Permissions::from_mode(0o755)).unwrap();
        fs::write(dir.join("case.toml"), CASE).unwrap();
        Scratch(dir)
    }
    fn path(&self, name: &str) -> PathBuf {
        self.0.join(name)
    }
    fn case(&self) -> String {
        self.path("case.toml").to_str().unwrap().to_string()
    }
    /// Names in the directory, sorted (hidden temporaries included).
    fn names(&self) -> Vec<String> {
        let mut v: Vec<String> = fs::read_dir(&self.0)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = fs::set_permissions(&self.0, fs::Permissions::from_mode(0o755));
        let _ = fs::remove_dir_all(&self.0);
    }
}

fn axicore() -> Command {
    Command::new(env!("CARGO_BIN_EXE_axicore"))
}

fn run(args: &[&str]) -> Output {
    axicore().args(args).output().unwrap()
}

fn is_root() -> bool {
    // SAFETY: geteuid has no preconditions and cannot fail.
    unsafe { libc::geteuid() == 0 }
}

/// Asserts a refusal before any work: exit code 2, one line naming `option` and `needle`,
/// nothing on standard output (no solve, no mesh statistics).
fn assert_refused(out: &Output, option: &str, needle: &str) {
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "stderr: {err}");
    assert_eq!(err.trim().lines().count(), 1, "not one line: {err}");
    assert!(err.contains(option) && err.contains(needle), "{err}");
    assert!(
        out.stdout.is_empty(),
        "work was done: {}",
        String::from_utf8_lossy(&out.stdout)
    );
}

#[test]
fn a_fifo_as_an_output_is_refused_and_stays_a_fifo() {
    let s = Scratch::new("fifo");
    let fifo = s.path("map.vtu");
    let made = Command::new("mkfifo").arg(&fifo).status().unwrap();
    assert!(made.success());
    for cmd in ["solve", "mesh"] {
        let out = run(&[cmd, &s.case(), "--vtk", fifo.to_str().unwrap()]);
        assert_refused(&out, "--vtk", "is a named pipe (FIFO)");
        assert!(fs::symlink_metadata(&fifo).unwrap().file_type().is_fifo());
    }
    assert_eq!(s.names(), ["case.toml", "map.vtu"]);
}

#[test]
fn a_character_device_as_an_output_is_refused_and_stays_a_device() {
    // Not /dev/null itself when root: were the refusal broken, the test would replace it.
    let s = Scratch::new("chardev");
    let device = if is_root() {
        let own = s.path("null");
        let made = Command::new("mknod")
            .arg(&own)
            .args(["c", "1", "3"])
            .status();
        if !made.is_ok_and(|m| m.success()) {
            eprintln!("skipped: root without the right to make a device node (mknod failed)");
            return;
        }
        own
    } else {
        PathBuf::from("/dev/null")
    };
    let path = device.to_str().unwrap();
    for args in [
        vec!["solve", &s.case(), "--vtk", path],
        vec!["mesh", &s.case(), "--vtk", path],
        vec!["ramp", &s.case(), "--to", "1 A", "--svg", path],
    ] {
        assert_refused(&run(&args), args[args.len() - 2], "is a character device");
        assert!(fs::symlink_metadata(&device)
            .unwrap()
            .file_type()
            .is_char_device());
    }
}

#[test]
fn a_link_to_dev_null_is_refused_and_dev_null_stays_a_device() {
    let s = Scratch::new("null-link");
    let link = s.path("out.vtu");
    std::os::unix::fs::symlink("/dev/null", &link).unwrap();
    let out = run(&["solve", &s.case(), "--vtk", link.to_str().unwrap()]);
    assert_refused(&out, "--vtk", "is a symbolic link to /dev/null");
    assert!(fs::symlink_metadata(&link)
        .unwrap()
        .file_type()
        .is_symlink());
    assert!(fs::metadata("/dev/null")
        .unwrap()
        .file_type()
        .is_char_device());
}

#[test]
fn a_socket_as_an_output_is_refused_and_stays_a_socket() {
    let s = Scratch::new("socket");
    let sock = s.path("line.csv");
    let _listener = std::os::unix::net::UnixListener::bind(&sock).unwrap();
    let out = run(&[
        "solve",
        &s.case(),
        "--line",
        "0,0:1mm,0:3",
        "--csv",
        sock.to_str().unwrap(),
    ]);
    assert_refused(&out, "--csv", "is a socket");
    assert!(fs::symlink_metadata(&sock).unwrap().file_type().is_socket());
}

#[test]
fn a_symbolic_link_as_an_output_is_refused_and_neither_it_nor_its_target_change() {
    let s = Scratch::new("link");
    let real = s.path("real.vtu");
    fs::write(&real, "earlier map").unwrap();
    let link = s.path("latest.vtu");
    std::os::unix::fs::symlink(&real, &link).unwrap();
    let out = run(&["solve", &s.case(), "--vtk", link.to_str().unwrap()]);
    assert_refused(&out, "--vtk", "is a symbolic link");
    assert_eq!(fs::read_link(&link).unwrap(), real);
    assert_eq!(fs::read_to_string(&real).unwrap(), "earlier map");
    // The path the link names is an ordinary output.
    let out = run(&["mesh", &s.case(), "--vtk", real.to_str().unwrap()]);
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(fs::read_to_string(&real).unwrap().contains("VTKFile"));
    assert_eq!(fs::read_link(&link).unwrap(), real);
    assert_eq!(s.names(), ["case.toml", "latest.vtu", "real.vtu"]);
}

#[test]
fn a_directory_where_no_file_can_be_created_is_refused_before_the_mesh() {
    // /proc takes no new files, for root too: the probe made before any work finds it.
    for cmd in ["mesh", "solve"] {
        let s = Scratch::new("proc");
        let out = run(&[cmd, &s.case(), "--vtk", "/proc/axicore-map.vtu"]);
        assert_refused(&out, "--vtk", "no file can be created in directory /proc");
        // The message names the user's path, not the probe's random name.
        assert!(!String::from_utf8_lossy(&out.stderr).contains(".tmp"));
    }
}

#[test]
fn a_read_only_directory_is_refused_before_the_solve() {
    let s = Scratch::new("read-only");
    let out_dir = s.path("results");
    fs::create_dir(&out_dir).unwrap();
    fs::set_permissions(&out_dir, fs::Permissions::from_mode(0o555)).unwrap();
    let target = out_dir.join("map.vtu");
    let mut cmd = axicore();
    cmd.args(["solve", &s.case(), "--vtk", target.to_str().unwrap()]);
    if is_root() {
        // A mode does not stop root: the run is made as the unprivileged user `nobody`.
        cmd.uid(65534).gid(65534);
    }
    let out = match cmd.output() {
        Ok(o) => o,
        Err(e) => {
            eprintln!("skipped: the binary cannot be started as user nobody here ({e})");
            return;
        }
    };
    assert_refused(&out, "--vtk", "no file can be created in directory");
    assert!(!target.exists());
    assert_eq!(fs::read_dir(&out_dir).unwrap().count(), 0);
}

#[test]
fn a_read_only_file_is_refused_and_kept() {
    let s = Scratch::new("read-only-file");
    let kept = s.path("reference.vtu");
    fs::write(&kept, "reference map").unwrap();
    fs::set_permissions(&kept, fs::Permissions::from_mode(0o444)).unwrap();
    let out = run(&["mesh", &s.case(), "--vtk", kept.to_str().unwrap()]);
    assert_refused(&out, "--vtk", "is read-only");
    assert_eq!(fs::read_to_string(&kept).unwrap(), "reference map");
}

/// Starts a solve writing two outputs that waits once both temporaries are written, sends it
/// `signal` there and returns how it ended.
fn interrupt_while_writing(s: &Scratch, signal: i32) -> std::process::ExitStatus {
    let vtk = s.path("map.vtu");
    let csv = s.path("line.csv");
    let mut child = axicore()
        .args(["solve", &s.case(), "--vtk", vtk.to_str().unwrap()])
        .args(["--line", "0,0:1mm,0:3", "--csv", csv.to_str().unwrap()])
        .env("AXICORE_TEST_HOLD_OUTPUTS", "1")
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let mut stderr = BufReader::new(child.stderr.take().unwrap());
    let mut line = String::new();
    stderr.read_line(&mut line).unwrap();
    assert!(line.contains("2 temporaries written"), "{line}");
    // The window the test is about: both temporaries exist, hidden, beside their targets.
    let temps: Vec<String> = s
        .names()
        .into_iter()
        .filter(|n| n.ends_with(".tmp"))
        .collect();
    assert_eq!(temps.len(), 2, "{:?}", s.names());
    // SAFETY: kill has no memory preconditions; the pid is our own live child.
    assert_eq!(unsafe { libc::kill(child.id() as i32, signal) }, 0);
    child.wait().unwrap()
}

#[test]
fn sigint_while_writing_removes_the_temporaries_and_writes_no_output() {
    let s = Scratch::new("sigint");
    fs::write(s.path("map.vtu"), "earlier map").unwrap();
    let status = interrupt_while_writing(&s, libc::SIGINT);
    // Ended as by the signal itself, so that a shell sees 130 and a loop of runs stops.
    assert_eq!(status.signal(), Some(libc::SIGINT), "{status:?}");
    assert_eq!(s.names(), ["case.toml", "map.vtu"]);
    assert_eq!(
        fs::read_to_string(s.path("map.vtu")).unwrap(),
        "earlier map"
    );
}

#[test]
fn sigterm_while_writing_removes_the_temporaries_and_writes_no_output() {
    let s = Scratch::new("sigterm");
    let status = interrupt_while_writing(&s, libc::SIGTERM);
    assert_eq!(status.signal(), Some(libc::SIGTERM), "{status:?}");
    assert_eq!(s.names(), ["case.toml"]);
}

#[test]
fn sigint_during_a_long_solve_leaves_no_file() {
    // A fine mesh (fineness 3) solves for seconds; no temporary exists during the solve (the
    // writability probe is removed at once), so an interrupt leaves the directory as it was.
    let s = Scratch::new("sigint-solve");
    fs::write(
        s.path("case.toml"),
        format!("{CASE}\n[mesh]\nfineness = 3\n"),
    )
    .unwrap();
    let vtk = s.path("map.vtu");
    let mut child = axicore()
        .args(["solve", &s.case(), "--vtk", vtk.to_str().unwrap()])
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(500));
    // SAFETY: as above.
    assert_eq!(unsafe { libc::kill(child.id() as i32, libc::SIGINT) }, 0);
    let status = child.wait().unwrap();
    if status.signal() == Some(libc::SIGINT) {
        assert_eq!(s.names(), ["case.toml"]);
    } else {
        // The solve ended before the signal (a fast machine): then the output is whole.
        assert!(status.success(), "{status:?}");
        assert!(fs::read_to_string(&vtk)
            .unwrap()
            .trim_end()
            .ends_with("</VTKFile>"));
        assert_eq!(s.names(), ["case.toml", "map.vtu"]);
    }
}

#[test]
fn outputs_written_whole_leave_no_temporary() {
    let s = Scratch::new("whole");
    let vtk = s.path("map.vtu");
    let csv = s.path("line.csv");
    let out = run(&[
        "solve",
        &s.case(),
        "--vtk",
        vtk.to_str().unwrap(),
        "--line",
        "0,0:1mm,0:3",
        "--csv",
        csv.to_str().unwrap(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert_eq!(s.names(), ["case.toml", "line.csv", "map.vtu"]);
}
