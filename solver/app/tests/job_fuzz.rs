//! Property test of the job reader: mutated and random job files give a
//! located error or a job, never a panic, an abort or a long stall. Fixed
//! seed; the longer hunt is `OLLI_FUZZ_ROUNDS=20000 cargo test --release -p
//! olli-app --test job_fuzz` (benchmarks/README.md).

use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

use olli_app::job::load_str;
use olli_mesh::fuzz::Mutator;

fn example(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../examples").join(name)
}

#[test]
fn mutated_job_files_never_panic_abort_or_stall() {
    let rounds: usize = std::env::var("OLLI_FUZZ_ROUNDS").ok().and_then(|v| v.parse().ok()).unwrap_or(60);
    let mut rng = Mutator::new(0x5DEE_CE66_D1CE_4E5B);
    let (mut rejected, mut accepted) = (0usize, 0usize);
    let mut slowest = (Duration::ZERO, String::new());
    for name in ["seal.toml", "bush.toml", "mount.toml", "radial-seal.toml"] {
        let path = example(name);
        let seed = std::fs::read(&path).unwrap();
        assert!(load_str(&path, std::str::from_utf8(&seed).unwrap()).is_ok(), "{name}: the seed must load");
        for round in 0..rounds {
            let len = rng.below(300);
            let bytes = if round % 10 == 9 { rng.random_bytes(len) } else { rng.mutate(&seed) };
            // The job reader takes text: invalid UTF-8 stops at reading (tested in diagnostics).
            let text = String::from_utf8_lossy(&bytes);
            let start = Instant::now();
            let outcome = std::panic::catch_unwind(|| load_str(&path, &text));
            let took = start.elapsed();
            if took > slowest.0 {
                slowest = (took, text.chars().take(2000).collect());
            }
            match outcome {
                Ok(Ok(_)) => accepted += 1,
                Ok(Err(e)) => {
                    rejected += 1;
                    assert!(e.file == path, "the error names the job file: {e}");
                }
                Err(_) => {
                    let saved = std::env::temp_dir().join(format!("olli_job_crash_{round}_{name}"));
                    std::fs::write(&saved, &bytes).unwrap();
                    panic!("{name}: the job reader panicked (input saved as {})", saved.display());
                }
            }
        }
    }
    assert!(rejected > rounds && accepted > 0, "rejected {rejected}, accepted {accepted}");
    // Reading and checking an example job takes milliseconds; a generous bound (common practice).
    assert!(slowest.0 < Duration::from_secs(3), "slowest job took {:?}:\n{}", slowest.0, slowest.1);
}
