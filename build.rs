//! Records the git commit the binary is built from (`HOLECAST_GIT_COMMIT`, "unknown" outside a
//! git checkout) and whether tracked files differed from it (`HOLECAST_GIT_TREE`: clean,
//! modified or unknown), for the provenance written into every JSON output.

use std::process::Command;

fn git(args: &[&str]) -> Option<String> {
    let out = Command::new("git").args(args).output().ok()?;
    out.status
        .success()
        .then(|| String::from_utf8_lossy(&out.stdout).trim().to_string())
}

fn main() {
    let commit = git(&["rev-parse", "HEAD"])
        .filter(|c| c.len() == 40 && c.bytes().all(|b| b.is_ascii_hexdigit()))
        .unwrap_or_else(|| "unknown".into());
    let tree = if commit == "unknown" {
        "unknown"
    } else {
        match git(&["status", "--porcelain", "--untracked-files=no"]) {
            Some(s) if s.is_empty() => "clean",
            Some(_) => "modified",
            None => "unknown",
        }
    };
    // Run again when HEAD moves (checkout, commit) or the sources change.
    if let Some(dir) = git(&["rev-parse", "--git-dir"]) {
        println!("cargo:rerun-if-changed={dir}/HEAD");
    }
    if let Some(common) = git(&["rev-parse", "--git-common-dir"]) {
        println!("cargo:rerun-if-changed={common}/packed-refs");
        if let Some(branch) = git(&["symbolic-ref", "-q", "HEAD"]) {
            println!("cargo:rerun-if-changed={common}/{branch}");
        }
    }
    for path in ["build.rs", "Cargo.toml", "Cargo.lock", "src"] {
        println!("cargo:rerun-if-changed={path}");
    }
    println!("cargo:rustc-env=HOLECAST_GIT_COMMIT={commit}");
    println!("cargo:rustc-env=HOLECAST_GIT_TREE={tree}");
}
