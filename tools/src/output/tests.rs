//! Unit tests of the output layer: exclusive temporaries, all-or-nothing writes with faults
//! injected at each step, and the checks made before any work.

use std::fs;
use std::io;
use std::os::unix::fs::{MetadataExt, PermissionsExt};
use std::path::{Path, PathBuf};

use super::commit::{write_all_with, Step};
use super::{check_paths, temp, write_all};

/// Names in `dir`, sorted.
fn names(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

fn failing_at(at: Step) -> impl FnMut(Step) -> io::Result<()> {
    move |s| {
        if s == at {
            Err(io::Error::other("injected fault"))
        } else {
            Ok(())
        }
    }
}

/// Two outputs: `a` replaces a file holding "old a", `b` is new.
fn two_outputs(dir: &Path) -> (PathBuf, PathBuf, Vec<(PathBuf, Vec<u8>)>) {
    let a = dir.join("a.vtu");
    let b = dir.join("b.csv");
    fs::write(&a, "old a").unwrap();
    let files = vec![
        (a.clone(), b"new a".to_vec()),
        (b.clone(), b"new b".to_vec()),
    ];
    (a, b, files)
}

#[test]
fn a_link_planted_at_the_temporary_name_is_not_followed() {
    let dir = tempfile::tempdir().unwrap();
    let victim = dir.path().join("victim");
    fs::write(&victim, "keep me").unwrap();
    let target = dir.path().join("out.vtu");
    // With no random characters the temporary's name is known: plant a link there.
    let planted = dir.path().join(".out.vtu..tmp");
    std::os::unix::fs::symlink(&victim, &planted).unwrap();
    let made = temp::create_named(&target, None, 0);
    assert_eq!(
        made.err().map(|e| e.kind()),
        Some(io::ErrorKind::AlreadyExists)
    );
    assert_eq!(fs::read_to_string(&victim).unwrap(), "keep me");
    assert!(fs::symlink_metadata(&planted)
        .unwrap()
        .file_type()
        .is_symlink());
    assert!(!target.exists());
}

#[test]
fn temporaries_get_fresh_random_names_beside_the_target() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("map.vtu");
    let t1 = temp::create_beside(&target, None).unwrap();
    let t2 = temp::create_beside(&target, None).unwrap();
    assert_ne!(t1.path, t2.path);
    for t in [&t1, &t2] {
        assert_eq!(t.path.parent(), Some(dir.path()));
        let name = t.path.file_name().unwrap().to_str().unwrap();
        let random = name
            .strip_prefix(".map.vtu.")
            .and_then(|r| r.strip_suffix(".tmp"))
            .unwrap();
        assert_eq!(random.len(), 12, "{name}");
    }
    drop((t1, t2));
    assert!(
        names(dir.path()).is_empty(),
        "dropped temporaries are removed"
    );
}

#[test]
fn a_long_target_name_gives_a_temporary_name_within_the_limit() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("x".repeat(250));
    let t = temp::create_beside(&target, None).unwrap();
    assert!(t.path.file_name().unwrap().len() <= 255);
}

#[test]
fn a_failure_writing_the_second_output_leaves_neither() {
    let dir = tempfile::tempdir().unwrap();
    let (a, b, files) = two_outputs(dir.path());
    let err = write_all_with(&files, &mut failing_at(Step::Write(1))).unwrap_err();
    assert!(
        err.contains("b.csv") && err.contains("injected fault"),
        "{err}"
    );
    assert_eq!(fs::read_to_string(&a).unwrap(), "old a");
    assert!(!b.exists());
    assert_eq!(names(dir.path()), ["a.vtu"], "no temporary remains");
}

#[test]
fn a_failure_renaming_the_second_output_restores_the_first() {
    let dir = tempfile::tempdir().unwrap();
    let (a, b, files) = two_outputs(dir.path());
    let inode = fs::metadata(&a).unwrap().ino();
    let err = write_all_with(&files, &mut failing_at(Step::Rename(1))).unwrap_err();
    assert!(err.contains("b.csv"), "{err}");
    assert!(!err.contains("could not be restored"), "{err}");
    assert_eq!(fs::read_to_string(&a).unwrap(), "old a");
    assert_eq!(
        fs::metadata(&a).unwrap().ino(),
        inode,
        "the old file itself is back"
    );
    assert!(!b.exists());
    assert_eq!(
        names(dir.path()),
        ["a.vtu"],
        "no temporary or backup remains"
    );
}

