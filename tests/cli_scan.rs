//! `holecast scan`, `scan-merge`, `scan-slurm` (issue 13): shards merged are byte-identical to a
//! single run for N = 1, 2, 3, 7; a run stopped part-way (point budget, a killed process, a
//! partial last line) resumes to the identical result; failed points keep their place;
//! missing, duplicate and mismatched shards are refused by number; the archive holds the
//! documented arrays with the documented shapes.

use std::io::Read;
use std::path::{Path, PathBuf};

use assert_cmd::Command;

fn holecast() -> Command {
    Command::cargo_bin("holecast").unwrap()
}

fn flat_atom() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data/scan/flat-atom.json")
}

/// 4 intensities × 3 ionization potentials (the last one invalid: those points fail).
fn scan_args(cmd: &mut Command, out: &Path, orders: &str) {
    cmd.arg("--quiet")
        .arg("scan")
        .arg("--target")
        .arg(flat_atom())
        .args([
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--axis",
            "intensity=1e14:2e14:4",
            "--axis",
            "target.channels[X].ip_ev=14,16,-1",
            "--orders",
            orders,
        ])
        .arg("--out")
        .arg(out);
}

fn run_scan(out: &Path, extra: &[&str]) -> std::process::Output {
    let mut cmd = holecast();
    // `--orders X` among the extra arguments replaces the default grid.
    let mut orders = "11:35:2";
    let mut rest = Vec::new();
    let mut it = extra.iter();
    while let Some(a) = it.next() {
        if *a == "--orders" {
            orders = it.next().expect("a grid after --orders");
        } else {
            rest.push(*a);
        }
    }
    scan_args(&mut cmd, out, orders);
    cmd.args(rest);
    let o = cmd.output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    o
}

const OUTPUTS: [&str; 3] = ["scan.npz", "scan.csv", "scan.svg"];

fn assert_same_outputs(a: &Path, b: &Path) {
    for name in OUTPUTS {
        let x = std::fs::read(a.join(name)).unwrap();
        let y = std::fs::read(b.join(name)).unwrap();
        assert!(
            x == y,
            "{name} differs between {} and {}",
            a.display(),
            b.display()
        );
    }
}

#[test]
fn shards_merge_into_the_bytes_of_a_single_run() {
    let dir = tempfile::tempdir().unwrap();
    let single = dir.path().join("single");
    run_scan(&single, &[]);
    for n in [1usize, 2, 3, 7] {
        let shards = dir.path().join(format!("shards-{n}"));
        // Shards in reverse order: the order of work must not matter.
        for k in (1..=n).rev() {
            run_scan(&shards, &["--shard", &format!("{k}/{n}")]);
            assert!(shards.join(format!("shard-{k}-of-{n}.jsonl")).exists());
        }
        let merged = dir.path().join(format!("merged-{n}"));
        holecast()
            .args(["--quiet", "scan-merge", "--out"])
            .arg(&merged)
            .arg(&shards)
            .assert()
            .success();
        assert_same_outputs(&single, &merged);
    }
    // Failed points keep their place: 4 of 12 (ip_ev = -1), with their reason.
    let csv = std::fs::read_to_string(single.join("scan.csv")).unwrap();
    let failed = csv.lines().filter(|l| l.contains(",failed,")).count();
    assert_eq!(failed, 4 * 13, "4 failed points × 13 orders");
    assert!(csv.contains("ip_ev"), "the reason names the key");
}

#[test]
fn a_stopped_scan_resumes_to_the_identical_result() {
    let dir = tempfile::tempdir().unwrap();
    let single = dir.path().join("single");
    run_scan(&single, &[]);
    // Point budget: 5 points, then 4 more, then the rest.
    let resumed = dir.path().join("resumed");
    let o = run_scan(&resumed, &["--max-points", "5"]);
    assert!(String::from_utf8_lossy(&o.stdout).contains("resume"));
    assert!(!resumed.join("scan.npz").exists());
    run_scan(&resumed, &["--max-points", "4"]);
    assert!(!resumed.join("scan.npz").exists());
    // A killed run leaves a partial last line: it is dropped and recomputed.
    let log = resumed.join("points.jsonl");
    let mut text = std::fs::read_to_string(&log).unwrap();
    text.push_str("{\"index\": 11, \"values\": [2e14");
    std::fs::write(&log, text).unwrap();
    run_scan(&resumed, &[]);
    assert_same_outputs(&single, &resumed);
}

