//! Seeded corruption of input files, for the property tests that feed the
//! importers and the job reader random and mutated bytes, and for the longer
//! fuzz run in `benchmarks/` (see its README).
//!
//! The mutations are the ones that broke readers before: flipped and
//! replaced bytes, long digit runs (counts that overflow or claim exabytes),
//! long whitespace runs (quadratic scans), cut, repeated and deleted spans.

/// Fixed-seed xorshift64 (Marsaglia 2003, "Xorshift RNGs", J. Stat. Softw. 8(14)).
#[derive(Debug, Clone)]
pub struct Mutator(u64);

impl Mutator {
    /// A generator started from `seed` (zero is replaced, xorshift needs a set bit).
    pub fn new(seed: u64) -> Self {
        Mutator(seed.max(1))
    }

    /// The next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0
    }

    /// Uniform in `0..n` (`n` > 0).
    pub fn below(&mut self, n: usize) -> usize {
        (self.next_u64() % n.max(1) as u64) as usize
    }

    /// `len` random bytes.
    pub fn random_bytes(&mut self, len: usize) -> Vec<u8> {
        (0..len).map(|_| self.next_u64() as u8).collect()
    }

    /// A copy of `seed` with one to four random mutations.
    pub fn mutate(&mut self, seed: &[u8]) -> Vec<u8> {
        let mut b = seed.to_vec();
        for _ in 0..1 + self.below(4) {
            if b.is_empty() {
                b.push(b'0');
            }
            let i = self.below(b.len());
            match self.below(9) {
                0 => b[i] ^= 1 << self.below(8),
                1 => b[i] = self.next_u64() as u8,
                2 => b[i] = b"0123456789 \n-.e+"[self.below(16)],
                // A count that overflows every integer type, or a huge but valid one.
                3 => {
                    let digits: &[u8] = [&b"99999999999999999999999"[..], b"281474976710656", b"4294967295", b"0", b"-1"][self.below(5)];
                    b.splice(i..i, digits.iter().copied());
                }
                // A long run of blank space.
                4 => {
                    let run = 1 + self.below(200_000);
                    b.splice(i..i, std::iter::repeat_n(if self.below(2) == 0 { b' ' } else { b'\n' }, run));
                }
                5 => b.truncate(i),
                6 => {
                    let end = (i + 1 + self.below(64)).min(b.len());
                    b.drain(i..end);
                }
                7 => {
                    let end = (i + 1 + self.below(256)).min(b.len());
                    let span = b[i..end].to_vec();
                    b.splice(i..i, span);
                }
                // Replace a number-like token with an extreme value.
                _ => {
                    let start = b[..i].iter().rposition(|c| !c.is_ascii_alphanumeric() && *c != b'.').map_or(0, |p| p + 1);
                    let end = b[i..].iter().position(|c| !c.is_ascii_alphanumeric() && *c != b'.').map_or(b.len(), |p| i + p);
                    let value: &[u8] = [&b"nan"[..], b"inf", b"1e308", b"18446744073709551616", b"", b"\xff\xfe"][self.below(6)];
                    b.splice(start..end, value.iter().copied());
                }
            }
        }
        b
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_same_seed_gives_the_same_mutations() {
        let seed = b"$Nodes\n1 2 3\n$EndNodes\n";
        let (mut a, mut b) = (Mutator::new(7), Mutator::new(7));
        let runs: Vec<_> = (0..50).map(|_| a.mutate(seed)).collect();
        assert_eq!(runs, (0..50).map(|_| b.mutate(seed)).collect::<Vec<_>>());
        assert!(runs.iter().filter(|r| r.as_slice() != seed).count() > 40);
    }
}