#[test]
fn a_failure_renaming_the_second_output_removes_a_new_first() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("a.svg");
    let b = dir.path().join("b.svg");
    let files = vec![(a.clone(), b"a".to_vec()), (b.clone(), b"b".to_vec())];
    write_all_with(&files, &mut failing_at(Step::Rename(1))).unwrap_err();
    assert!(names(dir.path()).is_empty(), "{:?}", names(dir.path()));
}

#[test]
fn outputs_are_written_whole_and_keep_the_mode_of_the_file_they_replace() {
    let dir = tempfile::tempdir().unwrap();
    let (a, b, files) = two_outputs(dir.path());
    fs::set_permissions(&a, fs::Permissions::from_mode(0o640)).unwrap();
    write_all(&files).unwrap();
    assert_eq!(fs::read_to_string(&a).unwrap(), "new a");
    assert_eq!(fs::read_to_string(&b).unwrap(), "new b");
    assert_eq!(fs::metadata(&a).unwrap().mode() & 0o7777, 0o640);
    // A new output gets what `File::create` gives (0o666 less the umask), not 0o600.
    let reference = dir.path().join("reference");
    fs::File::create(&reference).unwrap();
    let want = fs::metadata(&reference).unwrap().mode() & 0o7777;
    assert_eq!(fs::metadata(&b).unwrap().mode() & 0o7777, want);
    fs::remove_file(&reference).unwrap();
    assert_eq!(names(dir.path()), ["a.vtu", "b.csv"]);
}

#[test]
fn a_target_turned_into_a_link_while_writing_is_not_replaced() {
    let dir = tempfile::tempdir().unwrap();
    let (a, _b, files) = two_outputs(dir.path());
    let elsewhere = dir.path().join("elsewhere");
    fs::write(&elsewhere, "elsewhere").unwrap();
    // The fault hook runs before the renames: swap the first target for a link there.
    let mut swap = |s: Step| {
        if s == Step::Write(1) {
            fs::remove_file(&a)?;
            std::os::unix::fs::symlink(&elsewhere, &a)?;
        }
        Ok(())
    };
    let err = write_all_with(&files, &mut swap).unwrap_err();
    assert!(err.contains("symbolic link"), "{err}");
    assert!(fs::symlink_metadata(&a).unwrap().file_type().is_symlink());
    assert_eq!(fs::read_to_string(&elsewhere).unwrap(), "elsewhere");
    assert_eq!(names(dir.path()), ["a.vtu", "elsewhere"]);
}

#[test]
fn check_paths_sees_two_spellings_of_one_output() {
    let dir = tempfile::tempdir().unwrap();
    let one = dir.path().join("out.csv");
    let other = dir.path().join(".").join("out.csv");
    let err = check_paths(&[("--csv", &one), ("--svg", &other)], None).unwrap_err();
    assert!(
        err.starts_with("--svg: ") && err.contains("is also the --csv file"),
        "{err}"
    );
}

#[test]
fn check_paths_sees_a_hard_link_to_the_case_file() {
    let dir = tempfile::tempdir().unwrap();
    let case = dir.path().join("case.toml");
    fs::write(&case, "title = 'x'").unwrap();
    let link = dir.path().join("out.csv");
    fs::hard_link(&case, &link).unwrap();
    let err = check_paths(&[("--csv", &link)], Some(&case)).unwrap_err();
    assert!(err.contains("would overwrite the case file"), "{err}");
}

#[test]
fn check_paths_refuses_a_read_only_file_and_leaves_no_probe() {
    let dir = tempfile::tempdir().unwrap();
    let kept = dir.path().join("kept.vtu");
    fs::write(&kept, "keep").unwrap();
    fs::set_permissions(&kept, fs::Permissions::from_mode(0o444)).unwrap();
    let err = check_paths(&[("--vtk", &kept)], None).unwrap_err();
    assert!(
        err.starts_with("--vtk: ") && err.contains("read-only"),
        "{err}"
    );
    check_paths(&[("--vtk", &dir.path().join("new.vtu"))], None).unwrap();
    assert_eq!(names(dir.path()), ["kept.vtu"], "the probe file is gone");
}

#[test]
fn check_paths_refuses_a_path_naming_no_file() {
    let dir = tempfile::tempdir().unwrap();
    let err = check_paths(&[("--csv", &dir.path().join(".."))], None).unwrap_err();
    assert!(err.contains("names no file"), "{err}");
}
