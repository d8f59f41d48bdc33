//! Mutation fuzzing of the input files, run as a user would run them (the real binary).
//!
//! The shipped target files (`channels/*.json`) and laser files (`lasers/*.json`) are mutated
//! with a fixed seed — a number replaced by an extreme or rescaled value, a key deleted or
//! added, a value of the wrong type, an array emptied or grown — and each mutant is run through
//! `check --format json` and `spectrum` (a short grid or the default one, with the work limits
//! scaled down so that every run stays short). The checks, from issue 8:
//! - no panic and no abort: every run exits with 0 or 1 (an error message), never a signal;
//! - no run over [`TIME_LIMIT`];
//! - a successful run writes no non-finite number: every spectrum row has an empty
//!   `non_finite_columns`, the metadata numbers are numbers, complete rows have an intensity.
//!
//! The corpus of past crashes (`tests/data/fuzz-corpus/{targets,lasers}/*.json`, each file
//! named after what broke) runs through the same checks first. `HOLECAST_FUZZ_CASES` sets the
//! number of mutants (default 60; the figures in the README come from longer runs).

use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use assert_cmd::Command;
use serde_json::Value;

/// Longest a single run may take (generous for a loaded two-core CI machine; the runs are
/// bounded by `--work-limit-factor` to well under a second of work per stage).
const TIME_LIMIT: Duration = Duration::from_secs(30);
const SEED: u64 = 0x0005_eed8_2024;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn files(dir: &Path) -> Vec<PathBuf> {
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .map(|d| {
            d.filter_map(|e| e.ok())
                .map(|e| e.path())
                .filter(|p| p.extension().is_some_and(|x| x == "json"))
                .collect()
        })
        .unwrap_or_default();
    v.sort();
    v
}

/// xorshift64* (Vigna 2016): a small deterministic generator, enough for choosing mutations.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_f491_4f6c_dd1d)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
}

/// Paths (as key/index lists) of every leaf and container of a JSON value.
fn paths(v: &Value, here: &mut Vec<Value>, out: &mut Vec<Vec<Value>>) {
    out.push(here.clone());
    match v {
        Value::Object(m) => {
            for (k, x) in m {
                here.push(Value::String(k.clone()));
                paths(x, here, out);
                here.pop();
            }
        }
        Value::Array(a) => {
            for (i, x) in a.iter().enumerate() {
                here.push(Value::from(i));
                paths(x, here, out);
                here.pop();
            }
        }
        _ => {}
    }
}

fn at<'a>(v: &'a mut Value, path: &[Value]) -> &'a mut Value {
    path.iter().fold(v, |v, k| match k {
        Value::String(s) => &mut v[s.as_str()],
        Value::Number(i) => &mut v[i.as_u64().unwrap() as usize],
        _ => unreachable!(),
    })
}

/// One random mutation of `doc`; returns a description.
fn mutate(doc: &mut Value, rng: &mut Rng) -> String {
    let mut all = Vec::new();
    paths(doc, &mut Vec::new(), &mut all);
    let numbers: Vec<&Vec<Value>> = all
        .iter()
        .filter(|p| at(&mut doc.clone(), p).is_number())
        .collect();
    let kind = rng.below(6);
    if (kind <= 2) && !numbers.is_empty() {
        let p = numbers[rng.below(numbers.len())].clone();
        let slot = at(doc, &p);
        let x = slot.as_f64().unwrap_or(1.0);
        let choices = [
            0.0,
            -1.0,
            -x,
            x * 1e3,
            x * 1e-3,
            x * 1e12,
            x * 1e-12,
            1e308,
            -1e308,
            5e-324,
            1e6,
            0.5,
            2.0,
            7.0,
            1e-9,
        ];
        let y = choices[rng.below(choices.len())];
        *slot = serde_json::Number::from_f64(y).map_or(Value::Null, Value::Number);
        return format!("{p:?} = {y:e}");
    }
    if all.len() < 2 {
        return "nothing left to mutate".into();
    }
    let p = all[1 + rng.below(all.len() - 1)].clone();
    match kind {
        3 => {
            // Delete a key or an element.
            if let Some((last, parent)) = p.split_last() {
                match (at(doc, parent), last) {
                    (Value::Object(m), Value::String(k)) => {
                        m.remove(k);
                    }
                    (Value::Array(a), Value::Number(i)) => {
                        a.remove(i.as_u64().unwrap() as usize);
                    }
                    _ => {}
                }
            }
            format!("{p:?} removed")
        }
        4 => {
            let slot = at(doc, &p);
            let choices = [
                Value::from("x"),
                Value::Bool(true),
                Value::Null,
                Value::Array(vec![]),
                serde_json::json!({}),
            ];
            *slot = choices[rng.below(choices.len())].clone();
            format!("{p:?} = wrong type")
        }
        _ => {
            // Grow or empty the nearest array.
            let slot = at(doc, &p);
            if let Value::Array(a) = slot {
                if rng.below(2) == 0 || a.is_empty() {
                    a.clear();
                    return format!("{p:?} emptied");
                }
                let first = a[0].clone();
                for _ in 0..(1 + rng.below(9)) {
                    a.push(first.clone());
                }
                format!("{p:?} grown")
            } else {
                *slot = serde_json::json!({"unknown_key": 1});
                format!("{p:?} = unknown key")
            }
        }
    }
}

