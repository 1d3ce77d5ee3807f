//! The fuzz targets' bodies (fuzz/src/lib.rs) under the ordinary test
//! runner: every saved crash input under tests/robust_regressions/<target>/
//! is replayed, then a bounded number of pseudo-random inputs (mutations of
//! worked scenarios and equations, and plain random bytes) is run, so the
//! same code paths are exercised without cargo-fuzz and a nightly compiler.
//!
//! Set `ROBUST_FUZZ_ITERS` to change the number of random inputs per target
//! (default 2000 for the parsers, 300 for the network engine, 100 for the
//! spectrum finder).

use std::path::{Path, PathBuf};

/// xorshift64*: a small deterministic generator, so a failure reproduces.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }

    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
}

/// Bytes that often matter to a parser: delimiters, signs, digits, quotes,
/// escapes, non-ASCII and invalid UTF-8.
const INTERESTING: &[&[u8]] = &[
    b"(",
    b")",
    b"[",
    b"]",
    b"{",
    b"}",
    b",",
    b":",
    b"\"",
    b"\\",
    b"^",
    b"-",
    b"+",
    b"*",
    b"/",
    b"=",
    b"e",
    b"i",
    b"z",
    b"y",
    b"0",
    b"9",
    b".",
    b"1e308",
    b"1e400",
    b"-0",
    b"NaN",
    b"inf",
    b"Some(",
    b"None",
    b"\n",
    b"//",
    b"/*",
    b"\xff",
    b"\xc3",
    "\u{e9}".as_bytes(),
    b"99999999999999999999",
];

/// One random edit: insert, delete, replace or duplicate a piece.
fn mutate(rng: &mut Rng, input: &mut Vec<u8>) {
    let at = rng.below(input.len() + 1);
    match rng.below(5) {
        0 => {
            let piece = INTERESTING[rng.below(INTERESTING.len())];
            input.splice(at..at, piece.iter().copied());
        }
        1 if !input.is_empty() => {
            let end = (at + 1 + rng.below(8)).min(input.len());
            let at = at.min(end);
            input.drain(at..end);
        }
        2 if at < input.len() => input[at] = rng.next() as u8,
        3 if !input.is_empty() => {
            let from = rng.below(input.len());
            let end = (from + 1 + rng.below(16)).min(input.len());
            let piece = input[from..end].to_vec();
            input.splice(at..at, piece);
        }
        _ => input.truncate(at),
    }
}

fn regressions(target: &str) -> Vec<(PathBuf, Vec<u8>)> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/robust_regressions")
        .join(target);
    let mut out = Vec::new();
    if let Ok(entries) = std::fs::read_dir(&dir) {
        for e in entries.flatten() {
            let path = e.path();
            if path.is_file() {
                let bytes = std::fs::read(&path).expect("regression input is readable");
                out.push((path, bytes));
            }
        }
    }
    out.sort();
    out
}

fn iterations(default: usize) -> usize {
    std::env::var("ROBUST_FUZZ_ITERS")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(default)
}

/// Replays the regressions, then runs `iters` inputs: mutated seeds (1 to 8
/// edits each) and, one time in four, random bytes.
fn drive(target: &str, seeds: &[Vec<u8>], iters: usize, body: fn(&[u8])) {
    for (path, bytes) in regressions(target) {
        body(&bytes);
        eprintln!("{target}: regression {} passes", path.display());
    }
    let mut rng = Rng(0x9E37_79B9_7F4A_7C15 ^ target.len() as u64);
    for _ in 0..iters {
        let input = if rng.below(4) == 0 || seeds.is_empty() {
            (0..rng.below(256)).map(|_| rng.next() as u8).collect()
        } else {
            let mut input = seeds[rng.below(seeds.len())].clone();
            for _ in 0..1 + rng.below(8) {
                mutate(&mut rng, &mut input);
            }
            input
        };
        // A failing input is kept for tests/robust_regressions/ when
        // ROBUST_DUMP_DIR names a folder.
        let outcome = std::panic::catch_unwind(|| body(&input));
        if let Err(panic) = outcome {
            if let Some(dir) = std::env::var_os("ROBUST_DUMP_DIR") {
                let path = PathBuf::from(dir).join(format!("{target}-failing.bin"));
                let _ = std::fs::write(&path, &input);
                eprintln!("{target}: failing input written to {}", path.display());
            }
            std::panic::resume_unwind(panic);
        }
    }
    eprintln!("{target}: {iters} random inputs");
}

fn scenario_seeds() -> Vec<Vec<u8>> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenarios");
    let mut seeds: Vec<Vec<u8>> = std::fs::read_dir(dir)
        .expect("scenarios/ exists")
        .flatten()
        .filter(|e| e.path().extension().is_some_and(|x| x == "ron"))
        .map(|e| std::fs::read(e.path()).expect("scenario is readable"))
        .collect();
    seeds.sort();
    seeds
}

const EQUATIONS: &[&str] = &[
    "y^2 = z^3 - 1",
    "y^2 = z^2 + u z + 1",
    "y^3 + a z y + z^4 - 1 = 0",
    "y^2 = (z^2 - 1)/(z - 2)^3",
    "y^2 = 1e-6 z^8 + 1e6",
    "y^2 - (z + i)(z - i) = 0",
    "y^4 + z y^2 + 2^-3 z = 0",
    "0.5-2i",
];

#[test]
fn equation_parser_body() {
    let seeds: Vec<Vec<u8>> = EQUATIONS.iter().map(|s| s.as_bytes().to_vec()).collect();
    drive(
        "equation_parser",
        &seeds,
        iterations(2000),
        crate::bodies::equation_parser,
    );
}

#[test]
fn scenario_loader_body() {
    drive(
        "scenario_loader",
        &scenario_seeds(),
        iterations(2000),
        crate::bodies::scenario_loader,
    );
}

#[test]
fn network_engine_body() {
    drive(
        "network_engine",
        &[],
        iterations(300),
        crate::bodies::network_engine,
    );
}

#[test]
fn spectrum_finder_body() {
    drive(
        "spectrum_finder",
        &[],
        iterations(100),
        crate::bodies::spectrum_finder,
    );
}
