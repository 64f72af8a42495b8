//! One wording for Drucker stability, shared by `olli material`, `olli
//! check` and `olli fit`: where stability ends in each test (with the
//! tensile state a compressive loss equals), and whether the stretches that
//! matter — the data of a fit, the estimated strains of a job — come near
//! it. A loss far outside those stretches is reported, not raised as an
//! alarm.

use olli_solver::material::stability::{tensile_equivalent, ModeStability};

/// Stretches that matter for a verdict, and what they are.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reach<'a> {
    /// What the stretches are, e.g. "the data" or "this job's estimated stretches".
    pub what: &'a str,
    /// Smallest and largest stretch of the mode.
    pub range: (f64, f64),
}

/// Where a loss of stability lies relative to the stretches that matter.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Concern {
    /// No loss in the checked range.
    Stable,
    /// Stability ends, but beyond the stretches that matter.
    Beyond,
    /// Stability ends within the stretches that matter (or none were given).
    Within,
}

/// The losses of `s` as `(stretch, "tension" | "compression")`.
fn losses(s: &ModeStability) -> Vec<(f64, &'static str)> {
    let mut out = Vec::new();
    if let Some(l) = s.lost_in_compression {
        out.push((l, "compression"));
    }
    if let Some(l) = s.lost_in_tension {
        out.push((l, "tension"));
    }
    out
}

/// Whether the losses of `s` fall within `reach`.
pub fn concern(s: &ModeStability, reach: Option<Reach>) -> Concern {
    let lost = losses(s);
    if lost.is_empty() {
        return Concern::Stable;
    }
    match reach {
        Some(r) if lost.iter().all(|&(l, _)| l < r.range.0 || l > r.range.1) => Concern::Beyond,
        _ => Concern::Within,
    }
}

/// One line on the stability of a mode, e.g. `stable from stretch 0.3512 to
/// 10; stability ends at stretch 0.3512 in compression (the state of
/// uniaxial tension at stretch 8.11), beyond the data (0.6 to 2.5)`.
pub fn verdict(s: &ModeStability, reach: Option<Reach>) -> String {
    let lost = losses(s);
    let lo = s.lost_in_compression.unwrap_or(s.checked.0);
    let hi = s.lost_in_tension.unwrap_or(s.checked.1);
    let mut text = format!("stable from stretch {} to {}", short(lo), short(hi));
    if lost.is_empty() {
        text.push_str(" (checked range");
        if s.stopped.is_some() {
            text.push_str("; not checked beyond: the response stops there");
        }
        text.push(')');
    }
    for (l, side) in &lost {
        text.push_str(&format!("; stability ends at stretch {} in {side}", short(*l)));
        if let Some((other, x)) = tensile_equivalent(s.mode, *l) {
            text.push_str(&format!(" (the state of {} tension at stretch {})", other.name(), short(x)));
        }
    }
    if let Some(r) = reach {
        let range = format!("{} ({} to {})", r.what, short(r.range.0), short(r.range.1));
        match concern(s, Some(r)) {
            Concern::Stable => text.push_str(&format!(", covering {range}")),
            Concern::Beyond => text.push_str(&format!(", beyond {range}")),
            Concern::Within => text.push_str(&format!(", WITHIN {range}")),
        }
    }
    text
}

/// A stretch with four significant digits.
fn short(x: f64) -> String {
    let digits = (3 - x.abs().log10().floor() as i32).clamp(0, 8) as usize;
    format!("{x:.digits$}")
}

#[cfg(test)]
mod tests {
    use super::*;
    use olli_solver::material::homogeneous::Mode;

    fn lost_in_compression(at: f64) -> ModeStability {
        ModeStability { mode: Mode::Equibiaxial, lost_in_tension: None, lost_in_compression: Some(at), checked: (at, 10.0), stopped: None }
    }

    // The case that raised an alarm before: a loss in equibiaxial
    // compression at 0.35 is uniaxial tension at 1/0.35² = 8.16 — far beyond
    // a part's strains.
    #[test]
    fn a_far_loss_is_located_not_alarmed() {
        let s = lost_in_compression(0.35);
        let reach = Reach { what: "the data", range: (0.6, 2.5) };
        assert_eq!(concern(&s, Some(reach)), Concern::Beyond);
        let text = verdict(&s, Some(reach));
        assert!(text.contains("stability ends at stretch 0.3500 in compression"), "{text}");
        assert!(text.contains("uniaxial tension at stretch 8.163"), "{text}");
        assert!(text.contains("beyond the data (0.6000 to 2.500)"), "{text}");
        assert_eq!(concern(&s, Some(Reach { what: "x", range: (0.3, 2.0) })), Concern::Within);
    }
}
