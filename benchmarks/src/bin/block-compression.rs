//! Bonded block compression benchmark (see benchmarks/README.md).
fn main() {
    eprintln!("block-compression: not available yet");
    std::process::exit(2);
}