/// The outcome counts of a campaign.
#[derive(Default, Debug)]
struct Tally {
    runs: usize,
    succeeded: usize,
    refused: usize,
    slowest: Duration,
    problems: Vec<String>,
}

fn numbers_are_numbers(v: &Value, keys: &[&str], what: &str, problems: &mut Vec<String>) {
    for k in keys {
        if !v[k].is_number() {
            problems.push(format!("{what}: metadata {k} is {:?}", v[k]));
        }
    }
}

/// Checks a successful spectrum folder.
fn check_outputs(dir: &Path, what: &str, problems: &mut Vec<String>) {
    let Ok(text) = std::fs::read_to_string(dir.join("spectrum.json")) else {
        problems.push(format!("{what}: no spectrum.json after success"));
        return;
    };
    let v: Value = match serde_json::from_str(&text) {
        Ok(v) => v,
        Err(e) => {
            problems.push(format!("{what}: spectrum.json is not JSON: {e}"));
            return;
        }
    };
    numbers_are_numbers(
        &v,
        &[
            "photon_ev",
            "up_ev",
            "keldysh",
            "peak_field_au",
            "field_duration_fs",
        ],
        what,
        problems,
    );
    if !v["warnings"].is_array() {
        problems.push(format!("{what}: no warnings list"));
    }
    for p in v["points"].as_array().into_iter().flatten() {
        if p["non_finite_columns"].as_str() != Some("") {
            problems.push(format!(
                "{what}: order {} has non-finite {}",
                p["order"], p["non_finite_columns"]
            ));
        }
        if p["status"] == "complete" && !p["intensity"].is_number() {
            problems.push(format!("{what}: complete row without intensity"));
        }
    }
    if !dir.join("manifest-spectrum.json").exists() {
        problems.push(format!("{what}: no manifest"));
    }
}

/// Runs one command and records what went wrong.
fn run(args: &[String], out: Option<&Path>, what: &str, tally: &mut Tally) {
    let start = Instant::now();
    let result = Command::cargo_bin("holecast")
        .unwrap()
        .args(args)
        .timeout(TIME_LIMIT)
        .output()
        .unwrap();
    let elapsed = start.elapsed();
    tally.runs += 1;
    tally.slowest = tally.slowest.max(elapsed);
    let stderr = String::from_utf8_lossy(&result.stderr);
    if elapsed >= TIME_LIMIT {
        tally.problems.push(format!(
            "{what}: over the time limit ({elapsed:?}): {args:?}"
        ));
        return;
    }
    if stderr.contains("panicked") {
        tally.problems.push(format!("{what}: panic: {stderr}"));
        return;
    }
    match result.status.code() {
        Some(0) => {
            tally.succeeded += 1;
            if let Some(dir) = out {
                check_outputs(dir, what, &mut tally.problems);
            } else {
                match serde_json::from_slice::<Value>(&result.stdout) {
                    Ok(v) => numbers_are_numbers(
                        &v,
                        &["photon_ev", "up_ev", "keldysh", "peak_field_au"],
                        what,
                        &mut tally.problems,
                    ),
                    Err(e) => tally
                        .problems
                        .push(format!("{what}: check output is not JSON: {e}")),
                }
            }
        }
        Some(1) => {
            tally.refused += 1;
            if !stderr.starts_with("error: ") {
                tally
                    .problems
                    .push(format!("{what}: exit 1 without an error message: {stderr}"));
            }
        }
        other => tally.problems.push(format!(
            "{what}: exit status {other:?} (signal or usage error): {stderr}"
        )),
    }
}

