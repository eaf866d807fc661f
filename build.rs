//! Sets TERN_BUILD, the build id a report prints beside the version: the
//! short commit of the checkout, or "unknown" outside a git checkout (a
//! source archive).

use std::process::Command;

fn git(args: &[&str]) -> Option<String> {
    let out = Command::new("git").args(args).output().ok()?;
    let s = String::from_utf8_lossy(&out.stdout).trim().to_string();
    (out.status.success() && !s.is_empty()).then_some(s)
}

fn main() {
    println!("cargo:rerun-if-changed=build.rs");
    // Rerun when the commit moves: HEAD, the branch it points to, packed refs.
    if git(&["rev-parse", "--git-dir"]).is_some() {
        let branch = git(&["symbolic-ref", "-q", "HEAD"]);
        let names = ["HEAD", "packed-refs"].into_iter().chain(branch.as_deref());
        // Only paths that exist: a missing one would rerun every build.
        for path in names.filter_map(|n| git(&["rev-parse", "--git-path", n])) {
            if std::path::Path::new(&path).exists() {
                println!("cargo:rerun-if-changed={path}");
            }
        }
    }
    let build = git(&["rev-parse", "--short=10", "HEAD"]).unwrap_or_else(|| "unknown".to_string());
    println!("cargo:rustc-env=TERN_BUILD={build}");
}
