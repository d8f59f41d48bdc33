//! Clean outputs (issue 8, item 5): a folder never mixes two runs, leftovers of killed runs are
//! removed, an interrupt removes the temporary files and exits with 130.

use std::path::{Path, PathBuf};

use assert_cmd::Command;
use serde_json::Value;

fn holecast() -> Command {
    Command::cargo_bin("holecast").unwrap()
}

fn channels(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("channels")
        .join(name)
}

fn spectrum(target: &Path, out: &Path) {
    holecast()
        .arg("spectrum")
        .arg(target)
        .args([
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--orders",
            "15:21:2",
        ])
        .arg("--out")
        .arg(out)
        .assert()
        .success();
}

fn names(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

#[test]
fn an_atom_after_a_molecule_leaves_no_holes_files_behind() {
    // Formerly: hydrogen run into a folder of an earlier triatomic run kept its holes.json.
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    spectrum(&channels("demo-linear-triatomic.json"), &out);
    assert!(out.join("holes.json").exists());
    spectrum(&channels("hydrogen.json"), &out);
    assert_eq!(
        names(&out),
        [
            "manifest-spectrum.json",
            "spectrum.csv",
            "spectrum.json",
            "spectrum.svg"
        ]
    );
    let manifest: Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("manifest-spectrum.json")).unwrap())
            .unwrap();
    assert_eq!(manifest["command"], "spectrum");
    assert_eq!(manifest["files"].as_array().unwrap().len(), 3);
    let v: Value =
        serde_json::from_str(&std::fs::read_to_string(out.join("spectrum.json")).unwrap()).unwrap();
    assert_eq!(v["target"]["name"], "hydrogen");
}

#[test]
fn a_folder_without_a_manifest_loses_only_the_commands_own_stale_files() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    std::fs::create_dir_all(&out).unwrap();
    std::fs::write(out.join("holes.json"), "{}").unwrap();
    std::fs::write(out.join("notes.txt"), "mine").unwrap();
    spectrum(&channels("hydrogen.json"), &out);
    let n = names(&out);
    assert!(!n.contains(&"holes.json".to_string()), "{n:?}");
    assert!(
        n.contains(&"notes.txt".to_string()),
        "a user's file stays: {n:?}"
    );
}

#[test]
fn holes_into_a_spectrum_folder_replaces_that_run_whole() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let tri = channels("demo-linear-triatomic.json");
    spectrum(&tri, &out);
    holecast()
        .arg("holes")
        .arg(&tri)
        .args([
            "--intensity",
            "2e14",
            "--wavelength",
            "800",
            "--orders",
            "15:21:2",
        ])
        .arg("--out")
        .arg(&out)
        .assert()
        .success();
    assert_eq!(
        names(&out),
        [
            "holes.csv",
            "holes.json",
            "holes.svg",
            "manifest-holes.json"
        ]
    );
}

#[cfg(unix)]
fn dead_pid() -> u32 {
    let mut child = std::process::Command::new("true").spawn().unwrap();
    let pid = child.id();
    child.wait().unwrap();
    pid
}

#[cfg(unix)]
#[test]
fn temporary_files_of_killed_runs_are_removed_by_the_next_run() {
    // Formerly: after kill -9, 21 of 40 runs left a .spectrum.json.tmp-PID behind for good.
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    std::fs::create_dir_all(&out).unwrap();
    let stale = out.join(format!(".spectrum.json.tmp-{}", dead_pid()));
    std::fs::write(&stale, vec![0u8; 1000]).unwrap();
    spectrum(&channels("hydrogen.json"), &out);
    assert!(!stale.exists());
    assert!(names(&out).iter().all(|n| !n.contains(".tmp-")));
}

#[cfg(unix)]
#[test]
fn an_interrupt_exits_130_and_leaves_nothing() {
    use std::time::{Duration, Instant};
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    for signal in ["-INT", "-TERM"] {
        // A run of several seconds (3001 energies × 16 families × 192 orientations).
        let mut child = std::process::Command::new(assert_cmd::cargo::cargo_bin("holecast"))
            .arg("spectrum")
            .arg(channels("demo-bent-triatomic.json"))
            .args(["--intensity", "1.5e14", "--wavelength", "800"])
            .args(["--orders", "10:40:0.01", "--quiet", "--out"])
            .arg(&out)
            .stderr(std::process::Stdio::piped())
            .spawn()
            .unwrap();
        std::thread::sleep(Duration::from_millis(1500));
        let sent = std::process::Command::new("kill")
            .arg(signal)
            .arg(child.id().to_string())
            .status()
            .unwrap();
        assert!(sent.success());
        let start = Instant::now();
        let status = child.wait().unwrap();
        assert!(start.elapsed() < Duration::from_secs(10));
        assert_eq!(status.code(), Some(130), "{signal}");
        assert!(
            !out.exists() || names(&out).is_empty(),
            "{signal}: {:?}",
            names(&out)
        );
    }
}