#[test]
fn a_killed_scan_resumes_to_the_identical_result() {
    // A real SIGKILL while points are being written (a bigger grid so that it runs long
    // enough to be killed), then a rerun.
    let dir = tempfile::tempdir().unwrap();
    let extra = ["--orders", "11:35:0.05"];
    let single = dir.path().join("single");
    run_scan(&single, &extra);
    let killed = dir.path().join("killed");
    let mut cmd = std::process::Command::new(assert_cmd::cargo::cargo_bin("holecast"));
    cmd.arg("--quiet")
        .arg("scan")
        .arg("--target")
        .arg(flat_atom())
        .args([
            "--intensity",
            "1.5e14",
            "--wavelength",
            "800",
            "--axis",
            "intensity=1e14:2e14:4",
            "--axis",
            "target.channels[X].ip_ev=14,16,-1",
            "--orders",
            "11:35:0.05",
            "--out",
        ])
        .arg(&killed);
    let mut child = cmd.spawn().unwrap();
    let log = killed.join("points.jsonl");
    let start = std::time::Instant::now();
    loop {
        let lines = std::fs::read_to_string(&log)
            .map(|t| t.lines().count())
            .unwrap_or(0);
        if lines >= 3 || start.elapsed().as_secs() > 60 {
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    child.kill().unwrap();
    let status = child.wait().unwrap();
    let finished_before = std::fs::read_to_string(&log).unwrap().lines().count() - 1;
    run_scan(&killed, &extra);
    assert_same_outputs(&single, &killed);
    // Either the kill came in time (some points were left) or the run had finished.
    assert!(!status.success() || finished_before == 12);
}

fn shard_logs(dir: &Path, n: usize, extra: &[&str]) -> PathBuf {
    let shards = dir.join(format!("s{n}"));
    for k in 1..=n {
        let mut args = vec!["--shard".to_string(), format!("{k}/{n}")];
        args.extend(extra.iter().map(|s| s.to_string()));
        let refs: Vec<&str> = args.iter().map(String::as_str).collect();
        run_scan(&shards, &refs);
    }
    shards
}

fn merge_error(out: &Path, files: &[PathBuf]) -> String {
    let o = holecast()
        .args(["--quiet", "scan-merge", "--out"])
        .arg(out)
        .args(files)
        .output()
        .unwrap();
    assert!(!o.status.success());
    String::from_utf8_lossy(&o.stderr).into_owned()
}

#[test]
fn merge_names_missing_duplicate_and_mismatched_shards() {
    let dir = tempfile::tempdir().unwrap();
    let shards = shard_logs(dir.path(), 3, &[]);
    let f = |k: usize| shards.join(format!("shard-{k}-of-3.jsonl"));
    let out = dir.path().join("out");
    let e = merge_error(&out, &[f(1), f(3)]);
    assert!(e.contains("missing shards 2 of 3"), "{e}");
    let copy = dir.path().join("copy-of-1.jsonl");
    std::fs::copy(f(1), &copy).unwrap();
    let e = merge_error(&out, &[f(1), f(2), f(3), copy]);
    assert!(e.contains("given twice: shard 1"), "{e}");
    // A shard of another scan (another grid): refused by its hash.
    let other = dir.path().join("other");
    run_scan(&other, &["--shard", "2/3", "--orders", "11:33:2"]);
    let e = merge_error(&out, &[f(1), other.join("shard-2-of-3.jsonl"), f(3)]);
    assert!(e.contains("belongs to scan") && e.contains("differ"), "{e}");
    // A shard of another split.
    let two = shard_logs(dir.path(), 2, &[]);
    let e = merge_error(&out, &[f(1), two.join("shard-2-of-2.jsonl")]);
    assert!(e.contains("same split"), "{e}");
    // An unfinished shard: the missing points by index.
    let partial = dir.path().join("partial");
    run_scan(&partial, &["--shard", "2/3", "--max-points", "1"]);
    let e = merge_error(&out, &[f(1), partial.join("shard-2-of-3.jsonl"), f(3)]);
    assert!(
        e.contains("points 4, 7, 10") && e.contains("in shards 2"),
        "{e}"
    );
    assert!(!out.join("scan.npz").exists());
}

#[test]
fn scan_files_refuse_unknown_keys_and_bad_axes_by_name() {
    let dir = tempfile::tempdir().unwrap();
    let write = |name: &str, text: &str| {
        let p = dir.path().join(name);
        std::fs::write(&p, text).unwrap();
        p
    };
    let target = flat_atom().display().to_string();
    let laser = r#"{"colours": [{"wavelength_nm": 800, "intensity_wcm2": 1e14}]}"#;
    let cases = [
        (
            format!(r#"{{"target": "{target}", "laser": {laser}, "axes": [], "combne": "zip"}}"#),
            "combne",
        ),
        (
            format!(
                r#"{{"target": "{target}", "laser": {laser}, "axes": [{{"parameter": "intensity", "range": {{"from": 1, "to": 2, "cout": 3}}}}]}}"#
            ),
            "cout",
        ),
        (
            format!(
                r#"{{"target": "{target}", "laser": {{"colours": [{{"wavelength_nm": 800, "intensity_wcm2": 1e14, "phase": 1}}]}}, "axes": []}}"#
            ),
            "phase",
        ),
        (
            format!(
                r#"{{"target": "{target}", "laser": {laser}, "axes": [{{"parameter": "target.channels[Y].ip_ev", "values": [1]}}]}}"#
            ),
            "labels there: X",
        ),
        (
            format!(
                r#"{{"target": "{target}", "laser": {laser}, "axes": [{{"parameter": "cep", "values": [0, 1]}}, {{"parameter": "intensity", "values": [1e14]}}], "combine": "zip"}}"#
            ),
            "equally long",
        ),
    ];
    for (k, (text, expected)) in cases.iter().enumerate() {
        let plan = write(&format!("bad-{k}.json"), text);
        let o = holecast()
            .args(["scan", "--plan"])
            .arg(&plan)
            .arg("--out")
            .arg(dir.path().join("o"))
            .output()
            .unwrap();
        assert!(!o.status.success());
        let e = String::from_utf8_lossy(&o.stderr);
        assert!(e.contains(expected), "case {k}: {e}");
    }
}

#[test]
fn the_example_scan_file_is_valid_and_the_slurm_scripts_name_every_shard() {
    let dir = tempfile::tempdir().unwrap();
    let plan = Path::new(env!("CARGO_MANIFEST_DIR")).join("scans/intensity-demo.json");
    let o = holecast()
        .args(["--quiet", "scan-slurm", "--plan"])
        .arg(&plan)
        .args(["--shards", "5", "--cpus-per-task", "2", "--out"])
        .arg(dir.path())
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let lines = String::from_utf8_lossy(&o.stdout).into_owned();
    assert!(lines.contains("sbatch --parsable"), "{lines}");
    assert!(
        lines.contains("--dependency=afterok:${array_id}"),
        "{lines}"
    );
    let array = std::fs::read_to_string(dir.path().join("slurm/scan-array.sbatch")).unwrap();
    assert!(array.contains("#SBATCH --array=1-5"));
    assert!(array.contains("intensity-demo.json"));
}

/// Reads `NAME.npy` from a `.npz` archive: its shape and its type string.
fn npy_entry(npz: &Path, name: &str) -> (Vec<u64>, String) {
    let file = std::fs::File::open(npz).unwrap();
    let mut zip = zip::ZipArchive::new(file).unwrap();
    let mut entry = zip.by_name(&format!("{name}.npy")).unwrap();
    let mut bytes = Vec::new();
    entry.read_to_end(&mut bytes).unwrap();
    let npy = npyz::NpyFile::new(&bytes[..]).unwrap();
    (npy.shape().to_vec(), npy.dtype().descr())
}

#[test]
fn the_archive_holds_the_documented_arrays() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("s");
    run_scan(&out, &[]);
    let npz = out.join("scan.npz");
    let grid = 13u64;
    for (name, shape) in [
        ("yield", vec![4, 3, grid]),
        ("power", vec![4, 3, grid]),
        ("phase_rad", vec![4, 3, grid]),
        ("row_status", vec![4, 3, grid]),
        ("pair_X_to_X_yield", vec![4, 3, grid]),
        ("family_X_to_X_short_hc0_yield", vec![4, 3, grid]),
        ("family_X_to_X_long_hc1_emission_time_fs", vec![4, 3, grid]),
        ("point_status", vec![4, 3]),
        ("omega_ev", vec![4, 3]),
        ("order", vec![grid]),
        ("axis0_values", vec![4]),
        ("axis1_values", vec![3]),
        ("axis0_unit", vec![]),
        ("dims", vec![3]),
        ("scan_hash", vec![]),
    ] {
        let (s, _) = npy_entry(&npz, name);
        assert_eq!(s, shape, "{name}");
    }
    assert_eq!(npy_entry(&npz, "yield").1, "'<f8'");
    assert!(npy_entry(&npz, "point_status").1.contains("<U"));
}