/// Runs `check` and `spectrum` for one target and laser file (either may be None: the
/// shorthand laser, or the hydrogen target).
fn exercise(target: &Path, laser: Option<&Path>, what: &str, variant: usize, tally: &mut Tally) {
    let dir = tempfile::tempdir().unwrap();
    let mut base: Vec<String> = vec![target.display().to_string()];
    match laser {
        Some(l) => base.extend(["--laser".into(), l.display().to_string()]),
        None => base.extend(
            ["--intensity", "1.5e14", "--wavelength", "800"]
                .iter()
                .map(|s| s.to_string()),
        ),
    }
    let mut check: Vec<String> = vec!["check".into()];
    check.extend(base.clone());
    check.extend(["--format".into(), "json".into()]);
    run(&check, None, what, tally);
    let out = dir.path().join("out");
    let mut spectrum: Vec<String> = vec!["--quiet".into(), "spectrum".into()];
    spectrum.extend(base);
    // Half the runs on a short explicit grid, half on the default grid; the work limits
    // scaled down keep every run short (a refusal is a valid outcome).
    if variant % 2 == 0 {
        spectrum.extend(["--orders".into(), "11:31:4".into()]);
    }
    spectrum.extend([
        "--work-limit-factor".into(),
        "0.05".into(),
        "--out".into(),
        out.display().to_string(),
    ]);
    run(&spectrum, Some(&out), what, tally);
}

#[test]
fn past_crashes_stay_fixed() {
    let corpus = root().join("tests/data/fuzz-corpus");
    let hydrogen = root().join("channels/hydrogen.json");
    let mut tally = Tally::default();
    let targets = files(&corpus.join("targets"));
    let lasers = files(&corpus.join("lasers"));
    assert!(!targets.is_empty() && !lasers.is_empty(), "corpus missing");
    for (i, t) in targets.iter().enumerate() {
        exercise(t, None, &t.display().to_string(), i, &mut tally);
    }
    for (i, l) in lasers.iter().enumerate() {
        exercise(&hydrogen, Some(l), &l.display().to_string(), i, &mut tally);
    }
    report(&tally);
}

#[test]
fn mutated_inputs_never_panic_hang_or_write_non_finite_numbers() {
    let cases: usize = std::env::var("HOLECAST_FUZZ_CASES")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(60);
    let targets = files(&root().join("channels"));
    let lasers = files(&root().join("lasers"));
    assert!(targets.len() >= 5 && lasers.len() >= 3);
    let hydrogen = root().join("channels/hydrogen.json");
    let work = tempfile::tempdir().unwrap();
    let mut rng = Rng(SEED);
    let mut tally = Tally::default();
    for case in 0..cases {
        let mutate_target = rng.below(2) == 0;
        let source = if mutate_target {
            targets[rng.below(targets.len())].clone()
        } else {
            lasers[rng.below(lasers.len())].clone()
        };
        let mut doc: Value =
            serde_json::from_str(&std::fs::read_to_string(&source).unwrap()).unwrap();
        let mut changes = Vec::new();
        for _ in 0..(1 + rng.below(2)) {
            changes.push(mutate(&mut doc, &mut rng));
        }
        let file = work.path().join(format!("case{case}.json"));
        std::fs::write(&file, serde_json::to_string_pretty(&doc).unwrap()).unwrap();
        let what = format!(
            "case {case} ({} {})",
            source.file_name().unwrap().to_string_lossy(),
            changes.join("; ")
        );
        if mutate_target {
            exercise(&file, None, &what, case, &mut tally);
        } else {
            exercise(&hydrogen, Some(&file), &what, case, &mut tally);
        }
    }
    eprintln!(
        "fuzzing: {cases} mutants, {} runs: {} succeeded, {} refused with a message, slowest \
         {:?}, problems {}",
        tally.runs,
        tally.succeeded,
        tally.refused,
        tally.slowest,
        tally.problems.len()
    );
    report(&tally);
}

/// Fails with the problems, at most three per mutant, so that a campaign's report stays short.
fn report(tally: &Tally) {
    let mut shown: Vec<&String> = Vec::new();
    let mut per_case: std::collections::BTreeMap<&str, usize> = std::collections::BTreeMap::new();
    for p in &tally.problems {
        let case = p.split(')').next().unwrap_or(p);
        let n = per_case.entry(case).or_insert(0);
        *n += 1;
        if *n <= 3 {
            shown.push(p);
        }
    }
    assert!(
        tally.problems.is_empty(),
        "{} problems in {} mutants:\n{}",
        tally.problems.len(),
        per_case.len(),
        shown
            .iter()
            .map(|s| s.chars().take(400).collect::<String>())
            .collect::<Vec<_>>()
            .join("\n")
    );
}
